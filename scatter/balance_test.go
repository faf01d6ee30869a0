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

// balancedFixture is two 320-triangle spheres at centre distance L (in
// radii) and κR = 0.02,
// where the sweep basis works in balanced coordinates, with the dense
// blocks assembled for reference.
type balancedFixture struct {
	sys   *system
	sf    *selfFactors
	bal   [2]*balance
	ts    [2]*mat.Dense // T_i S_i, N_i × N_i
	cross *mat.Dense    // M01 in RWG coordinates
	self  [2]*mat.SymDense
}

func newBalancedFixture(t *testing.T, L float64) *balancedFixture {
	t.Helper()
	sys, err := newSystem(pairScene(t, 3, L), 1, 0, nil)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	const kappa = 0.02
	sf, err := sys.factorSelf(ctx, kappa)
	if err != nil {
		t.Fatal(err)
	}
	bal, err := sys.balanceAt(sf)
	if err != nil {
		t.Fatal(err)
	}
	if bal[0] == nil || bal[1] == nil {
		t.Fatalf("κ=%g: no balanced coordinates", kappa)
	}
	fx := &balancedFixture{sys: sys, sf: sf, bal: bal}
	for i, s := range sys.surf {
		n := s.Len()
		fx.self[i] = mat.NewSymDense(n, nil)
		if err := sys.asm.Self(ctx, fx.self[i], sf.op, s); err != nil {
			t.Fatal(err)
		}
		// Column j of T S is T applied to unit vector j scaled by s_j: build
		// T S row-major by mapping the identity.
		id := make([]float64, n*n)
		for j := 0; j < n; j++ {
			id[j*n+j] = bal[i].s[j]
		}
		ts := make([]float64, n*n)
		bal[i].lt.Mul(ts, id, n)
		fx.ts[i] = mat.NewDense(n, n, ts)
	}
	fx.cross = mat.NewDense(sys.surf[0].Len(), sys.surf[1].Len(), nil)
	if err := sys.asm.Cross(ctx, fx.cross, sf.op, sys.surf[0], sys.surf[1]); err != nil {
		t.Fatal(err)
	}
	return fx
}

// balancedBlock returns (T0 S0)ᵀ M01 (T1 S1), the reference balanced block.
func (fx *balancedFixture) balancedBlock() *mat.Dense {
	var tmp, out mat.Dense
	tmp.Mul(fx.ts[0].T(), fx.cross)
	out.Mul(&tmp, fx.ts[1])
	return &out
}

func maxAbs(a mat.Matrix) float64 {
	r, c := a.Dims()
	m := 0.0
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			m = math.Max(m, math.Abs(a.At(i, j)))
		}
	}
	return m
}

// TestBalancedCoordinates checks the balanced coordinates against dense
// linear algebra (gonum mat) on the same blocks: the Jacobi scales give
// every function unit self-interaction, the rows and columns the cross
// approximation draws are those of (T0 S0)ᵀ M01 (T1 S1), (T S)^-T inverts
// (T S)ᵀ, and the sparse sub-block and weight maps are each other's
// transpose. All are exact rearrangements of the same sums, so the
// tolerance is round-off: 1e-10 relative to the largest entry (the loop
// coefficients 1/l_e and the scales span about three decades).
func TestBalancedCoordinates(t *testing.T) {
	fx := newBalancedFixture(t, 2.5)
	ctx := context.Background()
	const tol = 1e-10

	for i := range fx.self {
		var d mat.Dense
		d.Mul(fx.ts[i].T(), fx.self[i])
		d.Mul(&d, fx.ts[i])
		n, _ := d.Dims()
		worst := 0.0
		for j := 0; j < n; j++ {
			worst = math.Max(worst, math.Abs(d.At(j, j)-1))
		}
		if worst > tol {
			t.Errorf("body %d: balanced self-interactions differ from 1 by up to %.3g", i, worst)
		}
	}

	ref := fx.balancedBlock()
	scale := maxAbs(ref)
	m, n := ref.Dims()
	src := newBalancedSource(fx.sys.asm, fx.sf.op, fx.sys.surf[0], fx.sys.surf[1], fx.bal)
	fns := []int{0, 7, fx.bal[0].lt.Loops(), m - 1} // loops and trees on both sides
	rows := make([]float64, len(fns)*n)
	if err := src.rows(ctx, rows, fns); err != nil {
		t.Fatal(err)
	}
	cols := make([]float64, len(fns)*m)
	if err := src.cols(ctx, cols, fns); err != nil {
		t.Fatal(err)
	}
	for k, f := range fns {
		for j := 0; j < n; j++ {
			if d := math.Abs(rows[k*n+j] - ref.At(f, j)); d > tol*scale {
				t.Fatalf("row %d, column %d: %.12g, want %.12g", f, j, rows[k*n+j], ref.At(f, j))
			}
		}
		for i := 0; i < m; i++ {
			if d := math.Abs(cols[k*m+i] - ref.At(i, f)); d > tol*scale {
				t.Fatalf("column %d, row %d: %.12g, want %.12g", f, i, cols[k*m+i], ref.At(i, f))
			}
		}
	}

	// (T S)ᵀ (T S)^-T x = x on three right-hand sides at once.
	bl := fx.bal[1]
	x := make([]float64, n*3)
	for i := range x {
		x[i] = math.Sin(float64(7*i + 1))
	}
	y, back := make([]float64, n*3), make([]float64, n*3)
	bl.invTransRows(y, x, 3)
	bl.transRows(back, y, 3)
	for i := range x {
		if math.Abs(back[i]-x[i]) > tol {
			t.Fatalf("(T S)ᵀ (T S)^-T x: entry %d is %.12g, want %.12g", i, back[i], x[i])
		}
	}

	// balancedSub on the supports equals the dense product, and
	// <h, balancedSub(raw)> = <balancedWeight(h), raw>.
	f0, f1 := []int{1, 40, m - 3}, []int{2, fx.bal[1].lt.Loops() + 5}
	supp0, t0 := supportOf(fx.bal[0], f0)
	supp1, t1 := supportOf(fx.bal[1], f1)
	raw := make([]float64, len(supp0)*len(supp1))
	for a, e := range supp0 {
		for b, g := range supp1 {
			raw[a*len(supp1)+b] = fx.cross.At(e, g)
		}
	}
	sub := make([]float64, len(f0)*len(f1))
	balancedSub(sub, raw, len(supp1), t0, t1)
	h := make([]float64, len(sub))
	inner := 0.0
	for a, i := range f0 {
		for b, j := range f1 {
			if d := math.Abs(sub[a*len(f1)+b] - ref.At(i, j)); d > tol*scale {
				t.Errorf("balancedSub (%d, %d): %.12g, want %.12g", i, j, sub[a*len(f1)+b], ref.At(i, j))
			}
			h[a*len(f1)+b] = math.Cos(float64(3*a + b))
			inner += h[a*len(f1)+b] * sub[a*len(f1)+b]
		}
	}
	hr := make([]float64, len(raw))
	balancedWeight(hr, h, len(supp1), len(f1), t0, t1)
	if back := dot(hr, raw); math.Abs(back-inner) > tol*math.Abs(inner) {
		t.Errorf("<balancedWeight(h), raw> = %.12g, <h, balancedSub(raw)> = %.12g", back, inner)
	}
}

