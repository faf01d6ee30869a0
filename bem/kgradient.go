package bem

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// CrossGradientK is CrossGradient for the K operator: the derivatives of
// Σ_ab H_ab K_ab(κ) over the interaction block between surfaces a (rows) and
// b (columns) when b moves rigidly (DESIGN §5, §13). With d = x - y,
// R = |d|, g(R) = -(1 + κR) e^{-κR}/(4πR³) and the collapsed weight
// V = Σ_kl w_kl (y - p_l) × (x - p_k), the pair integrand is g d·V. For a
// displacement u of b (y and p_l move, V does not change):
//
//	∂/∂u (g d·V) = -[g V + (g'/R)(d·V) d],  g' = e^{-κR}(3 + 3κR + κ²R²)/(4πR⁴);
//
// for a turn about axis n through centre (δy = n × (y - centre), and the
// basis functions turn: δ(y - p_l) = n × (y - p_l)) the torque vector is
//
//	-[g (a × V) + (g'/R)(d·V)(a × d)] + g Σ_kl w_kl (y - p_l) × ((x - p_k) × d),  a = y - centre.
//
// Near pairs of the two bodies are subdivided as in CrossGradient. Surfaces a
// and b must be different bodies.
func (as Assembler) CrossGradientK(ctx context.Context, h *mat.Dense, op *KFIE, a, b *Surface, centre r3.Vec) (Motion, error) {
	r, c := h.Dims()
	if r != a.Len() || c != b.Len() {
		return Motion{}, fmt.Errorf("bem: weight matrix is %d×%d, surfaces have %d and %d unknowns", r, c, a.Len(), b.Len())
	}
	kappa, quad, kern := op.Kappa, op.Quad, op.Kernel
	raw := h.RawMatrix()
	// Per-panel sums added in panel order: independent of thread scheduling.
	part := make([]Motion, len(a.Panels))
	err := as.byColor(ctx, a, func(s int) {
		acc := &part[s]
		for t := range b.Panels {
			kp := collapseK(raw.Data, raw.Stride, kappa, a, s, b, t, centre)
			if kp.S == 0 && kp.gamma == 0 && kp.alpha == (r3.Vec{}) && kp.beta == (r3.Vec{}) {
				continue
			}
			ps, pt := &a.Panels[s], &b.Panels[t]
			if lv, _ := quad.level(kern, ps, pt); lv < 0 {
				kp.subdivide(ps.V, ps.Centroid, pt.V, pt.Centroid, 0)
			} else {
				// One level finer than the EFIE's: the K integrand varies
				// one power of R faster (see KFIE).
				kp.product(a.points[min(lv+1, ruleCollapsed6)][s], b.points[min(lv+1, ruleCollapsed6)][t])
			}
			acc.Translation = r3.Add(acc.Translation, kp.force)
			acc.Rotation = r3.Add(acc.Rotation, kp.torque)
		}
	})
	var total Motion
	for _, p := range part {
		total.Translation = r3.Add(total.Translation, p.Translation)
		total.Rotation = r3.Add(total.Rotation, p.Rotation)
	}
	return total, err
}

// ruleCollapsed6 is the index of the finest far rule in panelRules.
const ruleCollapsed6 = 4

// kPoly is the collapsed weight of one triangle pair for the K gradient, in
// local coordinates x̃ = x - c_s, ỹ = y - c_t with P_k = p_k - c_s,
// Q_l = p_l - c_t and weights w_kl = h_kl c_k c_l:
//
//	S = Σ w, α = Σ w Q_l, β = Σ w P_k, γ = Σ w P_k·Q_l, δ = Σ w Q_l × P_k,
//	Γ = Σ w P_k Q_lᵀ (3×3, row-major).
type kPoly struct {
	kappa, S, gamma    float64
	alpha, beta, delta r3.Vec
	big                [9]float64
	lever              r3.Vec
	force, torque      r3.Vec
}

