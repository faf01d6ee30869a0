package scatter

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack/lapack64"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/bem"
)

// compression says whether and how tightly interaction blocks are
// compressed (DESIGN §10). The zero value keeps every block dense.
type compression struct {
	on bool
	// tol is the relative Frobenius error allowed in a compressed block,
	// ‖M_ij - U Vᵀ‖_F ≤ tol ‖M_ij‖_F.
	tol float64
}

// blockTolerance ties the block tolerance to the requested accuracy. For
// the two-body integrand f = ln det(I - KᵀK), K = L_i^-1 M_ij L_j^-T, a
// relative block error ε changes f to first order by
//
//	δf = -2 Tr[(I - KᵀK)^-1 Kᵀ δK],  |δf| ≤ 2 ‖(I - KᵀK)^-1‖ ‖K‖_F ‖δK‖_F,
//
// and for separated bodies f ≈ -‖K‖_F², so |δf|/|f| ≈ 2ε (the factor
// ‖(I - KᵀK)^-1‖ stays near 1 wherever compression is used: it grows only as
// the bodies touch, where the rank test falls back to dense). The integrand
// keeps one sign, so the energy's relative error is bounded by the largest
// relative integrand error. ε = accuracy/10 keeps that at a fifth of the
// target of the frequency integral.
//
// The whitening weighs the block's error in another norm than its Frobenius
// norm, and at small κ it amplifies it: M = κA + B/κ is dominated by the
// charge term B/κ, while the divergence-free (loop) currents couple through
// κA only, a part smaller by about (κa)² for currents on the scale a of a
// body. An error ε‖M‖ then becomes an error ε/(κa)² relative to the loop
// part, which the whitening brings to unit size (measured: the integrand's
// error grows as 1/κ² below κa ≈ 1). blockTolerance(accuracy)·min(1, (κa)²),
// with a the largest bounding-box diagonal of the two bodies, removes that
// growth (scaledTolerance; TestCompressedIntegrand measures the result).
func blockTolerance(accuracy float64) float64 { return accuracy / 10 }

// scaledTolerance is the block tolerance at wavenumber κ for bodies of size
// a (L0): tol·min(1, (κa)²), see blockTolerance.
func scaledTolerance(tol, kappa, a float64) float64 {
	return tol * math.Min(1, kappa*a*kappa*a)
}

// newCompression returns the compression of a run with the given settings.
func newCompression(set Settings) compression {
	return compression{on: !set.Dense, tol: blockTolerance(set.Accuracy)}
}

// maxRankFraction bounds the rank of a compressed block as a fraction of the
// smaller dimension. An ACA step assembles one row and one column (2T pair
// integrals each for T panels per body, against T² for the whole block) and
// the reduction costs O(N² r) against O(N³): beyond N/3 the dense path is
// about as fast and the compression is given up. Measured at 1920 unknowns
// (two spheres at gap R/2, κR = 0.0012 and 0.0024, forces): rank 434 and
// 393 compressed in 2.6–2.8 s, the dense block 3.8–4.5 s.
const maxRankFraction = 3

// contactFraction: bodies whose bounding boxes are closer than this fraction
// of the smaller box's diagonal are treated as close, and their block stays
// dense without trying a compression that would fail (the rank grows as the
// gap closes).
const contactFraction = 1.0 / 16

// lowRank is a block approximated as M ≈ U Vᵀ, with U (m×r) and V (n×r)
// row major. After recompression V has orthonormal columns.
type lowRank struct {
	u, v blas64.General
	// sk is the cross (skeleton) the approximation was built from, kept
	// for the gradient (nil after a plain recompression).
	sk *skeleton
}

