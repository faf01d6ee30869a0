package material

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// TestKramersKronigDrude turns a Drude metal sampled on real frequencies
// (eps″ = ω_p² γ/(ω(ω² + γ²)), the free-electron dielectric function, common
// practice; ħω_p = 9 eV, ħγ = 35 meV, 1 meV to 100 eV, 100 points per decade)
// into eps(iξ) and compares with the analytic 1 + ω_p²/(ξ(ξ+γ)).
//
// Tolerance 1e-3 for 0.01 eV ≤ ħξ ≤ 10 eV: the Drude tail fitted below 1 meV
// and the ω^-3 tail above 100 eV are exact for this model, so the error is that
// of linear interpolation between points a factor r = 10^(1/100) apart; for
// eps″ ∝ ω^-p its relative size is about p(p+1)/12 (ln r)² ≤ 5.3e-4 (p ≤ 3),
// and it only overestimates eps″. Measured: at most 2.6e-4.
func TestKramersKronigDrude(t *testing.T) {
	ref := Drude{PlasmaEV: fixturePlasmaEV, DampingEV: fixtureDampingEV}
	for _, name := range []string{"drude-gold-eps2.txt", "drude-gold-nk.csv"} {
		tab, err := LoadTable(filepath.Join(fixtureDir, name))
		if err != nil {
			t.Fatal(err)
		}
		if lo, hi := tab.RangeEV(); tab.Len() != 501 || !near(lo, 1e-3, 1e-12) || !near(hi, 100, 1e-12) {
			t.Errorf("%s: %d points from %g to %g eV, want 501 from 0.001 to 100", name, tab.Len(), lo, hi)
		}
		// The fit to the lowest four points recovers the model; the points
		// are only 2.3 % apart, so the 2×2 fit amplifies the 12-digit rounding
		// of the file: tolerance 1e-6.
		below := tab.Below()
		if below == nil || !near(below.PlasmaEV, ref.PlasmaEV, 1e-6) || !near(below.DampingEV, ref.DampingEV, 1e-6) {
			t.Errorf("%s: fitted tail %+v, want %+v", name, below, ref)
		}
		if st := tab.Static(); st.Kind != KindDrude || !math.IsInf(st.Epsilon, 1) {
			t.Errorf("%s: static %+v, want a Drude metal", name, st)
		}
		var worst float64
		for xiEV := 0.01; xiEV <= 10.0001; xiEV *= math.Pow(10, 0.125) {
			got, want := tab.Epsilon(FromEV(xiEV)), ref.Epsilon(FromEV(xiEV))
			rel := math.Abs(got/want - 1)
			worst = math.Max(worst, rel)
			if rel > 1e-3 {
				t.Errorf("%s: eps(i %.4g eV) = %.8g, analytic %.8g (relative %.2g)", name, xiEV, got, want, rel)
			}
		}
		t.Logf("%s: largest relative deviation for 0.01–10 eV: %.2g", name, worst)
	}
}

// TestKramersKronigLorentz does the same for a dielectric: one Lorentz
// oscillator (f = 2, ħω0 = 3 eV, ħγ = 0.5 eV) sampled as
// eps″ = f ω0² γ ω/((ω0² - ω²)² + γ²ω²) (the damped-oscillator response, common
// practice) from 0.1 meV to 100 eV, 400 points per decade, with eps″ = 0 below.
// Tolerance 1e-4 on eps - 1: interpolation error of order (ln r)² times the
// relative curvature near the resonance, (ω0/γ)² ≈ 36, i.e. ≲ 1e-4, less
// elsewhere; the absorption left out below 0.1 meV, eps″ ≈ f γ ω/ω0², removes
// (2/π) γ ω_min/ω0² ≈ 3.5e-6 of eps(0) - 1.
func TestKramersKronigLorentz(t *testing.T) {
	const f, w0, g = 2.0, 3.0, 0.5
	var e, e2 []float64
	for i := 0; i <= 2400; i++ {
		w := 1e-4 * math.Pow(10, float64(i)/400)
		e = append(e, w)
		e2 = append(e2, f*w0*w0*g*w/((w0*w0-w*w)*(w0*w0-w*w)+g*g*w*w))
	}
	tab, err := NewTable("lorentz", e, e2, nil)
	if err != nil {
		t.Fatal(err)
	}
	ref := Lorentz{[]Oscillator{{Strength: f, ResonanceEV: w0, DampingEV: g}}}
	if st := tab.Static(); st.Kind != KindDielectric || !near(st.Epsilon, 1+f, 1e-4) {
		t.Errorf("static %+v, want dielectric with eps(0) = %g", st, 1+f)
	}
	for _, xiEV := range []float64{0, 0.01, 0.1, 1, 3, 10, 30} {
		got, want := tab.Epsilon(FromEV(xiEV)), ref.Epsilon(FromEV(xiEV))
		if !near(got-1, want-1, 1e-4) {
			t.Errorf("eps(i %g eV) - 1 = %.8g, analytic %.8g", xiEV, got-1, want-1)
		}
		t.Logf("ξ = %g eV: relative deviation of eps - 1: %.2g", xiEV, (got-1)/(want-1)-1)
	}
}

