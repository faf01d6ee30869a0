package report

import (
	"fmt"
	"io"
	"math"
	"text/tabwriter"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
)

// MeshStats returns the statistics of m as label–value rows, lengths
// labelled by unit (e.g. "um"; empty when the unit is not known).
func MeshStats(m *mesh.Mesh, unit string) [][2]string {
	st := m.Stats()
	l := func(power int) string {
		switch {
		case unit == "":
			return ""
		case power == 2:
			return " " + unit + "²"
		case power == 3:
			return " " + unit + "³"
		}
		return " " + unit
	}
	// Coordinates below 1e-12 of the mesh's size are rounding noise of a
	// centred mesh: print them as 0.
	scale := 1e-12 * r3.Norm(r3.Sub(st.Max, st.Min))
	c := func(x float64) float64 {
		if math.Abs(x) < scale {
			return 0
		}
		return x
	}
	vec := func(v r3.Vec) string { return fmt.Sprintf("(%.6g, %.6g, %.6g)", c(v.X), c(v.Y), c(v.Z)) }
	return [][2]string{
		{"mesh", m.Name},
		{"vertices", fmt.Sprint(st.Vertices)},
		{"triangles", fmt.Sprint(st.Triangles)},
		{"edges", fmt.Sprintf("%d (unknowns of a closed mesh)", st.Edges)},
		{"area", fmt.Sprintf("%.6g%s", st.Area, l(2))},
		{"volume", fmt.Sprintf("%.6g%s", st.Volume, l(3))},
		{"equivalent radius", fmt.Sprintf("%.6g%s (ball of the same volume)", m.EquivalentRadius(), l(1))},
		{"centroid", vec(st.Centroid) + l(1)},
		{"bounding box", vec(st.Min) + " to " + vec(st.Max) + l(1)},
		{"edge length", fmt.Sprintf("min %.4g, mean %.4g, max %.4g%s", st.MinEdge, st.MeanEdge, st.MaxEdge, l(1))},
	}
}

// WriteRows prints label–value rows as two aligned columns.
func WriteRows(w io.Writer, rows [][2]string) error {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	for _, r := range rows {
		fmt.Fprintf(tw, "%s\t%s\n", r[0], r[1])
	}
	return tw.Flush()
}
