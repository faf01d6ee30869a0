package bem

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
)

// TestCrossGradientKFiniteDifference checks the analytic derivatives of
// Σ H_ab K_ab under translation and rotation of the second body against
// central differences of the assembled K block (step 1e-4, truncation
// ~1e-8), with one fixed product rule (collapsed 6×6) on both sides as in
// TestCrossGradientFiniteDifference. Tolerance 1e-6 of the largest component.
func TestCrossGradientKFiniteDifference(t *testing.T) {
	ma, err := mesh.SphereLevel(1, 2)
	if err != nil {
		t.Fatal(err)
	}
	box, err := mesh.Box(r3.Vec{X: 1.2, Y: 0.9, Z: 0.7}, 0.7)
	if err != nil {
		t.Fatal(err)
	}
	mb := box.Rotate(r3.Vec{X: 1, Y: 1}, 0.4, r3.Vec{}).Translate(r3.Vec{X: 0.3, Y: -0.2, Z: 2.2})
	a, b := surfaceOf(t, ma), surfaceOf(t, mb)
	rng := rand.New(rand.NewPCG(5, 6))
	h := mat.NewDense(a.Len(), b.Len(), nil)
	for i := 0; i < a.Len(); i++ {
		for j := 0; j < b.Len(); j++ {
			h.Set(i, j, rng.NormFloat64())
		}
	}
	centre := r3.Vec{X: 0.1, Y: 0.3, Z: 2.0}
	ctx := context.Background()
	for _, kappa := range []float64{0.05, 1.5} {
		op, _ := NewKFIE(kappa)
		op.Quad = &Quadrature{Near: 0, Far: []float64{0, 0, 0, 0}, Decay: []float64{0, 0, 0, 0}}
		as := Assembler{}
		got, err := as.CrossGradientK(ctx, h, op, a, b, centre)
		if err != nil {
			t.Fatal(err)
		}
		contract := func(m *mesh.Mesh) float64 {
			blk := mat.NewDense(a.Len(), b.Len(), nil)
			if err := as.Cross(ctx, blk, op, a, surfaceOf(t, m)); err != nil {
				t.Fatal(err)
			}
			return mat.Sum(mulElem(blk, h))
		}
		const eps = 1e-4
		var fdT, fdR [3]float64
		for i, ax := range []r3.Vec{{X: 1}, {Y: 1}, {Z: 1}} {
			fdT[i] = (contract(mb.Translate(r3.Scale(eps, ax))) - contract(mb.Translate(r3.Scale(-eps, ax)))) / (2 * eps)
			fdR[i] = (contract(mb.Rotate(ax, eps, centre)) - contract(mb.Rotate(ax, -eps, centre))) / (2 * eps)
		}
		ft := r3.Vec{X: fdT[0], Y: fdT[1], Z: fdT[2]}
		fr := r3.Vec{X: fdR[0], Y: fdR[1], Z: fdR[2]}
		scale := math.Max(r3.Norm(ft), r3.Norm(fr))
		if d := r3.Norm(r3.Sub(got.Translation, ft)); d > 1e-6*scale {
			t.Errorf("κ=%g translation: analytic %v, finite difference %v", kappa, got.Translation, ft)
		}
		if d := r3.Norm(r3.Sub(got.Rotation, fr)); d > 1e-6*scale {
			t.Errorf("κ=%g rotation: analytic %v, finite difference %v", kappa, got.Rotation, fr)
		}
	}
}
