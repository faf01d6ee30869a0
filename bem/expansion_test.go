package bem

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
)

// sphereSurface returns the surface of the icosphere of the given radius and
// subdivision.
func sphereSurface(t testing.TB, radius float64, level int) *Surface {
	t.Helper()
	m, err := mesh.SphereLevel(radius, level)
	if err != nil {
		t.Fatal(err)
	}
	return surfaceOf(t, m)
}

// ruleMoments integrates (1/A)∫u⊗u, (1/A)∫|u|² and (1/A)∫|u|⁴ (u relative
// to the centroid) over p with the collapsed 3×3 rule, exact for degree 4:
// the independent reference of the closed forms in expPanel.
func ruleMoments(p *Panel) (q [6]float64, q2, q4 float64) {
	for _, x := range panelPoints(p, mustCollapsed(3)) {
		u, w := x.rel, x.w/p.Area
		uu := r3.Dot(u, u)
		q[0] += w * u.X * u.X
		q[1] += w * u.Y * u.Y
		q[2] += w * u.Z * u.Z
		q[3] += w * u.X * u.Y
		q[4] += w * u.X * u.Z
		q[5] += w * u.Y * u.Z
		q2 += w * uu
		q4 += w * uu * uu
	}
	return q, q2, q4
}

// TestExpPanelMoments checks the closed-form moments of expPanel (Q, tr Q
// and the fourth moment (1/A)∫|u|⁴) against the collapsed 3×3 rule (exact for
// these polynomials) and its corner data against the panel, on sphere panels
// and on a skewed triangle far from the origin. Tolerance: 1e-12 relative to
// the powers of h (rounding of the offsets from the centroid, a few ulps of
// the coordinates over the panel size).
func TestExpPanelMoments(t *testing.T) {
	s := testSurface(t, 8)
	panels := []Panel{s.Panels[0], s.Panels[517], s.Panels[1279],
		NewPanel(r3.Vec{X: 30.1, Y: -2, Z: 5}, r3.Vec{X: 30.9, Y: -1.7, Z: 5.2}, r3.Vec{X: 30.2, Y: -1.95, Z: 5.6})}
	for i := range panels {
		p := &panels[i]
		e := newExpPanel(p)
		q, q2, q4 := ruleMoments(p)
		h := p.Size
		for k := range q {
			if d := math.Abs(e.q[k]-q[k]) / (h * h); d > 1e-12 {
				t.Errorf("panel %d: Q[%d] = %.15g, rule gives %.15g", i, k, e.q[k], q[k])
			}
		}
		if d := math.Abs(e.trQ-q2) / (h * h); d > 1e-12 {
			t.Errorf("panel %d: tr Q = %.15g, rule gives %.15g", i, e.trQ, q2)
		}
		if d := math.Abs(e.f4-q4) / (h * h * h * h); d > 1e-12 {
			t.Errorf("panel %d: (1/A)∫|u|⁴ = %.15g, rule gives %.15g", i, e.f4, q4)
		}
		p2 := r3.Sub(p.V[2], p.Centroid)
		if d := r3.Norm(r3.Add(p2, r3.Add(e.p0, e.p1))) / h; d > 1e-12 {
			t.Errorf("panel %d: corner 2 offset %v, -p0-p1 = %v", i, p2, r3.Scale(-1, r3.Add(e.p0, e.p1)))
		}
		if d := math.Abs(e.pp2-r3.Dot(p2, p2)) / (h * h); d > 1e-12 {
			t.Errorf("panel %d: |p2|² = %.15g, want %.15g", i, e.pp2, r3.Dot(p2, p2))
		}
		if e.g00 != r3.Dot(e.p0, e.p0) || e.g01 != r3.Dot(e.p0, e.p1) || e.g11 != r3.Dot(e.p1, e.p1) {
			t.Errorf("panel %d: corner Gram %v %v %v inconsistent with the corners", i, e.g00, e.g01, e.g11)
		}
	}
}