func collapseK(h []float64, stride int, kappa float64, a *Surface, s int, b *Surface, t int, centre r3.Vec) kPoly {
	ps, pt := &a.Panels[s], &b.Panels[t]
	kp := kPoly{kappa: kappa, lever: r3.Sub(pt.Centroid, centre)}
	for k := 0; k < 3; k++ {
		pk := r3.Sub(ps.V[k], ps.Centroid)
		row := h[a.edge[s][k]*stride:]
		for l := 0; l < 3; l++ {
			ql := r3.Sub(pt.V[l], pt.Centroid)
			w := row[b.edge[t][l]] * a.coef[s][k] * b.coef[t][l]
			kp.S += w
			kp.alpha = r3.Add(kp.alpha, r3.Scale(w, ql))
			kp.beta = r3.Add(kp.beta, r3.Scale(w, pk))
			kp.gamma += w * r3.Dot(pk, ql)
			kp.delta = r3.Add(kp.delta, r3.Scale(w, r3.Cross(ql, pk)))
			p, q := [3]float64{pk.X, pk.Y, pk.Z}, [3]float64{ql.X, ql.Y, ql.Z}
			for i := 0; i < 3; i++ {
				for j := 0; j < 3; j++ {
					kp.big[3*i+j] += w * p[i] * q[j]
				}
			}
		}
	}
	return kp
}

// subdivide is pairPoly.subdivide for the K gradient.
func (kp *kPoly) subdivide(u [3]r3.Vec, cu r3.Vec, v [3]r3.Vec, cv r3.Vec, depth int) {
	su, sv := triSize(u), triSize(v)
	gu, gv := triCentroid(u), triCentroid(v)
	if r3.Norm(r3.Sub(gu, gv)) >= subSeparation*math.Max(su, sv) || depth >= subDepth {
		kp.product(subPoints(u, cu, subRule), subPoints(v, cv, subRule))
		return
	}
	if su >= sv {
		for _, q := range splitTriangle(u) {
			kp.subdivide(q, cu, v, cv, depth+1)
		}
		return
	}
	for _, q := range splitTriangle(v) {
		kp.subdivide(u, cu, q, cv, depth+1)
	}
}

// product integrates the derivative integrands with a product rule.
func (kp *kPoly) product(xs, ys []qpoint) {
	kappa, S := kp.kappa, kp.S
	force, torque := kp.force, kp.torque
	for _, x := range xs {
		for _, y := range ys {
			d := r3.Sub(x.x, y.x)
			R := math.Sqrt(r3.Dot(d, d))
			e := math.Exp(-kappa*R) * inv4Pi
			R2 := R * R
			g := -(1 + kappa*R) * e / (R2 * R)
			gpr := e * (3 + 3*kappa*R + kappa*kappa*R2) / (R2 * R2 * R) // g'/R
			w := x.w * y.w
			// V = S ỹ×x̃ - ỹ×β - α×x̃ + δ.
			V := r3.Add(r3.Sub(r3.Sub(r3.Scale(S, r3.Cross(y.rel, x.rel)), r3.Cross(y.rel, kp.beta)), r3.Cross(kp.alpha, x.rel)), kp.delta)
			dV := r3.Dot(d, V)
			force = r3.Sub(force, r3.Scale(w, r3.Add(r3.Scale(g, V), r3.Scale(gpr*dV, d))))
			arm := r3.Add(kp.lever, y.rel)
			torque = r3.Sub(torque, r3.Scale(w, r3.Add(r3.Scale(g, r3.Cross(arm, V)), r3.Scale(gpr*dV, r3.Cross(arm, d)))))
			// Σ w (ỹ - Q_l)×((x̃ - P_k)×d) = Σ w [(x̃ - P_k)((ỹ - Q_l)·d) - d((ỹ - Q_l)·(x̃ - P_k))]
			//   = x̃(S ỹ·d - α·d) - β(ỹ·d) + Γd - d(S x̃·ỹ - x̃·α - ỹ·β + γ).
			yd := r3.Dot(y.rel, d)
			gd := r3.Vec{
				X: kp.big[0]*d.X + kp.big[1]*d.Y + kp.big[2]*d.Z,
				Y: kp.big[3]*d.X + kp.big[4]*d.Y + kp.big[5]*d.Z,
				Z: kp.big[6]*d.X + kp.big[7]*d.Y + kp.big[8]*d.Z,
			}
			spin := r3.Add(r3.Sub(r3.Scale(S*yd-r3.Dot(kp.alpha, d), x.rel), r3.Scale(yd, kp.beta)), gd)
			spin = r3.Sub(spin, r3.Scale(S*r3.Dot(x.rel, y.rel)-r3.Dot(x.rel, kp.alpha)-r3.Dot(y.rel, kp.beta)+kp.gamma, d))
			torque = r3.Add(torque, r3.Scale(w*g, spin))
		}
	}
	kp.force, kp.torque = force, torque
}