// skeleton is the cross of an adaptive cross approximation: the pivot rows
// I and columns J and the block's own entries on them, rows[k] = M[I_k, :]
// and cols[k] = M[:, J_k]. Partial-pivoted ACA is Gaussian elimination
// with the pivots (I_k, J_k), so its sum of terms equals the skeleton
// approximation M ≈ C S^-1 R with C = M[:, J], R = M[I, :], S = M[I, J]
// (Bebendorf 2000).
type skeleton struct {
	I, J       []int
	rows, cols [][]float64
	// gu and gv are the Gram matrices of the terms, row k holding
	// u_k·u_l and v_k·v_l for l ≤ k (the ACA computes them for its norm).
	gu, gv [][]float64
}

func (lr *lowRank) rank() int { return lr.u.Cols }

// compressCross approximates the interaction block between surfaces a
// (rows) and b (columns) at wavenumber κ (that of op) to the relative
// tolerance scaledTolerance(tol, κ, size) by adaptive cross approximation
// with partial pivoting, then trims the rank by a QR + SVD recompression.
// It reports false, with no error, when the block is not worth compressing:
// the surfaces are close, or the rank would exceed
// min(m, n)/maxRankFraction.
func (sys *system) compressCross(ctx context.Context, op bem.Operator, kappa float64, a, b *bem.Surface, tol float64) (*lowRank, bool, error) {
	close, size := surfacesClose(a, b)
	if close {
		return nil, false, nil
	}
	return sys.compressFrom(ctx, rwgSource{asm: sys.asm, op: op, a: a, b: b}, scaledTolerance(tol, kappa, size), true)
}

// compressBalanced is compressCross for the block in balanced coordinates
// M' = (T0 S0)ᵀ M01 (T1 S1) (balance.go), to the plain tolerance tol: in
// these coordinates the loops weigh as much as the charges, and the block
// needs no tightening at low κ.
func (sys *system) compressBalanced(ctx context.Context, op bem.Operator, a, b *bem.Surface, bal [2]*balance, tol float64) (*lowRank, bool, error) {
	if close, _ := surfacesClose(a, b); close {
		return nil, false, nil
	}
	return sys.compressFrom(ctx, newBalancedSource(sys.asm, op, a, b, bal), tol, false)
}

// compressFrom compresses the block of src to the relative tolerance tol
// (ACA to tol/3, recompression to tol/2). judge lets the ACA give up early
// on a block whose terms fall too slowly (hopeless); balanced blocks, whose
// terms fall slowly and unevenly at first while the pivots find the loops
// and the charges in turn (between two 1280-triangle spheres at gap R/2
// and κR = 0.019 the early rate gave up a block that converged at 326
// terms), run to maxRank instead.
func (sys *system) compressFrom(ctx context.Context, src crossSource, tol float64, judge bool) (*lowRank, bool, error) {
	m, n := src.size()
	maxRank := min(m, n) / maxRankFraction
	u, v, sk, ok, err := sys.aca(ctx, src, tol/3, maxRank, judge)
	if err != nil || !ok {
		return nil, false, err
	}
	lr, err := recompress(u, v, sk, m, n, tol/2)
	if err != nil {
		return nil, false, err
	}
	lr.sk = sk
	return lr, true, nil
}

// surfacesClose reports whether the bounding boxes of a and b are closer
// than contactFraction of the smaller box's diagonal, and returns the larger
// diagonal (L0).
func surfacesClose(a, b *bem.Surface) (bool, float64) {
	la, ha := bounds(a)
	lb, hb := bounds(b)
	da, db := r3.Norm(r3.Sub(ha, la)), r3.Norm(r3.Sub(hb, lb))
	return boxGap(la, ha, lb, hb) < contactFraction*math.Min(da, db), math.Max(da, db)
}

// boxGap is the distance between the boxes [la, ha] and [lb, hb] (zero
// where they overlap); a point is the box [x, x].
func boxGap(la, ha, lb, hb r3.Vec) float64 {
	return r3.Norm(r3.Vec{
		X: math.Max(0, math.Max(la.X-hb.X, lb.X-ha.X)),
		Y: math.Max(0, math.Max(la.Y-hb.Y, lb.Y-ha.Y)),
		Z: math.Max(0, math.Max(la.Z-hb.Z, lb.Z-ha.Z)),
	})
}

