package scatter

import (
	"context"
	"fmt"
	"math"
	"sync"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
)

// This file holds the sweep basis of two-body sweeps (DESIGN §10): at one κ
// the compressed interaction blocks M01(t) ≈ U(t) V(t)ᵀ of every placement t
// of the sweep have their columns U(t) in nearly one subspace of body 0's
// currents and V(t) in nearly one subspace of body 1's (the fields one body
// sends to the other change slowly with the placement). With orthonormal
// bases B0 (N0×p0) and B1 (N1×p1) of those subspaces, whitened once per κ,
//
//	W_i = L_i^-1 B_i,  Z_i = L_i^-T W_i = M_ii^-1 B_i,
//
// a point's U = B0 C0 and V = B1 C1 (C_i = B_iᵀ U or V, p_i×r) give the
// whitened factors of the reduction as L0^-1 U = W0 C0 and L1^-1 V = W1 C1,
// and the gradient's M00^-1 U = Z0 C0 and M11^-1 V = Z1 C1: O(N p r) work
// per point in place of the four triangular solves, O(N² r), of the direct
// low-rank path. Each point checks how much of its own U and V lies outside
// the bases; beyond a sixth of its block tolerance it whitens the leading
// directions of that part for itself (crossBasis.fit), so the bases
// decide only the speed, never the accuracy.
//
// The bases are nested: the references' directions enter them one
// reference after the other, from the end of the sweep whose block has the
// smaller rank, so the leading directions span the first references'
// blocks. A point between two references takes the sampled path on the
// smallest leading part holding both (a level), and the whole bases only
// where that fails its check: in a gap sweep most points lie between the
// far references, whose blocks need about half the directions of the
// closest one, and the per-point work is cubic in the size.

// Sweep-basis parameters.
const (
	// basisMinPoints is the least number of sweep points that admit a κ
	// (κ below their cutoff) for a basis to be built at that κ: below it the
	// per-κ work (basisRefs compressions, two solves with p columns) is not
	// won back. It is at least basisRefs: with as many points as references
	// every point is one, and its own compression, which it needs anyway,
	// goes into the basis, so that the points cost two solves with p
	// columns per κ instead of four with r columns each. Measured on the
	// 20-point sweep of BenchmarkSweep at the high-κ nodes with 4 and 6
	// points: 1.2 and 1.8 s with a basis against 2.0 and 2.1 s without.
	basisMinPoints = basisRefs
	// basisRefs is the number of placements, spread over the sweep, whose
	// compressed blocks span the bases, and basisKeep the fraction of a
	// reference block's tolerance (times its Frobenius norm) below which a
	// direction is left out of a basis. Fewer or smaller bases leave more
	// directions to the points, more or larger ones cost more per κ:
	// measured on the 20-point sweep of BenchmarkSweep (1920 unknowns per
	// body), 3, 4 and 5 references took 119.7, 113.4 and 118.8 s, and
	// basisKeep 1/10, 1/30 and 1/100 took 122.3, 113.4 and 119.2 s before
	// the sampled path; with it, 1/30, 1/10 and 1/5 took about 101, 94.3
	// and 93.9 s (1/5 sent most close points back to the compressed path).
	// With the nested levels (crossBasis.levelFor) the points between the
	// far references cost little, and the references' own compressions
	// weigh more: 2, 3 and 4 references took 75.3, 69.4 and 76.2 s (the
	// sweep's CPU time 3.8, 3.5 and 3.9 times that of its self blocks,
	// which does not depend on them), so 3.
	basisRefs = 3
	basisKeep = 1.0 / 10
	// basisTight is the references' block tolerance relative to the run's:
	// the sampled path interpolates in the bases, which amplifies what
	// they miss two to three times (measured at gaps 0.66R–1.3R between two
	// 1280-triangle spheres at κR = 1: with references at the run's
	// tolerance points between them were off by up to 0.9 of it, at a
	// quarter of it by up to 0.37), so the bases must hold the blocks
	// better than the points need.
	basisTight = 1.0 / 4
	// basisShare is the fraction of a point's block tolerance that the part
	// of its U and V outside the bases may take; the compression's own
	// error stays within the remaining 5/6 (ACA tol/3, recompression tol/2).
	basisShare = 1.0 / 6
)

