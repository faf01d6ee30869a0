package multipole

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/blas/blas64"
)

// errNotPositive reports a Cholesky breakdown of I - G.
var errNotPositive = errors.New("I - N is not positive definite (numerical breakdown of the round trip; check the gap and lmax)")

// nearIdentityCholesky factors M = I - G = L Lᵀ for symmetric G, n×n. The
// diagonal is carried as its deviation from 1, δ_k = M_kk - 1 - Σ_j L_kj², so
// that ln det M = Σ_k log1p(δ_k) keeps full relative precision even when G is
// so small that every pivot rounds to 1 (the far field, where
// ln det(I - N) ≈ -tr N can be 1e-12 and smaller).
type nearIdentityCholesky struct {
	n      int
	l      []float64 // row-major; lower triangle holds L after factorize
	logDet float64   // ln det M
}

// factorize overwrites the lower triangle of g (row-major n×n, holding G)
// with L. The strict upper triangle is left as it was.
func (c *nearIdentityCholesky) factorize(g []float64, n int) error {
	c.n, c.l, c.logDet = n, g, 0
	for i := 0; i < n; i++ {
		ri := g[i*n : i*n+i+1]
		for j := 0; j < i; j++ {
			rj := g[j*n : j*n+j]
			s := -ri[j]
			if j > 0 {
				s -= blas64.Dot(blas64.Vector{N: j, Inc: 1, Data: ri[:j]}, blas64.Vector{N: j, Inc: 1, Data: rj})
			}
			ri[j] = s / g[j*n+j]
		}
		d := -ri[i]
		if i > 0 {
			d -= blas64.Dot(blas64.Vector{N: i, Inc: 1, Data: ri[:i]}, blas64.Vector{N: i, Inc: 1, Data: ri[:i]})
		}
		if !(d > -1) {
			return errNotPositive
		}
		c.logDet += math.Log1p(d)
		ri[i] = math.Sqrt(1 + d)
	}
	return nil
}
