package scatter

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/bem"
	"github.com/fluctus/fluctus/mesh"
)

func sphere(t testing.TB, level int) *mesh.Mesh {
	t.Helper()
	m, err := mesh.SphereLevel(1, level)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func pairScene(t testing.TB, level int, L float64) []Body {
	m := sphere(t, level)
	return []Body{{Name: "a", Mesh: m}, {Name: "b", Mesh: m.Translate(r3.Vec{Z: L})}}
}

func integrandAt(t testing.TB, bodies []Body, kappa float64) float64 {
	t.Helper()
	sys, err := newSystem(bodies, 1, 0, nil)
	if err != nil {
		t.Fatal(err)
	}
	sf, err := sys.factorSelf(context.Background(), kappa)
	if err != nil {
		t.Fatal(err)
	}
	ev, err := sys.evaluate(context.Background(), sf, placement{}, false)
	if err != nil {
		t.Fatal(err)
	}
	return ev.logDet
}

// TestIntegrandSignAndDecay checks DESIGN §4: ln det(M M_∞^-1) ≤ 0, finite
// as κ → 0, falling monotonically, and decaying like exp(-2κd) at large κ:
// between κ = 4 and 8 its logarithm falls by at least 80 % of 2dΔκ (the
// remaining 20 % allows the power-law prefactor of the curved bodies).
func TestIntegrandSignAndDecay(t *testing.T) {
	bodies := pairScene(t, 3, 3) // gap d = 1 (less the faceting)
	prev := 0.0
	for i, kappa := range []float64{1e-3, 0.1, 0.5, 1, 2, 4, 8} {
		v := integrandAt(t, bodies, kappa)
		if !(v < 0) {
			t.Fatalf("κ=%g: integrand %g, want negative", kappa, v)
		}
		if i > 0 && math.Abs(v) >= math.Abs(prev) {
			t.Errorf("κ=%g: |integrand| %g did not fall from %g", kappa, math.Abs(v), math.Abs(prev))
		}
		prev = v
	}
	v4, v8 := integrandAt(t, bodies, 4), integrandAt(t, bodies, 8)
	if ratio, bound := v8/v4, math.Exp(-0.8*2*1.0*4); ratio > bound {
		t.Errorf("f(8)/f(4) = %g, slower than exp(-0.8·2κd) = %g", ratio, bound)
	}
}

// TestTwoBodyReduction checks the log1p two-body form against the n-body
// delta-form factorisation of the same matrix (relative 1e-10: same
// arithmetic, other order) and against ln det M - ln det M11 - ln det M22 from
// gonum's Cholesky of the whole matrix at a separation where that direct
// difference still holds its digits (relative 1e-7).
func TestTwoBodyReduction(t *testing.T) {
	bodies := pairScene(t, 2, 2.8)
	sys, err := newSystem(bodies, 1, 0, nil)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	kappa := 0.7
	sf, err := sys.factorSelf(ctx, kappa)
	if err != nil {
		t.Fatal(err)
	}
	pairEv, err := sys.evaluatePair(ctx, sf, sys.surf, placement{}, false)
	if err != nil {
		t.Fatal(err)
	}
	manyEv, err := sys.evaluateMany(ctx, sf, sys.surf, placement{}, false)
	if err != nil {
		t.Fatal(err)
	}
	pair, many := pairEv.logDet, manyEv.logDet
	if math.Abs(pair-many) > 1e-10*math.Abs(pair) {
		t.Errorf("two-body %.15g, n-body %.15g", pair, many)
	}
	// Direct: assemble the whole matrix.
	n1, n2 := sys.surf[0].Len(), sys.surf[1].Len()
	op, _ := bem.NewEFIE(kappa)
	m11 := mat.NewSymDense(n1, nil)
	m22 := mat.NewSymDense(n2, nil)
	m12 := mat.NewDense(n1, n2, nil)
	as := bem.Assembler{}
	if err := as.Self(ctx, m11, op, sys.surf[0]); err != nil {
		t.Fatal(err)
	}
	if err := as.Self(ctx, m22, op, sys.surf[1]); err != nil {
		t.Fatal(err)
	}
	if err := as.Cross(ctx, m12, op, sys.surf[0], sys.surf[1]); err != nil {
		t.Fatal(err)
	}
	full := mat.NewSymDense(n1+n2, nil)
	for i := 0; i < n1+n2; i++ {
		for j := i; j < n1+n2; j++ {
			var v float64
			switch {
			case j < n1:
				v = m11.At(i, j)
			case i >= n1:
				v = m22.At(i-n1, j-n1)
			case i < n1:
				v = m12.At(i, j-n1)
			}
			full.SetSym(i, j, v)
		}
	}
	logdet := func(s *mat.SymDense) float64 {
		var ch mat.Cholesky
		if !ch.Factorize(s) {
			t.Fatal("not positive definite")
		}
		return ch.LogDet()
	}
	direct := logdet(full) - logdet(m11) - logdet(m22)
	if math.Abs(pair-direct) > 1e-7*math.Abs(pair) {
		t.Errorf("two-body %.12g, direct difference %.12g", pair, direct)
	}
}

// TestEnergyInvariance checks that the energy does not change when the whole
// scene is turned and moved (relative 1e-6, the bound): the matrix
// entries depend only on relative positions, up to rounding.
func TestEnergyInvariance(t *testing.T) {
	a := sphere(t, 2)
	box, err := mesh.Box(r3.Vec{X: 1.5, Y: 1, Z: 0.8}, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	place := func(m *mesh.Mesh, rot bool) *mesh.Mesh {
		if rot {
			m = m.Rotate(r3.Vec{X: 1, Y: 2, Z: -0.5}, 0.83, r3.Vec{X: 0.3})
			return m.Translate(r3.Vec{X: 40, Y: -7, Z: 13})
		}
		return m
	}
	energy := func(rot bool) float64 {
		bodies := []Body{
			{Name: "ball", Mesh: place(a, rot)},
			{Name: "box", Mesh: place(box.Translate(r3.Vec{Z: 2.1, X: 0.2}), rot)},
		}
		dir := r3.Vec{Z: 1}
		if rot {
			dir = r3.Rotation(r3.NewRotation(0.83, r3.Vec{X: 1, Y: 2, Z: -0.5})).Rotate(dir)
		}
		pts, err := Energies(context.Background(), bodies, Sweep{Body: 1, Direction: dir, Offsets: []r3.Vec{{}}}, Settings{Accuracy: 1e-3})
		if err != nil {
			t.Fatal(err)
		}
		return pts[0].Energy
	}
	e0, e1 := energy(false), energy(true)
	if math.Abs(e1-e0) > 1e-6*math.Abs(e0) {
		t.Errorf("energy %.12g, after rotation and translation %.12g (rel %.2g)", e0, e1, math.Abs(e1/e0-1))
	}
}

// TestFrequencyIntegration checks the adaptive integral and its error
// estimate against the same integral taken to 1e-9: the error at accuracy
// 1e-3 must lie below the reported estimate, and the estimate must meet the
// target. Both runs keep every block dense, so that the difference is the
// frequency integration's alone (the estimate covers that; the
// compression's share is checked against dense in compress_test.go).
func TestFrequencyIntegration(t *testing.T) {
	for _, L := range []float64{2.5, 8} {
		bodies := pairScene(t, 2, L)
		sw := Sweep{Body: 1, Direction: r3.Vec{Z: 1}, Offsets: []r3.Vec{{}}}
		ref, err := Energies(context.Background(), bodies, sw, Settings{Accuracy: 1e-9, Dense: true})
		if err != nil {
			t.Fatal(err)
		}
		got, err := Energies(context.Background(), bodies, sw, Settings{Accuracy: 1e-3, Dense: true})
		if err != nil {
			t.Fatal(err)
		}
		e, r := got[0], ref[0]
		if d := math.Abs(e.Energy - r.Energy); d > e.EnergyError {
			t.Errorf("L=%g: error %.3g exceeds the estimate %.3g", L, d, e.EnergyError)
		}
		if e.EnergyError > 1e-3*math.Abs(e.Energy) {
			t.Errorf("L=%g: estimate %.3g above the target", L, e.EnergyError)
		}
		t.Logf("L=%g: E=%.8g, true error %.2g, estimate %.2g, %d samples", L, e.Energy, math.Abs(e.Energy-r.Energy), e.EnergyError, len(e.Samples))
	}
}

// TestMatsubara checks the finite-temperature sum: the κ → 0 extrapolation
// agrees with a direct evaluation at κ = 1e-4 per unit radius (relative 1e-6:
// the integrand is even in κ, so f(1e-4) - f(0) is about 1e-8 of f), and as
// T → 0 the free energy approaches the T = 0 energy, |F - E| falling with T.
func TestMatsubara(t *testing.T) {
	bodies := pairScene(t, 2, 3)
	sw := Sweep{Body: 1, Direction: r3.Vec{Z: 1}, Offsets: []r3.Vec{{}}}
	direct := integrandAt(t, bodies, 1e-4)
	sys, _ := newSystem(bodies, 1, 0, nil)
	run := &runner{sys: sys, set: Settings{Accuracy: 1e-4, ThermalWavenumber: 1}.withDefaults(), sweep: sw, pts: []Point{{Gap: 1}}, scale: []float64{1}, delta: []float64{0}}
	if err := run.matsubara(context.Background(), sceneSize(bodies, sw)); err != nil {
		t.Fatal(err)
	}
	// The first three samples are the small-κ evaluations; recompute f0.
	s := run.pts[0].Samples
	r1 := (4*s[0].Value - s[1].Value) / 3
	r2 := (4*s[1].Value - s[2].Value) / 3
	f0 := (16*r1 - r2) / 15
	if math.Abs(f0-direct) > 1e-6*math.Abs(direct) {
		t.Errorf("extrapolated f(0) = %.12g, direct f(1e-4) = %.12g", f0, direct)
	}
	zero, err := Energies(context.Background(), bodies, sw, Settings{Accuracy: 1e-5})
	if err != nil {
		t.Fatal(err)
	}
	prev := math.Inf(1)
	for _, kt := range []float64{1.6, 0.8, 0.4} {
		pts, err := Energies(context.Background(), bodies, sw, Settings{Accuracy: 1e-5, ThermalWavenumber: kt})
		if err != nil {
			t.Fatal(err)
		}
		d := math.Abs(pts[0].Energy - zero[0].Energy)
		t.Logf("κ_T=%g: F=%.8g E(T=0)=%.8g", kt, pts[0].Energy, zero[0].Energy)
		if d >= prev {
			t.Errorf("κ_T=%g: |F - E| = %.3g did not fall (previous %.3g)", kt, d, prev)
		}
		prev = d
	}
	if prev > 1e-2*math.Abs(zero[0].Energy) {
		t.Errorf("at κ_T = 0.4 the free energy is still %.2g away from the T = 0 energy", prev)
	}
}
