package bem

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// EdgeRule holds the Gauss–Legendre nodes on [-1, 1] used along triangle edges
// by the edge-reduced potentials.
type EdgeRule struct {
	x, w []float64
}

// NewEdgeRule returns the n-point Gauss–Legendre rule for edge integrals.
func NewEdgeRule(n int) *EdgeRule {
	r := &EdgeRule{x: make([]float64, n), w: make([]float64, n)}
	gaussLegendre(r.x, r.w, -1, 1)
	return r
}

// radialF is F(R) = [exp(-κ|h|) - exp(-κR)]/κ = exp(-κ|h|) (1 - exp(-κ(R-|h|)))/κ,
// written with expm1 so that it is exact as κ → 0 (where it tends to R - |h|);
// rho2 = R² - h² and eh = exp(-κ|h|).
func radialF(kappa, absH, eh, rho2 float64) float64 {
	r := math.Sqrt(rho2 + absH*absH)
	dr := rho2 / (r + absH) // R - |h| without cancellation
	if kappa == 0 {
		return dr
	}
	return -eh * math.Expm1(-kappa*dr) / kappa
}

// Potential returns the inner integrals over the panel of the kernel without
// its 1/(4π), for the observation point x and imaginary wavenumber κ ≥ 0:
//
//	s = ∫_T exp(-κR)/R dS,   v = ∫_T (y - ρ0) exp(-κR)/R dS,
//
// with R = |x - y| and ρ0 the projection of x onto the panel's plane (also
// returned). Both are reduced to edge integrals by the surface divergence
// theorem (DESIGN §3):
//
//	s = Σ_i t_i ∫_edge_i F(R)/ρ² dl,   v = Σ_i u_i ∫_edge_i F(R) dl,
//	F(R) = [exp(-κ|h|) - exp(-κR)]/κ,
//
// where u_i is the in-plane outward normal of edge i, t_i = (a_i - ρ0)·u_i and
// ρ the in-plane distance from ρ0. Both integrands are bounded; they vary on
// the scale of the distance from x to the edge, so each edge integral is a
// composite Gauss rule on intervals graded geometrically away from the point
// of the edge nearest to ρ0. The result holds for every κ and for x on, near
// or far from the panel.
func (p *Panel) Potential(x r3.Vec, kappa float64, er *EdgeRule) (s float64, v, rho0 r3.Vec) {
	h := r3.Dot(r3.Sub(x, p.V[0]), p.Normal)
	absH := math.Abs(h)
	rho0 = r3.Sub(x, r3.Scale(h, p.Normal))
	eh := math.Exp(-kappa * absH)
	tiny := 1e-14 * p.Size
	for i := 0; i < 3; i++ {
		a := r3.Sub(p.V[i], rho0)
		e := edgeIntegrand{er: er, kappa: kappa, absH: absH, eh: eh, t: r3.Dot(a, p.edgeOut[i])}
		if math.Abs(e.t) <= tiny {
			e.t = 0 // ρ0 on the edge line: the scalar term vanishes
		}
		sa := r3.Dot(a, p.edgeDir[i])
		sb := sa + p.edgeLen[i]
		// Nearest point of the edge to the foot of the perpendicular (s = 0).
		near := math.Min(math.Max(0, sa), sb)
		scale := math.Sqrt(e.t*e.t + absH*absH + near*near)
		var sc, ve float64
		if near > sa {
			sc, ve = e.graded(near, sa, scale, p.edgeLen[i])
			sc, ve = -sc, -ve
		}
		if near < sb {
			s2, v2 := e.graded(near, sb, scale, p.edgeLen[i])
			sc += s2
			ve += v2
		}
		s += sc
		v = r3.Add(v, r3.Scale(ve, p.edgeOut[i]))
	}
	return s, v, rho0
}

// edgeIntegrand evaluates both edge integrands of Potential on one edge.
type edgeIntegrand struct {
	er          *EdgeRule
	kappa, absH float64
	eh          float64 // exp(-κ|h|)
	t           float64 // signed distance of ρ0 from the edge line
}

// graded integrates t F/ρ² and F from s0 to s1 (either order) on the
// intervals of edgeIntervals.
func (e *edgeIntegrand) graded(s0, s1, scale, edge float64) (sc, ve float64) {
	iv := newEdgeIntervals(s0, s1, scale, edge, e.kappa)
	for half, mid, ok := iv.next(); ok; half, mid, ok = iv.next() {
		for k, xk := range e.er.x {
			sk := mid + half*xk
			rho2 := e.t*e.t + sk*sk
			f := radialF(e.kappa, e.absH, e.eh, rho2)
			wk := e.er.w[k] * half
			ve += wk * f
			if e.t != 0 {
				sc += wk * e.t * f / rho2
			}
		}
	}
	return sc, ve
}

// edgeIntervals walks from s0 to s1 (either order) on intervals growing by
// a factor of four from s0, the first one of length scale (the distance of
// x from the point s0), none longer than 2/κ at first (the integrands change
// on the scale 1/κ).
type edgeIntervals struct {
	s0, dir, length, lo, step float64
}

// newEdgeIntervals starts the walk; edge is the edge length.
func newEdgeIntervals(s0, s1, scale, edge, kappa float64) edgeIntervals {
	iv := edgeIntervals{s0: s0, dir: 1, length: math.Abs(s1 - s0), step: scale}
	if s1 < s0 {
		iv.dir = -1
	}
	if iv.step < 1e-10*edge {
		iv.step = iv.length // on the edge itself: the integrands are smooth on each side
	}
	if kappa*iv.step > 2 {
		iv.step = 2 / kappa
	}
	return iv
}

// next returns the half-length and midpoint of the next interval, or ok =
// false at the end.
func (iv *edgeIntervals) next() (half, mid float64, ok bool) {
	if !(iv.lo < iv.length) {
		return 0, 0, false
	}
	hi := math.Min(iv.length, iv.lo+iv.step)
	if iv.length-hi < iv.step {
		hi = iv.length // avoid a sliver at the end
	}
	a, b := iv.s0+iv.dir*iv.lo, iv.s0+iv.dir*hi
	iv.lo, iv.step = hi, 3*hi
	return (b - a) / 2, (b + a) / 2, true
}

// defaultEdgePoints is the Gauss–Legendre order on each edge interval.
const defaultEdgePoints = 8
