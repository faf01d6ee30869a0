//go:build long

package validate

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
	"github.com/fluctus/fluctus/scatter"
)

// TestPlateOverSubstrate (long suite) checks a square plate (side a = 1,
// thickness 0.25) parallel to the substrate at gaps d = 0.2 and 0.1. Its energy per facing area and its pressure tend to Casimir's
// -π²/(720 d³) and -π²/(240 d⁴) (Casimir 1948) as d/a falls, the edges
// adding a correction of order d/a; that the force scales as area/d⁴ is a
// fact of the trade. Check: both ratios to the parallel-plate laws exceed 1
// by an amount that shrinks with d/a, and their straight-line extrapolation
// from the two smallest gaps to d/a = 0 is within 5 % of 1 (tolerance: the
// O((d/a)²) remainder of the edge terms, about c₂ d₁d₂ for the two gaps, and
// the mesh error, h = d/2 at the facing side).
func TestPlateOverSubstrate(t *testing.T) {
	const a, th = 1.0, 0.25
	plane := &scatter.Plane{Normal: r3.Vec{Z: 1}}
	gaps := []float64{0.2, 0.1}
	var re, rf []float64
	for _, d := range gaps {
		zc := d + th/2
		near, far := d/2, 0.25
		size := func(p r3.Vec) float64 { return math.Min(far, near+0.5*(p.Z+zc-d)) }
		m, err := mesh.GradedPlate(a, a, th, mesh.Grading{Near: near, Far: far}, size)
		if err != nil {
			t.Fatal(err)
		}
		m = m.Translate(r3.Vec{Z: zc})
		pts, err := scatter.Energies(context.Background(), []scatter.Body{{Name: "plate", Mesh: m}},
			scatter.Sweep{Body: 0, Direction: r3.Vec{Z: -1}, Offsets: []r3.Vec{{}}, Centre: r3.Vec{Z: zc}},
			scatter.Settings{Accuracy: 1e-3, Forces: true, Substrate: plane})
		if err != nil {
			t.Fatal(err)
		}
		p := pts[0]
		re = append(re, p.Energy/(a*a*PlateEnergyPerArea(d)))
		rf = append(rf, p.Force.Z/(a*a*PlatePressure(d)))
		t.Logf("d/a=%g (%d triangles): E/(A e) = %.4f, F/(A P) = %.4f", d, len(m.Triangles), re[len(re)-1], rf[len(rf)-1])
	}
	n := len(gaps)
	for _, r := range [][]float64{re, rf} {
		for i := 1; i < n; i++ {
			if !(r[i-1] > r[i] && r[i] > 1) {
				t.Errorf("ratios %.4f (d/a=%g), %.4f (d/a=%g): want above 1 and falling with d/a", r[i-1], gaps[i-1], r[i], gaps[i])
			}
		}
		ext := r[n-1] - (r[n-2]-r[n-1])/(gaps[n-2]-gaps[n-1])*gaps[n-1]
		t.Logf("extrapolated to d/a = 0: %.4f", ext)
		if math.Abs(ext-1) > 0.05 {
			t.Errorf("extrapolated ratio %.4f, want 1 within 5 %%", ext)
		}
	}
}