func bounds(s *bem.Surface) (lo, hi r3.Vec) {
	lo = r3.Vec{X: math.Inf(1), Y: math.Inf(1), Z: math.Inf(1)}
	hi = r3.Scale(-1, lo)
	for i := range s.Panels {
		for _, v := range s.Panels[i].V {
			lo = r3.Vec{X: math.Min(lo.X, v.X), Y: math.Min(lo.Y, v.Y), Z: math.Min(lo.Z, v.Z)}
			hi = r3.Vec{X: math.Max(hi.X, v.X), Y: math.Max(hi.Y, v.Y), Z: math.Max(hi.Z, v.Z)}
		}
	}
	return lo, hi
}

// aca is adaptive cross approximation with partial pivoting (Bebendorf,
// Numer. Math. 86, 2000): M ≈ Σ_k u_k v_kᵀ, built from one row and one
// column of the residual per step, the next row at the largest entry of the
// last column. It stops when the last term is below tol of the
// approximation's Frobenius norm (updated exactly from the terms) on two
// steps in a row — one small step can be a pivot that missed the rest of the
// block — and the residual on a few rows spread over the block (missedRow)
// is within tol too, and reports false when maxRank terms do not reach that, or, with
// judge, as soon as hopeless predicts it. It returns the terms and the
// cross they were built from.
func (sys *system) aca(ctx context.Context, src crossSource, tol float64, maxRank int, judge bool) (us, vs [][]float64, sk *skeleton, ok bool, err error) {
	m, n := src.size()
	usedRow := make([]bool, m)
	usedCol := make([]bool, n)
	row := make([]float64, n)
	col := make([]float64, m)
	norm2 := 0.0
	small := 0
	var terms []float64 // relative size of each term
	sk = &skeleton{}
	i := 0
	for len(us) < maxRank {
		if err := ctx.Err(); err != nil {
			return nil, nil, nil, false, fmt.Errorf("scatter: compression: %w", err)
		}
		if err := src.rows(ctx, row, []int{i}); err != nil {
			return nil, nil, nil, false, err
		}
		usedRow[i] = true
		rowM := append([]float64(nil), row...)
		for l := range us {
			axpy(-us[l][i], vs[l], row)
		}
		j := argmaxFree(row, usedCol)
		if j < 0 || row[j] == 0 {
			// The residual vanishes on this row: try the next free row.
			if i = nextFree(usedRow); i < 0 {
				return us, vs, sk, true, nil
			}
			continue
		}
		v := make([]float64, n)
		for k, x := range row {
			v[k] = x / row[j]
		}
		if err := src.cols(ctx, col, []int{j}); err != nil {
			return nil, nil, nil, false, err
		}
		usedCol[j] = true
		sk.I, sk.J = append(sk.I, i), append(sk.J, j)
		sk.rows, sk.cols = append(sk.rows, rowM), append(sk.cols, append([]float64(nil), col...))
		for l := range us {
			axpy(-vs[l][j], us[l], col)
		}
		u := append([]float64(nil), col...)
		// ‖S_k‖² = ‖S_{k-1}‖² + 2 Σ_l (u·u_l)(v_l·v) + ‖u‖²‖v‖².
		uu, vv := dot(u, u), dot(v, v)
		gu, gv := make([]float64, len(us)+1), make([]float64, len(us)+1)
		for l := range us {
			gu[l], gv[l] = dot(u, us[l]), dot(vs[l], v)
			norm2 += 2 * gu[l] * gv[l]
		}
		gu[len(us)], gv[len(us)] = uu, vv
		sk.gu, sk.gv = append(sk.gu, gu), append(sk.gv, gv)
		norm2 += uu * vv
		us, vs = append(us, u), append(vs, v)
		term := math.Sqrt(uu * vv / norm2)
		terms = append(terms, term)
		if term <= tol {
			if small++; small == 2 {
				// Converged by the terms: check rows spread over the block
				// before believing it (below).
				miss, err := missedRow(ctx, src, us, vs, usedRow, 3*tol*math.Sqrt(norm2/float64(m)), row)
				if err != nil {
					return nil, nil, nil, false, err
				}
				if miss < 0 {
					return us, vs, sk, true, nil
				}
				i, small = miss, 0
				continue
			}
		} else {
			small = 0
		}
		if judge && hopeless(terms, tol, maxRank) {
			return nil, nil, nil, false, nil
		}
		if i = argmaxFree(u, usedRow); i < 0 {
			return us, vs, sk, true, nil
		}
	}
	return nil, nil, nil, false, nil
}

