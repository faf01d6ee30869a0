package scatter

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
)

// blockSize is the panel width of the blocked factorisations (192 measured
// best of 96 and 192 at n = 2000 and 4000 with both BLAS, BenchmarkFactor).
const blockSize = 192

// ErrNotPositive reports a factorisation that met a non-positive pivot.
type ErrNotPositive struct {
	What  string
	Pivot int
}

func (e *ErrNotPositive) Error() string {
	return fmt.Sprintf("%s is not positive definite (pivot %d)", e.What, e.Pivot)
}

// logDetIMinus returns ln det(I - Δ) for the symmetric n×n matrix Δ whose
// lower triangle is stored row-major in d with the given stride; I - Δ must be
// positive definite. The Cholesky factorisation is carried in "delta form":
// each pivot is 1 - δ_j with δ_j = Δ_jj + Σ_k L_jk² accumulated directly, so
// ln(1 - δ_j) = log1p(-δ_j) keeps its digits when Δ is tiny (bodies far apart,
// DESIGN §4). The lower triangle of d is overwritten by the factor.
func logDetIMinus(d []float64, n, stride, threads int) (float64, error) {
	logdet := 0.0
	for k0 := 0; k0 < n; k0 += blockSize {
		k1 := min(k0+blockSize, n)
		// Factor the diagonal block I - Δ_kk (unblocked, delta form).
		for j := k0; j < k1; j++ {
			rj := d[j*stride:]
			delta := rj[j]
			for k := k0; k < j; k++ {
				delta += rj[k] * rj[k]
			}
			if !(delta < 1) {
				return 0, &ErrNotPositive{What: "I - Δ", Pivot: j}
			}
			logdet += math.Log1p(-delta)
			piv := math.Sqrt(1 - delta)
			rj[j] = piv
			for i := j + 1; i < k1; i++ {
				ri := d[i*stride:]
				s := -ri[j]
				for k := k0; k < j; k++ {
					s -= ri[k] * rj[k]
				}
				ri[j] = s / piv
			}
		}
		if k1 == n {
			break
		}
		// Panel below: L_ik = (-Δ_ik) L_kk^-T.
		m := n - k1
		panel := blas64.General{Rows: m, Cols: k1 - k0, Stride: stride, Data: d[k1*stride+k0:]}
		for i := 0; i < m; i++ {
			row := panel.Data[i*stride : i*stride+panel.Cols]
			for j := range row {
				row[j] = -row[j]
			}
		}
		diag := blas64.Triangular{Uplo: blas.Lower, Diag: blas.NonUnit, N: k1 - k0, Stride: stride, Data: d[k0*stride+k0:]}
		blas64.Trsm(blas.Right, blas.Trans, 1, diag, panel)
		// Trailing update: Δ_rest += L_ik L_ikᵀ (lower triangle).
		trail := d[k1*stride+k1:]
		lowerRankUpdate(trail, m, stride, panel, threads)
	}
	return logdet, nil
}

// lowerRankUpdate adds a aᵀ to the lower triangle of the n×n matrix c (row
// major, stride). Gemm inside is parallel.
func lowerRankUpdate(c []float64, n, stride int, a blas64.General, threads int) {
	lowerRankUpdateScaled(c, n, stride, a, 1)
}

// lowerRankUpdateScaled adds alpha a aᵀ to the lower triangle of the n×n
// matrix c (row major, stride).
func lowerRankUpdateScaled(c []float64, n, stride int, a blas64.General, alpha float64) {
	if openBLAS {
		// OpenBLAS's Syrk is blocked and threaded: one call.
		blas64.Syrk(blas.NoTrans, alpha, a, 1, blas64.Symmetric{Uplo: blas.Lower, N: n, Stride: stride, Data: c})
		return
	}
	// gonum's transposed Gemm kernel is several times slower than its plain
	// one: transpose the panel once (n×k values, against n²k flops).
	addLowerProductT(blas64.General{Rows: n, Cols: n, Stride: stride, Data: c}, a, transpose(a), alpha)
}

