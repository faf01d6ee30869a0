//go:build long

package validate

import (
	"context"
	"math"
	"testing"
	"time"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/validate/multipole"
)

// TestSpherePlaneVeryNear (long suite) takes the sphere to d/R = 0.05 over
// the substrate with a graded mesh (h = 0.4 d at the gap, 0.3 R far).
//
// Against the independent multipole solution: within 1.5 %. The measured
// mesh error at the same h/d and d/R = 0.1 is 0.8 % (flat triangles inside
// the sphere lengthen the gap; DEVELOPERS.md), and h²/(8R) shrinks relative
// to d with h.
//
// Against the derivative expansion E/E_PFA = 1 + θ d/R, θ = 1/3 - 20/π²
// (Bimonte, Emig, Jaffe & Kardar 2012): E/E_PFA must lie between the linear
// law and 1 — the next terms (of order (d/R)^(3/2) and x² ln x) are
// positive here — and the secant slope (E/E_PFA - 1)/(d/R) must lie within
// 0.5 of θ ≈ -1.69: the multipole reference gives -1.26 at d/R = 0.05
// (measured), the mesh error of about 1 % moving it by -0.2.
func TestSpherePlaneVeryNear(t *testing.T) {
	const R, d = 1.0, 0.05
	m := gradedSphereOverPlane(t, R, d, 0.4*d, 0.3)
	start := time.Now()
	pts, err := scatter.Energies(context.Background(), []scatter.Body{{Name: "sphere", Mesh: m}},
		scatter.Sweep{Body: 0, Direction: r3.Vec{Z: -1}, Offsets: []r3.Vec{{}}},
		scatter.Settings{Accuracy: 3e-3, Substrate: &scatter.Plane{Normal: r3.Vec{Z: 1}}})
	if err != nil {
		t.Fatal(err)
	}
	took := time.Since(start)
	ref, err := multipole.Energy(context.Background(), multipole.Config{Field: multipole.Electromagnetic, Geometry: multipole.SpherePlane, R1: R, L: R + d, Tol: 1e-5})
	if err != nil {
		t.Fatal(err)
	}
	e := pts[0].Energy
	ratio := e / SpherePlanePFA(R, d)
	lin := 1 + DerivativeExpansionSlope*d
	t.Logf("d/R=%g (%d triangles, %d frequencies, %v): E = %.6g ± %.2g, multipole %.6g (ratio %.4f); E/E_PFA = %.4f, multipole %.4f, linear law %.4f",
		d, len(m.Triangles), len(pts[0].Samples), took.Round(time.Second), e, pts[0].EnergyError, ref.Energy, e/ref.Energy, ratio, ref.Energy/SpherePlanePFA(R, d), lin)
	if dev := math.Abs(e/ref.Energy - 1); dev > 0.015 {
		t.Errorf("%.3g from the multipole energy, want within 1.5 %%", dev)
	}
	if !(ratio > lin && ratio < 1) {
		t.Errorf("E/E_PFA = %.4f not between the linear law %.4f and 1", ratio, lin)
	}
	if s := (ratio - 1) / d; math.Abs(s-DerivativeExpansionSlope) > 0.5 {
		t.Errorf("secant slope %.3f, published slope %.3f: want within 0.5", s, DerivativeExpansionSlope)
	}
}