// checkRows is how many rows, spread evenly over the block, missedRow
// checks when the ACA has converged by its terms.
const checkRows = 4

// missedRow guards the ACA's stop against a part of the block the pivots
// never visited. Partial pivoting takes each next row where the last
// column is largest, and a weak sub-block that does not couple to the
// strong one is never chosen: between two 180-triangle spheres at gap 2R
// and κR = 0.02 in balanced coordinates the loop–loop block (magnetic,
// dipole–dipole through κA) was left out whole, an error of 3.3e-4 of the
// block at the ACA tolerance 1e-5 and below. missedRow evaluates the
// residual on checkRows unused rows spread over the index range (loops and
// trees of the loop–tree basis sit in separate ranges) and returns the
// first whose norm exceeds limit (the share of the tolerance of one row if
// the error were spread evenly), or -1 when none does. buf holds a row.
func missedRow(ctx context.Context, src crossSource, us, vs [][]float64, used []bool, limit float64, buf []float64) (int, error) {
	m := len(used)
	for k := 0; k < checkRows; k++ {
		i := (2*k + 1) * m / (2 * checkRows)
		for i < m && used[i] {
			i++
		}
		if i == m {
			continue
		}
		if err := src.rows(ctx, buf, []int{i}); err != nil {
			return -1, err
		}
		for l := range us {
			axpy(-us[l][i], vs[l], buf)
		}
		if math.Sqrt(dot(buf, buf)) > limit {
			return i, nil
		}
	}
	return -1, nil
}

// minJudged is the number of ACA terms before hopeless may judge. The
// first terms of a block between facing caps fall slowly and unevenly (at
// κd ≈ 2 for two spheres one radius apart they still scatter between 0.02
// and 0.13 after 20 steps, then fall steadily to 3e-5 by step 104), and a
// rate taken from 16 terms gave such blocks up as dense. Judged after 32
// terms, the blocks of two 1280-triangle spheres at gap R/2 were still
// given up at κR = 0.13, 0.18, 0.72 and 21.7 (terms not yet falling, or
// growing again as the pivots found the facing caps); after 96 they
// converge at rank 102–163 in 0.35–0.6 s against 3.1–3.6 s dense, and the
// point's energy and force stay within 7.6e-5 and 6.1e-5 of the dense ones
// (2.6e-5 and 3.9e-5 with those four dense). 96 terms cost 192 rows and
// columns, under a tenth of one dense block.
const minJudged = 96

