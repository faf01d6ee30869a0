package bem

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// TestGradPotential checks the edge-reduced gradient of the single-layer
// potential against central differences of the scalar potential
// (Panel.Potential, tested on its own in potential_test.go), for points far,
// near, just above the panel, in its plane outside it and near an edge.
// Step 2e-5 of the panel size (the closest point is 0.01 from an edge):
// truncation (step/distance)² ≈ 4e-6·(1/10) relative, rounding 1e-15/2e-5;
// tolerance 1e-6 relative to |W|.
func TestGradPotential(t *testing.T) {
	p := NewPanel(r3.Vec{}, r3.Vec{X: 1}, r3.Vec{X: 0.3, Y: 0.8})
	er := NewEdgeRule(defaultEdgePoints)
	fine := NewEdgeRule(16)
	for _, tc := range []struct {
		name string
		x    r3.Vec
	}{
		{"far", r3.Vec{X: 3, Y: -2, Z: 4}},
		{"near above", r3.Vec{X: 0.4, Y: 0.3, Z: 0.2}},
		{"just above", r3.Vec{X: 0.4, Y: 0.3, Z: 1e-3}},
		{"just below", r3.Vec{X: 0.4, Y: 0.3, Z: -1e-3}},
		{"in plane outside", r3.Vec{X: 1.2, Y: 0.7}},
		{"near an edge", r3.Vec{X: 0.5, Y: -0.01, Z: 0.02}},
		{"beyond a corner", r3.Vec{X: -0.1, Y: -0.1, Z: 0.05}},
	} {
		for _, kappa := range []float64{1e-3, 1, 5} {
			got := p.gradPotential(tc.x, kappa, er)
			h := 2e-5
			var want r3.Vec
			for i, e := range []r3.Vec{{X: 1}, {Y: 1}, {Z: 1}} {
				sp, _, _ := p.Potential(r3.Add(tc.x, r3.Scale(h, e)), kappa, fine)
				sm, _, _ := p.Potential(r3.Sub(tc.x, r3.Scale(h, e)), kappa, fine)
				d := (sp - sm) / (2 * h)
				switch i {
				case 0:
					want.X = d
				case 1:
					want.Y = d
				case 2:
					want.Z = d
				}
			}
			if err := r3.Norm(r3.Sub(got, want)); err > 1e-6*r3.Norm(want) {
				t.Errorf("%s κ=%g: W = %v, differences give %v (error %.2g)", tc.name, kappa, got, want, err/r3.Norm(want))
			}
		}
	}
}

// kBrute is the K entries of a pair from the defining integrand
// c_k c_l ∫∫ (x - p_k)·(∇_x G × (y - p_l)) by a product rule.
func kBrute(kappa float64, ps, pt *Panel, cs, ct [3]float64, rx, ry *Rule) [3][3]float64 {
	var out [3][3]float64
	xs, ys := panelPoints(ps, rx), panelPoints(pt, ry)
	for _, x := range xs {
		for _, y := range ys {
			d := r3.Sub(x.x, y.x)
			r := r3.Norm(d)
			g := -(1 + kappa*r) * math.Exp(-kappa*r) / (4 * math.Pi * r * r * r)
			grad := r3.Scale(g, d)
			for k := 0; k < 3; k++ {
				fa := r3.Sub(x.x, ps.V[k])
				for l := 0; l < 3; l++ {
					fb := r3.Sub(y.x, pt.V[l])
					out[k][l] += x.w * y.w * cs[k] * ct[l] * r3.Dot(fa, r3.Cross(grad, fb))
				}
			}
		}
	}
	return out
}

