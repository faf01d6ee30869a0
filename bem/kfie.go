package bem

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// KFIE is the magnetic-field (curl) operator of the PMCHWT formulation at
// imaginary wavenumber κ > 0 (DESIGN §13):
//
//	K_ab = ∫∫ f_a(x)·(∇_x G(x - y) × f_b(y)) dx dy,  G = exp(-κR)/(4πR).
//
// K is symmetric (swap x and y: ∇_y G(y - x) = -∇_x G(x - y) and the triple
// product changes sign once more), and its integrand vanishes when x and y lie
// on one flat triangle, so the self pair of a panel is exactly zero.
//
// Per triangle pair the nine half-RWG pairings follow from two vector
// moments. With ∇_x G = (x - y) g(R), g = -(1 + κR) exp(-κR)/(4πR³), and
// f = c (x - p) on each panel, (x - y) × (y - p_b) = (x - y) × (x - p_b), so
//
//	K_kl = c_k c_l ∫_s W(x)·((x - p_l) × (x - p_k)) dx,  W(x) = ∫_t (x - y) g dy = ∇_x ∫_t G dy,
//
// and with x̃ = x - c_s, P_k = p_k - c_s, Q_l = p_l - c_s:
//
//	K_kl = c_k c_l [ (Q_l - P_k)·A + (Q_l × P_k)·B ],  A = ∫ W × x̃ dx,  B = ∫ W dx.
//
// These are the moments X = ∫∫ g x×y, Ixg = ∫∫ g x, Iyg = ∫∫ g y of
// DESIGN §13 rearranged about the observation panel's centroid (B = Ixg - Iyg
// and A = X-type terms combined), which keeps the digits far from the origin
// and lets the inner integral be the single vector W. Far pairs evaluate W by
// the point rule of the source panel; near and touching pairs by its exact
// edge reduction (Panel.gradPotential), with the graded outer rules of the
// EFIE for panels of one mesh that share a side or a vertex.
type KFIE struct {
	Kappa  float64
	Kernel *Yukawa
	Quad   *Quadrature
}

// NewKFIE returns the operator at κ (1/L0) with the default quadrature. κ must
// be positive.
func NewKFIE(kappa float64) (*KFIE, error) {
	if !(kappa > 0) {
		return nil, fmt.Errorf("bem: K operator needs κ > 0, got %g", kappa)
	}
	return &KFIE{Kappa: kappa, Kernel: NewYukawa(kappa), Quad: DefaultQuadrature()}, nil
}

// KMoments are the two vector integrals of one triangle pair from which the
// K entries follow: A = ∫ W(x) × (x - c_s) dx and B = ∫ W(x) dx over the
// observation panel s, with W(x) = ∫ (x - y) g(|x - y|) dy over panel t.
type KMoments struct {
	A, B r3.Vec
}

// Pair implements Operator.
func (op *KFIE) Pair(dst *[3][3]float64, a *Surface, s int, b *Surface, t int, same bool) {
	if same && s == t {
		*dst = [3][3]float64{}
		return
	}
	ps, pt := &a.Panels[s], &b.Panels[t]
	swap := false
	m := op.moments(a, s, b, t, same, &swap)
	if swap {
		// The moments were taken with t as the observation panel: by the
		// symmetry of K, entry (k, l) of (s, t) is entry (l, k) of (t, s).
		kEntries(dst, m, pt, ps, b.coef[t], a.coef[s])
		for k := 0; k < 3; k++ {
			for l := k + 1; l < 3; l++ {
				dst[k][l], dst[l][k] = dst[l][k], dst[k][l]
			}
		}
		return
	}
	kEntries(dst, m, ps, pt, a.coef[s], b.coef[t])
}

// kEntries turns the moments of observation panel ps and source panel pt
// into the nine entries K_kl = c_k c_l [(Q_l - P_k)·A + (Q_l × P_k)·B].
func kEntries(dst *[3][3]float64, m KMoments, ps, pt *Panel, cs, ct [3]float64) {
	for k := 0; k < 3; k++ {
		pk := r3.Sub(ps.V[k], ps.Centroid)
		for l := 0; l < 3; l++ {
			ql := r3.Sub(pt.V[l], ps.Centroid)
			dst[k][l] = cs[k] * ct[l] * (r3.Dot(r3.Sub(ql, pk), m.A) + r3.Dot(r3.Cross(ql, pk), m.B))
		}
	}
}