// hopeless reports whether the relative term sizes of an ACA so far (at
// least minJudged terms) predict that tol is out of reach within maxRank
// terms. The terms of a block that is numerically low rank fall roughly
// geometrically; the rate is taken between the largest of the last four terms and the
// largest of four terms half as many steps back (maxima smooth the
// pivoting's noise), and the block is given up when that rate needs more
// than three times maxRank terms in all — the work of the remaining steps
// is saved, which matters for bodies close enough that the rank is high but
// not so close that surfacesClose catches them. The early rate understates
// the later one: the block of two 1280-triangle spheres at gap R/2 and
// κR = 0.005 (the lowest frequency node of a sweep, where the tolerance is
// scaled down by (κa)²) predicted more than 1.5 maxRank from its first 32
// terms and converged at rank 354 (480 were allowed then), in 1.7 s against
// 4.1 s for the dense block (integrand within 4e-5, gradient 1.2e-4).
func hopeless(terms []float64, tol float64, maxRank int) bool {
	k := len(terms)
	if k < minJudged {
		return false
	}
	peak := func(end int) float64 {
		m := 0.0
		for _, t := range terms[end-4 : end] {
			m = math.Max(m, t)
		}
		return m
	}
	now, then := peak(k), peak(k/2)
	if !(now > tol) {
		return false
	}
	if !(now < then) {
		return true // no decay at all over minJudged or more steps
	}
	rate := math.Log(now/then) / float64(k-k/2) // < 0
	need := float64(k) + math.Log(tol/now)/rate
	return need > 3*float64(maxRank) // allow the rate to improve
}

// recompress turns Σ_k u_k v_kᵀ (vectors of lengths m and n) into the
// shortest U Vᵀ that keeps the dropped singular values below tol of the
// Frobenius norm. It takes the Gram route (recompressGram) with the Gram
// matrices the ACA recorded in sk and, should one not factor, the
// Householder one (recompressQR).
func recompress(us, vs [][]float64, sk *skeleton, m, n int, tol float64) (*lowRank, error) {
	if len(us) == 0 {
		return &lowRank{u: blas64.General{Rows: m, Stride: 1}, v: blas64.General{Rows: n, Stride: 1}}, nil
	}
	if lr, ok := recompressGram(us, vs, sk.gu, sk.gv, m, n, tol); ok {
		return lr, nil
	}
	return recompressQR(us, vs, m, n, tol)
}

