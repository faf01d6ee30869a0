package scatter

import (
	"context"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"testing"

	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
)

// TestSpanOf checks the basis construction on matrices whose columns lie in
// a known 12-dimensional subspace of R^200, plus noise of norm 1e-9 per
// column: the basis must come out orthonormal (BᵀB = I to 1e-12, rounding
// of a few hundred products), with 12 directions at a threshold of 1e-6
// (above the noise, below every direction of the subspace), and every
// input column must lie in it up to the noise; gonum's SVD of the
// residual is the reference.
func TestSpanOf(t *testing.T) {
	const n, q = 200, 12
	rng := rand.New(rand.NewPCG(1, 2))
	var qr mat.QR
	basis := mat.NewDense(n, q, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < q; j++ {
			basis.Set(i, j, rng.NormFloat64())
		}
	}
	qr.Factorize(basis)
	var ortho mat.Dense
	qr.QTo(&ortho)
	sub := ortho.Slice(0, n, 0, q)
	var xs []blas64.General
	var thr []float64
	for _, k := range []int{5, 9, 7} {
		c := mat.NewDense(q, k, nil)
		for i := 0; i < q; i++ {
			for j := 0; j < k; j++ {
				if i < 4+k { // the first input spans 9 of the 12 directions
					c.Set(i, j, rng.NormFloat64())
				}
			}
		}
		var x mat.Dense
		x.Mul(sub, c)
		for i := 0; i < n; i++ {
			for j := 0; j < k; j++ {
				x.Set(i, j, x.At(i, j)+1e-9/math.Sqrt(n)*rng.NormFloat64())
			}
		}
		xs = append(xs, mat.DenseCopyOf(&x).RawMatrix())
		thr = append(thr, 1e-6)
	}
	bt, cuts, err := spanOf(xs, thr)
	if err != nil {
		t.Fatal(err)
	}
	if bt.Rows != q {
		t.Fatalf("basis of %d directions, want %d", bt.Rows, q)
	}
	b := fromGeneral(bt)
	var g mat.Dense
	g.Mul(b, b.T())
	for i := 0; i < q; i++ {
		for j := 0; j < q; j++ {
			want := 0.0
			if i == j {
				want = 1
			}
			if d := math.Abs(g.At(i, j) - want); d > 1e-12 {
				t.Fatalf("BᵀB[%d,%d] = %.15g, want %g", i, j, g.At(i, j), want)
			}
		}
	}
	// The basis is nested: its first cuts[k] directions span the first
	// k+1 inputs (5 directions, then all 12 with the second).
	if want := []int{5, q, q}; !slices.Equal(cuts, want) {
		t.Fatalf("cuts %v, want %v", cuts, want)
	}
	for k, x := range xs {
		for j := k; j < len(xs); j++ {
			e := copyGeneral(x)
			lead := blas64.General{Rows: cuts[j], Cols: n, Stride: n, Data: bt.Data[:cuts[j]*n]}
			removeSpan(lead, e)
			var svd mat.SVD
			svd.Factorize(fromGeneral(e), mat.SVDNone)
			if s := svd.Values(nil)[0]; s > 1e-8 {
				t.Errorf("input %d: largest singular value outside the first %d directions %.3g, want ≤ 1e-8 (the noise)", k, cuts[j], s)
			}
		}
	}
}

