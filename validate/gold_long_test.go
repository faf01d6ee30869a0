//go:build long

package validate

import (
	"context"
	"math"
	"testing"
	"time"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/scatter/material"
)

// Gold bodies against the Lifshitz PFA (long suite). Gold is the Drude model
// with ħω_p = 9 eV, ħγ = 35 meV (δ = c/ω_p = 22 nm); lengths are in µm.
// The PFA baseline of a run with materials uses the Lifshitz energy per
// area of the facing materials (Lifshitz 1956), so E/E_PFA carries only the
// geometric correction, which vanishes as d/R → 0 (Derjaguin 1934) and
// which, at these gaps (d ≥ 9δ), hardly depends on the material. The checks,
// at d/R = 0.4 and 0.2 on graded meshes (h = d/2 at the gap, 0.4 R far):
//   - gold attracts, less than perfect conductors on the same mesh;
//   - E/E_PFA of gold (Lifshitz law) is within 0.03 of E/E_PFA of perfect
//     conductors (Casimir's law) on the same mesh — measured 0.005 and 0.007
//     at d/R = 0.4; the tolerance leaves room for the different weight of
//     the near and far parts of the surface in the two frequency ranges;
//   - |1 - E/E_PFA| of gold shrinks as d/R falls.

// goldAgainstPerfect runs the scene with every body gold and with every body
// a perfect conductor, and returns both E/E_PFA ratios and energies.
func goldAgainstPerfect(t *testing.T, bodies []scatter.Body, sweep scatter.Sweep, plane *scatter.Plane) (rGold, rPerfect, eGold, ePerfect float64) {
	t.Helper()
	gold, err := material.Named("gold-drude")
	if err != nil {
		t.Fatal(err)
	}
	run := func(m material.Model) scatter.Point {
		bs := append([]scatter.Body(nil), bodies...)
		for i := range bs {
			bs[i].Material = m
		}
		pts, err := scatter.Energies(context.Background(), bs, sweep, scatter.Settings{Accuracy: 3e-3, Substrate: plane, Length: 1e-6})
		if err != nil {
			t.Fatal(err)
		}
		return pts[0]
	}
	g, p := run(gold), run(nil)
	return g.Energy / g.PFA.Mean, p.Energy / p.PFA.Mean, g.Energy, p.Energy
}

func checkGold(t *testing.T, what string, gaps []float64, scene func(d float64) ([]scatter.Body, scatter.Sweep, *scatter.Plane)) {
	var dev []float64
	for _, d := range gaps {
		bodies, sweep, plane := scene(d)
		start := time.Now()
		rg, rp, eg, ep := goldAgainstPerfect(t, bodies, sweep, plane)
		t.Logf("%s, d/R=%g (%d triangles per body, %v): gold E = %.5g, E/E_PFA = %.4f; perfect E = %.5g, E/E_PFA = %.4f",
			what, d, len(bodies[0].Mesh.Triangles), time.Since(start).Round(time.Second), eg, rg, ep, rp)
		if !(eg < 0 && eg > ep) {
			t.Errorf("%s, d/R=%g: gold E = %.5g, perfect %.5g: want an attraction weaker than the perfect one", what, d, eg, ep)
		}
		if math.Abs(rg-rp) > 0.03 {
			t.Errorf("%s, d/R=%g: E/E_PFA %.4f for gold, %.4f for perfect conductors: want within 0.03", what, d, rg, rp)
		}
		dev = append(dev, math.Abs(1-rg))
	}
	for i := 1; i < len(dev); i++ {
		if !(dev[i] < dev[i-1]) {
			t.Errorf("%s: |1 - E/E_PFA| = %.4f at d/R = %g, %.4f at %g: want it to shrink as d/R falls", what, dev[i], gaps[i], dev[i-1], gaps[i-1])
		}
	}
}

// TestGoldSphereOverSubstrate: a gold sphere of radius 1 µm over the
// perfectly conducting substrate.
func TestGoldSphereOverSubstrate(t *testing.T) {
	checkGold(t, "gold sphere over the substrate", []float64{0.4, 0.2}, func(d float64) ([]scatter.Body, scatter.Sweep, *scatter.Plane) {
		m := gradedSphereOverPlane(t, 1, d, d/2, 0.4)
		return []scatter.Body{{Name: "sphere", Mesh: m}}, scatter.Sweep{Body: 0, Direction: r3.Vec{Z: -1}, Offsets: []r3.Vec{{}}},
			&scatter.Plane{Normal: r3.Vec{Z: 1}}
	})
}

// TestGoldSpheres: two gold spheres of radius 1 µm, each meshed finely
// where it faces the other (the lower one the mirror image of the upper).
// For two spheres the PFA is a poorer estimate than over a plane at the same
// d/R (the effective radius is R/2): E/E_PFA is about 0.5 at d/R = 0.4.
func TestGoldSpheres(t *testing.T) {
	checkGold(t, "two gold spheres", []float64{0.4, 0.2}, func(d float64) ([]scatter.Body, scatter.Sweep, *scatter.Plane) {
		up := gradedSphereOverPlane(t, 1, d/2, d/2, 0.4)
		down := up.Mirror(r3.Vec{}, r3.Vec{Z: 1})
		return []scatter.Body{{Name: "lower", Mesh: down}, {Name: "upper", Mesh: up}},
			scatter.Sweep{Body: 1, Direction: r3.Vec{Z: -1}, Offsets: []r3.Vec{{}}}, nil
	})
}