// moments returns the expanded moments in the form of Quadrature.Moments,
// for comparison with the product rules.
func (e *expCoef) moments(es, et *expPanel) Moments {
	return Moments{
		I0:  e.i0,
		Ix:  r3.Add(r3.Scale(e.a0, es.p0), r3.Scale(e.a1, es.p1)),
		Iy:  r3.Add(r3.Scale(e.b0, et.p0), r3.Scale(e.b1, et.p1)),
		Ixy: e.ixy,
	}
}

// momentError returns the largest error of the moments got against want,
// each scaled by its natural size relative to |I0| (Ix and Iy by h, Ixy by
// h²), as the RWG entries weigh them.
func momentError(got, want Moments, h float64) float64 {
	s := math.Abs(want.I0)
	e := math.Abs(got.I0-want.I0) / s
	e = math.Max(e, r3.Norm(r3.Sub(got.Ix, want.Ix))/(h*s))
	e = math.Max(e, r3.Norm(r3.Sub(got.Iy, want.Iy))/(h*s))
	return math.Max(e, math.Abs(got.Ixy-want.Ixy)/(h*h*s))
}

// TestExpansionAccuracy checks the moment expansion against collapsed 12×12
// product rules (degree 22, converged far below the errors tested) for pairs
// of sphere panels placed, in several directions, just inside the edge of
// the expansion's criterion: h/r at ExpandFar, or κh at ExpandDecay times
// its decay allowance. The relative error (momentError and the RWG
// entries) must be below 2e-4·exp(κ(r-h)/2): the criterion lets the
// relative error of a pair grow with half its decay against its rows' near
// field (the thresholds of the 3-point rule make the same choice). The
// measured worst cases are 6e-6 and 9e-6 on the h/r edge (κ = 1e-3, 1),
// 1.6e-5 where it meets the κh edge (sphere of radius 3.5, κh ≈ 0.5) and
// 2e-6 and 8e-7 on the decay edge (κ = 10 and 20, κh ≈ 1.5 and 3). The test
// also places the same pairs at the 3-point rule's own edge (h/r = 0.2, κh
// = 0.3·exp(κ(r-h)/6)) and requires the expansion's worst scaled error to
// stay below that rule's there (1e-5 to 1e-4): over the pairs it serves the
// expansion is at least as accurate as the rule it replaces.
func TestExpansionAccuracy(t *testing.T) {
	q := DefaultQuadrature()
	ref := mustCollapsed(12)
	dirs := []r3.Vec{{X: 1}, {Y: -1}, {Z: 1}, r3.Unit(r3.Vec{X: 1, Y: 2, Z: -0.5}), r3.Unit(r3.Vec{X: -0.3, Y: 0.4, Z: 2})}
	pairs := [][2]int{{0, 0}, {0, 700}, {517, 93}, {1100, 1279}}
	for _, c := range []struct {
		name          string
		kappa, radius float64
	}{
		{"κ=1e-3, h/r edge", 1e-3, 1},
		{"κ=1, h/r edge", 1, 1},
		{"κ=1, κh edge", 1, 3.5},
		{"κ=10, decay edge", 10, 1},
		{"κ=20, decay edge", 20, 1},
	} {
		t.Run(c.name, func(t *testing.T) {
			s := sphereSurface(t, c.radius, 8)
			op, err := NewEFIE(c.kappa)
			if err != nil {
				t.Fatal(err)
			}
			// place returns a copy of s moved so that panel ti has its
			// centroid at c_si - r·dir (R = c_s - c_t = r·dir).
			place := func(si, ti int, dir r3.Vec, r float64) *Surface {
				return s.Translate(r3.Sub(r3.Sub(s.Panels[si].Centroid, r3.Scale(r, dir)), s.Panels[ti].Centroid))
			}
			var worstE, worst3, worstEntry float64
			for _, pr := range pairs {
				si, ti := pr[0], pr[1]
				ps := &s.Panels[si]
				h := math.Max(ps.Size, s.Panels[ti].Size)
				kh := c.kappa * h
				// Edge of the expansion and of the 3-point rule (relax =
				// κ(r-h)/2 spent at the fourth and third power).
				rE := h / q.ExpandFar
				if kh > q.ExpandDecay {
					rE = math.Max(rE, h+10*math.Log(kh/q.ExpandDecay)/c.kappa)
				}
				r3p := h / q.Far[1]
				if kh > q.Decay[1] {
					r3p = math.Max(r3p, h+6*math.Log(kh/q.Decay[1])/c.kappa)
				}
				rE *= 1.001
				r3p *= 1.001
				if !q.expands(c.kappa, h, rE) || q.expands(c.kappa, h, 0.99*rE) {
					t.Fatalf("pair %v: r = %.4g is not the edge of the expansion criterion", pr, rE)
				}
				for _, dir := range dirs {
					o := place(si, ti, dir, rE)
					pt := &o.Panels[ti]
					if lv, _ := q.levelKappa(c.kappa, ps, pt); lv < 1 {
						t.Fatalf("pair %v at r = %.4g: level %d, want a product-rule level", pr, rE, lv)
					}
					R := r3.Sub(ps.Centroid, pt.Centroid)
					want := farMoments(op.Kernel, panelPoints(ps, ref), panelPoints(pt, ref))
					var ec expCoef
					expansionCoefs(&ec, c.kappa, ps.Area*pt.Area, R.X, R.Y, R.Z, r3.Norm(R), &s.exp[si], &o.exp[ti])
					got := ec.moments(&s.exp[si], &o.exp[ti])
					allow := math.Exp(c.kappa * (rE - h) / 2)
					e := momentError(got, want, h) / allow
					worstE = math.Max(worstE, e)
					if e > 2e-4 {
						t.Errorf("pair %v dir %v r=%.4g: moment error %.3g·exp(κ(r-h)/2) exceeds 2e-4", pr, dir, rE, e)
					}
					// The entries as the assembly forms them.
					var blk [3][3]float64
					expansionEntries(&blk, c.kappa, &ec, &s.coef[si], &o.coef[ti])
					wantBlk := efieEntries(op, ps, pt, s.coef[si], o.coef[ti], want)
					scale, diff := 0.0, 0.0
					for k := range blk {
						for l := range blk[k] {
							scale = math.Max(scale, math.Abs(wantBlk[k][l]))
							diff = math.Max(diff, math.Abs(blk[k][l]-wantBlk[k][l]))
						}
					}
					worstEntry = math.Max(worstEntry, diff/scale/allow)
					if diff/scale/allow > 2e-4 {
						t.Errorf("pair %v dir %v r=%.4g: entry error %.3g·exp(κ(r-h)/2) exceeds 2e-4", pr, dir, rE, diff/scale/allow)
					}

					// The 3-point rule at its own edge.
					o = place(si, ti, dir, r3p)
					pt = &o.Panels[ti]
					want = farMoments(op.Kernel, panelPoints(ps, ref), panelPoints(pt, ref))
					got = farMomentsExp(c.kappa, s.points[1][si], o.points[1][ti])
					worst3 = math.Max(worst3, momentError(got, want, h)/math.Exp(c.kappa*(r3p-h)/2))
				}
			}
			t.Logf("worst scaled error: expansion moments %.2g, entries %.2g; 3-point rule at its edge %.2g", worstE, worstEntry, worst3)
			if worstE > worst3 {
				t.Errorf("expansion's worst scaled error %.3g exceeds the 3-point rule's %.3g at its edge", worstE, worst3)
			}
		})
	}
}