// TestKPairAccuracy compares the K entries of the pairs of one panel of a
// 320-triangle sphere with a translated copy (far and near pairs of two
// bodies, gaps down to a fifth of the panel size) with the defining
// integrand by collapsed 14×14 product rules for near pairs and 8×8 for far
// ones (converged to about 1e-8 of the near field for these smooth
// integrands). As for the EFIE (TestPairAccuracy) the error is
// measured against the near field of the panel's rows, here its largest K
// entry with the panels it touches: tolerance 1e-4 of that.
func TestKPairAccuracy(t *testing.T) {
	s := testSurface(t, 4)
	h := s.Panels[0].Size
	ref, farRef := mustCollapsed(14), mustCollapsed(8)
	// The panel nearest to the other body.
	p0 := 0
	for i := range s.Panels {
		if s.Panels[i].Centroid.X > s.Panels[p0].Centroid.X {
			p0 = i
		}
	}
	for _, shift := range []r3.Vec{{X: 2 + 0.2*h}, {X: 2 + 1.5*h, Y: 0.3}, {X: 4, Z: 3}} {
		b := s.Translate(shift)
		for _, kappa := range []float64{1e-2, 4} {
			op, _ := NewKFIE(kappa)
			near := 0.0
			for tt := range s.Panels {
				if n, _ := contact(s.Basis.Mesh, p0, tt); n == 0 || n == 3 {
					continue
				}
				var k [3][3]float64
				op.Pair(&k, s, p0, s, tt, true)
				for _, row := range k {
					for _, v := range row {
						near = math.Max(near, math.Abs(v))
					}
				}
			}
			worst := 0.0
			for tt := range b.Panels {
				var got [3][3]float64
				op.Pair(&got, s, p0, b, tt, false)
				r := farRef
				if lv, _ := op.Quad.level(op.Kernel, &s.Panels[p0], &b.Panels[tt]); lv < 0 {
					r = ref
				}
				want := kBrute(kappa, &s.Panels[p0], &b.Panels[tt], s.coef[p0], b.coef[tt], r, r)
				for k := range want {
					for l := range want[k] {
						worst = math.Max(worst, math.Abs(got[k][l]-want[k][l])/near)
					}
				}
			}
			if worst > 1e-4 {
				t.Errorf("shift %v κ=%g: worst pair error %.2g of the near field", shift, kappa, worst)
			} else {
				t.Logf("shift %v κ=%g: worst pair error %.2g of the near field", shift, kappa, worst)
			}
		}
	}
}

// TestKTouching checks the pairs of one mesh that share a side or a vertex:
// the default rules (graded outer rule, exact inner gradient) against a
// reference with high-order graded rules (side-graded 24×24 with radial
// power 4, vertex-graded 24×24 with radial power 3) and the inner gradient from central differences of the
// scalar potential, and against the transposed pair computed the other way
// round (outer rule on the other panel: K is symmetric). Tolerance 1e-4 of
// the pair's largest entry (3e-4 at κh ≈ 4.5, beyond the useful range of a
// mesh by DESIGN §4).
func TestKTouching(t *testing.T) {
	s := testSurface(t, 3)
	m := s.Basis.Mesh
	er := NewEdgeRule(16)
	for _, kappa := range []float64{1e-2, 2, 10} {
		op, _ := NewKFIE(kappa)
		for tt := 1; tt < len(s.Panels); tt++ {
			n, corner := contact(m, 0, tt)
			if n == 0 {
				continue
			}
			ps, pt := &s.Panels[0], &s.Panels[tt]
			var rule *Rule
			if n == 2 {
				rule = sideGradedPower(24, corner, 4)
			} else {
				rule = vertexGradedPower(24, corner, 3)
			}
			var mo KMoments
			for _, x := range panelPoints(ps, rule) {
				hh := 1e-5 * ps.Size
				var w r3.Vec
				for i, e := range []r3.Vec{{X: 1}, {Y: 1}, {Z: 1}} {
					sp, _, _ := pt.Potential(r3.Add(x.x, r3.Scale(hh, e)), kappa, er)
					sm, _, _ := pt.Potential(r3.Sub(x.x, r3.Scale(hh, e)), kappa, er)
					d := (sp - sm) / (2 * hh) * inv4Pi
					switch i {
					case 0:
						w.X = d
					case 1:
						w.Y = d
					case 2:
						w.Z = d
					}
				}
				mo.B = r3.Add(mo.B, r3.Scale(x.w, w))
				mo.A = r3.Add(mo.A, r3.Scale(x.w, r3.Cross(w, x.rel)))
			}
			var want, got, back [3][3]float64
			kEntries(&want, mo, ps, pt, s.coef[0], s.coef[tt])
			op.Pair(&got, s, 0, s, tt, true)
			op.Pair(&back, s, tt, s, 0, true)
			scale, diff, asym := 0.0, 0.0, 0.0
			for k := range want {
				for l := range want[k] {
					scale = math.Max(scale, math.Abs(want[k][l]))
					diff = math.Max(diff, math.Abs(got[k][l]-want[k][l]))
					asym = math.Max(asym, math.Abs(got[k][l]-back[l][k]))
				}
			}
			tol := 1e-4
			if kappa*ps.Size > 2 {
				tol = 3e-4 // κh ≈ 4.5: the 8×8 outer rule resolves exp(-κR) less well
			}
			if diff > tol*scale || asym > tol*scale {
				t.Errorf("κ=%g pair (0,%d) sharing %d vertices: error %.2g, asymmetry %.2g relative", kappa, tt, n, diff/scale, asym/scale)
			}
		}
	}
	// The self pair vanishes exactly.
	op, _ := NewKFIE(1)
	var self [3][3]float64
	op.Pair(&self, s, 0, s, 0, true)
	if self != ([3][3]float64{}) {
		t.Errorf("self pair %v, want zero", self)
	}
}

