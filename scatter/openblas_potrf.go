//go:build openblas

package scatter

// #cgo LDFLAGS: -lopenblas
// extern void dpotrf_(const char *uplo, const int *n, double *a, const int *lda, int *info);
import "C"

import (
	"fmt"
	"unsafe"
)

// potrfLower overwrites the lower triangle of the n×n row-major matrix a
// (stride lda) with its Cholesky factor L, A = L Lᵀ, by LAPACK's dpotrf in
// OpenBLAS. Row-major lower storage is column-major upper storage, so this is
// dpotrf with uplo 'U'. It is the reference of BenchmarkFactorOpenBLAS.
func potrfLower(n int, a []float64, lda int) error {
	if n == 0 {
		return nil
	}
	if lda < n || len(a) < (n-1)*lda+n {
		return fmt.Errorf("scatter: potrf: %d×%d matrix with stride %d in %d values", n, n, lda, len(a))
	}
	uplo := C.char('U')
	cn, clda := C.int(n), C.int(lda)
	var info C.int
	C.dpotrf_(&uplo, &cn, (*C.double)(unsafe.Pointer(&a[0])), &clda, &info)
	if info != 0 {
		return fmt.Errorf("scatter: dpotrf: info %d", int(info))
	}
	return nil
}