// TestExpansionEntries compares the corner-product entries of
// expansionEntries with efieEntries9 (the direct combination of DESIGN §3)
// applied to the same moments in vector form (expCoef.moments), for random
// moments of realistic size on several panel pairs. Tolerance: 1e-13
// relative to the largest entry (a few roundings in each).
func TestExpansionEntries(t *testing.T) {
	s := testSurface(t, 8)
	o := s.Translate(r3.Vec{X: 3, Y: 1})
	rng := rand.New(rand.NewPCG(3, 4))
	for _, kappa := range []float64{1e-3, 1, 10} {
		for _, pr := range [][2]int{{0, 1}, {200, 900}, {1279, 5}} {
			si, ti := pr[0], pr[1]
			ps, pt := &s.Panels[si], &o.Panels[ti]
			R := r3.Sub(ps.Centroid, pt.Centroid)
			var e expCoef
			expansionCoefs(&e, kappa, ps.Area*pt.Area, R.X, R.Y, R.Z, r3.Norm(R), &s.exp[si], &o.exp[ti])
			// Random moments; Ix/h and Iy/h of order 0.1 I0, Ixy/h² of 0.01 I0.
			e.i0 = 1 + rng.Float64()
			e.a0, e.a1, e.b0, e.b1 = 0.1*rng.NormFloat64(), 0.1*rng.NormFloat64(), 0.1*rng.NormFloat64(), 0.1*rng.NormFloat64()
			e.ixy = 0.01 * ps.Size * ps.Size * rng.NormFloat64()
			var got, want [3][3]float64
			expansionEntries(&got, kappa, &e, &s.coef[si], &o.coef[ti])
			m := e.moments(&s.exp[si], &o.exp[ti])
			efieEntries9(&want, kappa, &m, ps, pt, &s.coef[si], &o.coef[ti])
			scale := 0.0
			for k := range want {
				for l := range want[k] {
					scale = math.Max(scale, math.Abs(want[k][l]))
				}
			}
			for k := range want {
				for l := range want[k] {
					if e := math.Abs(got[k][l]-want[k][l]) / scale; e > 1e-13 {
						t.Errorf("κ=%g pair %v entry %d%d: %.15g, direct combination %.15g", kappa, pr, k, l, got[k][l], want[k][l])
					}
				}
			}
		}
	}
}

