package scatter

import (
	"context"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"

	"github.com/fluctus/fluctus/bem"
)

// BlockRank records how one interaction block of a point was handled over
// the frequencies: compressed to a low rank (DESIGN §10) or assembled dense.
type BlockRank struct {
	Rows, Cols string // names of the two bodies of the block
	// Rank is the largest rank used at the frequencies where the block was
	// compressed (0 when it never was).
	Rank int
	// Compressed and Dense count the evaluations of each kind, Basis those
	// of the compressed ones that went through the sweep basis, and Sampled
	// those of them that took the sampled path (sampled.go).
	Compressed, Dense, Basis, Sampled int
}

// mergeRanks adds the records of one evaluation to those of a point.
func mergeRanks(to, from []BlockRank) []BlockRank {
	for _, f := range from {
		found := false
		for k := range to {
			if to[k].Rows == f.Rows && to[k].Cols == f.Cols {
				to[k].Rank = max(to[k].Rank, f.Rank)
				to[k].Compressed += f.Compressed
				to[k].Dense += f.Dense
				to[k].Basis += f.Basis
				to[k].Sampled += f.Sampled
				found = true
				break
			}
		}
		if !found {
			to = append(to, f)
		}
	}
	return to
}

// evaluateTwo is the two-body integrand, from the compressed interaction
// block when it is numerically low rank and from the dense one otherwise.
// With a sweep basis at this κ (sf.basis) the block of a reference
// placement is taken from it, and the compressed block goes through the
// basis (crossBasis.fit) with a sixth of its tolerance for what the basis
// misses. Before that, a point the basis' sampled path (sampled.go) takes
// skips its own compression.
func (sys *system) evaluateTwo(ctx context.Context, sf *selfFactors, surf []*bem.Surface, pl placement, grad bool) (evaluation, error) {
	if ev, ok, err := sys.sampledTwo(ctx, sf, surf, pl, grad, -1, -1); err != nil || ok {
		return ev, err
	}
	return sys.compressedTwo(ctx, sf, surf, pl, grad)
}

// compressedTwo is evaluateTwo without the sampled path: the compressed
// path, through the sweep basis where κ has one, or the dense one where
// the block does not compress.
func (sys *system) compressedTwo(ctx context.Context, sf *selfFactors, surf []*bem.Surface, pl placement, grad bool) (evaluation, error) {
	rec := BlockRank{Rows: sys.names[0], Cols: sys.names[1]}
	if sys.compress.on {
		lr, ok, hit := sf.basis.cached(pl, sys.compress.tol)
		var err error
		if !hit {
			lr, ok, err = sys.compressCross(ctx, sf.op, sf.kappa, surf[0], surf[1], sys.compress.tol)
		}
		if err != nil {
			return evaluation{}, err
		}
		if ok {
			var fit *basisFit
			if sf.basis != nil && !sf.basis.balanced && lr.rank() > 0 {
				fit, err = sf.basis.fit(sys, sf, lr, basisShare*sys.blockTolerance(sf, surf))
				if err != nil {
					return evaluation{}, err
				}
			}
			ev, err := sys.evaluatePairLowRank(ctx, sf, surf, pl, grad, lr, fit)
			rec.Rank, rec.Compressed = lr.rank(), 1
			if ev.viaBasis {
				rec.Basis = 1
			}
			ev.ranks = []BlockRank{rec}
			return ev, err
		}
	}
	ev, err := sys.evaluatePair(ctx, sf, surf, pl, grad)
	rec.Dense = 1
	ev.ranks = []BlockRank{rec}
	return ev, err
}

// blockTolerance is the relative tolerance of the interaction block at
// the placement surf (scaledTolerance of the run's block tolerance).
func (sys *system) blockTolerance(sf *selfFactors, surf []*bem.Surface) float64 {
	_, size := surfacesClose(surf[0], surf[1])
	return scaledTolerance(sys.compress.tol, sf.kappa, size)
}

// hasSampled tells whether a two-body evaluation at the κ of sf tries the
// sweep basis' sampled path (sampled.go) first.
func (sys *system) hasSampled(sf *selfFactors) bool {
	return sys.compress.on && sf.basis != nil && len(sf.basis.sampled) > 0
}