// TestKramersKronigExactForInterpolant checks the closed-form segment and tail
// integrals against gonum's Gauss–Legendre quadrature of the same
// piecewise-linear eps″ and tails (a general-purpose reference). Both are
// accurate to rounding, so the tolerance is 1e-12.
func TestKramersKronigExactForInterpolant(t *testing.T) {
	e := []float64{0.05, 0.2, 0.21, 1, 2.5, 4, 9, 30}
	e2 := []float64{40, 6, 5.5, 1.2, 3, 0.2, 0.05, 0.01}
	below := Drude{PlasmaEV: 5, DampingEV: 0.08}
	tab, err := NewTable("synthetic", e, e2, &below)
	if err != nil {
		t.Fatal(err)
	}
	// Everything in eV units: the integral is scale free.
	wp2g := below.PlasmaEV * below.PlasmaEV * below.DampingEV
	g2 := below.DampingEV * below.DampingEV
	for _, xi := range []float64{1e-4, 0.01, 0.08, 0.0800001, 0.3, 1, 7, 100, 1e4} {
		xi2 := xi * xi
		var sum float64
		// Below: ω = e0 exp(-s), s ∈ [0, 60], dω = ω ds.
		sum += quad.Fixed(func(s float64) float64 {
			w := e[0] * math.Exp(-s)
			return w * wp2g / ((w*w + g2) * (w*w + xi2))
		}, 0, 60, 3000, quad.Legendre{}, 0)
		for i := 0; i+1 < len(e); i++ {
			wa, wb, ea, eb := e[i], e[i+1], e2[i], e2[i+1]
			sum += quad.Fixed(func(w float64) float64 {
				eps2 := ea + (eb-ea)*(w-wa)/(wb-wa)
				return w * eps2 / (w*w + xi2)
			}, wa, wb, 200, quad.Legendre{}, 0)
		}
		// Above: ω = ωN/u, ∫_0^1 e_N ωN² u²/(ωN² + ξ² u²) du.
		n := len(e) - 1
		sum += quad.Fixed(func(u float64) float64 {
			return e2[n] * e[n] * e[n] * u * u / (e[n]*e[n] + xi2*u*u)
		}, 0, 1, 200, quad.Legendre{}, 0)
		want := 1 + 2/math.Pi*sum
		if got := tab.Epsilon(FromEV(xi)); !near(got, want, 1e-12) {
			t.Errorf("ξ = %g eV: eps = %.16g, quadrature %.16g (relative %.2g)", xi, got, want, got/want-1)
		}
	}
}

// TestAtanRemainder compares the series branch of (z - atan z)/z³ with the
// direct formula where both are accurate (for z ≥ 0.3 the direct form loses
// at most a factor z/(z - atan z) ≈ 35 to cancellation: tolerance 1e-13), and
// with its limit 1/3 at z = 0 (Taylor series of atan, Abramowitz & Stegun 4.4.42).
func TestAtanRemainder(t *testing.T) {
	for _, z := range []float64{0.3, 0.45, 0.4999} {
		direct := (z - math.Atan(z)) / (z * z * z)
		if got := atanRemainder(z); !near(got, direct, 1e-13) {
			t.Errorf("z = %g: series %.16g, direct %.16g", z, got, direct)
		}
	}
	if got := atanRemainder(0); got != 1.0/3 {
		t.Errorf("z = 0: %.17g, want 1/3", got)
	}
	if a, b := atanRemainder(0.4999999), atanRemainder(0.5); !near(a, b, 1e-6) {
		t.Errorf("discontinuous at the branch: %.16g vs %.16g", a, b)
	}
}

