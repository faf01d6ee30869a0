package bem

// This file holds the far-pair path of the EFIE with the Yukawa kernel, the
// bulk of the assembly time: the rule level, the product-rule moments and the
// nine RWG entries of a pair in plain float64 arithmetic without interface
// calls. Its results are those of the general path (Quadrature.Moments and
// the EFIE combination) to rounding, except for the far pairs that take the
// moment expansion (Quadrature.expands, expansion.go), which the general
// path integrates by product rules.

// pairYukawa is EFIE.Pair for the Yukawa kernel.
func (op *EFIE) pairYukawa(dst *[3][3]float64, y *Yukawa, a *Surface, s int, b *Surface, t int, same bool) {
	ps, pt := &a.Panels[s], &b.Panels[t]
	lv, r := op.Quad.levelKappa(y.Kappa, ps, pt)
	var m Moments
	switch {
	case lv == 0:
		// Centroid rule: only I0 survives, M_kl = c_k c_l I0 (κ p_k·p_l + 4/κ).
		i0 := a.points[0][s][0].w * b.points[0][t][0].w * fastExp(-y.Kappa*r) * inv4Pi / r
		centroidEntries(dst, op.Kappa, i0, ps, pt, &a.coef[s], &b.coef[t])
		return
	case lv > 0 && op.Quad.expands(y.Kappa, max(ps.Size, pt.Size), r):
		// Moment expansion about the centroid pair: one exponential.
		dx := ps.Centroid.X - pt.Centroid.X
		dy := ps.Centroid.Y - pt.Centroid.Y
		dz := ps.Centroid.Z - pt.Centroid.Z
		var e expCoef
		expansionCoefs(&e, y.Kappa, ps.Area*pt.Area, dx, dy, dz, r, &a.exp[s], &b.exp[t])
		expansionEntries(dst, op.Kappa, &e, &a.coef[s], &b.coef[t])
		return
	case lv > 0:
		m = farMomentsYukawa(y.Kappa, r+ps.Size+pt.Size, a.points[lv][s], b.points[lv][t])
	default:
		m = op.Quad.Moments(y, a, s, b, t, same)
	}
	efieEntries9(dst, op.Kappa, &m, ps, pt, &a.coef[s], &b.coef[t])
}

// centroidEntries sets dst to the EFIE entries of a pair integrated by the
// centroid rule with ∫∫G = i0: c_k c_l i0 (κ p_k·p_l + 4/κ), p relative to
// the centroids.
func centroidEntries(dst *[3][3]float64, kappa, i0 float64, ps, pt *Panel, cs, ct *[3]float64) {
	div := 4 / kappa
	var plx, ply, plz [3]float64
	for l := 0; l < 3; l++ {
		plx[l] = pt.V[l].X - pt.Centroid.X
		ply[l] = pt.V[l].Y - pt.Centroid.Y
		plz[l] = pt.V[l].Z - pt.Centroid.Z
	}
	for k := 0; k < 3; k++ {
		pkx := ps.V[k].X - ps.Centroid.X
		pky := ps.V[k].Y - ps.Centroid.Y
		pkz := ps.V[k].Z - ps.Centroid.Z
		ck := cs[k] * i0
		for l := 0; l < 3; l++ {
			dot := pkx*plx[l] + pky*ply[l] + pkz*plz[l]
			dst[k][l] = ck * ct[l] * (kappa*dot + div)
		}
	}
}

// efieEntries9 sets dst to the EFIE entries of a pair from its moments
// (DESIGN §3): c_k c_l [κ (Ixy - p_k·Iy - p_l·(Ix - I0 p_k)) + (4/κ) I0].
func efieEntries9(dst *[3][3]float64, kappa float64, m *Moments, ps, pt *Panel, cs, ct *[3]float64) {
	div := 4 / kappa * m.I0
	var plx, ply, plz [3]float64
	for l := 0; l < 3; l++ {
		plx[l] = pt.V[l].X - pt.Centroid.X
		ply[l] = pt.V[l].Y - pt.Centroid.Y
		plz[l] = pt.V[l].Z - pt.Centroid.Z
	}
	for k := 0; k < 3; k++ {
		pkx := ps.V[k].X - ps.Centroid.X
		pky := ps.V[k].Y - ps.Centroid.Y
		pkz := ps.V[k].Z - ps.Centroid.Z
		// dst[k][l] = c_l (α_k - p_l·β_k), α_k = c_k (κ (Ixy - p_k·Iy) + 4 I0/κ),
		// β_k = c_k κ (Ix - I0 p_k).
		ck := cs[k]
		alpha := ck * (kappa*(m.Ixy-(pkx*m.Iy.X+pky*m.Iy.Y+pkz*m.Iy.Z)) + div)
		ckk := ck * kappa
		bx := ckk * (m.Ix.X - m.I0*pkx)
		by := ckk * (m.Ix.Y - m.I0*pky)
		bz := ckk * (m.Ix.Z - m.I0*pkz)
		for l := 0; l < 3; l++ {
			dst[k][l] = ct[l] * (alpha - (plx[l]*bx + ply[l]*by + plz[l]*bz))
		}
	}
}

// pairGeneral is EFIE.Pair for any kernel.
func (op *EFIE) pairGeneral(dst *[3][3]float64, a *Surface, s int, b *Surface, t int, same bool) {
	m := op.Quad.Moments(op.Kernel, a, s, b, t, same)
	efieEntries9(dst, op.Kappa, &m, &a.Panels[s], &b.Panels[t], &a.coef[s], &b.coef[t])
}