// recompressGram is recompress by Cholesky QR: with the terms packed as
// A = [u_k/|u_k|] (m×r) and B = [v_k/|v_k|] (n×r), D the products of the
// norms, AᵀA = Lu Luᵀ and BᵀB = Lv Lvᵀ (from the terms' Gram matrices gu,
// gv, rows k holding u_k·u_l for l ≤ k), the sum is Qu K Qvᵀ with
// Qu = A Lu^-T, Qv = B Lv^-T orthonormal and the core K = Luᵀ D Lv (r×r).
// The eigenvectors W of K Kᵀ (eigenvalues σ²) give K's singular vectors,
// Z = Kᵀ W Σ^-1, and U = A Lu^-T W Σ, V = B Lv^-T Z truncated: the two Gram
// matrices come free with the ACA, the two final products are plain Gemms
// (2(m+n)r·keep flops) and the symmetric eigenproblem is several times
// cheaper than the SVD, where the Householder route spends 8(m+n)r² in
// panel updates. Whatever the accuracy of the eigenvectors of the dropped
// part, U Vᵀ is Qu W Wᵀ K Qvᵀ, the projection of the sum on the kept directions, so the error is
// the dropped tail. The unit columns keep the Gram matrices' condition
// numbers those of the terms' directions (the terms themselves fall by the
// tolerance); it reports false when one does not factor.
func recompressGram(us, vs, gu, gv [][]float64, m, n int, tol float64) (*lowRank, bool) {
	r := len(us)
	if r == 0 || len(gu) != r || len(gv) != r {
		return nil, false
	}
	pack := func(cols [][]float64, rows int) (blas64.General, []float64) {
		a := blas64.General{Rows: rows, Cols: r, Stride: r, Data: make([]float64, rows*r)}
		norms := make([]float64, r)
		for k, c := range cols {
			norms[k] = math.Sqrt(dot(c, c))
			if norms[k] == 0 {
				return a, nil
			}
			inv := 1 / norms[k]
			for i, x := range c {
				a.Data[i*r+k] = x * inv
			}
		}
		return a, norms
	}
	a, nu := pack(us, m)
	b, nv := pack(vs, n)
	if nu == nil || nv == nil {
		return nil, false
	}
	gram := func(g [][]float64, norms []float64) blas64.General {
		out := blas64.General{Rows: r, Cols: r, Stride: r, Data: make([]float64, r*r)}
		for k, row := range g {
			for l, x := range row {
				out.Data[k*r+l] = x / (norms[k] * norms[l])
			}
		}
		return out
	}
	lu, lv := gram(gu, nu), gram(gv, nv)
	if _, ok := choleskyLower(lu.Data, r, r); !ok {
		return nil, false
	}
	if _, ok := choleskyLower(lv.Data, r, r); !ok {
		return nil, false
	}
	for i := 0; i < r; i++ { // clear the upper triangles: L proper
		for j := i + 1; j < r; j++ {
			lu.Data[i*r+j], lv.Data[i*r+j] = 0, 0
		}
	}
	// K = Luᵀ D Lv.
	dlv := copyGeneral(lv)
	for i := 0; i < r; i++ {
		d := nu[i] * nv[i]
		for j := 0; j < r; j++ {
			dlv.Data[i*r+j] *= d
		}
	}
	k := product(transpose(lu), dlv)
	kk := mat.NewSymDense(r, nil)
	blas64.Gemm(blas.NoTrans, blas.Trans, 1, k, k, 0, blas64.General{Rows: r, Cols: r, Stride: r, Data: kk.RawSymmetric().Data})
	var eig mat.EigenSym
	if !eig.Factorize(kk, true) {
		return nil, false
	}
	vals := eig.Values(nil) // ascending
	total := 0.0
	for _, l := range vals {
		total += math.Max(l, 0)
	}
	lo, tail := 0, 0.0
	for lo < r-1 && tail+math.Max(vals[lo], 0) <= tol*tol*total {
		tail += math.Max(vals[lo], 0)
		lo++
	}
	keep := r - lo
	var vecs mat.Dense
	eig.VectorsTo(&vecs)
	ws := blas64.General{Rows: r, Cols: keep, Stride: keep, Data: make([]float64, r*keep)} // W Σ
	wi := blas64.General{Rows: r, Cols: keep, Stride: keep, Data: make([]float64, r*keep)} // W Σ^-1
	for c := 0; c < keep; c++ {
		sig := math.Sqrt(math.Max(vals[r-1-c], 0))
		if sig == 0 {
			return nil, false
		}
		for i := 0; i < r; i++ {
			w := vecs.At(i, r-1-c)
			ws.Data[i*keep+c] = w * sig
			wi.Data[i*keep+c] = w / sig
		}
	}
	z := product(transpose(k), wi) // Z = Kᵀ W Σ^-1
	tri := func(l blas64.General) blas64.Triangular {
		return blas64.Triangular{Uplo: blas.Lower, Diag: blas.NonUnit, N: r, Stride: r, Data: l.Data}
	}
	blas64.Trsm(blas.Left, blas.Trans, 1, tri(lu), ws) // Lu^-T W Σ
	blas64.Trsm(blas.Left, blas.Trans, 1, tri(lv), z)  // Lv^-T Z
	return &lowRank{u: product(a, ws), v: product(b, z)}, true
}

