package bem

import (
	"fmt"
	"math"
)

// Rule is a quadrature rule on a triangle. Point i has barycentric
// coordinates Bary[i] (summing to one) and weight Weight[i]; the weights sum
// to one, so ∫_T f dA ≈ Area(T) Σ_i Weight[i] f(x_i).
type Rule struct {
	Name   string
	Degree int // polynomials up to this total degree are integrated exactly
	Bary   [][3]float64
	Weight []float64
}

// Len returns the number of points of the rule.
func (r *Rule) Len() int { return len(r.Weight) }

// Centroid is the one-point rule, exact for degree 1.
func Centroid() *Rule {
	return &Rule{Name: "centroid", Degree: 1, Bary: [][3]float64{{1.0 / 3, 1.0 / 3, 1.0 / 3}}, Weight: []float64{1}}
}

// Strang3 is the three-point interior rule exact for degree 2, points
// (2/3, 1/6, 1/6) and permutations with equal weights (Strang & Fix, An
// Analysis of the Finite Element Method, 1973, table 4.1).
func Strang3() *Rule {
	a, b := 2.0/3, 1.0/6
	return &Rule{Name: "3-point", Degree: 2,
		Bary:   [][3]float64{{a, b, b}, {b, a, b}, {b, b, a}},
		Weight: []float64{1.0 / 3, 1.0 / 3, 1.0 / 3}}
}

// Radon7 is the seven-point rule exact for degree 5 (Radon 1948; Stroud,
// Approximate Calculation of Multiple Integrals, 1971, formula T2:5-1), given in
// closed form with sqrt(15).
func Radon7() *Rule {
	s := math.Sqrt(15)
	a1, a2 := (6-s)/21, (6+s)/21
	w1, w2 := (155-s)/1200, (155+s)/1200
	r := &Rule{Name: "7-point", Degree: 5}
	r.Bary = append(r.Bary, [3]float64{1.0 / 3, 1.0 / 3, 1.0 / 3})
	r.Weight = append(r.Weight, 9.0/40)
	for _, p := range []struct{ a, w float64 }{{a1, w1}, {a2, w2}} {
		b := 1 - 2*p.a
		r.Bary = append(r.Bary, [3]float64{b, p.a, p.a}, [3]float64{p.a, b, p.a}, [3]float64{p.a, p.a, b})
		r.Weight = append(r.Weight, p.w, p.w, p.w)
	}
	return r
}

// Collapsed returns the n×n-point rule obtained by mapping the Gauss–Legendre
// product rule on the unit square onto the triangle with the collapsed (Duffy)
// map λ1 = ξ, λ2 = (1-ξ)η, λ3 = (1-ξ)(1-η), Jacobian 2(1-ξ). It is exact for
// total degree 2n-2 (the Jacobian uses one order of the ξ rule).
func Collapsed(n int) (*Rule, error) {
	if n < 1 || n > 64 {
		return nil, fmt.Errorf("bem: collapsed Gauss rule order %d out of range 1..64", n)
	}
	x := make([]float64, n)
	w := make([]float64, n)
	gaussLegendre(x, w, 0, 1)
	r := &Rule{Name: fmt.Sprintf("collapsed %dx%d", n, n), Degree: 2*n - 2}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			xi, eta := x[i], x[j]
			r.Bary = append(r.Bary, [3]float64{xi, (1 - xi) * eta, (1 - xi) * (1 - eta)})
			r.Weight = append(r.Weight, 2*w[i]*w[j]*(1-xi))
		}
	}
	return r, nil
}

// mustCollapsed is Collapsed for orders known to be valid.
func mustCollapsed(n int) *Rule {
	r, err := Collapsed(n)
	if err != nil {
		panic(err)
	}
	return r
}

// EdgeGraded returns a rule for integrands that are smooth inside the
// triangle but lose smoothness at its edges and corners, as the inner
// potential of a coincident or touching triangle does (its derivatives grow
// logarithmically there). The triangle is split at its centroid into three,
// each mapped from the unit square with the apex at the centroid; the radial
// variable is graded towards the edge by ξ = 1 - (1-u)³ and the one along the
// edge towards the corners by η = 3v² - 2v³, with n-point Gauss–Legendre rules
// in u and v (3n² points). It integrates polynomials of degree 1 exactly; its
// purpose is the fast convergence on the singular integrands (TestEdgeGraded).
func EdgeGraded(n int) (*Rule, error) {
	if n < 1 || n > 32 {
		return nil, fmt.Errorf("bem: edge-graded rule order %d out of range 1..32", n)
	}
	x := make([]float64, n)
	w := make([]float64, n)
	gaussLegendre(x, w, 0, 1)
	r := &Rule{Name: fmt.Sprintf("edge-graded %d", n), Degree: 1}
	for i := 0; i < 3; i++ {
		for a := 0; a < n; a++ {
			u := x[a]
			xi := 1 - (1-u)*(1-u)*(1-u)
			dxi := 3 * (1 - u) * (1 - u)
			for b := 0; b < n; b++ {
				v := x[b]
				eta := v * v * (3 - 2*v)
				deta := 6 * v * (1 - v)
				// Point (1-ξ) c + ξ (1-η) V_i + ξ η V_{i+1}; the sub-triangle
				// has a third of the area.
				var bary [3]float64
				for k := range bary {
					bary[k] = (1 - xi) / 3
				}
				bary[i] += xi * (1 - eta)
				bary[(i+1)%3] += xi * eta
				r.Bary = append(r.Bary, bary)
				r.Weight = append(r.Weight, w[a]*w[b]*dxi*deta*xi*2/3)
			}
		}
	}
	return r, nil
}

