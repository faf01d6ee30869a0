//go:build long

package multipole

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// Slow accuracy studies (go test -tags long): small gaps, high multipole
// orders (lmax ≈ 100–210).

// Derivative expansion of the perfectly conducting sphere–plane energy,
// E/E_PFA = 1 + θ d/R + ..., θ = 1/3 - 20/π² ≈ -1.693 (Bimonte, Emig, Jaffe &
// Kardar, EPL 97, 50001 (2012), recalled from memory), E_PFA = -π³ħcR/(720d²).
// E/E_PFA at d/R = 0.05, 0.1, 0.2 is fitted by least squares with the slope
// plus one higher term. The higher orders are not known here (they include
// logarithms); the fit with x² ln x is asserted and the fits with x² and x^{3/2}
// are logged (measured θ ≈ -1.50, -1.31, -1.51): the data at d/R ≥ 0.05 fix
// the slope only to ±0.3, which is the tolerance. E/E_PFA must rise
// monotonically towards 1 as d/R falls.
func TestLongDerivativeExpansion(t *testing.T) {
	theta := 1.0/3 - 20/(math.Pi*math.Pi)
	xs := []float64{0.2, 0.1, 0.05}
	ys := make([]float64, len(xs))
	for i, x := range xs {
		r := mustEnergy(t, Config{Field: Electromagnetic, Geometry: SpherePlane, R1: 1, L: 1 + x, Tol: 1e-6})
		ys[i] = r.Energy / (-math.Pow(math.Pi, 3) / (720 * x * x))
		t.Logf("d/R = %g: E/E_PFA = %.8f ± %.1e (lmax %d, %d evaluations)", x, ys[i], r.EnergyError/-r.Energy, r.LMax, r.Evaluations)
		if i > 0 && !(ys[i] > ys[i-1] && ys[i] < 1) {
			t.Errorf("E/E_PFA = %.6f at d/R = %g does not rise towards 1 from %.6f", ys[i], x, ys[i-1])
		}
	}
	fit := func(h func(x float64) float64) (float64, float64) {
		a := mat.NewDense(len(xs), 2, nil)
		b := mat.NewVecDense(len(xs), nil)
		for i, x := range xs {
			a.Set(i, 0, x)
			a.Set(i, 1, h(x))
			b.SetVec(i, ys[i]-1)
		}
		var c mat.VecDense
		if err := c.SolveVec(a, b); err != nil {
			t.Fatal(err)
		}
		return c.AtVec(0), c.AtVec(1)
	}
	thLog, cLog := fit(func(x float64) float64 { return x * x * math.Log(x) })
	thSq, cSq := fit(func(x float64) float64 { return x * x })
	th32, c32 := fit(func(x float64) float64 { return math.Pow(x, 1.5) })
	t.Logf("fits: θ = %.4f (+ %.3f x² ln x), %.4f (+ %.3f x²), %.4f (+ %.3f x^1.5); derivative expansion %.4f",
		thLog, cLog, thSq, cSq, th32, c32, theta)
	if math.Abs(thLog-theta) > 0.3 {
		t.Errorf("fitted slope %.4f, derivative expansion %.4f (tolerance 0.3)", thLog, theta)
	}
}

// Scalar fields at d/R = 0.1: Dirichlet E/E_PFA - 1 ≈ (1/3) d/R (derivative
// expansion, same reference; secant slope within 0.1 of 1/3, the size of the
// next order there), Neumann E/E_PFA below 1 and rising from d/R = 0.2.
func TestLongScalarProximity(t *testing.T) {
	pfa := func(x float64) float64 { return -math.Pow(math.Pi, 3) / (1440 * x * x) }
	d := mustEnergy(t, Config{Field: Dirichlet, Geometry: SpherePlane, R1: 1, L: 1.1, Tol: 1e-6})
	if s := (d.Energy/pfa(0.1) - 1) / 0.1; math.Abs(s-1.0/3) > 0.1 {
		t.Errorf("Dirichlet d/R = 0.1: secant slope %.4f, want 1/3 ± 0.1", s)
	}
	n1 := mustEnergy(t, Config{Field: Neumann, Geometry: SpherePlane, R1: 1, L: 1.1, Tol: 1e-6})
	n2 := mustEnergy(t, Config{Field: Neumann, Geometry: SpherePlane, R1: 1, L: 1.2, Tol: 1e-6})
	r1, r2 := n1.Energy/pfa(0.1), n2.Energy/pfa(0.2)
	t.Logf("Dirichlet E/E_PFA(0.1) = %.6f; Neumann E/E_PFA(0.2) = %.6f, (0.1) = %.6f", d.Energy/pfa(0.1), r2, r1)
	if !(r1 > r2 && r1 < 1) {
		t.Errorf("Neumann E/E_PFA does not rise towards 1: %.6f (0.2) → %.6f (0.1)", r2, r1)
	}
}