// TestCompressedBalanced checks the adaptive cross approximation of the
// balanced block against the dense one (gonum's spectral norm as the
// reference), within 3 times the tolerance as in TestCompressedBlock, and
// that its rank stays below the RWG block's at the tightened tolerance the
// balanced coordinates replace (the reason they exist). The spheres are
// two radii apart: at gap R/2 these small meshes need more than the
// compressed path allows and stay dense.
func TestCompressedBalanced(t *testing.T) {
	fx := newBalancedFixture(t, 4)
	ctx := context.Background()
	const tol = 1e-4
	b := fx.sys.surf[1].Translate(r3.Vec{})
	lr, ok, err := fx.sys.compressBalanced(ctx, fx.sf.op, fx.sys.surf[0], b, fx.bal, tol)
	if err != nil || !ok {
		t.Fatalf("balanced block not compressed (err %v)", err)
	}
	ref := fx.balancedBlock()
	m, n := ref.Dims()
	approx := mat.NewDense(m, n, nil)
	blas64.Gemm(blas.NoTrans, blas.Trans, 1, lr.u, lr.v, 0, approx.RawMatrix())
	approx.Sub(approx, ref)
	if rel := mat.Norm(approx, 2) / mat.Norm(ref, 2); rel > 3*tol {
		t.Errorf("relative error %.3g of the rank-%d balanced block, want ≤ %g", rel, lr.rank(), 3*tol)
	}
	_, size := surfacesClose(fx.sys.surf[0], b)
	rwg, ok, err := fx.sys.compressCross(ctx, fx.sf.op, fx.sf.kappa, fx.sys.surf[0], b, tol)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("κ=%g (tightening %.2g): balanced rank %d, RWG rank %d (compressed %v) of %d unknowns",
		fx.sf.kappa, scaledTolerance(1, fx.sf.kappa, size), lr.rank(), rankOf(rwg), ok, m)
	if ok && rwg.rank() <= lr.rank() {
		t.Errorf("balanced rank %d not below the RWG rank %d at the tightened tolerance", lr.rank(), rwg.rank())
	}
}

func rankOf(lr *lowRank) int {
	if lr == nil {
		return -1
	}
	return lr.rank()
}

// TestPositionFollowsPlacement checks that the check unknowns are placed on
// the surface as moved, not on the mesh its basis shares with the unmoved
// one: every position on a surface translated by v is the unmoved one plus
// v, in RWG and in balanced coordinates (exact up to the rounding of one
// addition, so 1e-12 of the radius).
func TestPositionFollowsPlacement(t *testing.T) {
	fx := newBalancedFixture(t, 2.5)
	s := fx.sys.surf[1]
	v := r3.Vec{X: 0.3, Y: -0.2, Z: 1.1}
	moved := s.Translate(v)
	rwg := topologyOf(s)
	bal := rwg
	bal.bal = fx.bal[1]
	for _, et := range []edgeTopology{rwg, bal} {
		for j := 0; j < s.Len(); j++ {
			want := r3.Add(et.position(s, j), v)
			if d := r3.Norm(r3.Sub(et.position(moved, j), want)); d > 1e-12 {
				t.Fatalf("balanced %v, unknown %d: moved by %v, want %v (off by %.3g)", et.bal != nil, j, et.position(moved, j), want, d)
			}
		}
	}
}
