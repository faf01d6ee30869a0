package scatter

import (
	"context"
	"fmt"
	"sort"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack/lapack64"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/bem"
)

// This file holds the sampled path of the sweep basis (basis.go): a point
// whose interaction block lies in the bases, M01 ≈ B0 X B1ᵀ, needs only
// enough of its entries to fix X. With E0, E1 sets of rows and columns on
// which B0 and B1 are well conditioned (m_i ≥ p_i unknowns picked by
// pivoted QR of B_iᵀ, completed to every edge whose two panels they
// touch) and A_i = B_i[E_i, :]⁺ (p_i×m_i), the sub-block S = M01[E0, E1]
// gives
//
//	X = A0 S A1ᵀ,   M01 ≈ Π0 S Π1ᵀ,  Π_i = B_i A_i (N_i×m_i),
//
// interpolation in the bases (discrete empirical interpolation). With
// G_i = B_iᵀ M_ii^-1 B_i = R_iᵀ R_i the reduction of evaluatePairLowRank
// becomes, by Sylvester's identity,
//
//	ln det(I - M00^-1 M01 M11^-1 M10) = ln det(I - D Dᵀ),  D = T0 S T1ᵀ,
//
// with T_i = R_i A_i fixed per κ: O(p³) per point, no N-sized work. The
// interpolation operators do not depend on the placement, so the
// derivative of the approximation is Π0 dS Π1ᵀ and
//
//	d ln det = <-2 T0ᵀ (I - D Dᵀ)^-1 D T1, dS>,
//
// a weight on E0 × E1 alone (bem.CrossGradientBlock). The sub-block costs
// the pairs of the panels of E0 against those of E1, against about 4rT for
// the adaptive cross approximation of rank r and its contraction.
//
// A point is taken this way only when full rows and columns of its block
// on unknowns outside E0 and E1 (those nearest the other body and some
// spread over the surface) agree with the interpolation within
// sampledShare of its block tolerance; otherwise it takes the compressed
// path, so the sampling decides the speed, not the accuracy.

// Sampled-path parameters.
const (
	// sampledShare is the fraction of a point's block tolerance that the
	// interpolation's estimated error (sampledBlock) may reach: 5/6, the
	// share the compressed path's own compression takes (ACA tol/3,
	// recompression tol/2). Measured on the 20-point sweep of
	// BenchmarkSweep: 1/2 sent 40 evaluations back to the compressed path
	// (69.4 s), 5/6 sent 9 (66.0 s).
	sampledShare = 5.0 / 6
	// sampledChecks is the number of check rows (and of check columns):
	// half the unknowns nearest the other body, half spread over the rest.
	sampledChecks = 16
	// sampledOversample is the number of rows picked for the least-squares
	// fit, relative to the basis size: the p pivots and then the rows of
	// largest leverage. Measured between two 1280-triangle spheres at gap
	// 0.66R, κR = 1: the interpolation's error was 5.3, 3.1 and 2.4
	// times the best in the bases with 1, 1.5 and 2 times p.
	sampledOversample = 1.5
	// sampledCond is the largest condition number of B_i[E_i, :] accepted:
	// beyond it the interpolation would amplify the bases' error.
	sampledCond = 1e3
)

// sampledSide is one side of the sampled path at one κ.
type sampledSide struct {
	pick  []int          // E_i, ascending
	a, at blas64.General // A_i = B_i[E_i, :]⁺ (p_i × m_i) and its transpose
	rg    blas64.General // R_i, upper triangular, R_iᵀ R_i = G_i (p_i × p_i)
	rgt   blas64.General // R_iᵀ
	t, tt blas64.General // T_i = R_i A_i (p_i × m_i) and its transpose
	basis *sideBasis     // B_i
	// In balanced coordinates pick lists balanced functions; supp lists
	// the RWG edges they use, ascending, and terms[k] the edges of pick[k]
	// on that list: S = P0ᵀ M01[supp0, supp1] P1 with the sparse P_i of
	// terms (balanced). Both are nil in RWG coordinates.
	supp  []int
	terms [][]term
}

