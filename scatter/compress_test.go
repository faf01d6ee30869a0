package scatter

import (
	"context"
	"math"
	"math/rand/v2"
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
// gradient with the dense path at accuracy 1e-3: two 320-triangle spheres at
// centre distance 6 radii, and two 500-triangle spheres one radius apart at
// κd = 2 and 4, where the first ACA terms fall slowly and unevenly (such
// blocks used to be given up as dense). The block tolerance is chosen so
// that the integrand's relative error stays near a fifth of the accuracy
// (blockTolerance): the test allows that, 2e-4, for the value and for every
// component of the gradient relative to the axial force (translations) or
// the axial force times the radius (turns), which checks the gradient's
// contraction on the cross of the approximation (crossWeight). The ranks
// must be reported and below maxRank (and below a tenth of the unknowns for
// the far pair: measured 28 to 41 of 480).
func TestCompressedIntegrand(t *testing.T) {
	const accuracy = 1e-3
	for _, tc := range []struct {
		level     int
		L         float64
		kappas    []float64
		rankShare int
	}{
		{4, 6, []float64{0.05, 0.5, 2}, 10},
		{6, 3, []float64{2}, maxRankFraction},
	} {
		bodies := pairScene(t, tc.level, tc.L)
		sys, err := newSystem(bodies, 1, 0, nil)
		if err != nil {
			t.Fatal(err)
		}
		ctx := context.Background()
		pl := placement{centre: r3.Vec{Z: tc.L}}
		n := sys.surf[0].Len()
		for _, kappa := range tc.kappas {
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
			rel := math.Abs(comp.logDet/dense.logDet - 1)
			worst := 0.0
			for i := range comp.grad {
				worst = math.Max(worst, math.Abs(comp.grad[i]-dense.grad[i])/math.Abs(dense.grad[2]))
			}
			t.Logf("L=%g κ=%g: integrand error %.2g, gradient error %.2g, rank %d of %d", tc.L, kappa, rel, worst, comp.ranks[0].Rank, n)
			if rel > accuracy/5 {
				t.Errorf("L=%g κ=%g: integrand %.8g compressed, %.8g dense (relative %.2g)", tc.L, kappa, comp.logDet, dense.logDet, rel)
			}
			if worst > accuracy/5 {
				t.Errorf("L=%g κ=%g: gradient %.8g compressed, %.8g dense (error %.2g of the axial component)", tc.L, kappa, comp.grad, dense.grad, worst)
			}
			if len(comp.ranks) != 1 || comp.ranks[0].Compressed != 1 || comp.ranks[0].Rank < 1 || comp.ranks[0].Rank > n/tc.rankShare {
				t.Errorf("L=%g κ=%g: ranks %+v, want one compressed block of rank 1..%d", tc.L, kappa, comp.ranks, n/tc.rankShare)
			}
		}
	}
}

// TestCompressedEnergy compares whole energies and forces with and without
// compression (Settings.Dense) for two 180-triangle spheres at gap 3 radii:
// they must agree within the requested accuracy 1e-3 (the block
// tolerance spends a fifth of it), and every point must report its block's
// rank.
func TestCompressedEnergy(t *testing.T) {
	set := Settings{Accuracy: 1e-3, Forces: true}
	comp, dense := compressedAndDense(t, 3, 5, set)
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

// TestLooseness checks the node-share loosening of the block tolerance on a
// made-up integrand f(κ) = -e^{-2κ} of a point at gap 1, tolerance 1e-4:
// no loosening without lower nodes, for the dense path or without a weight;
// the factor I_lb/(2 n w |f_prev|) (I_lb = max κ'|f(κ')| over lower nodes)
// where it exceeds 1, divided by 1 + 2κd with forces; and the cap
// maxLooseTolerance. The values are worked by hand from the formula in
// looseness' comment (tolerance 1e-12, rounding).
func TestLooseness(t *testing.T) {
	samples := []Sample{{Kappa: 0.5, Value: -math.Exp(-1)}, {Kappa: 2, Value: -math.Exp(-4)}, {Kappa: 6, Value: -math.Exp(-12)}}
	mk := func(forces, on bool) *runner {
		return &runner{
			sys:   &system{compress: compression{on: on, tol: 1e-4}},
			set:   Settings{Forces: forces},
			pts:   []Point{{Samples: samples}},
			scale: []float64{1},
		}
	}
	lb := 0.5 * math.Exp(-1) // max κ'|f(κ')|: 0.184 at κ' = 0.5 (2e^-4 = 0.037)
	for _, tc := range []struct {
		name   string
		forces bool
		on     bool
		rq     request
		want   float64
	}{
		{"lowest node", false, true, request{kappa: 0.3, weight: 0.1, nodes: 15}, 1},
		{"no weight", false, true, request{kappa: 4}, 1},
		{"dense", false, false, request{kappa: 4, weight: 0.5, nodes: 15}, 1},
		{"small share", false, true, request{kappa: 1, weight: 0.5, nodes: 15}, 1},                                   // 0.184/(15 e^-1) < 1
		{"decayed", false, true, request{kappa: 4, weight: 0.05, nodes: 15}, lb / (1.5 * math.Exp(-4))},              // 6.70
		{"decayed, forces", true, true, request{kappa: 4, weight: 0.005, nodes: 15}, lb / (0.15 * math.Exp(-4)) / 9}, // 7.44
		{"capped", false, true, request{kappa: 8, weight: 0.05, nodes: 15}, maxLooseTolerance / 1e-4},
	} {
		got := mk(tc.forces, tc.on).looseness(tc.rq)
		if math.Abs(got-tc.want) > 1e-12*tc.want {
			t.Errorf("%s: looseness %.15g, want %.15g", tc.name, got, tc.want)
		}
	}
}

// TestCompressedEnergyNear compares whole energies and forces with and
// without compression for two 320-triangle spheres one radius apart, where
// the blocks at κd ≳ 2 are compressed with the loosened tolerance of
// looseness: they must agree within the requested accuracy 1e-3 (the
// tolerances spend three tenths of it; measured 1e-5 to 3e-5 on
// 500-triangle spheres).
func TestCompressedEnergyNear(t *testing.T) {
	set := Settings{Accuracy: 1e-3, Forces: true}
	comp, dense := compressedAndDense(t, 4, 3, set)
	c, d := comp[0], dense[0]
	eRel, fRel := math.Abs(c.Energy/d.Energy-1), math.Abs(c.Force.Z/d.Force.Z-1)
	t.Logf("energy error %.2g, force error %.2g, blocks %+v", eRel, fRel, c.Ranks)
	if eRel > set.Accuracy || fRel > set.Accuracy {
		t.Errorf("energy %.8g/%.8g, force %.8g/%.8g compressed/dense", c.Energy, d.Energy, c.Force.Z, d.Force.Z)
	}
	if c.Ranks[0].Compressed == 0 {
		t.Errorf("blocks %+v, want compressed ones", c.Ranks)
	}
}

// compressedAndDense computes one point of two spheres of the given mesh
// level at centre distance L, with set as given and with Settings.Dense.
func compressedAndDense(t *testing.T, level int, L float64, set Settings) (comp, dense []Point) {
	t.Helper()
	bodies := pairScene(t, level, L)
	sw := Sweep{Body: 1, Direction: r3.Vec{Z: 1}, Offsets: []r3.Vec{{}}, Centre: r3.Vec{Z: L}}
	ctx := context.Background()
	comp, err := Energies(ctx, bodies, sw, set)
	if err != nil {
		t.Fatal(err)
	}
	set.Dense = true
	dense, err = Energies(ctx, bodies, sw, set)
	if err != nil {
		t.Fatal(err)
	}
	return comp, dense
}

// TestHopeless checks the ACA's early give-up on synthetic term series
// worked by hand from hopeless' comment: with terms 0.1·exp(-k/s) the rate
// between the peaks of the last four terms and of four terms half as many
// steps back is -1/s, so after k terms a block needs about
// k + s·ln(0.1·e^(-(k-4)/s)/tol) = 4 + s·ln(0.1/tol) terms in all, whatever
// k. At tol 1e-6 that is 292 for s = 25 and 695 for s = 60, judged at
// minJudged terms; against maxRank 120 (three times:
// 360) the first goes on and the second is given up. Too few terms, terms
// already below tol, and terms that do not fall are the other cases.
func TestHopeless(t *testing.T) {
	series := func(n int, s float64) []float64 {
		out := make([]float64, n)
		for k := range out {
			out[k] = 0.1 * math.Exp(-float64(k)/s)
		}
		return out
	}
	flat := make([]float64, minJudged+8)
	for k := range flat {
		flat[k] = 0.05 + 0.01*float64(k%3)
	}
	for _, tc := range []struct {
		name  string
		terms []float64
		tol   float64
		want  bool
	}{
		{"slow but reachable", series(minJudged, 25), 1e-6, false},
		{"too slow", series(minJudged, 60), 1e-6, true},
		{"too few terms to judge", series(minJudged-1, 60), 1e-6, false},
		{"already converged", series(minJudged+8, 60), 0.1, false},
		{"no decay", flat, 1e-6, true},
	} {
		if got := hopeless(tc.terms, tc.tol, 120); got != tc.want {
			t.Errorf("%s: hopeless = %v, want %v", tc.name, got, tc.want)
		}
	}
}

// TestRecompressGram checks the Gram route of the recompression against
// gonum's SVD of the full sum: 200 random terms of 1920 entries falling by
// e^(-k/20) (as ACA terms fall), truncated at 1e-5. The result must keep
// the rank the singular values call for (the dropped tail within 1e-5 of
// the Frobenius norm, the next one not), differ from the sum by at most
// 1e-5 of its norm (plus rounding), and have V orthonormal to 1e-5 (the
// eigenvectors of the smallest kept directions carry an error of order
// ε σ₁²/σ² ≈ 1e-7 here).
func TestRecompressGram(t *testing.T) {
	const n, k, tol = 1920, 200, 1e-5
	rng := rand.New(rand.NewPCG(3, 4))
	us, vs := make([][]float64, k), make([][]float64, k)
	gu, gv := make([][]float64, k), make([][]float64, k)
	for j := range us {
		us[j], vs[j] = make([]float64, n), make([]float64, n)
		s := math.Exp(-float64(j) / 20)
		for i := range us[j] {
			us[j][i], vs[j][i] = s*rng.NormFloat64(), rng.NormFloat64()
		}
		gu[j], gv[j] = make([]float64, j+1), make([]float64, j+1)
		for l := 0; l <= j; l++ {
			gu[j][l], gv[j][l] = dot(us[j], us[l]), dot(vs[j], vs[l])
		}
	}
	full := mat.NewDense(n, n, nil)
	for j := range us {
		full.RankOne(full, 1, mat.NewVecDense(n, us[j]), mat.NewVecDense(n, vs[j]))
	}
	var svd mat.SVD
	if !svd.Factorize(full, mat.SVDNone) {
		t.Fatal("reference SVD failed")
	}
	sv := svd.Values(nil)
	total := 0.0
	for _, s := range sv {
		total += s * s
	}
	want, tail := len(sv), 0.0
	for want > 1 && tail+sv[want-1]*sv[want-1] <= tol*tol*total {
		tail += sv[want-1] * sv[want-1]
		want--
	}
	lr, ok := recompressGram(us, vs, gu, gv, n, n, tol)
	if !ok {
		t.Fatal("the Gram route failed on well-conditioned terms")
	}
	if lr.rank() != want {
		t.Errorf("rank %d, want %d from the singular values", lr.rank(), want)
	}
	approx := mat.NewDense(n, n, nil)
	blas64.Gemm(blas.NoTrans, blas.Trans, 1, lr.u, lr.v, 0, approx.RawMatrix())
	approx.Sub(approx, full)
	if rel := mat.Norm(approx, 2) / math.Sqrt(total); rel > 1.01*tol {
		t.Errorf("relative error %.3g, want ≤ %g", rel, tol)
	}
	var vtv mat.Dense
	vtv.Mul(fromGeneral(lr.v).T(), fromGeneral(lr.v))
	for i := 0; i < lr.rank(); i++ {
		for j := 0; j < lr.rank(); j++ {
			d := vtv.At(i, j)
			if i == j {
				d--
			}
			if math.Abs(d) > 1e-5 {
				t.Fatalf("VᵀV[%d,%d] off by %.3g", i, j, d)
			}
		}
	}
}
