package bem

import "gonum.org/v1/gonum/spatial/r3"

// This file holds the moment expansion of far pairs of the EFIE with the
// Yukawa kernel: the Taylor expansion of G(R + u - v) about the centroid
// pair (R = c_s - c_t, u and v relative to the centroids of panels s and t)
// integrated term by term against the exact moments of the flat triangles,
// with one exponential per pair.
//
// Moments of a triangle. With p_k the corners relative to the centroid
// (Σ p_k = 0) and d_k = p_k·a for a direction a, the integrals of monomials
// over a simplex give, per unit area,
//
//	(1/A) ∫ (u·a)² = (1/12) Σ d_k²,   (1/A) ∫ (u·a)³ = (1/30) Σ d_k³,
//	(1/A) ∫ (u·a)⁴ = (1/15) [(Σ d_k²)²/8 + Σ d_k⁴/4],
//
// whose polarisations give every contraction below: Q = (1/A)∫u⊗u =
// (1/12) Σ p_k⊗p_k, S = (1/A)∫u⊗u⊗u = (1/30) Σ p_k⊗p_k⊗p_k and
// F = (1/A)∫u⊗u⊗u⊗u = (1/120) sym(M⊗M) + (1/60) Σ p_k⊗p_k⊗p_k⊗p_k with
// M = Σ p_k⊗p_k and sym(M⊗M)_ijkl = (M_ij M_kl + M_ik M_jl + M_il M_jk)/3.
// Everything a panel contributes is a combination of its corners p_0, p_1
// (p_2 = -p_0 - p_1), so the vector moments come out as Ix = a_0 p_0 +
// a_1 p_1 and Iy = b_0 q_0 + b_1 q_1 (q_k the corners of t) and the RWG
// entries need only the corner dot products p_j·q_k.
//
// Radial derivatives. For G(r) with n = R/r, ∇G = G' n, the Hessian is
// H = a nn + b 1 (b = G'/r, a = G″ - b), the third derivative D³ = c nnn +
// (a/r) Σ₃ 1n (c = G‴ - 3a/r) and the fourth D⁴ = d nnnn + (c/r) Σ₆ 1nn +
// (a/r²) Σ₃ 11 (d = G⁗ - 6c/r - 3a/r²), the sums running over the distinct
// index pairings. With α = κ + 1/r: G'/G = -α, G″/G = α² + 1/r²,
// G‴/G = -(α³ + 3α/r² + 2/r³), G⁗/G = α⁴ + 6α²/r² + 8α/r³ + 9/r⁴.
//
// Terms kept (A_s A_t factored out; the first moments of each panel vanish
// about its centroid):
//
//	I0:  G + ½ H:(Q_s + Q_t) + (1/6) D³:(S_s - S_t) + (1/24) D⁴:(F_s + F_t + 6 Q_s⊗Q_t)
//	Ix:  Q_s ∇G + ½ S_s:H + (1/6) [F_s·D³ + 3 Q_s D³:Q_t]
//	Iy:  -Q_t ∇G + ½ S_t:H - (1/6) [F_t·D³ + 3 Q_t D³:Q_s]
//	Ixy: -tr(Q_s H Q_t)
//
// that is every term up to total order four in the panel sizes, counting the
// weights u, v of the moments, as the RWG entries weigh them. The error is of
// order five, (h(κ + 1/r))⁵ relative to the pair's entries, where the 3-point
// product rule has an error of order three (its points at p_k/2 give
// S = (1/24) Σ p_k⊗p_k⊗p_k instead of 1/30). TestExpansionAccuracy checks
// the moments against a 12×12 product rule.

// expPanel holds the corner data of a panel that the moment expansion needs,
// relative to its centroid (L0 and its powers).
type expPanel struct {
	p0, p1        r3.Vec     // corners 0 and 1; corner 2 is -p0-p1
	g00, g01, g11 float64    // p_j·p_k for j, k ∈ {0, 1}
	pp2           float64    // |p_2|²
	q             [6]float64 // Q = (1/12) Σ p_k⊗p_k: xx, yy, zz, xy, xz, yz
	trQ           float64    // tr Q = (1/A)∫|u|² = (1/12) Σ |p_k|²
	f4            float64    // (1/A)∫|u|⁴ = (1/15)[((tr M)² + 2 tr M²)/24 + Σ |p_k|⁴/4]
}