// moments chooses the rule of a pair and returns its K moments; swap is set
// when panel t served as the observation panel.
func (op *KFIE) moments(a *Surface, s int, b *Surface, t int, same bool, swap *bool) KMoments {
	ps, pt := &a.Panels[s], &b.Panels[t]
	lv, dist := op.Quad.level(op.Kernel, ps, pt)
	if lv >= 0 {
		return farKMoments(op.Kappa, a.points[lv][s], b.points[lv][t])
	}
	if same {
		switch n, corner := contact(a.Basis.Mesh, s, t); n {
		case 2:
			return nearKMoments(op.Kernel, panelPoints(ps, kSideRules[corner]), pt)
		case 1:
			return nearKMoments(op.Kernel, panelPoints(ps, kVertexRules[corner]), pt)
		}
	}
	// W varies on the scale of the distance like 1/R², one power faster
	// than the potential of the EFIE: the outer rules are one step finer
	// (collapsed 4×4 for near pairs, 6×6 below Close panel sizes and 8×8
	// below kVeryClose; errors below about 4e-5 of the near field,
	// TestKPairAccuracy).
	src, surf, idx := pt, a, s
	if ps.Size > 1.5*pt.Size {
		*swap = true
		src, surf, idx = ps, b, t
	}
	switch {
	case dist < kVeryClose:
		return nearKMoments(op.Kernel, panelPoints(&surf.Panels[idx], kCloseRule), src)
	case dist < op.Quad.Close:
		return nearKMoments(op.Kernel, surf.points[ruleCollapsed6][idx], src)
	}
	return nearKMoments(op.Kernel, surf.points[ruleCollapsed4][idx], src)
}

// kSideRules are the outer rules of panels sharing the side opposite corner
// a: the K integrand grows like the logarithm of the distance to that side
// and to its two corners, which the side-graded rules of the EFIE resolve
// only to about 3e-3 with 36 points; the stronger radial grading
// ξ = 1 - (1-u)⁴ with 8×8 points reaches about 1e-5 (TestKTouching).
var kSideRules = [3]*Rule{sideGradedPower(8, 0, 4), sideGradedPower(8, 1, 4), sideGradedPower(8, 2, 4)}

// sideGradedPower is SideGraded with the radial grading ξ = 1 - (1-u)^p.
func sideGradedPower(n, a int, p float64) *Rule {
	name := fmt.Sprintf("side-graded %d (power %g) opposite %d", n, p, a)
	return sideGradedRule(n, a, name, 1, func(u float64) (float64, float64) {
		return 1 - math.Pow(1-u, p), p * math.Pow(1-u, p-1)
	})
}

// kVertexRules are the outer rules of panels sharing only corner v: the
// collapsed map with its apex at v and the radial grading ρ = u³, 7×7 points.
var kVertexRules = [3]*Rule{vertexGradedPower(7, 0, 3), vertexGradedPower(7, 1, 3), vertexGradedPower(7, 2, 3)}

// vertexGradedPower is VertexGraded with the radial grading ρ = u^p.
func vertexGradedPower(n, v int, p float64) *Rule {
	name := fmt.Sprintf("vertex-graded %d (power %g) at %d", n, p, v)
	return vertexGradedRule(n, v, name, 1, func(u float64) (float64, float64) { return math.Pow(u, p), p * math.Pow(u, p-1) })
}

// kCloseRule is the outer rule of K for pairs closer than kVeryClose panel
// sizes (centroid distance): panels facing each other across a gap well
// below their size.
var kCloseRule = mustCollapsed(8)

const kVeryClose = 0.8

// farKMoments applies the product of two point rules:
// W(x) = Σ_y w_y g(R) (x - y).
func farKMoments(kappa float64, xs, ys []qpoint) KMoments {
	var m KMoments
	for _, x := range xs {
		var w r3.Vec
		for _, y := range ys {
			dx, dy, dz := x.x.X-y.x.X, x.x.Y-y.x.Y, x.x.Z-y.x.Z
			r2 := dx*dx + dy*dy + dz*dz
			r := math.Sqrt(r2)
			g := -y.w * (1 + kappa*r) * math.Exp(-kappa*r) / (r2 * r)
			w.X += g * dx
			w.Y += g * dy
			w.Z += g * dz
		}
		w = r3.Scale(inv4Pi, w)
		m.B = r3.Add(m.B, r3.Scale(x.w, w))
		m.A = r3.Add(m.A, r3.Scale(x.w, r3.Cross(w, x.rel)))
	}
	return m
}

// nearKMoments integrates over the observation points xs the exact inner
// gradient potential of panel pt.
func nearKMoments(k *Yukawa, xs []qpoint, pt *Panel) KMoments {
	var m KMoments
	for _, x := range xs {
		w := r3.Scale(inv4Pi, pt.gradPotential(x.x, k.Kappa, k.edge))
		m.B = r3.Add(m.B, r3.Scale(x.w, w))
		m.A = r3.Add(m.A, r3.Scale(x.w, r3.Cross(w, x.rel)))
	}
	return m
}

