//go:build !openblas

package scatter

// openBLAS reports the BLAS behind blas64: false in the default pure-Go
// build (see blas_openblas.go).
const openBLAS = false
