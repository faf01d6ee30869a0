package scatter

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// TestSampledOffAxis checks the sampled path (sampled.go) where the force
// has a transverse part and the torque does not vanish: two 320-triangle
// spheres whose centres are 0.8 radii apart sideways, swept along the
// axis over gaps of about 1 to 3 radii, the basis built from four
// placements spread over the sweep. The sampled approximation's derivative
// is that of an interpolation in the bases, so it is right only as far as
// the bases also span the blocks of the body moved sideways or turned;
// every gradient component (translations and turns) must stay within a
// fifth of the accuracy of the dense one, relative to the size of the
// force (the criterion of TestBasisIntegrand). Points between the
// references must take the sampled path.
func TestSampledOffAxis(t *testing.T) {
	const accuracy = 1e-3
	sys, err := newSystem(pairScene(t, 4, 4), 1, 0, nil)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	at := func(z float64) placement {
		return placement{offset: r3.Vec{X: 0.8, Z: z}, centre: r3.Vec{X: 0.8, Z: 4 + z}}
	}
	refs := []placement{at(-1), at(-1.0 / 3), at(1.0 / 3), at(1)}
	for _, kappa := range []float64{0.05, 0.5, 2} {
		sf, err := sys.factorSelf(ctx, kappa)
		if err != nil {
			t.Fatal(err)
		}
		sys.compress = newCompression(Settings{Accuracy: accuracy})
		if sf.basis, err = sys.buildCrossBasis(ctx, sf, refs); err != nil || sf.basis == nil || sf.basis.sampled == nil {
			t.Fatalf("κ=%g: no sampled basis (error %v)", kappa, err)
		}
		for _, z := range []float64{0, 2.0 / 3} {
			pl := at(z)
			comp, err := sys.evaluate(ctx, sf, pl, true)
			if err != nil {
				t.Fatal(err)
			}
			dsys := *sys
			dsys.compress = compression{}
			dense, err := dsys.evaluate(ctx, sf, pl, true)
			if err != nil {
				t.Fatal(err)
			}
			if comp.ranks[0].Sampled != 1 {
				t.Errorf("κ=%g, offset %.2g: ranks %+v, want the sampled path", kappa, z, comp.ranks)
			}
			size := math.Hypot(dense.grad[0], dense.grad[2])
			worst := 0.0
			for i := range comp.grad {
				worst = math.Max(worst, math.Abs(comp.grad[i]-dense.grad[i])/size)
			}
			rel := math.Abs(comp.logDet/dense.logDet - 1)
			t.Logf("κ=%g, offset %.2g: transverse/axial %.3g, integrand error %.2g, worst gradient error %.2g", kappa, z, dense.grad[0]/dense.grad[2], rel, worst)
			if rel > accuracy/5 || worst > accuracy/5 {
				t.Errorf("κ=%g, offset %.2g: integrand error %.2g, gradient %v against dense %v (error %.2g of the force)", kappa, z, rel, comp.grad, dense.grad, worst)
			}
		}
	}
}