// recompressQR is recompress by Householder QR: thin QR of both factors,
// Qu Ru Rvᵀ Qvᵀ, SVD of the small core Ru Rvᵀ = W Σ Zᵀ, U = Qu W Σ and
// V = Qv Z truncated.
func recompressQR(us, vs [][]float64, m, n int, tol float64) (*lowRank, error) {
	r := len(us)
	qu, ru := thinQR(us, m)
	qv, rv := thinQR(vs, n)
	core := mat.NewDense(r, r, nil)
	core.Mul(mat.NewDense(r, r, ru), mat.NewDense(r, r, rv).T())
	var svd mat.SVD
	if !svd.Factorize(core, mat.SVDThin) {
		return nil, fmt.Errorf("scatter: compression: SVD of the %d×%d core did not converge", r, r)
	}
	sv := svd.Values(nil)
	total := 0.0
	for _, s := range sv {
		total += s * s
	}
	keep, tail := r, 0.0
	for keep > 1 && tail+sv[keep-1]*sv[keep-1] <= tol*tol*total {
		tail += sv[keep-1] * sv[keep-1]
		keep--
	}
	var w, z mat.Dense
	svd.UTo(&w)
	svd.VTo(&z)
	ws := mat.NewDense(r, keep, nil)
	for i := 0; i < r; i++ {
		for k := 0; k < keep; k++ {
			ws.Set(i, k, w.At(i, k)*sv[k])
		}
	}
	zk := z.Slice(0, r, 0, keep)
	lr := &lowRank{
		u: blas64.General{Rows: m, Cols: keep, Stride: keep, Data: make([]float64, m*keep)},
		v: blas64.General{Rows: n, Cols: keep, Stride: keep, Data: make([]float64, n*keep)},
	}
	blas64.Gemm(blas.NoTrans, blas.NoTrans, 1, qu, ws.RawMatrix(), 0, lr.u)
	zr := mat.DenseCopyOf(zk).RawMatrix()
	blas64.Gemm(blas.NoTrans, blas.NoTrans, 1, qv, zr, 0, lr.v)
	return lr, nil
}

// thinQR returns the thin QR factors of the m×r matrix whose columns are
// cols: Q (m×r, orthonormal columns) and R (r×r upper triangular, row
// major).
func thinQR(cols [][]float64, m int) (blas64.General, []float64) {
	r := len(cols)
	a := blas64.General{Rows: m, Cols: r, Stride: r, Data: make([]float64, m*r)}
	for k, c := range cols {
		for i, x := range c {
			a.Data[i*r+k] = x
		}
	}
	rr, q := qrInPlace(a)
	return q, rr
}

// qrInPlace factors the m×r matrix a (m ≥ r) as Q R with LAPACK's
// Householder QR and returns R (r×r, row major) and Q (a overwritten).
func qrInPlace(a blas64.General) ([]float64, blas64.General) {
	r := a.Cols
	tau := make([]float64, r)
	work := make([]float64, 1)
	lapack64.Geqrf(a, tau, work, -1)
	work = make([]float64, int(work[0]))
	lapack64.Geqrf(a, tau, work, len(work))
	rr := make([]float64, r*r)
	for i := 0; i < r; i++ {
		copy(rr[i*r+i:i*r+r], a.Data[i*a.Stride+i:i*a.Stride+r])
	}
	work = make([]float64, 1)
	lapack64.Orgqr(a, tau, work, -1)
	work = make([]float64, int(work[0]))
	lapack64.Orgqr(a, tau, work, len(work))
	return rr, a
}

func dot(x, y []float64) float64 {
	return blas64.Dot(blas64.Vector{N: len(x), Inc: 1, Data: x}, blas64.Vector{N: len(y), Inc: 1, Data: y})
}

// axpy sets y += alpha x.
func axpy(alpha float64, x, y []float64) {
	if alpha == 0 {
		return
	}
	blas64.Axpy(alpha, blas64.Vector{N: len(x), Inc: 1, Data: x}, blas64.Vector{N: len(y), Inc: 1, Data: y})
}

// argmaxFree returns the index of the largest |x_i| with used[i] false, or
// -1 when every index is used.
func argmaxFree(x []float64, used []bool) int {
	best, at := -1.0, -1
	for i, v := range x {
		if !used[i] && math.Abs(v) > best {
			best, at = math.Abs(v), i
		}
	}
	return at
}

// nextFree returns the first index not used, or -1.
func nextFree(used []bool) int {
	for i, u := range used {
		if !u {
			return i
		}
	}
	return -1
}
