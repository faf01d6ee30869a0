package bem

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Moments are the four integrals of a kernel over a triangle pair (x on panel
// s, y on panel t) from which every RWG pairing follows (DESIGN §3):
//
//	I0 = ∫∫ G,  Ix = ∫∫ (x - c_s) G,  Iy = ∫∫ (y - c_t) G,  Ixy = ∫∫ (x - c_s)·(y - c_t) G,
//
// with c_s, c_t the panel centroids (local origins keep the digits when the
// scene is far from the coordinate origin).
type Moments struct {
	I0  float64
	Ix  r3.Vec
	Iy  r3.Vec
	Ixy float64
}

// Quadrature chooses and applies the integration rule of each triangle pair.
// Pairs whose centroid distance r is below Near times the larger panel size h
// use the edge-reduced inner integral (Kernel.Potential) with a Gauss rule for
// the outer integral. Other pairs use product rules whose order falls with
// distance: level i (centroid, 3-point, 7-point, collapsed 4×4, 6×6) serves
// when h/r < Far[i] and κh < Decay[i]·exp(κ(r-h)/(2(p_i+1))). The two
// criteria differ because a degree-p rule's error grows like (h/r)^(p+1) for
// the 1/r part of the kernel but like (κh)^(p+1)/(p+1)! for its exponential
// part, and a pair that has decayed by exp(-κ(r-h)) against the near field of
// its rows needs proportionally less relative accuracy (half of that decay is
// spent).
//
// The EFIE with the Yukawa kernel replaces the product rules of levels 1 and
// above by the moment expansion about the centroid pair (expansion.go, one
// exponential per pair) when h/r < ExpandFar and κh <
// ExpandDecay·exp(κ(r-h)/10): its relative error, of fifth order in
// h(κ + 1/r) against third order for the 3-point rule, grows like (h/r)^5 in
// the 1/r part of the kernel and like (κh)^5 in its exponential part, again
// spending half of the decay. The other operators and the force gradients
// keep the product rules (level is unchanged for them).
type Quadrature struct {
	Near  float64
	Far   []float64
	Decay []float64
	// ExpandFar and ExpandDecay bound the far pairs that the EFIE integrates
	// by the moment expansion; zero turns the expansion off.
	ExpandFar, ExpandDecay float64
	// NearOuter and CloseOuter are the outer rules (indices of the
	// precomputed panel rules) of near pairs that do not touch, CloseOuter
	// for centroid distances below Close times the panel size. Touching and
	// coincident panels of one mesh always use the graded rules.
	NearOuter, CloseOuter int
	Close                 float64
}

// DefaultQuadrature returns the rule selection used by fluctus. Its
// thresholds keep the relative error of each pair's entries near 1e-5 or
// below (TestPairAccuracy). The expansion serves the 3-point rule's range of
// h/r; its bounds keep its worst error below that rule's at the rule's own
// bounds (TestExpansionAccuracy): about 2e-5 of the pair against 1.5e-4 at
// h/r = 0.2, and 1e-5 against 1.4e-5 at the κh edge, where the expansion's
// error grows faster than (κh)^5 beyond κh ≈ 1 and ExpandDecay keeps a
// margin of five up to κh = 3.
func DefaultQuadrature() *Quadrature {
	return &Quadrature{Near: 2.5,
		Far:       []float64{0.02, 0.2, 0.5, 0.5},
		Decay:     []float64{0.03, 0.3, 1.5, 2.5},
		ExpandFar: 0.2, ExpandDecay: 0.5,
		NearOuter: ruleRadon7, CloseOuter: ruleCollapsed4, Close: 1.5}
}

// expands reports whether a far pair of level 1 or above (levelKappa) with
// larger panel size h and centroid distance r takes the moment expansion in
// the EFIE with the Yukawa kernel of decay rate κ.
func (q *Quadrature) expands(kappa, h, r float64) bool {
	if !(h < q.ExpandFar*r) {
		return false
	}
	kh := kappa * h
	return kh < q.ExpandDecay || kh < q.ExpandDecay*fastExp(kappa*(r-h)/10)
}

// negligible is the decay exponent κ(r - h) beyond which a pair's entries
// fall below exp(-25) ≈ 1e-11 of the near-field entries of its rows, so that
// the centroid rule serves whatever its relative error.
const negligible = 25

// level returns the far level for a pair, or -1 for a near pair, and the
// centroid distance in units of the larger panel size.
func (q *Quadrature) level(k Kernel, ps, pt *Panel) (int, float64) {
	lv, r := q.levelKappa(k.Wavenumber(), ps, pt)
	return lv, r / max(ps.Size, pt.Size)
}

// levelKappa is level for a kernel of decay rate κ; it returns the centroid
// distance r itself.
func (q *Quadrature) levelKappa(kappa float64, ps, pt *Panel) (int, float64) {
	size := max(ps.Size, pt.Size)
	dx := ps.Centroid.X - pt.Centroid.X
	dy := ps.Centroid.Y - pt.Centroid.Y
	dz := ps.Centroid.Z - pt.Centroid.Z
	r := math.Sqrt(dx*dx + dy*dy + dz*dz)
	if r < q.Near*size {
		return -1, r
	}
	kh := size * kappa
	if kappa*(r-size) > negligible {
		// The pair is weaker than the panel's own near field by more than
		// exp(-negligible): any rule will do.
		return 0, r
	}
	// A pair that has decayed by exp(-κ(r - h)) against the near field of
	// its rows may carry a larger relative error: the (κh)^(p+1) growth of
	// a degree-p rule's error is allowed to use half of that decay.
	relax := kappa * (r - size) / 2
	for i := range q.Far {
		// h/r < Far[i] is tested as h < Far[i] r; with relax ≥ 0 (r ≥ h),
		// kh < Decay[i] already settles the second criterion.
		if size < q.Far[i]*r && (relax >= 0 && kh < q.Decay[i] || kh < q.Decay[i]*fastExp(relax/float64(panelRules[i].Degree+1))) {
			return i, r
		}
	}
	return len(q.Far), r
}

// Moments returns the integrals of kernel k over panel s of a and panel t of
// b; same says that a and b are the same surface (so panels may coincide or
// touch).
func (q *Quadrature) Moments(k Kernel, a *Surface, s int, b *Surface, t int, same bool) Moments {
	ps, pt := &a.Panels[s], &b.Panels[t]
	lv, r := q.levelKappa(k.Wavenumber(), ps, pt)
	if lv >= 0 {
		if y, ok := k.(*Yukawa); ok {
			return farMomentsYukawa(y.Kappa, r+ps.Size+pt.Size, a.points[lv][s], b.points[lv][t])
		}
		return farMoments(k, a.points[lv][s], b.points[lv][t])
	}
	dist := r / max(ps.Size, pt.Size)
	if same {
		switch n, corner := contact(a.Basis.Mesh, s, t); n {
		case 3:
			return nearMoments(k, a.points[ruleEdgeGraded][s], ps, pt)
		case 2:
			return nearMoments(k, a.points[ruleSide+corner][s], ps, pt)
		case 1:
			return nearMoments(k, a.points[ruleVertex+corner][s], ps, pt)
		}
	}
	outer := q.NearOuter
	if dist < q.Close {
		outer = q.CloseOuter
	}
	// Put the outer rule on the clearly smaller panel: the inner integral
	// is exact for any observation point, the outer one must resolve its
	// variation. Between panels of similar size it stays on the first, so
	// the choice does not flip under rotations of the scene.
	if ps.Size > 1.5*pt.Size {
		m := nearMoments(k, b.points[outer][t], pt, ps)
		m.Ix, m.Iy = m.Iy, m.Ix
		return m
	}
	return nearMoments(k, a.points[outer][s], ps, pt)
}

// farMoments applies the product of two point rules.
func farMoments(k Kernel, xs, ys []qpoint) Moments {
	if y, ok := k.(*Yukawa); ok {
		return farMomentsExp(y.Kappa, xs, ys)
	}
	var m Moments
	for _, x := range xs {
		var g float64
		var gy r3.Vec
		for _, y := range ys {
			d := r3.Sub(x.x, y.x)
			v := y.w * k.Value(math.Sqrt(r3.Dot(d, d)))
			g += v
			gy = r3.Add(gy, r3.Scale(v, y.rel))
		}
		m.I0 += x.w * g
		m.Ix = r3.Add(m.Ix, r3.Scale(x.w*g, x.rel))
		m.Iy = r3.Add(m.Iy, r3.Scale(x.w, gy))
		m.Ixy += x.w * r3.Dot(x.rel, gy)
	}
	return m
}

// farMomentsYukawa is farMoments for exp(-κr)/(4πr) with the kernel and
// fastExp written out in the loop: the far pairs are most of the assembly
// time. reach bounds the distances between the points (centroid distance
// plus both panel sizes); beyond 708/κ (values under 1e-307) the pair takes
// math.Exp.
func farMomentsYukawa(kappa, reach float64, xs, ys []qpoint) Moments {
	var m Moments
	if len(xs) == 1 && len(ys) == 1 {
		// Centroid rule: the relative positions vanish.
		d := r3.Sub(xs[0].x, ys[0].x)
		r := math.Sqrt(d.X*d.X + d.Y*d.Y + d.Z*d.Z)
		m.I0 = xs[0].w * ys[0].w * fastExp(-kappa*r) * inv4Pi / r
		return m
	}
	if len(xs) > maxFarPoints || len(ys) > maxFarPoints || !(kappa*reach <= -expMinArg) || kappa < 0 {
		return farMomentsExp(kappa, xs, ys)
	}
	if len(xs) == 3 && len(ys) == 3 {
		return farMoments3(kappa, (*[3]qpoint)(xs), (*[3]qpoint)(ys))
	}
	var i0, ixx, ixy, ixz, iyx, iyy, iyz, ixy2 float64
	var row [maxFarPoints]float64
	c := -kappa * expInvLn2N
	for i := range xs {
		x := &xs[i]
		px, py, pz := x.x.X, x.x.Y, x.x.Z
		// First pass: the kernel values w_y exp(-κr)/r of this row, with
		// fastExp inline (its argument -κr is known to lie in range).
		vs := row[:len(ys)]
		for j := range vs {
			y := &ys[j]
			dx, dy, dz := px-y.x.X, py-y.x.Y, pz-y.x.Z
			r := math.Sqrt(dx*dx + dy*dy + dz*dz)
			kd := r*c + expShifter
			ki := math.Float64bits(kd)
			kd -= expShifter
			u := (-kappa*r - kd*expLn2HiN) - kd*expLn2LoN
			u2 := u * u
			pm1 := u + u2*(expPolyC2+u*expPolyC3) + u2*u2*(expPolyC4+u*expPolyC5)
			sc := math.Float64frombits(expTable[ki&expMaskBits] + ki<<(52-expTableBits))
			vs[j] = y.w * (sc + sc*pm1) / r
		}
		// Second pass: the row's share of the moments.
		var g, gx, gy, gz float64
		for j, v := range vs {
			y := &ys[j]
			g += v
			gx += v * y.rel.X
			gy += v * y.rel.Y
			gz += v * y.rel.Z
		}
		wg := x.w * g
		i0 += wg
		ixx += wg * x.rel.X
		ixy += wg * x.rel.Y
		ixz += wg * x.rel.Z
		iyx += x.w * gx
		iyy += x.w * gy
		iyz += x.w * gz
		ixy2 += x.w * (x.rel.X*gx + x.rel.Y*gy + x.rel.Z*gz)
	}
	m.I0 = i0 * inv4Pi
	m.Ix = r3.Vec{X: ixx * inv4Pi, Y: ixy * inv4Pi, Z: ixz * inv4Pi}
	m.Iy = r3.Vec{X: iyx * inv4Pi, Y: iyy * inv4Pi, Z: iyz * inv4Pi}
	m.Ixy = ixy2 * inv4Pi
	return m
}

// farMoments3 is farMomentsYukawa for two 3-point rules (the far level
// most pairs of neighbouring bodies use), with the loops of fixed length.
func farMoments3(kappa float64, xs, ys *[3]qpoint) Moments {
	var v, rs [9]float64
	c := -kappa * expInvLn2N
	for n := range v {
		x, y := &xs[n/3], &ys[n%3]
		dx, dy, dz := x.x.X-y.x.X, x.x.Y-y.x.Y, x.x.Z-y.x.Z
		r := math.Sqrt(dx*dx + dy*dy + dz*dz)
		rs[n] = r
		kd := r*c + expShifter
		ki := math.Float64bits(kd)
		kd -= expShifter
		u := (-kappa*r - kd*expLn2HiN) - kd*expLn2LoN
		u2 := u * u
		pm1 := u + u2*(expPolyC2+u*expPolyC3) + u2*u2*(expPolyC4+u*expPolyC5)
		sc := math.Float64frombits(expTable[ki&expMaskBits] + ki<<(52-expTableBits))
		v[n] = x.w * y.w * (sc + sc*pm1)
	}
	// Divide by the distances three at a time: 1/a = bc/(abc).
	for n := 0; n < 9; n += 3 {
		a, b, cc := rs[n], rs[n+1], rs[n+2]
		ab := a * b
		inv := 1 / (ab * cc)
		v[n] *= b * cc * inv
		v[n+1] *= a * cc * inv
		v[n+2] *= ab * inv
	}
	var m Moments
	for i := 0; i < 3; i++ {
		x := &xs[i]
		g := v[3*i] + v[3*i+1] + v[3*i+2]
		m.I0 += g
		m.Ix.X += g * x.rel.X
		m.Ix.Y += g * x.rel.Y
		m.Ix.Z += g * x.rel.Z
	}
	for j := 0; j < 3; j++ {
		y := &ys[j]
		g := v[j] + v[3+j] + v[6+j]
		m.Iy.X += g * y.rel.X
		m.Iy.Y += g * y.rel.Y
		m.Iy.Z += g * y.rel.Z
		// Ixy = Σ_ij v_ij x̃_i·ỹ_j
		hx := v[j]*xs[0].rel.X + v[3+j]*xs[1].rel.X + v[6+j]*xs[2].rel.X
		hy := v[j]*xs[0].rel.Y + v[3+j]*xs[1].rel.Y + v[6+j]*xs[2].rel.Y
		hz := v[j]*xs[0].rel.Z + v[3+j]*xs[1].rel.Z + v[6+j]*xs[2].rel.Z
		m.Ixy += hx*y.rel.X + hy*y.rel.Y + hz*y.rel.Z
	}
	m.I0 *= inv4Pi
	m.Ix = r3.Scale(inv4Pi, m.Ix)
	m.Iy = r3.Scale(inv4Pi, m.Iy)
	m.Ixy *= inv4Pi
	return m
}

// farMomentsExp is farMomentsYukawa with math.Exp, for any argument.
func farMomentsExp(kappa float64, xs, ys []qpoint) Moments {
	var m Moments
	for _, x := range xs {
		var g float64
		var gy r3.Vec
		for _, y := range ys {
			d := r3.Sub(x.x, y.x)
			r := math.Sqrt(r3.Dot(d, d))
			v := y.w * math.Exp(-kappa*r) / r
			g += v
			gy = r3.Add(gy, r3.Scale(v, y.rel))
		}
		m.I0 += x.w * g
		m.Ix = r3.Add(m.Ix, r3.Scale(x.w*g, x.rel))
		m.Iy = r3.Add(m.Iy, r3.Scale(x.w, gy))
		m.Ixy += x.w * r3.Dot(x.rel, gy)
	}
	m.I0 *= inv4Pi
	m.Ix = r3.Scale(inv4Pi, m.Ix)
	m.Iy = r3.Scale(inv4Pi, m.Iy)
	m.Ixy *= inv4Pi
	return m
}

// maxFarPoints bounds the number of points of a far rule (collapsed 6×6).
const maxFarPoints = 36

// nearMoments integrates over observation points xs on ps the exact inner
// potentials of pt.
func nearMoments(k Kernel, xs []qpoint, ps, pt *Panel) Moments {
	var m Moments
	for _, x := range xs {
		g, v, rho0 := k.Potential(pt, x.x)
		// ∫ (y - c_t) G dy = (ρ0 - c_t) ∫G + ∫ (y - ρ0) G.
		gy := r3.Add(r3.Scale(g, r3.Sub(rho0, pt.Centroid)), v)
		m.I0 += x.w * g
		m.Ix = r3.Add(m.Ix, r3.Scale(x.w*g, x.rel))
		m.Iy = r3.Add(m.Iy, r3.Scale(x.w, gy))
		m.Ixy += x.w * r3.Dot(x.rel, gy)
	}
	return m
}
