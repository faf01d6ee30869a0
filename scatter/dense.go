package scatter

import (
	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
)

// The two level-3 kernels below are written recursively on top of Gemm, which
// is blocked and parallel in gonum, while its own Trsm and Syrk work column by
// column. Recursion stops at leafSize, where gonum's kernels are efficient.
// With OpenBLAS (build tag openblas) each is one call of the library.

const leafSize = 64

// solveLowerInPlace overwrites the n×m matrix b with L^-1 b for the n×n lower
// triangular l (forward substitution by blocks):
//
//	[L11 0; L21 L22] [X1; X2] = [B1; B2]:  X1 = L11^-1 B1, X2 = L22^-1 (B2 - L21 X1).
func solveLowerInPlace(l blas64.Triangular, b blas64.General) {
	n := l.N
	if n <= leafSize || openBLAS {
		blas64.Trsm(blas.Left, blas.NoTrans, 1, l, b)
		return
	}
	h := n / 2
	l11 := blas64.Triangular{Uplo: blas.Lower, Diag: l.Diag, N: h, Stride: l.Stride, Data: l.Data}
	l22 := blas64.Triangular{Uplo: blas.Lower, Diag: l.Diag, N: n - h, Stride: l.Stride, Data: l.Data[h*l.Stride+h:]}
	l21 := blas64.General{Rows: n - h, Cols: h, Stride: l.Stride, Data: l.Data[h*l.Stride:]}
	b1 := blas64.General{Rows: h, Cols: b.Cols, Stride: b.Stride, Data: b.Data}
	b2 := blas64.General{Rows: n - h, Cols: b.Cols, Stride: b.Stride, Data: b.Data[h*b.Stride:]}
	solveLowerInPlace(l11, b1)
	blas64.Gemm(blas.NoTrans, blas.NoTrans, -1, l21, b1, 1, b2)
	solveLowerInPlace(l22, b2)
}

// addLowerProduct adds a aᵀ to the lower triangle of the n×n matrix c (a is
// n×k), by halves: C11 += A1 A1ᵀ, C21 += A2 A1ᵀ, C22 += A2 A2ᵀ.
func addLowerProduct(c blas64.General, a blas64.General) {
	n := c.Rows
	if n <= leafSize || openBLAS {
		blas64.Syrk(blas.NoTrans, 1, a, 1, blas64.Symmetric{Uplo: blas.Lower, N: n, Stride: c.Stride, Data: c.Data})
		return
	}
	h := n / 2
	a1 := blas64.General{Rows: h, Cols: a.Cols, Stride: a.Stride, Data: a.Data}
	a2 := blas64.General{Rows: n - h, Cols: a.Cols, Stride: a.Stride, Data: a.Data[h*a.Stride:]}
	c11 := blas64.General{Rows: h, Cols: h, Stride: c.Stride, Data: c.Data}
	c21 := blas64.General{Rows: n - h, Cols: h, Stride: c.Stride, Data: c.Data[h*c.Stride:]}
	c22 := blas64.General{Rows: n - h, Cols: n - h, Stride: c.Stride, Data: c.Data[h*c.Stride+h:]}
	addLowerProduct(c11, a1)
	blas64.Gemm(blas.NoTrans, blas.Trans, 1, a2, a1, 1, c21)
	addLowerProduct(c22, a2)
}

// addLowerProductT adds alpha a aᵀ to the lower triangle of c like
// addLowerProduct, with aᵀ (k×n) given as well, so that the off-diagonal
// products C21 += alpha A2 A1ᵀ are plain NoTrans Gemms.
func addLowerProductT(c, a, at blas64.General, alpha float64) {
	n := c.Rows
	if n <= leafSize || openBLAS {
		blas64.Syrk(blas.NoTrans, alpha, a, 1, blas64.Symmetric{Uplo: blas.Lower, N: n, Stride: c.Stride, Data: c.Data})
		return
	}
	h := n / 2
	a1 := blas64.General{Rows: h, Cols: a.Cols, Stride: a.Stride, Data: a.Data}
	a2 := blas64.General{Rows: n - h, Cols: a.Cols, Stride: a.Stride, Data: a.Data[h*a.Stride:]}
	at1 := blas64.General{Rows: at.Rows, Cols: h, Stride: at.Stride, Data: at.Data}
	at2 := blas64.General{Rows: at.Rows, Cols: n - h, Stride: at.Stride, Data: at.Data[h:]}
	c11 := blas64.General{Rows: h, Cols: h, Stride: c.Stride, Data: c.Data}
	c21 := blas64.General{Rows: n - h, Cols: h, Stride: c.Stride, Data: c.Data[h*c.Stride:]}
	c22 := blas64.General{Rows: n - h, Cols: n - h, Stride: c.Stride, Data: c.Data[h*c.Stride+h:]}
	addLowerProductT(c11, a1, at1, alpha)
	blas64.Gemm(blas.NoTrans, blas.NoTrans, alpha, a2, at1, 1, c21)
	addLowerProductT(c22, a2, at2, alpha)
}

// solveLowerTransInPlace overwrites the n×m matrix b with L^-T b for the n×n
// lower triangular l. It solves with the upper triangular U = Lᵀ (copied
// once), which keeps every update a NoTrans Gemm — gonum's transposed Gemm
// kernel is several times slower.
func solveLowerTransInPlace(l blas64.Triangular, b blas64.General) {
	if openBLAS {
		// OpenBLAS's transposed Trsm is as fast as the plain one.
		blas64.Trsm(blas.Left, blas.Trans, 1, l, b)
		return
	}
	solveUpperInPlace(upperOf(l), b)
}

// upperOf returns Lᵀ as an upper triangular matrix in its own storage.
func upperOf(l blas64.Triangular) blas64.Triangular {
	n := l.N
	u := blas64.Triangular{Uplo: blas.Upper, Diag: l.Diag, N: n, Stride: n, Data: make([]float64, n*n)}
	for i := 0; i < n; i++ {
		row := l.Data[i*l.Stride : i*l.Stride+i+1]
		for j, v := range row {
			u.Data[j*n+i] = v
		}
	}
	return u
}

// solveUpperInPlace overwrites the n×m matrix b with U^-1 b for the n×n upper
// triangular u (back substitution by blocks):
//
//	[U11 U12; 0 U22] [X1; X2] = [B1; B2]:  X2 = U22^-1 B2, X1 = U11^-1 (B1 - U12 X2).
func solveUpperInPlace(u blas64.Triangular, b blas64.General) {
	n := u.N
	if n <= leafSize {
		blas64.Trsm(blas.Left, blas.NoTrans, 1, u, b)
		return
	}
	h := n / 2
	u11 := blas64.Triangular{Uplo: blas.Upper, Diag: u.Diag, N: h, Stride: u.Stride, Data: u.Data}
	u22 := blas64.Triangular{Uplo: blas.Upper, Diag: u.Diag, N: n - h, Stride: u.Stride, Data: u.Data[h*u.Stride+h:]}
	u12 := blas64.General{Rows: h, Cols: n - h, Stride: u.Stride, Data: u.Data[h:]}
	b1 := blas64.General{Rows: h, Cols: b.Cols, Stride: b.Stride, Data: b.Data}
	b2 := blas64.General{Rows: n - h, Cols: b.Cols, Stride: b.Stride, Data: b.Data[h*b.Stride:]}
	solveUpperInPlace(u22, b2)
	blas64.Gemm(blas.NoTrans, blas.NoTrans, -1, u12, b2, 1, b1)
	solveUpperInPlace(u11, b1)
}