// solveLower overwrites the n×m matrix b with L^-1 b for the lower triangular
// Cholesky factor L.
func solveLower(l blas64.Triangular, b blas64.General, threads int) {
	solveLowerInPlace(l, b)
}

// factor is the Cholesky factor of one self block, M_ii = L Lᵀ.
type factor struct {
	l blas64.Triangular
}

// newFactor factors the symmetric positive definite block m with the
// blocked kernels of choleskyLower (gonum's mat.Cholesky is several times
// slower at the sizes of self blocks, BenchmarkFactor).
func newFactor(m *mat.SymDense) (*factor, error) {
	n := m.SymmetricDim()
	raw := m.RawSymmetric()
	l := blas64.Triangular{Uplo: blas.Lower, Diag: blas.NonUnit, N: n, Stride: n, Data: make([]float64, n*n)}
	// Copy the stored triangle into the lower one of row-major storage.
	for i := 0; i < n; i++ {
		for j := 0; j <= i; j++ {
			if raw.Uplo == blas.Upper {
				l.Data[i*n+j] = raw.Data[j*raw.Stride+i]
			} else {
				l.Data[i*n+j] = raw.Data[i*raw.Stride+j]
			}
		}
	}
	if p, ok := choleskyLower(l.Data, n, n); !ok {
		return nil, &ErrNotPositive{What: "self block", Pivot: p}
	}
	return &factor{l: l}, nil
}

// choleskyLower overwrites the lower triangle of the symmetric positive
// definite n×n matrix A (row major, stride) with its Cholesky factor L,
// A = L Lᵀ, by the blocked right-looking algorithm of logDetIMinus. It
// reports false and the pivot at a non-positive pivot.
func choleskyLower(d []float64, n, stride int) (int, bool) {
	for k0 := 0; k0 < n; k0 += blockSize {
		k1 := min(k0+blockSize, n)
		for j := k0; j < k1; j++ {
			rj := d[j*stride:]
			a := rj[j]
			for k := k0; k < j; k++ {
				a -= rj[k] * rj[k]
			}
			if !(a > 0) {
				return j, false
			}
			piv := math.Sqrt(a)
			rj[j] = piv
			for i := j + 1; i < k1; i++ {
				ri := d[i*stride:]
				s := ri[j]
				for k := k0; k < j; k++ {
					s -= ri[k] * rj[k]
				}
				ri[j] = s / piv
			}
		}
		if k1 == n {
			break
		}
		// Panel below: L_ik = A_ik L_kk^-T; trailing A_rest -= L_ik L_ikᵀ.
		m := n - k1
		panel := blas64.General{Rows: m, Cols: k1 - k0, Stride: stride, Data: d[k1*stride+k0:]}
		diag := blas64.Triangular{Uplo: blas.Lower, Diag: blas.NonUnit, N: k1 - k0, Stride: stride, Data: d[k0*stride+k0:]}
		blas64.Trsm(blas.Right, blas.Trans, 1, diag, panel)
		lowerRankUpdateScaled(d[k1*stride+k1:], m, stride, panel, -1)
	}
	return 0, true
}

// logDetSelf returns ln det M_ii = 2 Σ ln L_jj.
func (f *factor) logDet() float64 {
	s := 0.0
	for j := 0; j < f.l.N; j++ {
		s += math.Log(f.l.Data[j*f.l.Stride+j])
	}
	return 2 * s
}

// transpose returns the n×m transpose of the m×n matrix a.
func transpose(a blas64.General) blas64.General {
	t := blas64.General{Rows: a.Cols, Cols: a.Rows, Stride: a.Rows, Data: make([]float64, a.Rows*a.Cols)}
	for i := 0; i < a.Rows; i++ {
		row := a.Data[i*a.Stride : i*a.Stride+a.Cols]
		for j, v := range row {
			t.Data[j*t.Stride+i] = v
		}
	}
	return t
}