// newSampledSide picks the sampled unknowns of one side from its basis sb
// and builds the interpolation. It returns nil, without error, when the
// picked rows are too ill conditioned for the interpolation.
func newSampledSide(sb *sideBasis, basis edgeTopology) (*sampledSide, error) {
	p, n := sb.bt.Rows, sb.bt.Cols
	if p == 0 || p > n {
		return nil, nil
	}
	// Pivoted QR of Bᵀ (p×N) picks p well-conditioned rows of B.
	a := copyGeneral(sb.bt)
	jpvt := make([]int, n)
	for i := range jpvt {
		jpvt[i] = -1
	}
	tau := make([]float64, p)
	work := make([]float64, 1)
	lapack64.Geqp3(a, jpvt, tau, work, -1)
	work = make([]float64, int(work[0]))
	lapack64.Geqp3(a, jpvt, tau, work, len(work))
	// Leverage scores (squared row norms of B) rank the rows beyond the
	// pivots: the oversampled rows that steady the least-squares fit.
	lev := make([]float64, n)
	for j := 0; j < p; j++ {
		for i, v := range sb.bt.Data[j*sb.bt.Stride : j*sb.bt.Stride+n] {
			lev[i] += v * v
		}
	}
	order := make([]int, n)
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return lev[order[a]] > lev[order[b]] })
	list := append([]int(nil), jpvt[:p]...)
	in := make([]bool, n)
	for _, e := range list {
		in[e] = true
	}
	for _, e := range order {
		if len(list) >= int(sampledOversample*float64(p)) {
			break
		}
		if !in[e] {
			in[e] = true
			list = append(list, e)
		}
	}
	pick := basis.complete(list)
	m := len(pick)
	// A = B[E, :]⁺ = R^-1 Qᵀ from the thin QR of B[E, :] (m×p).
	be := mat.NewDense(m, p, nil)
	for k, e := range pick {
		for j := 0; j < p; j++ {
			be.Set(k, j, sb.b.Data[e*sb.b.Stride+j])
		}
	}
	var qr mat.QR
	qr.Factorize(be)
	if c := qr.Cond(); !(c <= sampledCond) {
		return nil, nil
	}
	var am mat.Dense // A = B[E, :]⁺ (p×m), the least-squares solution of B[E, :] A = I
	if err := qr.SolveTo(&am, false, eye(m)); err != nil {
		return nil, fmt.Errorf("interpolation of the sweep basis: %w", err)
	}
	// R_G with G = R_Gᵀ R_G (the basis' Gram matrix in M^-1).
	g := copyGeneral(sb.g)
	if _, ok := choleskyLower(g.Data, p, g.Stride); !ok {
		return nil, nil
	}
	ru := upperOf(blas64.Triangular{Uplo: blas.Lower, Diag: blas.NonUnit, N: p, Stride: g.Stride, Data: g.Data})
	rg := blas64.General{Rows: p, Cols: p, Stride: ru.Stride, Data: ru.Data}
	sd := &sampledSide{pick: pick, basis: sb, rg: rg, rgt: transpose(rg)}
	if basis.bal != nil {
		sd.supp, sd.terms = supportOf(basis.bal, pick)
	}
	sd.a = am.RawMatrix()
	sd.at = transpose(sd.a)
	sd.t = product(rg, sd.a)
	sd.tt = transpose(sd.t)
	return sd, nil
}

// edgeTopology is the edge–panel incidence of one body's RWG basis, and
// the balanced coordinates the sampled unknowns are taken in (nil for RWG
// ones).
type edgeTopology struct {
	panels [][2]int // the two panels of each edge
	edges  [][3]int // the three edges of each panel
	bal    *balance
}

