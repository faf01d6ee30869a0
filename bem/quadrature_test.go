package bem

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

func testSurface(t testing.TB, level int) *Surface {
	t.Helper()
	return sphereSurface(t, 1, level)
}

// TestPairAccuracy compares the EFIE entries of every pair involving one panel
// of a 1280-triangle sphere (self, touching, near and far pairs) computed with
// the default rule selection against a reference that uses far products of
// collapsed 12×12 rules and, for near pairs, the exact inner potential with a
// 16-point edge-graded outer rule (converged to about 1e-8, see the rule
// convergence in TestEdgeGraded). κ spans 1e-3 to 10 per unit radius (κh up to
// 1.6). Tolerance: 1e-4 relative to the largest entry of the pair, or for
// far pairs of the panel's own near field (its self pair): far pairs that
// have decayed exponentially are allowed a larger error of their own — the
// thresholds of DefaultQuadrature aim at 1e-5; the margin covers the worst
// pair of each class.
func TestPairAccuracy(t *testing.T) {
	s := testSurface(t, 8)
	refFar := mustCollapsed(12)
	refNear := mustEdgeGraded(16)
	for _, kappa := range []float64{1e-3, 1, 10} {
		op, err := NewEFIE(kappa)
		if err != nil {
			t.Fatal(err)
		}
		var self [3][3]float64
		op.Pair(&self, s, 0, s, 0, true)
		selfScale := 0.0
		for k := range self {
			for l := range self[k] {
				selfScale = math.Max(selfScale, math.Abs(self[k][l]))
			}
		}
		worst := map[string]float64{}
		for tt := range s.Panels {
			ps, pt := &s.Panels[0], &s.Panels[tt]
			var ref Moments
			kind := "far"
			if lv, _ := op.Quad.level(op.Kernel, ps, pt); lv < 0 {
				kind = "near"
				switch n, _ := contact(s.Basis.Mesh, 0, tt); n {
				case 3:
					kind = "self"
				case 2:
					kind = "side"
				case 1:
					kind = "vertex"
				}
				ref = nearMoments(op.Kernel, panelPoints(ps, refNear), ps, pt)
			} else {
				ref = farMoments(op.Kernel, panelPoints(ps, refFar), panelPoints(pt, refFar))
			}
			var got [3][3]float64
			op.Pair(&got, s, 0, s, tt, true)
			want := efieEntries(op, ps, pt, s.coef[0], s.coef[tt], ref)
			scale := 0.0
			for k := range want {
				for l := range want[k] {
					scale = math.Max(scale, math.Abs(want[k][l]))
				}
			}
			if kind == "far" {
				scale = selfScale
			}
			for k := range want {
				for l := range want[k] {
					if e := math.Abs(got[k][l]-want[k][l]) / scale; e > worst[kind] {
						worst[kind] = e
					}
				}
			}
		}
		for kind, e := range worst {
			t.Logf("κ=%g %s pairs: worst relative entry error %.2g", kappa, kind, e)
			if e > 1e-4 {
				t.Errorf("κ=%g %s pairs: relative entry error %.2g exceeds 1e-4", kappa, kind, e)
			}
		}
	}
}

// efieEntries is the EFIE combination of moments written out directly from
// DESIGN §3: κ c_k c_l ∫∫ (x-p_k)·(y-p_l) G + (4/κ) c_k c_l ∫∫ G.
func efieEntries(op *EFIE, ps, pt *Panel, cs, ct [3]float64, m Moments) [3][3]float64 {
	var out [3][3]float64
	for k := 0; k < 3; k++ {
		pk := r3.Sub(ps.V[k], ps.Centroid)
		for l := 0; l < 3; l++ {
			pl := r3.Sub(pt.V[l], pt.Centroid)
			ff := m.Ixy - r3.Dot(pl, m.Ix) - r3.Dot(pk, m.Iy) + r3.Dot(pk, pl)*m.I0
			out[k][l] = cs[k] * ct[l] * (op.Kappa*ff + 4/op.Kappa*m.I0)
		}
	}
	return out
}

// TestEdgeGraded checks the outer rule for touching pairs: weights sum to one,
// degree-1 exactness (rounding tolerance 1e-14), and fast convergence on the
// coincident-panel integral ∫_T ∫_T dx dy/|x-y| (a self-convergence check:
// orders 6 and 8 agree with order 16 to 1e-5 and 1e-6 relative, where a plain
// collapsed Gauss rule of similar size stays near 1e-3).
func TestEdgeGraded(t *testing.T) {
	p := NewPanel(r3.Vec{}, r3.Vec{X: 1}, r3.Vec{X: 0.3, Y: 0.8})
	er := NewEdgeRule(defaultEdgePoints)
	integral := func(n int) float64 {
		r := mustEdgeGraded(n)
		sum := 0.0
		for i, w := range r.Weight {
			s, _, _ := p.Potential(p.Point(r.Bary[i]), 0, er)
			sum += w * s * p.Area
		}
		return sum
	}
	ref := integral(16)
	for _, c := range []struct {
		n   int
		tol float64
	}{{6, 1e-5}, {8, 1e-6}} {
		n := c.n
		if got := integral(n); math.Abs(got/ref-1) > c.tol {
			t.Errorf("edge-graded %d: %.12g, order 16 gives %.12g", n, got, ref)
		}
	}
	r := mustEdgeGraded(5)
	var sum, m1 float64
	for i, w := range r.Weight {
		sum += w
		m1 += w * r.Bary[i][0]
	}
	if math.Abs(sum-1) > 1e-14 || math.Abs(m1-1.0/3) > 1e-14 {
		t.Errorf("edge-graded 5: weight sum %v, first moment %v", sum, m1)
	}
}
