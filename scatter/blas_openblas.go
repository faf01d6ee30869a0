//go:build openblas

package scatter

import (
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/netlib/blas/netlib"
)

// With the openblas build tag every level-1 to level-3 BLAS call of gonum
// (mat, lapack/gonum and the kernels of dense.go and logdet.go) goes to the
// system OpenBLAS through cgo. Build with
//
//	CGO_LDFLAGS="-lopenblas" go build -tags openblas ./...
//
// (Debian: apt-get install libopenblas-dev). The default build stays pure Go.
func init() { blas64.Use(netlib.Implementation{}) }

// openBLAS reports the BLAS behind blas64: with OpenBLAS the trailing update
// of the log-determinant factorisation is one Dsyrk call (its Syrk is blocked
// and threaded), in pure Go it is written over Gemm (dense.go).
const openBLAS = true