// sideBasis is the basis of one body's side of the interaction blocks at
// one κ, in RWG or in balanced coordinates (balance.go): B (N×p) with
// orthonormal columns and its transpose (so that both
// Bᵀ X and B C are plain products: gonum's transposed Gemm kernel is
// several times slower), W = L^-1 B and Z = M^-1 B (N×p). Only the
// gradient of a point that takes the fit path needs Z (the sampled path
// needs G alone), so Z is solved for on first use.
type sideBasis struct {
	b, bt, w blas64.General
	g        blas64.General // Wᵀ W = Bᵀ M^-1 B (p×p)
	l        blas64.Triangular
	zOnce    sync.Once
	z        blas64.General
}

func (sb *sideBasis) size() int { return sb.bt.Rows }

// inverse returns Z = M^-1 B = L^-T W (N×p), solved for on the first call.
// It is safe for concurrent use.
func (sb *sideBasis) inverse() blas64.General {
	sb.zOnce.Do(func() {
		sb.z = copyGeneral(sb.w)
		solveLowerTransInPlace(sb.l, sb.z)
	})
	return sb.z
}

// crossBasis is the sweep basis of both sides at one κ, with the compressed
// blocks of the reference placements it was built from.
type crossBasis struct {
	side [2]*sideBasis
	tol  float64 // block tolerance the references were compressed to
	refs map[placement]*lowRank
	// balanced tells that the bases live in balanced coordinates
	// (balance.go): the sampled path samples balanced functions, and the
	// fit path (RWG blocks in orthonormal RWG bases) and the references'
	// blocks are not available.
	balanced bool
	// sampled is the sampled path (sampled.go) on nested bases, smallest
	// first, the last on the whole bases; empty where a side's basis cannot
	// be interpolated. The references' directions enter the bases one
	// reference after the other (spanOf), in the order added, so the
	// leading directions of the bases are those of the first references:
	// level k spans the blocks of added[:sampled[k].refs]. A point between
	// two references needs only a level holding both (levelFor), and the
	// per-point work grows as the cube of the bases' size.
	sampled []*sampledBasis
	added   []int // indices of the references' placements, in the order their directions entered the bases
}

// levelFor returns the smallest sampled level whose bases hold the
// directions of the references lo and hi (indices into the placements the
// basis was built from), or the whole bases when lo or hi is negative or
// did not enter them. It returns nil when the basis has no sampled path.
func (cb *crossBasis) levelFor(lo, hi int) *sampledBasis {
	if len(cb.sampled) == 0 {
		return nil
	}
	full := cb.sampled[len(cb.sampled)-1]
	if lo < 0 || hi < 0 {
		return full
	}
	need := 0
	for _, j := range [2]int{lo, hi} {
		at := -1
		for k, a := range cb.added {
			if a == j {
				at = k
			}
		}
		if at < 0 {
			return full
		}
		need = max(need, at+1)
	}
	for _, sp := range cb.sampled {
		if sp.refs >= need {
			return sp
		}
	}
	return full
}

