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
type Quadrature struct {
	Near  float64
	Far   []float64
	Decay []float64
	// NearOuter and CloseOuter are the outer rules (indices of the
	// precomputed panel rules) of near pairs that do not touch, CloseOuter
	// for centroid distances below Close times the panel size. Touching and
	// coincident panels of one mesh always use the graded rules.
	NearOuter, CloseOuter int
	Close                 float64
}

// DefaultQuadrature returns the rule selection used by fluctus. Its
// thresholds keep the relative error of each pair's entries near 1e-5 or
// below (TestPairAccuracy).
func DefaultQuadrature() *Quadrature {
	return &Quadrature{Near: 2.5,
		Far:       []float64{0.02, 0.2, 0.5, 0.5},
		Decay:     []float64{0.03, 0.3, 1.5, 2.5},
		NearOuter: ruleRadon7, CloseOuter: ruleCollapsed4, Close: 1.5}
}

// negligible is the decay exponent κ(r - h) beyond which a pair's entries
// fall below exp(-25) ≈ 1e-11 of the near-field entries of its rows, so that
// the centroid rule serves whatever its relative error.
const negligible = 25

// level returns the far level for a pair, or -1 for a near pair, and the
// centroid distance in units of the larger panel size.
func (q *Quadrature) level(k Kernel, ps, pt *Panel) (int, float64) {
	size := math.Max(ps.Size, pt.Size)
	d := r3.Sub(ps.Centroid, pt.Centroid)
	r := math.Sqrt(r3.Dot(d, d))
	if r < q.Near*size {
		return -1, r / size
	}
	hr, kh := size/r, size*k.Wavenumber()
	if k.Wavenumber()*(r-size) > negligible {
		// The pair is weaker than the panel's own near field by more than
		// exp(-negligible): any rule will do.
		return 0, r / size
	}
	// A pair that has decayed by exp(-κ(r - h)) against the near field of
	// its rows may carry a larger relative error: the (κh)^(p+1) growth of
	// a degree-p rule's error is allowed to use half of that decay.
	relax := k.Wavenumber() * (r - size) / 2
	for i := range q.Far {
		if hr < q.Far[i] && kh < q.Decay[i]*math.Exp(relax/float64(panelRules[i].Degree+1)) {
			return i, r / size
		}
	}
	return len(q.Far), r / size
}

// Moments returns the integrals of kernel k over panel s of a and panel t of
// b; same says that a and b are the same surface (so panels may coincide or
// touch).
func (q *Quadrature) Moments(k Kernel, a *Surface, s int, b *Surface, t int, same bool) Moments {
	ps, pt := &a.Panels[s], &b.Panels[t]
	lv, dist := q.level(k, ps, pt)
	if lv >= 0 {
		return farMoments(k, a.points[lv][s], b.points[lv][t])
	}
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
		return farMomentsYukawa(y.Kappa, xs, ys)
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

// farMomentsYukawa is farMoments for exp(-κr)/(4πr) with the kernel inlined:
// the far pairs are most of the assembly time.
func farMomentsYukawa(kappa float64, xs, ys []qpoint) Moments {
	var m Moments
	if len(xs) == 1 && len(ys) == 1 {
		// Centroid rule: the relative positions vanish.
		d := r3.Sub(xs[0].x, ys[0].x)
		r := math.Sqrt(d.X*d.X + d.Y*d.Y + d.Z*d.Z)
		m.I0 = xs[0].w * ys[0].w * math.Exp(-kappa*r) * inv4Pi / r
		return m
	}
	for _, x := range xs {
		var g, gx, gy, gz float64
		for _, y := range ys {
			dx, dy, dz := x.x.X-y.x.X, x.x.Y-y.x.Y, x.x.Z-y.x.Z
			r := math.Sqrt(dx*dx + dy*dy + dz*dz)
			v := y.w * math.Exp(-kappa*r) / r
			g += v
			gx += v * y.rel.X
			gy += v * y.rel.Y
			gz += v * y.rel.Z
		}
		wg := x.w * g
		m.I0 += wg
		m.Ix.X += wg * x.rel.X
		m.Ix.Y += wg * x.rel.Y
		m.Ix.Z += wg * x.rel.Z
		m.Iy.X += x.w * gx
		m.Iy.Y += x.w * gy
		m.Iy.Z += x.w * gz
		m.Ixy += x.w * (x.rel.X*gx + x.rel.Y*gy + x.rel.Z*gz)
	}
	m.I0 *= inv4Pi
	m.Ix = r3.Scale(inv4Pi, m.Ix)
	m.Iy = r3.Scale(inv4Pi, m.Iy)
	m.Ixy *= inv4Pi
	return m
}

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