// gradPotential returns, without the 1/(4π), the gradient with respect to
// the observation point x of the single-layer potential of the panel,
//
//	W(x) = ∇_x ∫_T exp(-κR)/R dS = ∫_T (x - y) g̃(R) dS,  g̃ = -(1 + κR) exp(-κR)/R³,
//
// reduced to edge integrals by the surface divergence theorem (DESIGN §3
// notation: h the height of x over the plane, ρ0 its foot, t_i and u_i the
// distance and outward normal of edge i):
//
//	in plane:  ∫_T (y - ρ0) G̃'(R)/R dS = Σ_i u_i ∫_edge_i G̃(R) dl,
//	normal:    h ∫_T G̃'(R)/R dS = h Σ_i t_i ∫_edge_i [G̃(R) - G̃(|h|)]/ρ² dl,
//
// with G̃ = exp(-κR)/R. The second bracket is written as
// sign(h) exp(-κ|h|) [κ|h| φ(κ(R-|h|)) - 1]/(R(R+|h|)) with φ(z) = (e^-z - 1)/z,
// which is bounded and free of cancellation for every h (it carries the
// ∓2π jump of the normal derivative across the panel). x must not lie on an
// edge of the panel; on the panel's own plane the normal part is zero.
func (p *Panel) gradPotential(x r3.Vec, kappa float64, er *EdgeRule) r3.Vec {
	h := r3.Dot(r3.Sub(x, p.V[0]), p.Normal)
	absH := math.Abs(h)
	rho0 := r3.Sub(x, r3.Scale(h, p.Normal))
	eh := math.Exp(-kappa * absH)
	tiny := 1e-14 * p.Size
	var normal float64
	var inPlane r3.Vec
	for i := 0; i < 3; i++ {
		a := r3.Sub(p.V[i], rho0)
		e := gradIntegrand{er: er, kappa: kappa, absH: absH, eh: eh, t: r3.Dot(a, p.edgeOut[i])}
		if math.Abs(e.t) <= tiny {
			e.t = 0
		}
		sa := r3.Dot(a, p.edgeDir[i])
		sb := sa + p.edgeLen[i]
		near := math.Min(math.Max(0, sa), sb)
		scale := math.Sqrt(e.t*e.t + absH*absH + near*near)
		var nc, pc float64
		if near > sa {
			nc, pc = e.graded(near, sa, scale, p.edgeLen[i])
			nc, pc = -nc, -pc
		}
		if near < sb {
			n2, p2 := e.graded(near, sb, scale, p.edgeLen[i])
			nc += n2
			pc += p2
		}
		normal += nc
		inPlane = r3.Add(inPlane, r3.Scale(pc, p.edgeOut[i]))
	}
	sgn := 0.0
	if h > 0 {
		sgn = 1
	} else if h < 0 {
		sgn = -1
	}
	// W = h n ∫g̃ + ∫(ρ0 - y) g̃ = sign(h) n Σ t_i ∫[...] - Σ u_i ∫ G̃ dl.
	return r3.Sub(r3.Scale(sgn*normal, p.Normal), inPlane)
}

// gradIntegrand evaluates both edge integrands of gradPotential on one edge.
type gradIntegrand struct {
	er          *EdgeRule
	kappa, absH float64
	eh          float64 // exp(-κ|h|)
	t           float64 // signed distance of ρ0 from the edge line
}

// graded integrates t exp(-κ|h|)[κ|h|φ - 1]/(R(R+|h|)) and exp(-κR)/R from
// s0 to s1 (either order) on the intervals of edgeIntervals.
func (e *gradIntegrand) graded(s0, s1, scale, edge float64) (nc, pc float64) {
	iv := newEdgeIntervals(s0, s1, scale, edge, e.kappa)
	for half, mid, ok := iv.next(); ok; half, mid, ok = iv.next() {
		for k, xk := range e.er.x {
			sk := mid + half*xk
			wk := e.er.w[k] * half
			rho2 := e.t*e.t + sk*sk
			r := math.Sqrt(rho2 + e.absH*e.absH)
			dr := rho2 / (r + e.absH) // R - |h| without cancellation
			z := e.kappa * dr
			// exp(-κR) = exp(-κ|h|)(1 + em); beyond z = 0.3 the plain
			// exponential loses nothing and is several times faster.
			var em float64
			if z > 0.3 {
				em = math.Exp(-z) - 1
			} else {
				em = math.Expm1(-z)
			}
			pc += wk * e.eh * (1 + em) / r
			if e.t != 0 && e.absH > 0 {
				phi := -1 + z/2
				if z >= 1e-8 {
					phi = em / z
				}
				f := e.eh * (e.kappa*e.absH*phi - 1) / (r * (r + e.absH))
				nc += wk * e.t * f
			}
		}
	}
	return nc, pc
}