// complete returns the unknowns whose two panels both carry one of the
// listed unknowns, ascending: the sub-block of the listed rows costs the
// pairs of those panels, which give the entries of the completed rows too.
// Balanced functions count as carried when every edge they use has both
// its panels among those of the listed functions' edges.
func (et edgeTopology) complete(list []int) []int {
	on := make([]bool, len(et.edges))
	if et.bal != nil {
		for _, j := range list {
			edges, _ := et.bal.lt.Column(j)
			for _, e := range edges {
				on[et.panels[e][0]], on[et.panels[e][1]] = true, true
			}
		}
		var out []int
		for j := 0; j < et.bal.lt.Len(); j++ {
			edges, _ := et.bal.lt.Column(j)
			in := true
			for _, e := range edges {
				in = in && on[et.panels[e][0]] && on[et.panels[e][1]]
			}
			if in {
				out = append(out, j)
			}
		}
		return out
	}
	for _, e := range list {
		on[et.panels[e][0]], on[et.panels[e][1]] = true, true
	}
	var out []int
	for e, pp := range et.panels {
		if on[pp[0]] && on[pp[1]] {
			out = append(out, e)
		}
	}
	return out
}

// sampledBasis is the sampled path of both sides at one κ, on the bases
// of the first refs references (crossBasis.levelFor).
type sampledBasis struct {
	side [2]*sampledSide
	topo [2]edgeTopology
	refs int
}

// rank is the rank of the sampled path's approximation, min(p0, p1).
func (sp *sampledBasis) rank() int { return min(sp.side[0].t.Rows, sp.side[1].t.Rows) }

// midpoint returns the midpoint of edge e on the surface s as placed (its
// panels' vertices, not the basis' mesh, which a moved surface shares).
func (et edgeTopology) midpoint(s *bem.Surface, e int) r3.Vec {
	plus := et.panels[e][0]
	v := s.Panels[plus].V
	var mid r3.Vec
	for k, te := range et.edges[plus] {
		if te != e { // vertex k is opposite edge k
			mid = r3.Add(mid, r3.Scale(0.5, v[k]))
		}
	}
	return mid
}

// position is where unknown j sits on the surface s as placed: an RWG
// function at its edge's midpoint, a balanced one at the mean of its edges'
// midpoints (a loop around its vertex, a tree at its edge).
func (et edgeTopology) position(s *bem.Surface, j int) r3.Vec {
	if et.bal == nil {
		return et.midpoint(s, j)
	}
	edges, _ := et.bal.lt.Column(j)
	var p r3.Vec
	for _, e := range edges {
		p = r3.Add(p, et.midpoint(s, e))
	}
	return r3.Scale(1/float64(len(edges)), p)
}

func topologyOf(s *bem.Surface) edgeTopology {
	b := s.Basis
	et := edgeTopology{panels: make([][2]int, len(b.Edges)), edges: b.TriEdge}
	for e, ed := range b.Edges {
		et.panels[e] = [2]int{ed.Plus, ed.Minus}
	}
	return et
}

// checks returns the check unknowns of side i at the placement surf: the
// sampledChecks/2 outside E_i whose edge midpoints are nearest the other
// body's bounding box, and sampledChecks/2 spread evenly over the rest.
func (sp *sampledBasis) checks(i int, surf []*bem.Surface) []int {
	own, other := surf[i], surf[1-i]
	lo, hi := bounds(other)
	in := make([]bool, own.Len())
	for _, e := range sp.side[i].pick {
		in[e] = true
	}
	type cand struct {
		e int
		d float64
	}
	var cs []cand
	for j := range in {
		if !in[j] {
			p := sp.topo[i].position(own, j)
			cs = append(cs, cand{j, boxGap(lo, hi, p, p)})
		}
	}
	if len(cs) <= sampledChecks {
		out := make([]int, len(cs))
		for k, c := range cs {
			out[k] = c.e
		}
		return out
	}
	sort.SliceStable(cs, func(a, b int) bool { return cs[a].d < cs[b].d })
	near := sampledChecks / 2
	out := make([]int, 0, sampledChecks)
	for _, c := range cs[:near] {
		out = append(out, c.e)
	}
	rest := cs[near:]
	sort.Slice(rest, func(a, b int) bool { return rest[a].e < rest[b].e })
	spread := sampledChecks - near
	for k := 0; k < spread; k++ {
		out = append(out, rest[(2*k+1)*len(rest)/(2*spread)].e)
	}
	return out
}

