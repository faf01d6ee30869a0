package scatter

import (
	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
)

// The two level-3 kernels below are written recursively on top of Gemm, which
// is blocked and parallel in gonum, while its own Trsm and Syrk work column by
// column. Recursion stops at leafSize, where gonum's kernels are efficient.

const leafSize = 64

// solveLowerInPlace overwrites the n×m matrix b with L^-1 b for the n×n lower
// triangular l (forward substitution by blocks):
//
//	[L11 0; L21 L22] [X1; X2] = [B1; B2]:  X1 = L11^-1 B1, X2 = L22^-1 (B2 - L21 X1).
func solveLowerInPlace(l blas64.Triangular, b blas64.General) {
	n := l.N
	if n <= leafSize {
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
	if n <= leafSize {
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

// solveLowerTransInPlace overwrites the n×m matrix b with L^-T b for the n×n
// lower triangular l (back substitution by blocks):
//
//	[L11ᵀ L21ᵀ; 0 L22ᵀ] [X1; X2] = [B1; B2]:  X2 = L22^-T B2, X1 = L11^-T (B1 - L21ᵀ X2).
func solveLowerTransInPlace(l blas64.Triangular, b blas64.General) {
	n := l.N
	if n <= leafSize {
		blas64.Trsm(blas.Left, blas.Trans, 1, l, b)
		return
	}
	h := n / 2
	l11 := blas64.Triangular{Uplo: blas.Lower, Diag: l.Diag, N: h, Stride: l.Stride, Data: l.Data}
	l22 := blas64.Triangular{Uplo: blas.Lower, Diag: l.Diag, N: n - h, Stride: l.Stride, Data: l.Data[h*l.Stride+h:]}
	l21 := blas64.General{Rows: n - h, Cols: h, Stride: l.Stride, Data: l.Data[h*l.Stride:]}
	b1 := blas64.General{Rows: h, Cols: b.Cols, Stride: b.Stride, Data: b.Data}
	b2 := blas64.General{Rows: n - h, Cols: b.Cols, Stride: b.Stride, Data: b.Data[h*b.Stride:]}
	solveLowerTransInPlace(l22, b2)
	blas64.Gemm(blas.Trans, blas.NoTrans, -1, l21, b2, 1, b1)
	solveLowerTransInPlace(l11, b1)
}
