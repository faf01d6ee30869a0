package scatter

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// TestPlaneDirect compares both substrate routes — one factorisation of M_P
// (ln det M_P - ln det M) and the whitened delta form — with
// ln det(I - L^-1 C L^-T), C = M(body, image), computed here with gonum's
// dense Cholesky and triangular solves, for a sphere near the plane
// (integrand about 0.4) and far from it (about 3e-4). Tolerance for the
// direct route: 1e-9 relative near; far, an absolute 1e-11, the rounding
// floor of the difference of two log-determinants (measured 1.5e-12 on this
// mesh and 4e-13 on a 480-unknown one, where the delta form keeps 1e-15 of
// the value — why evaluatePlane takes the whitened route far from the
// plane).
func TestPlaneDirect(t *testing.T) {
	cases := []struct {
		name    string
		height  float64 // centre above the plane, sphere radius 1
		kappa   float64
		rel, ab float64
		direct  bool // the route evaluatePlane takes
	}{
		{"near", 1.3, 1.5, 1e-9, 0, true},
		{"far", 12, 0.08, 0, 1e-11, false},
	}
	for _, c := range cases {
		ball := sphere(t, 2).Translate(r3.Vec{Z: c.height})
		sys, err := newSystem([]Body{{Name: "ball", Mesh: ball}}, 0, 0, floor)
		if err != nil {
			t.Fatal(err)
		}
		ctx := context.Background()
		sf, err := sys.factorSelf(ctx, c.kappa)
		if err != nil {
			t.Fatal(err)
		}
		direct, _, err := sys.factorPlane(ctx, sf, sys.surf, sys.images)
		if err != nil {
			t.Fatal(err)
		}
		whitened, _, err := sys.whitenedPlane(ctx, sf, sys.surf, sys.images)
		if err != nil {
			t.Fatal(err)
		}
		if got := nearPlane(sys.surf, floor); got != c.direct {
			t.Errorf("%s: nearPlane = %v, want %v", c.name, got, c.direct)
		}
		// Whitened reference.
		s := sys.surf[0]
		n := s.Len()
		cm := mat.NewDense(n, n, nil)
		if err := sys.asm.Cross(ctx, cm, sf.op, s, sys.images[0]); err != nil {
			t.Fatal(err)
		}
		var ch mat.Cholesky
		if !ch.Factorize(sf.blocks[0]) {
			t.Fatal("self block not positive definite")
		}
		var l mat.TriDense
		ch.LTo(&l)
		var w, k mat.Dense
		if err := w.Solve(&l, cm); err != nil { // L^-1 C
			t.Fatal(err)
		}
		if err := k.Solve(&l, w.T()); err != nil { // L^-1 (L^-1 C)ᵀ
			t.Fatal(err)
		}
		id := mat.NewDense(n, n, nil)
		for i := 0; i < n; i++ {
			id.Set(i, i, 1)
		}
		id.Sub(id, &k)
		sym := mat.NewSymDense(n, nil)
		for i := 0; i < n; i++ {
			for j := 0; j <= i; j++ {
				sym.SetSym(i, j, 0.5*(id.At(i, j)+id.At(j, i)))
			}
		}
		var cr mat.Cholesky
		if !cr.Factorize(sym) {
			t.Fatal("I - K not positive definite")
		}
		ref := cr.LogDet()
		t.Logf("%s (%d unknowns): reference %.12g, direct %+.3g, whitened %+.3g", c.name, n, ref, direct-ref, whitened-ref)
		if d := math.Abs(direct - ref); d > c.rel*math.Abs(ref)+c.ab {
			t.Errorf("%s: direct %.12g vs reference %.12g", c.name, direct, ref)
		}
		// The delta form keeps relative digits at any distance; it takes the
		// image block as assembled, symmetric only to the quadrature error of
		// mirrored pairs (2e-8 of the integrand near), hence 1e-7.
		if d := math.Abs(whitened - ref); d > 1e-7*math.Abs(ref) {
			t.Errorf("%s: whitened %.12g vs reference %.12g", c.name, whitened, ref)
		}
	}
}

// TestPlaneInverse checks the two routes to the moving body's block column
// of M_P^-1 against each other for a ball over the substrate: the whole
// inverse by LAPACK's Dpotri (gonum) and the triangular solves for the
// identity's columns. Both are backward stable; on a matrix of condition
// about 1e3 they agree to 1e-11 of the largest entry.
func TestPlaneInverse(t *testing.T) {
	ball := sphere(t, 2).Translate(r3.Vec{Z: 1.3})
	sys, err := newSystem([]Body{{Name: "ball", Mesh: ball}}, 0, 0, floor)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	sf, err := sys.factorSelf(ctx, 1.5)
	if err != nil {
		t.Fatal(err)
	}
	_, pi, err := sys.factorPlane(ctx, sf, sys.surf, sys.images)
	if err != nil {
		t.Fatal(err)
	}
	pf := pi.(*planeFactor)
	byPotri, ok := pf.inverseByPotri(0)
	if !ok {
		t.Fatal("Dpotri failed on a positive definite factor")
	}
	bySolves := pf.inverseBySolves(0)
	var d mat.Dense
	d.Sub(byPotri[0], bySolves[0])
	if e, s := mat.Norm(&d, math.Inf(1)), mat.Norm(bySolves[0], math.Inf(1)); e > 1e-11*s {
		t.Errorf("inverses differ by %.2g of the norm", e/s)
	}
	if got := pf.inverseColumn(0); !mat.Equal(got[0], byPotri[0]) {
		t.Error("one body: inverseColumn does not take the Dpotri route")
	}
}