// TestBasisIntegrand compares the two-body integrand and its gradient
// evaluated through a sweep basis with the dense path, at accuracy 1e-3 and
// with the criterion of TestCompressedIntegrand (a fifth of the accuracy
// for the value and for every gradient component relative to the axial
// one): two 320-triangle spheres at gaps 2 to 4 radii, the basis built from
// four placements spread over the sweep, points between them. A second
// basis built only from the two farthest placements misses part of the
// closest point's block: there the point's own directions must make up for
// it (the fit reports them) and the result must stay as accurate. Each
// point is evaluated by the sampled path (sampled.go), which must take the
// points between the references, and by the fit of its compressed block;
// a point between two references also by the sampled path on the smallest
// nested level holding those two (crossBasis.levelFor), which must be
// smaller than the whole bases for the points between the far references
// and as accurate.
func TestBasisIntegrand(t *testing.T) {
	const accuracy = 1e-3
	bodies := pairScene(t, 4, 4)
	sys, err := newSystem(bodies, 1, 0, nil)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	at := func(z float64) placement {
		return placement{offset: r3.Vec{Z: z}, centre: r3.Vec{Z: 4 + z}}
	}
	spread := []placement{at(0), at(2.0 / 3), at(4.0 / 3), at(2)}
	far := []placement{at(5.0 / 3), at(2)}
	for _, tc := range []struct {
		name    string
		refs    []placement
		point   float64
		extra   bool // the fit needs the point's own directions
		sampled bool // the sampled path takes the point
		between [2]int
		nested  bool // a level smaller than the whole bases serves the point
	}{
		{"between references", spread, 1.0 / 3, false, true, [2]int{0, 1}, false},
		{"between references", spread, 1, false, true, [2]int{1, 2}, true},
		{"between references", spread, 5.0 / 3, false, true, [2]int{2, 3}, true},
		{"outside the references", far, 0, true, false, [2]int{-1, -1}, false},
	} {
		for _, kappa := range []float64{0.005, 0.05, 0.5, 2} {
			sf, err := sys.factorSelf(ctx, kappa)
			if err != nil {
				t.Fatal(err)
			}
			pl := at(tc.point)
			sys.compress = compression{}
			dense, err := sys.evaluate(ctx, sf, pl, true)
			if err != nil {
				t.Fatal(err)
			}
			sys.compress = newCompression(Settings{Accuracy: accuracy})
			if sf.basis, err = sys.buildCrossBasis(ctx, sf, tc.refs); err != nil || sf.basis == nil {
				t.Fatalf("κ=%g: no basis (error %v)", kappa, err)
			}
			sampled, err := sys.evaluate(ctx, sf, pl, true)
			if err != nil {
				t.Fatal(err)
			}
			if tc.sampled && sampled.ranks[0].Sampled != 1 {
				t.Errorf("%s, κ=%g: ranks %+v, want the sampled path", tc.name, kappa, sampled.ranks)
			}
			// The same point without the sampled path: the fit of its
			// compressed block in the bases.
			keep := sf.basis.sampled
			sf.basis.sampled = nil
			comp, err := sys.evaluate(ctx, sf, pl, true)
			sf.basis.sampled = keep
			if err != nil {
				t.Fatal(err)
			}
			extra := false
			if sf.basis.balanced {
				// Bases in balanced coordinates have no fit path: the point
				// takes its own compressed block.
				if len(comp.ranks) != 1 || comp.ranks[0].Basis != 0 {
					t.Fatalf("%s, κ=%g: ranks %+v, want one block outside the basis", tc.name, kappa, comp.ranks)
				}
			} else {
				if len(comp.ranks) != 1 || comp.ranks[0].Basis != 1 || comp.ranks[0].Sampled != 0 {
					t.Fatalf("%s, κ=%g: ranks %+v, want one block through the basis", tc.name, kappa, comp.ranks)
				}
				// The fit on its own: did it need the point's directions?
				surf, _ := sys.surfacesAt(pl)
				lr, _, _ := sys.compressCross(ctx, sf.op, kappa, surf[0], surf[1], sys.compress.tol)
				_, size := surfacesClose(surf[0], surf[1])
				fit, err := sf.basis.fit(sys, sf, lr, basisShare*scaledTolerance(sys.compress.tol, kappa, size))
				if err != nil {
					t.Fatal(err)
				}
				extra = fit.extra[0] != nil || fit.extra[1] != nil
				if tc.extra && !extra {
					t.Errorf("%s, κ=%g: the fit found the point inside a basis built from the far placements only", tc.name, kappa)
				}
			}
			paths := []struct {
				path string
				ev   evaluation
			}{{"sampled", sampled}, {"fit", comp}}
			if tc.sampled {
				// The nested level of the references the point lies between.
				lv := sf.basis.levelFor(tc.between[0], tc.between[1])
				full := sf.basis.levelFor(-1, -1)
				if tc.nested && (lv == nil || lv.rank() >= full.rank()) {
					t.Fatalf("%s, κ=%g: no level smaller than the whole bases (%d references added as %v)", tc.name, kappa, len(sf.basis.added), sf.basis.added)
				}
				surf, _ := sys.surfacesAt(pl)
				nested, ok, err := sys.sampledTwo(ctx, sf, surf, pl, true, tc.between[0], tc.between[1])
				if err != nil {
					t.Fatal(err)
				}
				if !ok {
					t.Fatalf("%s, κ=%g: the sampled path did not take the point on its level", tc.name, kappa)
				}
				if tc.nested && nested.ranks[0].Rank >= full.rank() {
					t.Errorf("%s, κ=%g: rank %d on the level, want below the whole bases' %d", tc.name, kappa, nested.ranks[0].Rank, full.rank())
				}
				paths = append(paths, struct {
					path string
					ev   evaluation
				}{"level", nested})
			}
			for _, got := range paths {
				rel := math.Abs(got.ev.logDet/dense.logDet - 1)
				worst := 0.0
				for i := range got.ev.grad {
					worst = math.Max(worst, math.Abs(got.ev.grad[i]-dense.grad[i])/math.Abs(dense.grad[2]))
				}
				t.Logf("%s, offset %.3g, κ=%g, %s (sampled %d, rank %d): basis %d+%d, own directions %v, integrand error %.2g, gradient error %.2g",
					tc.name, tc.point, kappa, got.path, got.ev.ranks[0].Sampled, got.ev.ranks[0].Rank, sf.basis.side[0].size(), sf.basis.side[1].size(), extra, rel, worst)
				if rel > accuracy/5 {
					t.Errorf("%s, κ=%g, %s: integrand %.8g through the basis, %.8g dense (relative %.2g)", tc.name, kappa, got.path, got.ev.logDet, dense.logDet, rel)
				}
				if worst > accuracy/5 {
					t.Errorf("%s, κ=%g, %s: gradient %.8g through the basis, %.8g dense (error %.2g of the axial component)", tc.name, kappa, got.path, got.ev.grad, dense.grad, worst)
				}
			}
		}
	}
}

