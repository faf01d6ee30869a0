package scatter

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// TestCompressedBlock checks the adaptive cross approximation against the
// dense block it replaces (gonum's Frobenius norm as the reference): the
// relative error must stay within 3 times the tolerance asked for (the
// stopping test estimates the error from the last terms, common practice
// for ACA, so it is not a bound), and the rank must be far below the
// dimension for bodies four radii apart.
func TestCompressedBlock(t *testing.T) {
	bodies := pairScene(t, 3, 5)
	sys, err := newSystem(bodies, 1, 0, nil)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	for _, kappa := range []float64{0.1, 1, 4} {
		sf, err := sys.factorSelf(ctx, kappa)
		if err != nil {
			t.Fatal(err)
		}
		a, b := sys.surf[0], sys.surf[1].Translate(r3.Vec{})
		const tol = 1e-4
		lr, ok, err := sys.compressCross(ctx, sf.op, 1, a, b, tol) // κ = 1 passed: κa > 1, so tol is not scaled down
		if err != nil || !ok {
			t.Fatalf("κ=%g: not compressed (err %v)", kappa, err)
		}
		dense := mat.NewDense(a.Len(), b.Len(), nil)
		if err := sys.asm.Cross(ctx, dense, sf.op, a, b); err != nil {
			t.Fatal(err)
		}
		ref := mat.Norm(dense, 2)
		approx := mat.NewDense(a.Len(), b.Len(), nil)
		blas64.Gemm(blas.NoTrans, blas.Trans, 1, lr.u, lr.v, 0, approx.RawMatrix())
		approx.Sub(approx, dense)
		if rel := mat.Norm(approx, 2) / ref; rel > 3*tol {
			t.Errorf("κ=%g: relative error %.3g of the rank-%d block, want ≤ %g", kappa, rel, lr.rank(), 3*tol)
		}
		if lr.rank() > a.Len()/5 {
			t.Errorf("κ=%g: rank %d of %d unknowns for bodies four radii apart", kappa, lr.rank(), a.Len())
		}
	}
}

// TestCompressedIntegrand compares the compressed two-body integrand and its
// gradient with the dense path for two 320-triangle spheres at centre
// distance 6 radii, at accuracy 1e-3. The block tolerance is chosen so that
// the integrand's relative error stays near a fifth of the accuracy
// (blockTolerance): the test allows that, 2e-4, for the value and the
// force component along the axis. The ranks must be reported and small
// (below a tenth of the 480 unknowns: measured 28 to 41).
func TestCompressedIntegrand(t *testing.T) {
	const accuracy = 1e-3
	bodies := pairScene(t, 4, 6)
	sys, err := newSystem(bodies, 1, 0, nil)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	pl := placement{centre: r3.Vec{Z: 6}}
	for _, kappa := range []float64{0.05, 0.5, 2} {
		sf, err := sys.factorSelf(ctx, kappa)
		if err != nil {
			t.Fatal(err)
		}
		sys.compress = compression{}
		dense, err := sys.evaluate(ctx, sf, pl, true)
		if err != nil {
			t.Fatal(err)
		}
		sys.compress = newCompression(Settings{Accuracy: accuracy})
		comp, err := sys.evaluate(ctx, sf, pl, true)
		if err != nil {
			t.Fatal(err)
		}
		if rel := math.Abs(comp.logDet/dense.logDet - 1); rel > accuracy/5 {
			t.Errorf("κ=%g: integrand %.8g compressed, %.8g dense (relative %.2g)", kappa, comp.logDet, dense.logDet, rel)
		}
		if rel := math.Abs(comp.grad[2]/dense.grad[2] - 1); rel > accuracy/5 {
			t.Errorf("κ=%g: z gradient %.8g compressed, %.8g dense (relative %.2g)", kappa, comp.grad[2], dense.grad[2], rel)
		}
		if len(comp.ranks) != 1 || comp.ranks[0].Compressed != 1 || comp.ranks[0].Rank < 1 || comp.ranks[0].Rank > sys.surf[0].Len()/10 {
			t.Errorf("κ=%g: ranks %+v, want one compressed block of rank 1..%d", kappa, comp.ranks, sys.surf[0].Len()/10)
		}
	}
}