func mustEdgeGraded(n int) *Rule {
	r, err := EdgeGraded(n)
	if err != nil {
		panic(err)
	}
	return r
}

// VertexGraded returns an n×n-point rule for integrands that lose smoothness
// at corner v (0, 1 or 2) of the triangle, as the inner potential of a
// triangle that shares only that vertex does. The collapsed map puts its apex
// at the corner, λ_v = 1 - ρ, with the radial variable graded as ρ = u²; its
// Jacobian ρ dρ removes the corner's influence. Exact for polynomials of
// degree n-2.
func VertexGraded(n, v int) (*Rule, error) {
	if n < 2 || n > 32 || v < 0 || v > 2 {
		return nil, fmt.Errorf("bem: vertex-graded rule order %d at corner %d out of range", n, v)
	}
	name := fmt.Sprintf("vertex-graded %d at %d", n, v)
	return vertexGradedRule(n, v, name, n-2, func(u float64) (float64, float64) { return u * u, 2 * u }), nil
}

// SideGraded returns an n×n-point rule for integrands that lose smoothness
// along the side opposite corner a, as the inner potential of a triangle that
// shares that side does. The collapsed map has its apex at corner a and
// reaches the side at ξ = 1, graded as ξ = 1 - (1-u)²; along the side the
// variable is graded towards both ends by η = 3v² - 2v³. Exact for
// polynomials of degree min(n-2, (2n-3)/3).
func SideGraded(n, a int) (*Rule, error) {
	if n < 2 || n > 32 || a < 0 || a > 2 {
		return nil, fmt.Errorf("bem: side-graded rule order %d opposite corner %d out of range", n, a)
	}
	name := fmt.Sprintf("side-graded %d opposite %d", n, a)
	return sideGradedRule(n, a, name, min(n-2, (2*n-3)/3), func(u float64) (float64, float64) { return 1 - (1-u)*(1-u), 2 * (1 - u) }), nil
}

// vertexGradedRule is the collapsed n×n rule with its apex at corner v and
// the radial grading ρ(u) with derivative dρ/du given by grade.
func vertexGradedRule(n, v int, name string, degree int, grade func(u float64) (rho, drho float64)) *Rule {
	x := make([]float64, n)
	w := make([]float64, n)
	gaussLegendre(x, w, 0, 1)
	r := &Rule{Name: name, Degree: degree}
	for i := 0; i < n; i++ {
		rho, drho := grade(x[i])
		for j := 0; j < n; j++ {
			eta := x[j]
			var b [3]float64
			b[v] = 1 - rho
			b[(v+1)%3] = rho * (1 - eta)
			b[(v+2)%3] = rho * eta
			r.Bary = append(r.Bary, b)
			r.Weight = append(r.Weight, 2*w[i]*w[j]*rho*drho)
		}
	}
	return r
}

// sideGradedRule is the collapsed n×n rule with its apex at corner a, the
// radial grading ξ(u) towards the opposite side given (with dξ/du) by
// grade, and η = 3v² - 2v³ along that side.
func sideGradedRule(n, a int, name string, degree int, grade func(u float64) (xi, dxi float64)) *Rule {
	x := make([]float64, n)
	w := make([]float64, n)
	gaussLegendre(x, w, 0, 1)
	r := &Rule{Name: name, Degree: degree}
	for i := 0; i < n; i++ {
		xi, dxi := grade(x[i])
		for j := 0; j < n; j++ {
			v := x[j]
			eta, deta := v*v*(3-2*v), 6*v*(1-v)
			var b [3]float64
			b[a] = 1 - xi
			b[(a+1)%3] = xi * (1 - eta)
			b[(a+2)%3] = xi * eta
			r.Bary = append(r.Bary, b)
			r.Weight = append(r.Weight, 2*w[i]*w[j]*xi*dxi*deta)
		}
	}
	return r
}

func must(r *Rule, err error) *Rule {
	if err != nil {
		panic(err)
	}
	return r
}
