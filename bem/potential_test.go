package bem

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// graded integrates f over [a, b] by composite 12-point Gauss–Legendre rules on
// intervals that shrink geometrically towards the point c (if c lies in [a,b]),
// so that integrands peaked or kinked at c converge. It is the brute-force
// reference of these tests and shares nothing with the edge reduction.
func graded(f func(float64) float64, a, b, c float64) float64 {
	x := make([]float64, 12)
	w := make([]float64, 12)
	gaussLegendre(x, w, -1, 1)
	gauss := func(lo, hi float64) float64 {
		s := 0.0
		for i := range x {
			s += w[i] * f((hi+lo)/2+(hi-lo)/2*x[i])
		}
		return s * (hi - lo) / 2
	}
	side := func(from, to float64) float64 { // grade towards `from`
		d := to - from
		sum := 0.0
		hi := 1.0
		for hi > 1e-16 {
			lo := hi * 0.2
			sum += gauss(from+d*lo, from+d*hi)
			hi = lo
		}
		return sum + gauss(from, from+d*hi)
	}
	switch {
	case c <= a:
		return side(a, b)
	case c >= b:
		return -side(b, a)
	default:
		return -side(c, a) + side(c, b)
	}
}

// referencePotential computes s and v of Panel.Potential by direct 2-D
// quadrature: the panel is split into the three signed triangles (ρ0, a_i,
// b_i), each mapped from the unit square with the apex at ρ0 (the Jacobian ξ
// cancels the 1/R singularity), and integrated with graded composite rules.
func referencePotential(p *Panel, x r3.Vec, kappa float64) (float64, r3.Vec) {
	h := r3.Dot(r3.Sub(x, p.V[0]), p.Normal)
	rho0 := r3.Sub(x, r3.Scale(h, p.Normal))
	var s float64
	var v r3.Vec
	for i := 0; i < 3; i++ {
		a, b := p.V[i], p.V[(i+1)%3]
		wa := r3.Sub(a, rho0)
		e := r3.Sub(b, a)
		jac := r3.Dot(r3.Cross(wa, r3.Sub(b, rho0)), p.Normal) // signed, 2 × area
		if jac == 0 {
			continue
		}
		// Foot of the perpendicular from rho0 on the edge line, in η.
		etaStar := -r3.Dot(wa, e) / r3.Dot(e, e)
		comp := func(k int) float64 {
			return graded(func(xi float64) float64 {
				return graded(func(eta float64) float64 {
					w := r3.Add(wa, r3.Scale(eta, e))
					y := r3.Scale(xi, w)
					R := math.Sqrt(r3.Dot(y, y) + h*h)
					g := math.Exp(-kappa*R) / R * xi * jac
					switch k {
					case 0:
						return g
					case 1:
						return g * y.X
					case 2:
						return g * y.Y
					}
					return g * y.Z
				}, 0, 1, etaStar)
			}, 0, 1, 0)
		}
		s += comp(0)
		v = r3.Add(v, r3.Vec{X: comp(1), Y: comp(2), Z: comp(3)})
	}
	return s, v
}

// TestPotentialAgainstQuadrature compares the edge-reduced inner integrals
// with the independent 2-D reference, for κ from 1e-4 to 30 per unit length
// (triangle size ≈ 1) and observation points on, near and far from the
// triangle. Tolerance: 5e-8 relative to the scale of the integral (the
// potential of the whole triangle seen from its centroid): the reference is
// converged to about 1e-13, so this bounds the truncation of the production
// edge rule, far below the 1e-4 the matrix entries need.
func TestPotentialAgainstQuadrature(t *testing.T) {
	p := NewPanel(r3.Vec{X: 0.1, Y: -0.2, Z: 0.3}, r3.Vec{X: 1.2, Y: 0.1, Z: 0.25}, r3.Vec{X: 0.3, Y: 0.9, Z: 0.5})
	n := p.Normal
	c := p.Centroid
	mid01 := r3.Scale(0.5, r3.Add(p.V[0], p.V[1]))
	out := r3.Add(mid01, r3.Scale(-0.2, p.edgeOut[0])) // in-plane point beyond edge 0
	points := []struct {
		name string
		x    r3.Vec
	}{
		{"centroid", c},
		{"on edge", mid01},
		{"at vertex", p.V[2]},
		{"near vertex inside", r3.Add(p.V[0], r3.Scale(0.01, r3.Sub(c, p.V[0])))},
		{"just inside edge", r3.Add(mid01, r3.Scale(1e-4, r3.Scale(-1, p.edgeOut[0])))},
		{"in plane outside", r3.Add(mid01, r3.Scale(0.2, p.edgeOut[0]))},
		{"above centroid 1e-3", r3.Add(c, r3.Scale(1e-3, n))},
		{"above edge 1e-2", r3.Add(mid01, r3.Scale(-1e-2, n))},
		{"above outside 0.1", r3.Add(out, r3.Scale(0.1, n))},
		{"above centroid 0.5", r3.Add(c, r3.Scale(0.5, n))},
		{"far 5", r3.Add(c, r3.Vec{X: 3, Y: -3, Z: 2.5})},
	}
	er := NewEdgeRule(defaultEdgePoints)
	for _, kappa := range []float64{1e-4, 0.1, 1, 5, 30} {
		scale, _, _ := p.Potential(c, kappa, er)
		for _, pt := range points {
			s, v, _ := p.Potential(pt.x, kappa, er)
			rs, rv := referencePotential(&p, pt.x, kappa)
			tol := 5e-8 * scale
			if math.Abs(s-rs) > tol {
				t.Errorf("κ=%g %s: scalar %.15g, reference %.15g (diff %.2g, tol %.2g)", kappa, pt.name, s, rs, s-rs, tol)
			}
			if d := r3.Norm(r3.Sub(v, rv)); d > tol*p.Size {
				t.Errorf("κ=%g %s: vector %v, reference %v (diff %.2g)", kappa, pt.name, v, rv, d)
			}
		}
	}
}

// TestPotentialStaticLimit checks the κ → 0 limit against a closed form: at
// the acute vertex of the right isosceles triangle with legs a,
// ∫ dS/R = ∫_0^{π/4} a/cosθ dθ = a ln(1+√2) (elementary polar integral).
// Tolerance 1e-9: the truncation of the production edge rule.
func TestPotentialStaticLimit(t *testing.T) {
	a := 1.7
	p := NewPanel(r3.Vec{}, r3.Vec{X: a}, r3.Vec{X: a, Y: a})
	er := NewEdgeRule(defaultEdgePoints)
	for _, kappa := range []float64{0, 1e-8} {
		s, _, _ := p.Potential(r3.Vec{}, kappa, er)
		// e^{-κR} ≈ 1 - κR: the first-order term is -κ·Area.
		want := a*math.Log(1+math.Sqrt2) - kappa*p.Area
		if math.Abs(s-want) > 1e-9*want {
			t.Errorf("κ=%g: vertex potential %.15g, want %.15g", kappa, s, want)
		}
	}
}
