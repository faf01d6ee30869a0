package bem

import "fmt"

// Operator turns the integrals of one triangle pair into its contributions to
// the RWG matrix entries.
type Operator interface {
	// Pair sets dst[k][l] to the contribution of panel s of a and panel t of
	// b to the entry between the half-functions of local edge k of s and
	// local edge l of t (coefficients and signs included); same says that a
	// and b are one surface.
	Pair(dst *[3][3]float64, a *Surface, s int, b *Surface, t int, same bool)
}

// EFIE is the electric-field integral operator of a perfect conductor at
// imaginary wavenumber κ > 0 (DESIGN §3):
//
//	M_ab = ∫∫ [κ f_a·f_b + (1/κ) ∇·f_a ∇·f_b] G dx dy.
type EFIE struct {
	Kappa  float64
	Kernel Kernel
	Quad   *Quadrature
}

// NewEFIE returns the operator at κ with the Yukawa kernel and the default
// quadrature. κ must be positive: the κ → 0 limit is taken by the caller.
func NewEFIE(kappa float64) (*EFIE, error) {
	if !(kappa > 0) {
		return nil, fmt.Errorf("bem: EFIE needs κ > 0, got %g", kappa)
	}
	return &EFIE{Kappa: kappa, Kernel: NewYukawa(kappa), Quad: DefaultQuadrature()}, nil
}

// Pair implements Operator. With f = c (x - p) on a panel, (x-p)·(y-p') is
// expanded about the centroids and ∇·f = 2c.
func (op *EFIE) Pair(dst *[3][3]float64, a *Surface, s int, b *Surface, t int, same bool) {
	if y, ok := op.Kernel.(*Yukawa); ok {
		op.pairYukawa(dst, y, a, s, b, t, same)
		return
	}
	op.pairGeneral(dst, a, s, b, t, same)
}