// Two spheres at small gaps: E/E_PFA (R_eff = R/2) rises monotonically towards
// 1 over d/R = 0.5, 0.2, 0.1.
func TestLongSphereSphereProximity(t *testing.T) {
	prev := 0.0
	for _, x := range []float64{0.5, 0.2, 0.1} {
		r := mustEnergy(t, Config{Field: Electromagnetic, Geometry: SphereSphere, R1: 1, R2: 1, L: 2 + x, Tol: 1e-6})
		ratio := r.Energy / (-math.Pow(math.Pi, 3) * 0.5 / (720 * x * x))
		t.Logf("d/R = %g: E/E_PFA = %.8f (lmax %d)", x, ratio, r.LMax)
		if !(ratio > prev && ratio < 1) {
			t.Errorf("d/R = %g: E/E_PFA = %.6f does not rise towards 1 from %.6f", x, ratio, prev)
		}
		prev = ratio
	}
}

// The error estimate at a small gap (d/R = 0.2, lmax ≈ 55 at 1e-6 and ≈ 85
// at 1e-9): the Tol = 1e-6 result lies within its EnergyError/ForceError of
// the Tol = 1e-9 one.
func TestLongErrorEstimateSmallGap(t *testing.T) {
	for _, g := range []Geometry{SpherePlane, SphereSphere} {
		c := Config{Field: Electromagnetic, Geometry: g, R1: 1, R2: 1, L: 1.2, Tol: 1e-6}
		if g == SphereSphere {
			c.L = 2.2
		}
		r := mustEnergy(t, c)
		c.Tol = 1e-9
		ref := mustEnergy(t, c)
		de, df := math.Abs(r.Energy-ref.Energy), math.Abs(r.Force-ref.Force)
		t.Logf("%v: |ΔE|/E = %.2e (estimate %.2e), |ΔF|/F = %.2e (estimate %.2e), lmax %d / %d", g,
			de/-ref.Energy, r.EnergyError/-ref.Energy, df/-ref.Force, r.ForceError/-ref.Force, r.LMax, ref.LMax)
		if de > r.EnergyError || df > r.ForceError {
			t.Errorf("%v: error estimate too small", g)
		}
	}
}

// Low temperature at finer steps: |F/E - 1| keeps falling like κ_T⁴ (ratio > 8
// per halving, κ_T gap = 0.1 → 0.05 → 0.025).
func TestLongMatsubaraConvergence(t *testing.T) {
	c := Config{Field: Electromagnetic, Geometry: SpherePlane, R1: 1, L: 2, Tol: 1e-10}
	e := mustEnergy(t, c)
	prev := 0.0
	for _, k := range []float64{0.1, 0.05, 0.025} {
		r, err := FreeEnergy(t.Context(), c, k/c.gap())
		if err != nil {
			t.Fatal(err)
		}
		d := relErr(r.Energy, e.Energy)
		t.Logf("κ_T gap = %g: |F/E - 1| = %.3e", k, d)
		if prev != 0 && !(prev > 8*d) {
			t.Errorf("κ_T gap = %g: %s", k, fmt.Sprintf("difference %.3g did not fall by 8 from %.3g", d, prev))
		}
		prev = d
	}
}
