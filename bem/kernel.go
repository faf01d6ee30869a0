package bem

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Kernel is a scalar free-space kernel G(|x-y|) together with its inner
// integrals over a panel, which the quadrature needs for near and singular
// pairs.
type Kernel interface {
	// Value returns G(r) for r > 0.
	Value(r float64) float64
	// Potential returns s = ∫_T G dS and v = ∫_T (y - ρ0) G dS for the
	// observation point x, with ρ0 the projection of x onto the panel plane.
	Potential(p *Panel, x r3.Vec) (s float64, v, rho0 r3.Vec)
	// Wavenumber is the decay rate of the kernel in 1/L0 (it sets how fine
	// the far-pair rules must be).
	Wavenumber() float64
}

// Yukawa is the Helmholtz Green function at imaginary wavenumber,
// G(r) = exp(-κr)/(4πr), κ ≥ 0 in 1/L0.
type Yukawa struct {
	Kappa float64
	edge  *EdgeRule
}

// NewYukawa returns the kernel at imaginary wavenumber κ (1/L0).
func NewYukawa(kappa float64) *Yukawa {
	return &Yukawa{Kappa: kappa, edge: NewEdgeRule(defaultEdgePoints)}
}

const inv4Pi = 1 / (4 * math.Pi)

// Value returns exp(-κr)/(4πr).
func (k *Yukawa) Value(r float64) float64 { return math.Exp(-k.Kappa*r) * inv4Pi / r }

// Derivative returns dG/dr = -(1 + κr) exp(-κr)/(4πr²).
func (k *Yukawa) Derivative(r float64) float64 {
	return -(1 + k.Kappa*r) * math.Exp(-k.Kappa*r) * inv4Pi / (r * r)
}

// Potential implements Kernel by the edge reduction of Panel.Potential.
func (k *Yukawa) Potential(p *Panel, x r3.Vec) (float64, r3.Vec, r3.Vec) {
	s, v, rho0 := p.Potential(x, k.Kappa, k.edge)
	return s * inv4Pi, r3.Scale(inv4Pi, v), rho0
}

// Wavenumber returns κ.
func (k *Yukawa) Wavenumber() float64 { return k.Kappa }