// newExpPanel returns the expansion data of p.
func newExpPanel(p *Panel) expPanel {
	var ps [3]r3.Vec
	for k := range ps {
		ps[k] = r3.Sub(p.V[k], p.Centroid)
	}
	e := expPanel{p0: ps[0], p1: ps[1],
		g00: r3.Dot(ps[0], ps[0]), g01: r3.Dot(ps[0], ps[1]), g11: r3.Dot(ps[1], ps[1]),
		pp2: r3.Dot(ps[2], ps[2])}
	var trm, trm2, p4 float64
	for _, v := range ps {
		e.q[0] += v.X * v.X / 12
		e.q[1] += v.Y * v.Y / 12
		e.q[2] += v.Z * v.Z / 12
		e.q[3] += v.X * v.Y / 12
		e.q[4] += v.X * v.Z / 12
		e.q[5] += v.Y * v.Z / 12
		vv := r3.Dot(v, v)
		trm += vv
		p4 += vv * vv
		for _, w := range ps {
			d := r3.Dot(v, w)
			trm2 += d * d
		}
	}
	e.trQ = trm / 12
	e.f4 = ((trm*trm+2*trm2)/24 + p4/4) / 15
	return e
}

// expPanels returns the expansion data of every panel.
func expPanels(ps []Panel) []expPanel {
	e := make([]expPanel, len(ps))
	for t := range ps {
		e[t] = newExpPanel(&ps[t])
	}
	return e
}

// expCoef are the moments of a pair from the expansion in corner form:
// Ix = a0 p_0 + a1 p_1 on panel s, Iy = b0 q_0 + b1 q_1 on panel t, with the
// corner dot products x_jk = p_j·q_k that the RWG entries need.
type expCoef struct {
	i0, ixy            float64
	a0, a1, b0, b1     float64
	x00, x01, x10, x11 float64
}