// TestCompressedEnergy compares whole energies and forces with and without
// compression (Settings.Dense) for two 180-triangle spheres at gap 3 radii:
// they must agree within the requested accuracy 1e-3 (the block
// tolerance spends a fifth of it), and every point must report its block's
// rank.
func TestCompressedEnergy(t *testing.T) {
	bodies := pairScene(t, 3, 5)
	sw := Sweep{Body: 1, Direction: r3.Vec{Z: 1}, Offsets: []r3.Vec{{}}, Centre: r3.Vec{Z: 5}}
	ctx := context.Background()
	set := Settings{Accuracy: 1e-3, Forces: true}
	comp, err := Energies(ctx, bodies, sw, set)
	if err != nil {
		t.Fatal(err)
	}
	set.Dense = true
	dense, err := Energies(ctx, bodies, sw, set)
	if err != nil {
		t.Fatal(err)
	}
	for i := range comp {
		c, d := comp[i], dense[i]
		if rel := math.Abs(c.Energy/d.Energy - 1); rel > set.Accuracy {
			t.Errorf("point %d: energy %.8g compressed, %.8g dense (relative %.2g)", i, c.Energy, d.Energy, rel)
		}
		if rel := math.Abs(c.Force.Z/d.Force.Z - 1); rel > set.Accuracy {
			t.Errorf("point %d: force %.8g compressed, %.8g dense (relative %.2g)", i, c.Force.Z, d.Force.Z, rel)
		}
		if len(c.Ranks) != 1 || c.Ranks[0].Compressed == 0 || c.Ranks[0].Rank == 0 {
			t.Errorf("point %d: ranks %+v, want a compressed block", i, c.Ranks)
		}
		if len(d.Ranks) != 1 || d.Ranks[0].Compressed != 0 || d.Ranks[0].Dense != len(d.Samples) {
			t.Errorf("point %d: dense run reports %+v", i, d.Ranks)
		}
	}
}

// TestCompressionContact checks the fallback at near contact (gap 0.05 of
// the radius): the block is assembled dense, the integrand is the dense one
// exactly, and the record says so.
func TestCompressionContact(t *testing.T) {
	bodies := pairScene(t, 3, 2.05)
	sys, err := newSystem(bodies, 1, 0, nil)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	sf, err := sys.factorSelf(ctx, 1)
	if err != nil {
		t.Fatal(err)
	}
	dense, err := sys.evaluate(ctx, sf, placement{}, false)
	if err != nil {
		t.Fatal(err)
	}
	sys.compress = newCompression(Settings{Accuracy: 1e-3})
	comp, err := sys.evaluate(ctx, sf, placement{}, false)
	if err != nil {
		t.Fatal(err)
	}
	if comp.logDet != dense.logDet {
		t.Errorf("integrand %.17g with compression on, %.17g dense", comp.logDet, dense.logDet)
	}
	if len(comp.ranks) != 1 || comp.ranks[0].Dense != 1 || comp.ranks[0].Compressed != 0 {
		t.Errorf("ranks %+v, want one dense block", comp.ranks)
	}
}

// TestSweepKappaScale checks the shared frequency scales of a sweep: points
// within a factor 4 in gap share one κc, and no point's κc is more than
// 2√2 from its own 2/gap (the bound the integration's node counts rest on).
func TestSweepKappaScale(t *testing.T) {
	var gaps []float64
	for i := 0; i < 20; i++ {
		gaps = append(gaps, 0.5*math.Pow(4, float64(i)/19)) // 0.5 .. 2
	}
	kc := sweepKappaScales(gaps)
	for i := range kc {
		if kc[i] != kc[0] {
			t.Fatalf("a sweep over a factor 4 uses κc %g and %g", kc[0], kc[i])
		}
	}
	wide := []float64{100, 1, 3, 0.01, 30, 0.3, 10}
	for i, c := range sweepKappaScales(wide) {
		if r := c * wide[i] / 2; r > 2*math.Sqrt2*(1+1e-12) || r < 1/(2*math.Sqrt2)/(1+1e-12) {
			t.Errorf("gap %g: κc %g is %g times 2/gap", wide[i], c, r)
		}
	}
}