// TestBasisShardsAlike checks that a sweep long enough for the sweep basis
// (8 points of two 180-triangle spheres at gaps 3 to 4.4 radii, forces)
// gives every point exactly (every bit) alike whether the whole sweep runs,
// or disjoint shards of its points, or a run stopped part-way and resumed
// from its store: the basis depends on the whole sweep only. Tolerance:
// none (exact equality). It also checks that the basis was used.
func TestBasisShardsAlike(t *testing.T) {
	if testing.Short() {
		t.Skip("solver runs")
	}
	bodies := pairScene(t, 3, 5)
	var offs []r3.Vec
	for i := 0; i < 8; i++ { // at least basisMinPoints
		offs = append(offs, r3.Vec{Z: 0.2 * float64(i)})
	}
	sweep := Sweep{Body: 1, Direction: r3.Vec{Z: 1}, Offsets: offs, Centre: r3.Vec{Z: 5}}
	set := Settings{Accuracy: 1e-3, Forces: true}
	ctx := context.Background()
	whole, err := Energies(ctx, bodies, sweep, set)
	if err != nil {
		t.Fatal(err)
	}
	used := 0
	for _, p := range whole {
		for _, r := range p.Ranks {
			used += r.Basis
		}
	}
	if used == 0 {
		t.Fatalf("no evaluation went through the sweep basis: %+v", whole[0].Ranks)
	}
	for _, own := range [][]int{{0, 2, 4, 6}, {1, 3, 5, 7}} {
		part := set
		part.Points = own
		got, err := Energies(ctx, bodies, sweep, part)
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range own {
			if !reflect.DeepEqual(got[p], whole[p]) {
				t.Errorf("points %v: point %d differs from the whole run:\n%+v\n%+v", own, p, got[p], whole[p])
			}
		}
	}
	st := newMemStore()
	stopped := set
	stopped.Store = st
	st.failAfter = 60
	if _, err := Energies(ctx, bodies, sweep, stopped); err == nil {
		t.Fatal("the stopped run did not stop")
	}
	st.failAfter = 0
	resumed, err := Energies(ctx, bodies, sweep, stopped)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(resumed, whole) {
		t.Errorf("resumed results differ from the uninterrupted run:\n%+v\n%+v", resumed[0], whole[0])
	}
}