// sampledTwo is the two-body integrand by the sweep basis' sampled path
// (sampled.go), on the smallest level holding the references lo and hi
// (crossBasis.levelFor; negative for the whole bases) and, where the
// point's block does not lie in that level closely enough, on the whole
// bases. It reports false, with no error, when κ has no sampled path or
// the point's block does not lie in the bases closely enough.
func (sys *system) sampledTwo(ctx context.Context, sf *selfFactors, surf []*bem.Surface, pl placement, grad bool, lo, hi int) (evaluation, bool, error) {
	if !sys.hasSampled(sf) {
		return evaluation{}, false, nil
	}
	tol := sys.blockTolerance(sf, surf)
	if sf.basis.balanced {
		tol = sys.compress.tol // the balancing replaces the (κa)² tightening
	}
	levels := []*sampledBasis{sf.basis.levelFor(lo, hi)}
	if full := sf.basis.levelFor(-1, -1); levels[0] != full {
		levels = append(levels, full)
	}
	for _, sp := range levels {
		ev, ok, err := sys.evaluateSampled(ctx, sf, sp, surf, pl, grad, tol)
		if err != nil {
			return evaluation{}, false, err
		}
		if ok {
			ev.ranks = []BlockRank{{Rows: sys.names[0], Cols: sys.names[1], Rank: sp.rank(), Compressed: 1, Basis: 1, Sampled: 1}}
			return ev, true, nil
		}
	}
	return evaluation{}, false, nil
}