// expansionCoefs sets e to the expanded moments of G = exp(-κr)/(4πr) over
// panels s and t (data es, et; area = A_s A_t in L0⁴) whose centroid offset
// is R = c_s - c_t = (rx, ry, rz), |R| = r > 0.
func expansionCoefs(e *expCoef, kappa, area, rx, ry, rz, r float64, es, et *expPanel) {
	ex := fastExp(-kappa * r)
	ir := 1 / r
	nx, ny, nz := rx*ir, ry*ir, rz*ir
	// Radial derivatives in units of G; every term carries A_s A_t G,
	// applied at the end.
	al := kappa + ir
	ir2 := ir * ir
	g1 := -al
	g2 := al*al + ir2
	g3 := -(al*(al*al+3*ir2) + 2*ir2*ir)
	g4 := al*al*(al*al+6*ir2) + ir2*(8*al*ir+9*ir2)
	b := g1 * ir
	a := g2 - b
	c := g3 - 3*a*ir
	ar, cr := a*ir, c*ir
	ar2 := ar * ir
	d4 := g4 - 6*cr - 3*ar2

	// Corner projections on n and corner dot products.
	ds0 := es.p0.X*nx + es.p0.Y*ny + es.p0.Z*nz
	ds1 := es.p1.X*nx + es.p1.Y*ny + es.p1.Z*nz
	ds2 := -ds0 - ds1
	dt0 := et.p0.X*nx + et.p0.Y*ny + et.p0.Z*nz
	dt1 := et.p1.X*nx + et.p1.Y*ny + et.p1.Z*nz
	dt2 := -dt0 - dt1
	x00 := es.p0.X*et.p0.X + es.p0.Y*et.p0.Y + es.p0.Z*et.p0.Z
	x01 := es.p0.X*et.p1.X + es.p0.Y*et.p1.Y + es.p0.Z*et.p1.Z
	x10 := es.p1.X*et.p0.X + es.p1.Y*et.p0.Y + es.p1.Z*et.p0.Z
	x11 := es.p1.X*et.p1.X + es.p1.Y*et.p1.Y + es.p1.Z*et.p1.Z
	e.x00, e.x01, e.x10, e.x11 = x00, x01, x10, x11

	// 12 Q_s n = Σ d_k p_k = u0 p_0 + u1 p_1, likewise for t.
	u0, u1 := ds0-ds2, ds1-ds2
	v0, v1 := dt0-dt2, dt1-dt2
	ds00, ds11, ds22 := ds0*ds0, ds1*ds1, ds2*ds2
	dt00, dt11, dt22 := dt0*dt0, dt1*dt1, dt2*dt2
	s2s, s2t := ds00+ds11+ds22, dt00+dt11+dt22 // 12 Q[n,n]
	ps0, ps1, ps2 := es.g00, es.g11, es.pp2
	pt0, pt1, pt2 := et.g00, et.g11, et.pp2
	// Corner-2 folded sums: Σ_k |p_k|² d_k (30 S:1n) and Σ_k d_k² |p_k|².
	tds := (ps0-ps2)*ds0 + (ps1-ps2)*ds1
	tdt := (pt0-pt2)*dt0 + (pt1-pt2)*dt1
	// (12 Q_s n)·(12 Q_t n), |12 Q n|² and 144 tr(Q_s Q_t) = Σ_kl (p_k·q_l)².
	qst := u0*(v0*x00+v1*x01) + u1*(v0*x10+v1*x11)
	qss := u0*(u0*es.g00+2*u1*es.g01) + u1*u1*es.g11
	qtt := v0*(v0*et.g00+2*v1*et.g01) + v1*v1*et.g11
	qq := es.q[0]*et.q[0] + es.q[1]*et.q[1] + es.q[2]*et.q[2] + 2*(es.q[3]*et.q[3]+es.q[4]*et.q[4]+es.q[5]*et.q[5])

	// I0 to fourth order: F[nnnn] = (Σd²)²/120 + Σd⁴/60 = (Σd²)²/60 (Σd⁴ =
	// (Σd²)²/2 when Σd = 0), F[nn1] = (tr Q)(Σd²)/30 + |12 Qn|²/180 +
	// Σ d_k² |p_k|²/60, F[11] = f4.
	fnnnn := (s2s*s2s + s2t*s2t) * (1.0 / 60)
	fnn := (s2s*es.trQ+s2t*et.trQ)*(1.0/30) + (qss+qtt)*(1.0/180) +
		(ds00*ps0+ds11*ps1+ds22*ps2+dt00*pt0+dt11*pt1+dt22*pt2)*(1.0/60)
	o4 := d4*(fnnnn+s2s*s2t*(1.0/24)) + 6*cr*(fnn+(es.trQ*s2t+s2s*et.trQ)*(1.0/12)+qst*(1.0/36)) +
		3*ar2*(es.f4+et.f4+2*(es.trQ*et.trQ+2*qq))
	ddd := 3 * (ds0*ds1*ds2 - dt0*dt1*dt2) // 30 (S_s - S_t)[nnn]
	f := area * ex * inv4Pi * ir
	e.i0 = f * (1 + a*(1.0/24)*(s2s+s2t) + 0.5*b*(es.trQ+et.trQ) + c*(1.0/180)*ddd + ar*(1.0/60)*(tds-tdt) + o4*(1.0/24))
	e.ixy = -f * (a*(1.0/144)*qst + b*qq)

	// Ix in corners of s: order one (G'/12) Σ d_k p_k; order two (a/60)
	// Σ d_k² p_k + (b/60) Σ |p_k|² p_k; order three (1/6)[c F[·nnn] +
	// 3(a/r) F[·n1] + 3c Q_t[nn] Q_s n + 3(a/r)(2 Q_s Q_t n + tr Q_t Q_s n)],
	// which gathers to cs Σ d_k p_k + (c/360) Σ d_k³ p_k + (a/r)/120
	// Σ d_k |p_k|² p_k + (a/r)/6 Q_s (Σd p/5 + Σd' q/2).
	k1, k2, k3 := g1*(1.0/12), a*(1.0/60), b*(1.0/60)
	c360, a120, a72 := c*(1.0/360), ar*(1.0/120), ar*(1.0/72)
	cs := (c*(s2s*(1.0/120)+s2t*(1.0/48)) + ar*(es.trQ*(1.0/10)+et.trQ*(1.0/4))) * (1.0 / 6)
	ct := (c*(s2t*(1.0/120)+s2s*(1.0/48)) + ar*(et.trQ*(1.0/10)+es.trQ*(1.0/4))) * (1.0 / 6)
	// ω_k = p_k·(Σd p/5 + Σd' q/2); Q_s w = (1/12)[(2ω0+ω1) p_0 + (ω0+2ω1) p_1].
	w0 := (u0*es.g00+u1*es.g01)*0.2 + (v0*x00+v1*x01)*0.5
	w1 := (u0*es.g01+u1*es.g11)*0.2 + (v0*x10+v1*x11)*0.5
	a0 := (k1+cs)*u0 + k2*(ds00-ds22) + k3*(ps0-ps2) + c360*(ds00*ds0-ds22*ds2) + a120*(ds0*ps0-ds2*ps2) + a72*(2*w0+w1)
	a1 := (k1+cs)*u1 + k2*(ds11-ds22) + k3*(ps1-ps2) + c360*(ds11*ds1-ds22*ds2) + a120*(ds1*ps1-ds2*ps2) + a72*(w0+2*w1)
	// Iy: the same with s and t swapped, odd orders negated.
	w0 = (v0*et.g00+v1*et.g01)*0.2 + (u0*x00+u1*x10)*0.5
	w1 = (v0*et.g01+v1*et.g11)*0.2 + (u0*x01+u1*x11)*0.5
	b0 := k2*(dt00-dt22) + k3*(pt0-pt2) - (k1+ct)*v0 - c360*(dt00*dt0-dt22*dt2) - a120*(dt0*pt0-dt2*pt2) - a72*(2*w0+w1)
	b1 := k2*(dt11-dt22) + k3*(pt1-pt2) - (k1+ct)*v1 - c360*(dt11*dt1-dt22*dt2) - a120*(dt1*pt1-dt2*pt2) - a72*(w0+2*w1)
	e.a0, e.a1, e.b0, e.b1 = f*a0, f*a1, f*b0, f*b1
}