// TestKSymmetry checks K(a, b) = K(b, a)ᵀ between two spheres of different
// meshes at a gap of half a panel (the pairs are integrated with the outer
// rule on different panels each way). Tolerance 1e-5 of the largest entry.
func TestKSymmetry(t *testing.T) {
	a := testSurface(t, 2)
	b := testSurface(t, 3).Translate(r3.Vec{X: 2 + 0.5*a.Panels[0].Size})
	op, _ := NewKFIE(1.5)
	as := Assembler{}
	ab := mat.NewDense(a.Len(), b.Len(), nil)
	ba := mat.NewDense(b.Len(), a.Len(), nil)
	if err := as.Cross(context.Background(), ab, op, a, b); err != nil {
		t.Fatal(err)
	}
	if err := as.Cross(context.Background(), ba, op, b, a); err != nil {
		t.Fatal(err)
	}
	var d mat.Dense
	d.Sub(ab, ba.T())
	if e, s := mat.Norm(&d, math.Inf(1)), mat.Norm(ab, math.Inf(1)); e > 1e-5*s {
		t.Errorf("‖K(a,b) - K(b,a)ᵀ‖ = %.2g of ‖K‖ = %.2g", e/s, s)
	}
}

// TestDielectricSelfSymmetric checks the layout of the PMCHWT self block:
// its J-J block is the EFIE block of the outside plus the inside one over √ε
// (to rounding, 1e-14). Its symmetry rests on that of K, checked pair by pair
// in TestKTouching and TestKSymmetry.
func TestDielectricSelfSymmetric(t *testing.T) {
	s := testSurface(t, 2)
	n := s.Len()
	m := mat.NewSymDense(2*n, nil)
	as := Assembler{}
	if err := as.DielectricSelf(context.Background(), m, s, 0.7, 4); err != nil {
		t.Fatal(err)
	}
	ge, gi := mat.NewSymDense(n, nil), mat.NewSymDense(n, nil)
	e1, _ := NewEFIE(0.7)
	e2, _ := NewEFIE(1.4)
	if err := as.Self(context.Background(), ge, e1, s); err != nil {
		t.Fatal(err)
	}
	if err := as.Self(context.Background(), gi, e2, s); err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			want := ge.At(i, j) + gi.At(i, j)/2
			worst = math.Max(worst, math.Abs(m.At(i, j)-want))
		}
	}
	if worst > 1e-14*mat.Norm(ge, math.Inf(1)) {
		t.Errorf("J-J block differs from G~e + G~i/√ε by %.2g", worst)
	}
}

// TestDielectricCrossSymmetric checks that the vacuum cross blocks of a real
// body and a perfect one (and of two real bodies) are transposes of each
// other when assembled either way round, as the symmetry of the PMCHWT
// matrix requires; tolerance 5e-5 of the block's norm (the pairs are
// integrated with the outer rule on different panels each way, each good to
// about 2e-5 of the near field: TestKPairAccuracy, TestPairAccuracy;
// measured 2.1e-5).
func TestDielectricCrossSymmetric(t *testing.T) {
	a := testSurface(t, 2)
	b := testSurface(t, 3).Translate(r3.Vec{X: 0.4, Z: 2 + 0.6*a.Panels[0].Size})
	as := Assembler{}
	ctx := context.Background()
	for _, tc := range []struct{ ma, mb bool }{{true, false}, {true, true}} {
		ra, cb := a.Len(), b.Len()
		if tc.ma {
			ra *= 2
		}
		if tc.mb {
			cb *= 2
		}
		ab, ba := mat.NewDense(ra, cb, nil), mat.NewDense(cb, ra, nil)
		if err := as.DielectricCross(ctx, ab, a, tc.ma, b, tc.mb, 0.9); err != nil {
			t.Fatal(err)
		}
		if err := as.DielectricCross(ctx, ba, b, tc.mb, a, tc.ma, 0.9); err != nil {
			t.Fatal(err)
		}
		var d mat.Dense
		d.Sub(ab, ba.T())
		if e, s := mat.Norm(&d, math.Inf(1)), mat.Norm(ab, math.Inf(1)); e > 5e-5*s {
			t.Errorf("magnetic %v/%v: asymmetry %.2g of the norm", tc.ma, tc.mb, e/s)
		}
	}
}