// buildCrossBasis compresses the interaction block at the reference
// placements pls to basisTight times the run's block tolerance and builds
// the bases of both sides, and their sampled path (sampled.go), from them.
// It returns nil, without error, when no reference block compresses.
func (sys *system) buildCrossBasis(ctx context.Context, sf *selfFactors, pls []placement) (*crossBasis, error) {
	cb := &crossBasis{tol: basisTight * sys.compress.tol, refs: map[placement]*lowRank{}}
	bal, err := sys.balanceAt(sf)
	if err != nil {
		return nil, err
	}
	cb.balanced = bal[0] != nil
	// The references are compressed side by side (each compression is a
	// sequence of small row and column assemblies that keeps one core busy
	// at best), and so are the two sides' bases below.
	lrs := make([]*lowRank, len(pls))
	tols := make([]float64, len(pls)) // each reference's own block tolerance
	err = forEach(ctx, len(pls), sys.threads, func(ctx context.Context, j int) error {
		surf, err := sys.surfacesAt(pls[j])
		if err != nil {
			return err
		}
		var lr *lowRank
		var ok bool
		if cb.balanced {
			lr, ok, err = sys.compressBalanced(ctx, sf.op, surf[0], surf[1], bal, cb.tol)
			tols[j] = cb.tol
		} else {
			lr, ok, err = sys.compressCross(ctx, sf.op, sf.kappa, surf[0], surf[1], cb.tol)
			_, size := surfacesClose(surf[0], surf[1])
			tols[j] = scaledTolerance(cb.tol, sf.kappa, size)
		}
		if err != nil {
			return err
		}
		if ok {
			lrs[j] = lr
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	for j, lr := range lrs {
		if !cb.balanced {
			// nil: the point's own evaluation goes dense. Balanced blocks
			// are not the RWG ones the compressed path reduces.
			cb.refs[pls[j]] = lr
		}
	}
	var us, vs []blas64.General
	var thr []float64
	for _, j := range nestingOrder(lrs) {
		lr := lrs[j]
		sigma := columnNorms(lr.u)
		us = append(us, lr.u)
		vs = append(vs, scaledColumns(lr.v, sigma))
		thr = append(thr, basisKeep*tols[j]*math.Sqrt(dot(sigma, sigma)))
		cb.added = append(cb.added, j)
	}
	if len(us) == 0 {
		return nil, nil
	}
	// The nested levels of the sampled path: one for every number of
	// leading references from two on (a single reference is a point of its
	// own), sides[c][i] that of side i on the first c+1 references.
	first := min(2, len(us))
	sides := make([][2]*sampledSide, len(us))
	var topo [2]edgeTopology
	xs := [2][]blas64.General{us, vs}
	err = forEach(ctx, 2, sys.threads, func(ctx context.Context, i int) error {
		bt, cuts, err := spanOf(xs[i], thr)
		if err != nil {
			return fmt.Errorf("scatter: sweep basis of %s at κ = %g: %w", sys.names[i], sf.kappa, err)
		}
		sb := &sideBasis{b: transpose(bt), bt: bt, l: sf.f[i].l}
		sb.w = copyGeneral(sb.b)
		if bal[i] != nil {
			// W = L^-1 (T S)^-T B': G = B'ᵀ M'^-1 B' with M' = (T S)ᵀ M (T S).
			bal[i].invTransRows(sb.w.Data, sb.b.Data, sb.b.Cols)
		}
		solveLower(sb.l, sb.w, sys.threads)
		sb.g = gram(sb.w)

		cb.side[i] = sb
		topo[i] = topologyOf(sys.surf[i])
		topo[i].bal = bal[i]
		for c := first - 1; c < len(us); c++ {
			if c > first-1 && cuts[c] == cuts[c-1] {
				sides[c][i] = sides[c-1][i]
				continue
			}
			if sides[c][i], err = newSampledSide(sb.prefix(cuts[c]), topo[i]); err != nil {
				return fmt.Errorf("scatter: sweep basis of %s at κ = %g: %w", sys.names[i], sf.kappa, err)
			}
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	for c := first - 1; c < len(us); c++ {
		s := sides[c]
		if s[0] == nil || s[1] == nil {
			continue // cannot be interpolated: the next level serves its points
		}
		if n := len(cb.sampled); n > 0 && cb.sampled[n-1].side == s {
			cb.sampled[n-1].refs = c + 1 // no new directions: the same level
			continue
		}
		cb.sampled = append(cb.sampled, &sampledBasis{side: s, topo: topo, refs: c + 1})
	}
	if n := len(cb.sampled); n > 0 && cb.sampled[n-1].refs < len(us) {
		cb.sampled = nil // the whole bases cannot be interpolated
	}
	return cb, nil
}

// gram returns Wᵀ W (p×p) for the N×p matrix w: the lower triangle by a
// rank-N update (half the work of the general product), mirrored.
func gram(w blas64.General) blas64.General {
	p := w.Cols
	g := blas64.General{Rows: p, Cols: p, Stride: p, Data: make([]float64, p*p)}
	lowerRankUpdate(g.Data, p, p, transpose(w), 1)
	for i := 0; i < p; i++ {
		for j := 0; j < i; j++ {
			g.Data[j*p+i] = g.Data[i*p+j]
		}
	}
	return g
}

// nestingOrder returns the indices of the compressed reference blocks lrs
// (nil or rank 0 left out) in the order their directions enter the bases:
// from the end of the sweep whose reference has the smaller rank towards
// the other, so that the leading levels, which serve the points between
// the first references, are the smallest (for a gap sweep the far end).
func nestingOrder(lrs []*lowRank) []int {
	var out []int
	for j, lr := range lrs {
		if lr != nil && lr.rank() > 0 {
			out = append(out, j)
		}
	}
	if n := len(out); n > 1 && lrs[out[n-1]].rank() < lrs[out[0]].rank() {
		for a, b := 0, n-1; a < b; a, b = a+1, b-1 {
			out[a], out[b] = out[b], out[a]
		}
	}
	return out
}

// prefix returns the basis of the first k directions of sb (k ≤ p): the
// leading columns of B and W and the leading block of G. The bases are
// nested (spanOf), so this is the basis of the first references.
func (sb *sideBasis) prefix(k int) *sideBasis {
	if k == sb.size() {
		return sb
	}
	n := sb.b.Rows
	cols := func(a blas64.General, r int) blas64.General {
		return copyGeneral(blas64.General{Rows: r, Cols: k, Stride: a.Stride, Data: a.Data})
	}
	return &sideBasis{
		b:  cols(sb.b, n),
		bt: copyGeneral(blas64.General{Rows: k, Cols: n, Stride: sb.bt.Stride, Data: sb.bt.Data[:k*sb.bt.Stride]}),
		w:  cols(sb.w, n),
		g:  cols(sb.g, k),
		l:  sb.l,
	}
}

// spanOf returns, transposed (p×N), an orthonormal basis of the directions
// of the N×k_i matrices xs whose singular values exceed thr[i] once the
// directions of the earlier matrices are removed: block Gram–Schmidt, the
// residual's directions from the eigenvectors of its Gram matrix, and a
// second projection of the directions kept (so that the basis stays
// orthonormal to rounding). One projection of the whole block is enough to
// rank its directions: what rounding leaves of the basis in the residual
// is of order 1e-16 of the block, far below the thresholds (a tenth of a
// block tolerance: 7e-10 of the block at accuracy 1e-3 and the lowest κ of
// BenchmarkSweep). cuts[i] is the number of directions after those of
// xs[:i+1]: the first cuts[i] rows of the basis span the first i+1
// matrices to their thresholds.
func spanOf(xs []blas64.General, thr []float64) (bt blas64.General, cuts []int, err error) {
	n := xs[0].Rows
	bt = blas64.General{Rows: 0, Cols: n, Stride: n}
	cuts = make([]int, len(xs))
	for i, x := range xs {
		if i > 0 {
			cuts[i-1] = bt.Rows
		}
		e := copyGeneral(x)
		removeSpan(bt, e)
		k := e.Cols
		vals, vecs, err := gramEigen(e)
		if err != nil {
			return blas64.General{}, nil, err
		}
		var keep []int
		for j := k - 1; j >= 0; j-- {
			if vals[j] > thr[i]*thr[i] {
				keep = append(keep, j)
			}
		}
		if len(keep) == 0 {
			continue
		}
		// New directions E v_j / sqrt(λ_j), made orthonormal to B and to
		// each other once more.
		sel := blas64.General{Rows: k, Cols: len(keep), Stride: len(keep), Data: make([]float64, k*len(keep))}
		for c, j := range keep {
			s := 1 / math.Sqrt(vals[j])
			for r := 0; r < k; r++ {
				sel.Data[r*sel.Stride+c] = vecs.At(r, j) * s
			}
		}
		nw := blas64.General{Rows: n, Cols: len(keep), Stride: len(keep), Data: make([]float64, n*len(keep))}
		blas64.Gemm(blas.NoTrans, blas.NoTrans, 1, e, sel, 0, nw)
		removeSpan(bt, nw)
		_, q := qrInPlace(nw)
		qt := transpose(q)
		bt.Data = append(bt.Data[:bt.Rows*n:bt.Rows*n], qt.Data...)
		bt.Rows += qt.Rows
	}
	cuts[len(xs)-1] = bt.Rows
	return bt, cuts, nil
}

// removeSpan overwrites x (N×k) with x - B Bᵀ x for the basis bt = Bᵀ.
func removeSpan(bt, x blas64.General) {
	if bt.Rows == 0 {
		return
	}
	c := blas64.General{Rows: bt.Rows, Cols: x.Cols, Stride: x.Cols, Data: make([]float64, bt.Rows*x.Cols)}
	blas64.Gemm(blas.NoTrans, blas.NoTrans, 1, bt, x, 0, c)
	blas64.Gemm(blas.NoTrans, blas.NoTrans, -1, transpose(bt), c, 1, x)
}

// fit expresses the compressed block lr in the bases: U = B0 C0 + E0 and
// V = B1 C1 + E1 with C0 = B0ᵀ U, C1 = B1ᵀ V. The block's error from
// leaving the residuals out is, to first order (Σ the column norms of U, V
// orthonormal),
//
//	‖M - B0 C0 C1ᵀ B1ᵀ‖_F ≤ sqrt(‖E0‖²_F + ‖E1 Σ‖²_F),
//
// with ‖E‖² = ‖X‖² - ‖C‖² for orthonormal B. Within tol times ‖U‖_F (the
// block's norm, V orthonormal) the residuals are dropped. Otherwise each side keeps the
// leading directions of its residual, P = E v_k for the eigenvectors v_k of
// the Gram matrix of E (of E Σ on side 1), until the dropped part is within
// tol/√2 per side; they are whitened for this point alone (2N² per
// direction, against 2N² per column of U for the direct path). The result
// is exact to tol whatever the bases missed.
func (cb *crossBasis) fit(sys *system, sf *selfFactors, lr *lowRank, tol float64) (*basisFit, error) {
	sigma := columnNorms(lr.u)
	tol *= math.Sqrt(dot(sigma, sigma))
	f := &basisFit{cb: cb, sigma: sigma}
	xs := [2]blas64.General{lr.u, scaledColumns(lr.v, sigma)}
	var res [2]float64
	for i, x := range xs {
		f.c[i] = product(cb.side[i].bt, x)
		res[i] = math.Max(0, dot(x.Data, x.Data)-dot(f.c[i].Data, f.c[i].Data))
	}
	unscale := make([]float64, len(sigma))
	for k, s := range sigma {
		unscale[k] = 1 / s
	}
	defer func() { f.c[1] = scaledColumns(f.c[1], unscale) }() // C1 was taken of V Σ
	if res[0]+res[1] <= tol*tol {
		return f, nil
	}
	for i, x := range xs {
		e := copyGeneral(x)
		blas64.Gemm(blas.NoTrans, blas.NoTrans, -1, cb.side[i].b, f.c[i], 1, e)
		p, d, err := leading(e, tol*tol/2)
		if err != nil {
			return nil, fmt.Errorf("scatter: sweep basis of %s at κ = %g: %w", sys.names[i], sf.kappa, err)
		}
		if p.Cols == 0 {
			continue
		}
		if i == 1 {
			d = scaledColumns(d, unscale) // E1 Σ ≈ P D: E1 ≈ P D Σ^-1
		}
		w := copyGeneral(p)
		solveLower(sf.f[i].l, w, sys.threads)
		z := copyGeneral(w)
		solveLowerTransInPlace(sf.f[i].l, z)
		f.extra[i] = &extraDirections{w: w, z: z, d: d, wtw: product(transpose(cb.side[i].w), w), ptp: product(transpose(w), w)}
	}
	return f, nil
}

// leading returns the directions of e (N×k) that carry all but at most
// drop of its squared Frobenius norm: P = E V_k (N×e) and D = V_kᵀ (e×k),
// so that e ≈ P D, with V_k the leading eigenvectors of eᵀe.
func leading(e blas64.General, drop float64) (p, d blas64.General, err error) {
	k := e.Cols
	vals, vecs, err := gramEigen(e)
	if err != nil {
		return p, d, err
	}
	tail, lo := 0.0, 0
	for lo < k && tail+math.Max(vals[lo], 0) <= drop {
		tail += math.Max(vals[lo], 0)
		lo++
	}
	m := k - lo
	vk := blas64.General{Rows: k, Cols: m, Stride: m, Data: make([]float64, k*m)}
	for r := 0; r < k; r++ {
		for c := 0; c < m; c++ {
			vk.Data[r*m+c] = vecs.At(r, k-1-c)
		}
	}
	p = blas64.General{Rows: e.Rows, Cols: m, Stride: m, Data: make([]float64, e.Rows*m)}
	if m > 0 {
		blas64.Gemm(blas.NoTrans, blas.NoTrans, 1, e, vk, 0, p)
	}
	return p, transpose(vk), nil
}

// gramEigen returns the eigenvalues (ascending) and eigenvectors (columns)
// of the Gram matrix eᵀe of the N×k matrix e.
func gramEigen(e blas64.General) ([]float64, *mat.Dense, error) {
	k := e.Cols
	g := mat.NewSymDense(k, nil)
	blas64.Syrk(blas.Trans, 1, e, 0, g.RawSymmetric())
	var eig mat.EigenSym
	if !eig.Factorize(g, true) {
		return nil, nil, fmt.Errorf("eigen decomposition of a %d×%d Gram matrix did not converge", k, k)
	}
	vecs := &mat.Dense{}
	eig.VectorsTo(vecs)
	return eig.Values(nil), vecs, nil
}

// columnNorms returns the Euclidean norms of the columns of a.
func columnNorms(a blas64.General) []float64 {
	s := make([]float64, a.Cols)
	for i := 0; i < a.Rows; i++ {
		for k, v := range a.Data[i*a.Stride : i*a.Stride+a.Cols] {
			s[k] += v * v
		}
	}
	for k := range s {
		s[k] = math.Sqrt(s[k])
	}
	return s
}

// scaledColumns returns a copy of a with column k multiplied by s[k].
func scaledColumns(a blas64.General, s []float64) blas64.General {
	c := copyGeneral(a)
	for i := 0; i < c.Rows; i++ {
		row := c.Data[i*c.Stride : i*c.Stride+c.Cols]
		for k := range row {
			row[k] *= s[k]
		}
	}
	return c
}

// basisFit is a compressed block expressed in a sweep basis: on side i
// (0: U, 1: V) the block's factor is B_i c[i] plus, where the basis missed
// part of it, this point's own directions P_i d_i.
type basisFit struct {
	cb    *crossBasis
	c     [2]blas64.General
	extra [2]*extraDirections
	sigma []float64 // column norms of U
}

// extraDirections are a point's own directions P (N×e) outside a basis,
// whitened (W_P = L^-1 P, Z_P = M^-1 P), with their coefficients d (e×r)
// and the Gram blocks Wᵀ W_P (p×e) and W_Pᵀ W_P (e×e).
type extraDirections struct {
	w, z, d  blas64.General
	wtw, ptp blas64.General
}

// gram returns Xᵀ M_ii^-1 X (r×r) for side i's factor X, with the columns
// of c and d scaled by s when s is not nil:
//
//	cᵀ G c + cᵀ (Wᵀ W_P) d + dᵀ (W_Pᵀ W) c + dᵀ (W_Pᵀ W_P) d.
func (f *basisFit) gram(i int, s []float64) blas64.General {
	c := f.c[i]
	if s != nil {
		c = scaledColumns(c, s)
	}
	out := product(transpose(c), product(f.cb.side[i].g, c))
	if x := f.extra[i]; x != nil {
		d := x.d
		if s != nil {
			d = scaledColumns(d, s)
		}
		cross := product(transpose(c), product(x.wtw, d)) // cᵀ (Wᵀ W_P) d
		dd := product(transpose(d), product(x.ptp, d))
		for a := 0; a < out.Rows; a++ {
			for b := 0; b < out.Cols; b++ {
				out.Data[a*out.Stride+b] += cross.Data[a*cross.Stride+b] + cross.Data[b*cross.Stride+a] + dd.Data[a*dd.Stride+b]
			}
		}
	}
	return out
}

// inverse returns M_ii^-1 times side i's factor, times g (r×k) when g is
// not nil: Z c g (+ Z_P d g).
func (f *basisFit) inverse(i int, g *blas64.General) blas64.General {
	times := func(c blas64.General) blas64.General {
		if g == nil {
			return c
		}
		return product(c, *g)
	}
	out := product(f.cb.side[i].inverse(), times(f.c[i]))
	if x := f.extra[i]; x != nil {
		blas64.Gemm(blas.NoTrans, blas.NoTrans, 1, x.z, times(x.d), 1, out)
	}
	return out
}

// reduce returns the triangular factor R (r×r, upper, row major) with
// RᵀR = Uᵀ M00^-1 U and Δ = R (Vᵀ M11^-1 V) Rᵀ of the low-rank reduction
// (evaluatePairLowRank), from the r×r Gram matrices of the fit. The Gram
// matrix of side 0 is taken of U Σ^-1, whose columns have unit norm, and
// factored as R̂ᵀR̂, R = R̂ Σ: its condition number is then about that of
// M00, not that times the condition number of Σ². It reports false when the
// factorisation fails (the caller then takes the direct path).
func (f *basisFit) reduce(r int) (rr, delta []float64, ok bool) {
	inv := make([]float64, r)
	for k, s := range f.sigma {
		inv[k] = 1 / s
	}
	a0 := f.gram(0, inv)
	if _, ok := choleskyLower(a0.Data, r, a0.Stride); !ok {
		return nil, nil, false
	}
	rr = make([]float64, r*r)
	for a := 0; a < r; a++ {
		for b := a; b < r; b++ {
			rr[a*r+b] = a0.Data[b*a0.Stride+a] * f.sigma[b] // R = L̂ᵀ Σ
		}
	}
	rg := blas64.General{Rows: r, Cols: r, Stride: r, Data: rr}
	d := product(rg, product(f.gram(1, nil), transpose(rg)))
	return rr, d.Data, true
}

// product returns a b.
func product(a, b blas64.General) blas64.General {
	out := blas64.General{Rows: a.Rows, Cols: b.Cols, Stride: b.Cols, Data: make([]float64, a.Rows*b.Cols)}
	if a.Rows > 0 && b.Cols > 0 && a.Cols > 0 {
		blas64.Gemm(blas.NoTrans, blas.NoTrans, 1, a, b, 0, out)
	}
	return out
}

// cached returns the compressed block of a reference placement as
// compressCross returned it (ok false for a block that did not compress),
// for a point whose block tolerance tol is the references' or looser (a
// node that carries a small share of the integral): the tighter block only
// adds accuracy, and which points reuse it depends on the sweep alone. A
// block that did not compress to the references' tolerance is a hit only at
// that tolerance. hit is false otherwise, and for a nil basis.
func (cb *crossBasis) cached(pl placement, tol float64) (lr *lowRank, ok, hit bool) {
	if cb == nil || cb.tol > tol {
		return nil, false, false
	}
	lr, hit = cb.refs[pl]
	if lr == nil && cb.tol != tol {
		return nil, false, false // the looser tolerance may still compress
	}
	return lr, lr != nil, hit
}