// evaluatePairLowRank is evaluatePair with M01 ≈ U Vᵀ of rank r. With
// Ũ = L0^-1 U = Q R (thin QR) and Ṽ = L1^-1 V the whitened block is
// K = Q Y, Y = R Ṽᵀ (r×N1), and by Sylvester's determinant identity
//
//	ln det(I - KᵀK) = ln det(I_r - Y Yᵀ) = ln det(I_r - (Vᵀ M11^-1 V)(Uᵀ M00^-1 U))
//
// (the last form in the unwhitened blocks), factored in delta form like the
// dense reduction: O(N² r) instead of O(N³). The gradient needs
// H = (M^-1)_01 = -L0^-T K (I - KᵀK)^-1 L1^-1, and since
// (I - Q Δ Qᵀ)^-1 Q = Q (I - Δ)^-1,
//
//	H = -(L0^-T Q) C^-1 Y L1^-1,  C = I_r - Y Yᵀ,
//
// a rank-r product; its contraction with dM01/du is moved onto the cross of
// the approximation (crossWeight), so the kernel derivatives are needed on
// the pivot rows and columns only (bem.CrossGradientSparse).
//
// With fit (the block expressed in a sweep basis, basis.go) the same
// quantities come without the four O(N² r) triangular solves: RᵀR =
// Uᵀ M00^-1 U and Δ = R (Vᵀ M11^-1 V) Rᵀ from the fit's Gram matrices
// (basisFit.reduce), L0^-T Q = M00^-1 U R^-1 and the weight's second factor
// M11^-1 V (C^-1 R)ᵀ from the whitened bases, O(N p r). A nil fit, or one
// whose Gram matrix does not factor, takes the direct path.
func (sys *system) evaluatePairLowRank(ctx context.Context, sf *selfFactors, surf []*bem.Surface, pl placement, grad bool, lr *lowRank, fit *basisFit) (evaluation, error) {
	r := lr.rank()
	if r == 0 {
		return evaluation{}, nil // the block vanishes to the tolerance
	}
	var rr, delta []float64
	var y blas64.General // Y = R Ṽᵀ, direct path only
	var q blas64.General // Q of Ũ = Q R, direct path only
	ok := false
	if fit != nil {
		rr, delta, ok = fit.reduce(r)
	}
	if !ok {
		fit = nil
		ut := copyGeneral(lr.u)
		solveLower(sf.f[0].l, ut, sys.threads) // Ũ = L0^-1 U, N0 × r
		vt := copyGeneral(lr.v)
		solveLower(sf.f[1].l, vt, sys.threads) // Ṽ = L1^-1 V, N1 × r
		rr, q = qrInPlace(ut)                  // Ũ = Q R
		y = blas64.General{Rows: r, Cols: vt.Rows, Stride: vt.Rows, Data: make([]float64, r*vt.Rows)}
		blas64.Gemm(blas.NoTrans, blas.Trans, 1, blas64.General{Rows: r, Cols: r, Stride: r, Data: rr}, vt, 0, y)
		delta = make([]float64, r*r)
		lowerRankUpdate(delta, r, r, y, sys.threads) // Δ = Y Yᵀ
	}
	ld, err := logDetIMinus(delta, r, r, sys.threads)
	if err != nil {
		return evaluation{}, sys.checkPositive(sf.kappa, err)
	}
	ev := evaluation{logDet: ld, viaBasis: fit != nil}
	if !grad {
		return ev, nil
	}
	lc := blas64.Triangular{Uplo: blas.Lower, Diag: blas.NonUnit, N: r, Stride: r, Data: delta}
	var w blas64.General
	if fit != nil {
		// L0^-T Q = L0^-T Ũ R^-1 = Z0 C0 R^-1, and
		// (C^-1 Y L1^-1)ᵀ = L1^-T Ṽ Rᵀ C^-1 = Z1 C1 (C^-1 R)ᵀ.
		q = fit.inverse(0, nil)
		blas64.Trsm(blas.Right, blas.NoTrans, 1, blas64.Triangular{Uplo: blas.Upper, Diag: blas.NonUnit, N: r, Stride: r, Data: rr}, q)
		m := blas64.General{Rows: r, Cols: r, Stride: r, Data: append([]float64(nil), rr...)}
		solveLowerInPlace(lc, m)
		solveLowerTransInPlace(lc, m) // C^-1 R
		mt := transpose(m)
		w = fit.inverse(1, &mt)
	} else {
		z := copyGeneral(y)
		solveLowerInPlace(lc, z)
		solveLowerTransInPlace(lc, z)        // C^-1 Y, r × N1
		w = transpose(z)                     // N1 × r
		solveLowerTransInPlace(sf.f[1].l, w) // (C^-1 Y L1^-1)ᵀ
		solveLowerTransInPlace(sf.f[0].l, q) // L0^-T Q, N0 × r
	}
	for i := range q.Data {
		q.Data[i] = -q.Data[i] // H = A Bᵀ with A = -L0^-T Q, B = w
	}
	var mot bem.Motion
	if h, ok := crossWeight(lr.sk, q, w); ok {
		if sys.moving == 1 {
			mot, err = sys.asm.CrossGradientSparse(ctx, h, sf.op, surf[0], surf[1], pl.centre, lr.sk.I, lr.sk.J)
		} else {
			mot, err = sys.asm.CrossGradientSparse(ctx, mat.DenseCopyOf(h.T()), sf.op, surf[1], surf[0], pl.centre, lr.sk.J, lr.sk.I)
		}
	} else {
		h := mat.NewDense(q.Rows, w.Rows, nil)
		blas64.Gemm(blas.NoTrans, blas.Trans, 1, q, w, 0, h.RawMatrix()) // H
		if sys.moving == 1 {
			mot, err = sys.asm.CrossGradient(ctx, h, sf.op, surf[0], surf[1], pl.centre)
		} else {
			mot, err = sys.asm.CrossGradient(ctx, mat.DenseCopyOf(h.T()), sf.op, surf[1], surf[0], pl.centre)
		}
	}
	if err != nil {
		return evaluation{}, err
	}
	ev.setGrad(mot, 2)
	return ev, nil
}