// TestBasisAngleSweep runs an angle sweep through the sweep basis: a
// 252-triangle plate tilted in 8 steps of 0.05 rad about its centre, 3
// radii above a 180-triangle sphere, with forces (at 1.8 radii, with the
// frequency cutoff of the accuracy, no reference block of these small
// meshes compresses at the κ that remain, so no basis is built). The turned plate's
// currents are its own basis functions turned with it, so its side of the
// blocks lives in one subspace as for a translation. Energy, force and
// torque must agree with the all-dense sweep to a fifth of the accuracy
// 1e-3 (the share the compression may spend): the energy relative to
// itself, force and torque relative to the force (times the unit length
// for the torque, the lever of the plate's half width). Measured at 1.8
// radii before the cutoff followed the accuracy: energy within 6.5e-6,
// force 4.2e-5, torque 6.3e-5 of the force.
func TestBasisAngleSweep(t *testing.T) {
	if testing.Short() {
		t.Skip("solver runs")
	}
	plate, err := mesh.Plate(2, 2, 0.3, 0.3)
	if err != nil {
		t.Fatal(err)
	}
	plate = plate.Translate(r3.Vec{Z: 4})
	bodies := []Body{{Name: "ball", Mesh: sphere(t, 3)}, {Name: "plate", Mesh: plate}}
	var offs []r3.Vec
	var turns []Turn
	for i := 0; i < 8; i++ { // at least basisMinPoints
		offs = append(offs, r3.Vec{})
		turns = append(turns, Turn{Axis: r3.Vec{Y: 1}, Angle: 0.05 * float64(i), Pivot: r3.Vec{Z: 4}})
	}
	sw := Sweep{Body: 1, Direction: r3.Vec{Z: 1}, Offsets: offs, Turns: turns, Centre: r3.Vec{Z: 4}}
	ctx := context.Background()
	comp, err := Energies(ctx, bodies, sw, Settings{Accuracy: 1e-3, Forces: true})
	if err != nil {
		t.Fatal(err)
	}
	dense, err := Energies(ctx, bodies, sw, Settings{Accuracy: 1e-3, Forces: true, Dense: true})
	if err != nil {
		t.Fatal(err)
	}
	const share = 1e-3 / 5
	for i := range comp {
		f := r3.Norm(dense[i].Force)
		e := math.Abs(comp[i].Energy/dense[i].Energy - 1)
		df := r3.Norm(r3.Sub(comp[i].Force, dense[i].Force)) / f
		dt := r3.Norm(r3.Sub(comp[i].Torque, dense[i].Torque)) / f
		if e > share || df > share || dt > share {
			t.Errorf("angle %.2f: energy off by %.2g, force by %.2g, torque by %.2g of the force; want each ≤ %g", turns[i].Angle, e, df, dt, share)
		}
		if len(comp[i].Ranks) != 1 || comp[i].Ranks[0].Basis == 0 {
			t.Errorf("angle %.2f: ranks %+v, want evaluations through the basis", turns[i].Angle, comp[i].Ranks)
		}
	}
}

// TestNestedLevels checks the bookkeeping of the nested levels of the
// sampled path: references enter the bases from the end of smaller rank,
// blocks that did not compress are left out, and a point between two
// references gets the smallest level holding both (the whole bases for a
// reference left out or for no bracket). Exact (integer bookkeeping).
func TestNestedLevels(t *testing.T) {
	ofRank := func(r int) *lowRank {
		return &lowRank{u: blas64.General{Rows: 4, Cols: r, Stride: max(r, 1), Data: make([]float64, 4*max(r, 1))}}
	}
	for _, tc := range []struct {
		ranks []int // -1: did not compress
		want  []int
	}{
		{[]int{300, 200, 120}, []int{2, 1, 0}},
		{[]int{120, 200, 300}, []int{0, 1, 2}},
		{[]int{300, -1, 0, 120}, []int{3, 0}},
		{[]int{-1}, nil},
	} {
		lrs := make([]*lowRank, len(tc.ranks))
		for j, r := range tc.ranks {
			if r >= 0 {
				lrs[j] = ofRank(r)
			}
		}
		if got := nestingOrder(lrs); !slices.Equal(got, tc.want) {
			t.Errorf("nestingOrder(ranks %v) = %v, want %v", tc.ranks, got, tc.want)
		}
	}
	small, mid, full := &sampledBasis{refs: 2}, &sampledBasis{refs: 3}, &sampledBasis{refs: 4}
	cb := &crossBasis{added: []int{4, 3, 2, 0}, sampled: []*sampledBasis{small, mid, full}} // reference 1 left out
	for _, tc := range []struct {
		lo, hi int
		want   *sampledBasis
	}{
		{4, 4, small}, // a reference of its own: the first level there is
		{3, 4, small},
		{2, 3, mid},
		{0, 2, full},
		{1, 2, full}, // a reference left out
		{-1, -1, full},
	} {
		if got := cb.levelFor(tc.lo, tc.hi); got != tc.want {
			t.Errorf("levelFor(%d, %d): level of %d references, want %d", tc.lo, tc.hi, got.refs, tc.want.refs)
		}
	}
	if (&crossBasis{}).levelFor(0, 1) != nil {
		t.Error("levelFor without a sampled path: want nil")
	}
}