// evaluateSampled is the two-body integrand by the sampled path sp at a
// placement. It reports false, with no error, when the error of the
// point's block estimated from the check rows and columns (sampledBlock)
// exceeds tol (relative, Frobenius) times sampledShare.
func (sys *system) evaluateSampled(ctx context.Context, sf *selfFactors, sp *sampledBasis, surf []*bem.Surface, pl placement, grad bool, tol float64) (evaluation, bool, error) {
	s0, s1 := sp.side[0], sp.side[1]
	x, ok, err := sys.sampledBlock(ctx, sf, sp, surf, tol*sampledShare)
	if err != nil || !ok {
		return evaluation{}, false, err
	}
	d := product(product(s0.rg, x), s1.rgt) // D = T0 S T1ᵀ = R0 X R1ᵀ, p0×p1
	// Factor I - D Dᵀ or I - Dᵀ D, whichever is smaller (same determinant).
	y := d
	if d.Cols < d.Rows {
		y = transpose(d)
	}
	n := y.Rows
	delta := make([]float64, n*n)
	lowerRankUpdate(delta, n, n, y, sys.threads)
	ld, err := logDetIMinus(delta, n, n, sys.threads)
	if err != nil {
		return evaluation{}, false, sys.checkPositive(sf.kappa, err)
	}
	ev := evaluation{logDet: ld, viaBasis: true}
	if !grad {
		return ev, true, nil
	}
	// Z = (I - D Dᵀ)^-1 D = D (I - Dᵀ D)^-1.
	lc := blas64.Triangular{Uplo: blas.Lower, Diag: blas.NonUnit, N: n, Stride: n, Data: delta}
	z := copyGeneral(y)
	solveLowerInPlace(lc, z)
	solveLowerTransInPlace(lc, z)
	if d.Cols < d.Rows {
		z = transpose(z)
	}
	// H = T0ᵀ Z T1 on E0 × E1 (m0×m1); d ln det = -2 <H, dS>.
	h := product(s0.tt, product(z, s1.t))
	rows, cols := s0.pick, s1.pick
	if s0.supp != nil {
		// <H, dS> = <P0 H P1ᵀ, dM01[supp0, supp1]>.
		hr := make([]float64, len(s0.supp)*len(s1.supp))
		balancedWeight(hr, h.Data, len(s1.supp), h.Cols, s0.terms, s1.terms)
		h = blas64.General{Rows: len(s0.supp), Cols: len(s1.supp), Stride: len(s1.supp), Data: hr}
		rows, cols = s0.supp, s1.supp
	}
	var mot bem.Motion
	if sys.moving == 1 {
		mot, err = sys.asm.CrossGradientBlock(ctx, h.Data, sf.op, surf[0], surf[1], pl.centre, rows, cols)
	} else {
		mot, err = sys.asm.CrossGradientBlock(ctx, transpose(h).Data, sf.op, surf[1], surf[0], pl.centre, cols, rows)
	}
	if err != nil {
		return evaluation{}, false, err
	}
	ev.setGrad(mot, -2)
	return ev, true, nil
}