func TestFitDrude(t *testing.T) {
	// Exact Drude data at well separated points: the fit is exact to rounding
	// (tolerance 1e-12).
	const wp, g = 9.0, 0.035
	e := []float64{0.01, 0.02, 0.05, 0.1, 0.3}
	e2 := make([]float64, len(e))
	for i, w := range e {
		e2[i] = wp * wp * g / (w * (w*w + g*g))
	}
	d, err := FitDrude(e, e2)
	if err != nil {
		t.Fatal(err)
	}
	if !near(d.PlasmaEV, wp, 1e-12) || !near(d.DampingEV, g, 1e-12) {
		t.Errorf("fit %+v, want {%g %g}", d, wp, g)
	}
	// Absorption rising with energy is no Drude tail.
	if _, err := FitDrude([]float64{1, 2, 3}, []float64{1, 2, 3}); err == nil || !strings.Contains(err.Error(), "do not fit") {
		t.Errorf("rising data: error %v", err)
	}
	if _, err := FitDrude([]float64{1}, []float64{1}); err == nil {
		t.Error("one point: no error")
	}
}

func TestReadTableErrors(t *testing.T) {
	tests := []struct {
		name, src string
		want      []string
	}{
		{"letters.txt", "0.1 5\n0.2 x4\n", []string{"letters.txt:2", `"x4"`, "#"}},
		{"cols.txt", "# eV eps2\n0.1 5 1 2\n", []string{"cols.txt:2", "4 columns", "give 2"}},
		{"mixed.txt", "0.1 5\n0.2 1 1\n", []string{"mixed.txt:2", "3 columns", "has 2"}},
		{"order.txt", "0.2 5\n0.1 4\n", []string{"order.txt:2", "does not exceed", "sort"}},
		{"repeat.txt", "0.1 5\n0.1 4\n", []string{"repeat.txt:2", "without repeats"}},
		{"zero.txt", "0 5\n0.1 4\n", []string{"zero.txt:1", "must be > 0"}},
		{"gain.txt", "0.1 5\n0.2 -4\n", []string{"gain.txt:2", "eps'' = -4 < 0"}},
		{"nk.txt", "0.1, 1, -1\n", []string{"nk.txt:1", "k = -1"}},
		{"short.txt", "# only one\n0.1 5\n", []string{"short.txt", "at least 2"}},
		{"nan.txt", "0.1 NaN\n0.2 1\n", []string{"nan.txt:1", "finite"}},
	}
	dir := t.TempDir()
	for _, tc := range tests {
		path := filepath.Join(dir, tc.name)
		if err := os.WriteFile(path, []byte(tc.src), 0o644); err != nil {
			t.Fatal(err)
		}
		_, err := LoadTable(path)
		if err == nil {
			t.Errorf("%s: no error", tc.name)
			continue
		}
		for _, w := range tc.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %q lacks %q", tc.name, err, w)
			}
		}
	}
	if _, err := LoadTable(filepath.Join(dir, "absent.txt")); err == nil || !strings.Contains(err.Error(), "absent.txt") {
		t.Errorf("missing file: error %v", err)
	}
}

func TestReadTableFormats(t *testing.T) {
	// Header line, CSV and semicolons, trailing comments, blank lines.
	src := "Energy;eps2\n\n0.1;4 # first\n0.2 ; 3\n# note\n0.4,1\n"
	e, e2, err := ReadTable(strings.NewReader(src), "mem")
	if err != nil {
		t.Fatal(err)
	}
	if len(e) != 3 || e[2] != 0.4 || e2[0] != 4 || e2[2] != 1 {
		t.Errorf("got %v %v", e, e2)
	}
	// n, k columns: eps″ = 2 n k.
	_, e2, err = ReadTable(strings.NewReader("1 2 3\n2 0.5 0.5\n"), "mem")
	if err != nil {
		t.Fatal(err)
	}
	if e2[0] != 12 || e2[1] != 0.5 {
		t.Errorf("eps'' from n, k = %v, want [12 0.5]", e2)
	}
}

// BenchmarkTableEpsilon measures one Kramers–Kronig evaluation of the
// 501-point fixture.
func BenchmarkTableEpsilon(b *testing.B) {
	tab, err := LoadTable(filepath.Join(fixtureDir, "drude-gold-eps2.txt"))
	if err != nil {
		b.Fatal(err)
	}
	xi := FromEV(0.16)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		_ = tab.Epsilon(xi)
	}
	b.ReportMetric(float64(tab.Len()), "points")
}