// TestSurfaceExpMoments checks that Translate keeps the expansion data
// (relative to the centroids) and that Mirror reflects the corners, p → Pp
// with P = 1 - 2nnᵀ, and Q → PQP, leaving the invariants (corner products,
// tr Q, fourth moment) unchanged. Tolerance: 1e-14 relative to the powers of h (rounding
// of the reflected corners).
func TestSurfaceExpMoments(t *testing.T) {
	s := testSurface(t, 8)
	tr := s.Translate(r3.Vec{X: 5, Y: -2, Z: 1})
	n := r3.Unit(r3.Vec{X: 0.3, Y: -1, Z: 0.2})
	mi := s.Mirror(r3.Vec{X: 2, Y: 1}, n)
	flip := func(v r3.Vec) r3.Vec { return r3.Sub(v, r3.Scale(2*r3.Dot(v, n), n)) }
	for i := range s.Panels {
		e, et, em := &s.exp[i], &tr.exp[i], &mi.exp[i]
		if *e != *et {
			t.Fatalf("panel %d: Translate changed the expansion data", i)
		}
		h := s.Panels[i].Size
		h2 := h * h
		d := math.Max(r3.Norm(r3.Sub(em.p0, flip(e.p0))), r3.Norm(r3.Sub(em.p1, flip(e.p1)))) / h
		for _, v := range [][2]float64{{em.g00, e.g00}, {em.g01, e.g01}, {em.g11, e.g11}, {em.pp2, e.pp2}, {em.trQ, e.trQ}} {
			d = math.Max(d, math.Abs(v[0]-v[1])/h2)
		}
		d = math.Max(d, math.Abs(em.f4-e.f4)/(h2*h2))
		// Q → PQP.
		qm := [3][3]float64{{e.q[0], e.q[3], e.q[4]}, {e.q[3], e.q[1], e.q[5]}, {e.q[4], e.q[5], e.q[2]}}
		nv := [3]float64{n.X, n.Y, n.Z}
		var pm, pqp [3][3]float64
		for a := range pm {
			for b := range pm[a] {
				pm[a][b] = -2 * nv[a] * nv[b]
			}
			pm[a][a]++
		}
		for a := range pqp {
			for b := range pqp[a] {
				for k := 0; k < 3; k++ {
					for l := 0; l < 3; l++ {
						pqp[a][b] += pm[a][k] * qm[k][l] * pm[l][b]
					}
				}
			}
		}
		want := [6]float64{pqp[0][0], pqp[1][1], pqp[2][2], pqp[0][1], pqp[0][2], pqp[1][2]}
		for k := range want {
			d = math.Max(d, math.Abs(em.q[k]-want[k])/h2)
		}
		if d > 1e-14 {
			t.Fatalf("panel %d: mirrored expansion data off by %.3g relative", i, d)
		}
	}
}