// sampledBlock assembles the sub-block S = M01[E0, E1] of the placement
// surf and returns the block in the bases, X = A0 S A1ᵀ (p0×p1, M01 ≈
// B0 X B1ᵀ), and whether the interpolation agrees with full rows and
// columns of the block on the check unknowns within tol, relative to the
// block. The block's error is estimated as if every row (column) erred
// like the checked ones on average, the larger of
//
//	‖E‖²_F ≈ (N0/c0) Σ_checked rows ‖E_r‖²,  (N1/c1) Σ_checked columns ‖E_c‖²,
//
// (half the checked ones are the nearest the other body, where the block
// and its error are largest) and compared with tol ‖X‖_F = tol ‖B0 X B1ᵀ‖_F,
// the block's own norm: the same measure as the compressed path's
// tolerance (relative Frobenius of the whole block). Relative to the
// checked rows' own norm instead, a block concentrated on E0 × E1 (high κ)
// would fail on rows that hardly carry it.
func (sys *system) sampledBlock(ctx context.Context, sf *selfFactors, sp *sampledBasis, surf []*bem.Surface, tol float64) (x blas64.General, ok bool, err error) {
	s0, s1 := sp.side[0], sp.side[1]
	m0, m1 := len(s0.pick), len(s1.pick)
	s := blas64.General{Rows: m0, Cols: m1, Stride: m1, Data: make([]float64, m0*m1)}
	if s0.supp != nil {
		n0, n1 := len(s0.supp), len(s1.supp)
		raw := make([]float64, n0*n1)
		if err := sys.asm.CrossBlock(ctx, raw, sf.op, surf[0], surf[1], s0.supp, s1.supp); err != nil {
			return x, false, err
		}
		balancedSub(s.Data, raw, n1, s0.terms, s1.terms)
	} else if err := sys.asm.CrossBlock(ctx, s.Data, sf.op, surf[0], surf[1], s0.pick, s1.pick); err != nil {
		return x, false, err
	}
	x = product(product(s0.a, s), s1.at)
	normSq := dot(x.Data, x.Data)
	var errSq float64
	check := func(exact []float64, approx blas64.General, n, c int) {
		var sum float64
		for i, v := range approx.Data {
			e := exact[i] - v
			sum += e * e
		}
		errSq = max(errSq, sum*float64(n)/float64(c))
	}
	// Exact rows and columns of the block in the coordinates of the bases.
	var src crossSource = rwgSource{asm: sys.asm, op: sf.op, a: surf[0], b: surf[1]}
	if sp.topo[0].bal != nil {
		src = newBalancedSource(sys.asm, sf.op, surf[0], surf[1], [2]*balance{sp.topo[0].bal, sp.topo[1].bal})
	}
	if rows := sp.checks(0, surf); len(rows) > 0 {
		exact := make([]float64, len(rows)*surf[1].Len())
		if err := src.rows(ctx, exact, rows); err != nil {
			return x, false, err
		}
		// B0[rows, :] X B1ᵀ, c×N1
		check(exact, product(product(rowsOf(s0.basis.b, rows), x), s1.basis.bt), surf[0].Len(), len(rows))
	}
	if cols := sp.checks(1, surf); len(cols) > 0 {
		exact := make([]float64, len(cols)*surf[0].Len())
		if err := src.cols(ctx, exact, cols); err != nil {
			return x, false, err
		}
		// B1[cols, :] Xᵀ B0ᵀ, c×N0
		check(exact, product(product(rowsOf(s1.basis.b, cols), transpose(x)), s0.basis.bt), surf[1].Len(), len(cols))
	}
	return x, errSq <= tol*tol*normSq, nil
}

// eye returns the n×n identity.
func eye(n int) *mat.Dense {
	d := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		d.Set(i, i, 1)
	}
	return d
}

// rowsOf returns the listed rows of a.
func rowsOf(a blas64.General, rows []int) blas64.General {
	out := blas64.General{Rows: len(rows), Cols: a.Cols, Stride: a.Cols, Data: make([]float64, len(rows)*a.Cols)}
	for k, i := range rows {
		copy(out.Data[k*a.Cols:(k+1)*a.Cols], a.Data[i*a.Stride:i*a.Stride+a.Cols])
	}
	return out
}