// expansionEntries sets dst to the EFIE entries (DESIGN §3) of a pair from
// its expanded moments: X_kl = κ(Ixy - p_k·Iy - q_l·Ix + p_k·q_l I0) +
// (4/κ) I0 times c_k c_l. Each term in p_k or q_l sums to zero over the
// corner index, so the corner-2 terms follow from the others, and the dot
// products reduce to the corner products x_jk.
func expansionEntries(dst *[3][3]float64, kappa float64, e *expCoef, cs, ct *[3]float64) {
	d := 4/kappa*e.i0 + kappa*e.ixy
	ki := kappa * e.i0
	// β_k = -κ p_k·Iy, γ_l = -κ q_l·Ix, δ_kl = κ I0 p_k·q_l.
	b0 := -kappa * (e.b0*e.x00 + e.b1*e.x01)
	b1 := -kappa * (e.b0*e.x10 + e.b1*e.x11)
	g0 := -kappa * (e.a0*e.x00 + e.a1*e.x10)
	g1 := -kappa * (e.a0*e.x01 + e.a1*e.x11)
	d00, d01, d10, d11 := ki*e.x00, ki*e.x01, ki*e.x10, ki*e.x11
	r0, r1 := d+b0, d+b1
	r2 := d - b0 - b1
	g2 := -g0 - g1
	c0, c1, c2 := ct[0], ct[1], ct[2]
	s0, s1, s2 := cs[0], cs[1], cs[2]
	dst[0][0] = s0 * c0 * (r0 + g0 + d00)
	dst[0][1] = s0 * c1 * (r0 + g1 + d01)
	dst[0][2] = s0 * c2 * (r0 + g2 - d00 - d01)
	dst[1][0] = s1 * c0 * (r1 + g0 + d10)
	dst[1][1] = s1 * c1 * (r1 + g1 + d11)
	dst[1][2] = s1 * c2 * (r1 + g2 - d10 - d11)
	dst[2][0] = s2 * c0 * (r2 + g0 - d00 - d10)
	dst[2][1] = s2 * c1 * (r2 + g1 - d01 - d11)
	dst[2][2] = s2 * c2 * (r2 + g2 + d00 + d01 + d10 + d11)
}
