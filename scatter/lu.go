package scatter

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
)

// logDetIPlus returns ln |det(I + D)| for the n×n matrix D (row-major, the
// given stride), the general (unsymmetric) counterpart of logDetIMinus.
//
// When every row of D has Σ_j |D_ij| < dominance, I + D is strictly diagonally
// dominant and Gaussian elimination without pivoting is stable (growth factor
// at most two; Wilkinson 1961, common practice). The LU factorisation is then
// carried in delta form: each pivot is 1 + δ_j with δ_j accumulated directly,
// so ln(1 + δ_j) = log1p(δ_j) keeps its digits when D is tiny (bodies far
// apart, DESIGN §4). Otherwise I + D is factored with partial pivoting (LAPACK
// dgetrf through gonum's mat.LU); its determinant is then far from one and
// the plain logarithm of the pivots loses nothing. d is overwritten.
func logDetIPlus(d []float64, n, stride int) (float64, error) {
	dominant := true
	for i := 0; i < n && dominant; i++ {
		s := 0.0
		for _, v := range d[i*stride : i*stride+n] {
			s += math.Abs(v)
		}
		if !(s < dominance) {
			dominant = false
		}
	}
	if dominant {
		return deltaLU(d, n, stride)
	}
	a := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		row := d[i*stride : i*stride+n]
		for j, v := range row {
			a.Set(i, j, v)
		}
		a.Set(i, i, a.At(i, i)+1)
	}
	var lu mat.LU
	lu.Factorize(a)
	if c := lu.Cond(); math.IsInf(c, 1) || c > 1e15 {
		return 0, fmt.Errorf("the scene matrix I + Δ is singular (condition %.3g)", lu.Cond())
	}
	ld, _ := lu.LogDet()
	return ld, nil
}

// dominance is the row-sum bound of D below which logDetIPlus factors
// I + D without pivoting.
const dominance = 0.9

// deltaLU is the unpivoted, blocked LU factorisation of I + D in delta form
// (right-looking: factor a panel of columns, solve for the block row of U,
// update the trailing matrix with one Gemm). It returns Σ_j log1p(δ_j).
func deltaLU(d []float64, n, stride int) (float64, error) {
	logdet := 0.0
	for k0 := 0; k0 < n; k0 += blockSize {
		k1 := min(k0+blockSize, n)
		for j := k0; j < k1; j++ {
			dj := d[j*stride+j]
			if !(dj > -1) {
				return 0, fmt.Errorf("I + Δ has a non-positive pivot %g at %d", 1+dj, j)
			}
			logdet += math.Log1p(dj)
			piv := 1 + dj
			rj := d[j*stride:]
			for i := j + 1; i < n; i++ {
				ri := d[i*stride:]
				l := ri[j] / piv
				ri[j] = l
				if l == 0 {
					continue
				}
				for c := j + 1; c < k1; c++ {
					ri[c] -= l * rj[c]
				}
			}
		}
		if k1 == n {
			break
		}
		// U12 = L11^-1 A12 (unit lower triangular), then A22 -= L21 U12.
		l11 := blas64.Triangular{Uplo: blas.Lower, Diag: blas.Unit, N: k1 - k0, Stride: stride, Data: d[k0*stride+k0:]}
		a12 := blas64.General{Rows: k1 - k0, Cols: n - k1, Stride: stride, Data: d[k0*stride+k1:]}
		blas64.Trsm(blas.Left, blas.NoTrans, 1, l11, a12)
		l21 := blas64.General{Rows: n - k1, Cols: k1 - k0, Stride: stride, Data: d[k1*stride+k0:]}
		a22 := blas64.General{Rows: n - k1, Cols: n - k1, Stride: stride, Data: d[k1*stride+k1:]}
		blas64.Gemm(blas.NoTrans, blas.NoTrans, -1, l21, a12, 1, a22)
	}
	return logdet, nil
}

// luFactor is the LU factorisation A = P L U of one self block (partial
// pivoting, LAPACK dgetrf through gonum), kept as two triangular matrices so
// that solves go through the Gemm-based block substitutions of dense.go
// (gonum's own triangular solves work column by column).
type luFactor struct {
	l, u blas64.Triangular // unit lower and upper triangular factors
	piv  []int             // row i of L U is row piv[i] of A
	cond float64           // condition number estimate (1-norm)
}

// newLUFactor factors the square matrix a. A singular or numerically
// singular matrix (condition above 1e14) is an error.
func newLUFactor(a *mat.Dense) (*luFactor, error) {
	var lu mat.LU
	lu.Factorize(a)
	c := lu.Cond()
	if math.IsInf(c, 1) || c > 1e14 {
		return nil, fmt.Errorf("it is singular (condition %.3g)", c)
	}
	var l, u mat.TriDense
	lu.LTo(&l)
	lu.UTo(&u)
	// A = P L U with row i of A equal to row p[i] of L U; solving needs
	// the inverse permutation: row k of L U is row piv[k] of A.
	p := lu.RowPivots(nil)
	piv := make([]int, len(p))
	for i, k := range p {
		piv[k] = i
	}
	f := &luFactor{l: l.RawTriangular(), u: u.RawTriangular(), piv: piv, cond: c}
	f.l.Diag = blas.Unit
	return f, nil
}

// solve returns A^-1 b for the n×m matrix b (b is not modified).
func (f *luFactor) solve(b mat.Matrix) *mat.Dense {
	n, m := b.Dims()
	x := mat.NewDense(n, m, nil)
	for i, p := range f.piv {
		for j := 0; j < m; j++ {
			x.Set(i, j, b.At(p, j))
		}
	}
	raw := x.RawMatrix()
	g := blas64.General{Rows: n, Cols: m, Stride: raw.Stride, Data: raw.Data}
	solveLowerInPlace(f.l, g)
	solveUpperInPlace(f.u, g)
	return x
}