// crossWeight moves the contraction <H, dM> with H = A Bᵀ (A: m×r, B: n×r)
// onto the cross of the block's approximation. With M ≈ C S^-1 R
// (skeleton) and the pivots held fixed, the derivative of the
// approximation is
//
//	dM ≈ dC S^-1 R + C S^-1 dR - C S^-1 dS S^-1 R,
//
// so <H, dM> ≈ <W, dM> for a weight W that lives on the pivot columns J
// (W[:, J] += A X1ᵀ, X1 = S^-1 R B), the pivot rows I (W[I, :] += X2 Bᵀ,
// X2 = S^-ᵀ Cᵀ A) and their crossings (W[I, J] -= X2 X1ᵀ). The
// approximation error of the skeleton is an analytic function of the motion
// that is small wherever the block is, so its derivative is small too
// (Cauchy's estimate over a neighbourhood of the gap's size): the
// contraction keeps the block's relative tolerance, and it needs only the
// kernel derivatives on r rows and r columns instead of all pairs
// (TestCompressedIntegrand compares it with the dense contraction). It
// reports false when there is no skeleton or S is numerically singular.
func crossWeight(sk *skeleton, a, b blas64.General) (*mat.Dense, bool) {
	if sk == nil || len(sk.I) == 0 {
		return nil, false
	}
	rs, m, n, r := len(sk.I), a.Rows, b.Rows, a.Cols
	s := mat.NewDense(rs, rs, nil)
	rmat := mat.NewDense(rs, n, nil)
	for k, row := range sk.rows {
		rmat.SetRow(k, row)
		for l, j := range sk.J {
			s.Set(k, l, row[j])
		}
	}
	cmat := mat.NewDense(m, rs, nil)
	for l, col := range sk.cols {
		cmat.SetCol(l, col)
	}
	am := mat.NewDense(m, r, a.Data[:m*r])
	bm := mat.NewDense(n, r, b.Data[:n*r])
	if a.Stride != r || b.Stride != r {
		am, bm = mat.DenseCopyOf(fromGeneral(a)), mat.DenseCopyOf(fromGeneral(b))
	}
	var lu mat.LU
	lu.Factorize(s)
	if lu.Cond() > 1e13 {
		return nil, false
	}
	var rb, ca, x1, x2 mat.Dense
	rb.Mul(rmat, bm)     // R B, rs × r
	ca.Mul(cmat.T(), am) // Cᵀ A, rs × r
	if err := lu.SolveTo(&x1, false, &rb); err != nil {
		return nil, false
	}
	if err := lu.SolveTo(&x2, true, &ca); err != nil {
		return nil, false
	}
	w := mat.NewDense(m, n, nil)
	var w1, w2, w3 mat.Dense
	w1.Mul(am, x1.T())  // m × rs, on the columns J
	w2.Mul(&x2, bm.T()) // rs × n, on the rows I
	w3.Mul(&x2, x1.T()) // rs × rs, on the crossings
	wd, r1, r2, r3 := w.RawMatrix(), w1.RawMatrix(), w2.RawMatrix(), w3.RawMatrix()
	for i := 0; i < m; i++ {
		row, src := wd.Data[i*wd.Stride:], r1.Data[i*r1.Stride:]
		for l, j := range sk.J {
			row[j] = src[l]
		}
	}
	for k, i := range sk.I {
		row := wd.Data[i*wd.Stride : i*wd.Stride+n]
		for j, v := range r2.Data[k*r2.Stride : k*r2.Stride+n] {
			row[j] += v
		}
		src := r3.Data[k*r3.Stride:]
		for l, j := range sk.J {
			row[j] -= src[l]
		}
	}
	return w, true
}

// fromGeneral wraps a as a gonum matrix.
func fromGeneral(a blas64.General) *mat.Dense {
	d := &mat.Dense{}
	d.SetRawMatrix(a)
	return d
}

// copyGeneral returns a compact copy of a.
func copyGeneral(a blas64.General) blas64.General {
	c := blas64.General{Rows: a.Rows, Cols: a.Cols, Stride: a.Cols, Data: make([]float64, a.Rows*a.Cols)}
	for i := 0; i < a.Rows; i++ {
		copy(c.Data[i*a.Cols:(i+1)*a.Cols], a.Data[i*a.Stride:i*a.Stride+a.Cols])
	}
	return c
}

// evaluateFine is evaluate with the gradient for the central differences of
// the stiffness. A difference over the step stiffnessStep·gap amplifies each
// gradient's error by 1/stiffnessStep, so the compression tolerance is
// tightened by that factor: the stiffness then carries about the relative
// error a compressed gradient carries (blockTolerance).
func (sys *system) evaluateFine(ctx context.Context, sf *selfFactors, pl placement) (evaluation, error) {
	fine := *sys
	fine.compress.tol *= stiffnessStep
	return fine.evaluate(ctx, sf, pl, true)
}
