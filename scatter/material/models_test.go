package material

import (
	"math"
	"strings"
	"testing"
)

// TestFromEV checks the eV ↔ rad/s conversion against CODATA 2018,
// ħ = 6.582119569e-16 eV s (the published value, rounded to 10 digits, hence
// the 1e-9 tolerance).
func TestFromEV(t *testing.T) {
	if got, want := FromEV(1), 1/6.582119569e-16; !near(got, want, 1e-9) {
		t.Errorf("FromEV(1) = %.10g rad/s, want %.10g", got, want)
	}
	if got := ToEV(FromEV(9)); !near(got, 9, 1e-15) {
		t.Errorf("ToEV(FromEV(9)) = %.17g", got)
	}
}

// TestModelClosedForms evaluates each model where its defining formula is
// easy by hand. The values are exact rationals, so the tolerance is a few
// units of rounding (1e-14).
func TestModelClosedForms(t *testing.T) {
	wp := FromEV(9)
	silicon := Sum{Constant{Eps: 1.035}, Lorentz{[]Oscillator{{Strength: 10.835, ResonanceEV: ToEV(6.6e15)}}}}
	tests := []struct {
		name  string
		model Model
		xi    float64 // rad/s
		want  float64
	}{
		// Plasma: eps = 1 + (ω_p/ξ)².
		{"plasma at ξ = ω_p", Plasma{9}, wp, 2},
		{"plasma at ξ = 3ω_p", Plasma{9}, 3 * wp, 1 + 1.0/9},
		// Drude: eps = 1 + ω_p²/(ξ(ξ+γ)); at ξ = γ = ω_p: 1 + 1/2.
		{"drude at ξ = γ = ω_p", Drude{9, 9}, wp, 1.5},
		{"drude gold at ξ = ω_p", Drude{9, 0.035}, wp, 1 + 9/9.035},
		// Lorentz: eps = 1 + f ω0²/(ω0² + ξ² + γξ); at ξ = ω0 = γ: 1 + f/3.
		{"lorentz at ξ = ω0 = γ", Lorentz{[]Oscillator{{Strength: 3, ResonanceEV: 2, DampingEV: 2}}}, FromEV(2), 2},
		{"lorentz static", Lorentz{[]Oscillator{{Strength: 3, ResonanceEV: 2}, {Strength: 1.5, ResonanceEV: 7, DampingEV: 1}}}, 0, 5.5},
		{"constant", Constant{11.7}, 1e15, 11.7},
		// Silicon's single oscillator: eps_∞ + (eps_0 - eps_∞) ω0²/(ω0² + ξ²).
		{"silicon at ξ = 0", silicon, 0, 11.87},
		{"silicon at ξ = ω0", silicon, 6.6e15, 1.035 + 10.835/2},
		// Sum of Drude and plasma: 1 + (ω_p/ξ)² + ω_p²/(ξ(ξ+γ)).
		{"plasma + drude", Sum{Plasma{9}, Drude{9, 9}}, wp, 2.5},
	}
	for _, tc := range tests {
		if got := tc.model.Epsilon(tc.xi); !near(got, tc.want, 1e-14) {
			t.Errorf("%s: eps = %.16g, want %.16g", tc.name, got, tc.want)
		}
	}
	if !math.IsInf(Perfect{}.Epsilon(1e15), 1) {
		t.Error("perfect conductor: eps is not +Inf")
	}
}

// TestDrudeTendsToPlasma: as γ → 0 the Drude eps(iξ) tends to the plasma one at
// every ξ > 0, with relative difference ≈ γ/ξ (first order in γ of
// 1/(ξ(ξ+γ)); definition of the models). Checked at tolerance 2γ/ξ.
func TestDrudeTendsToPlasma(t *testing.T) {
	for _, gammaEV := range []float64{1e-2, 1e-4, 1e-6, 1e-9} {
		for _, xiEV := range []float64{0.01, 0.1, 1, 10} {
			d := Drude{PlasmaEV: 9, DampingEV: gammaEV}.Epsilon(FromEV(xiEV))
			p := Plasma{PlasmaEV: 9}.Epsilon(FromEV(xiEV))
			if tol := 2 * gammaEV / xiEV; !near(d, p, tol) {
				t.Errorf("γ = %g eV, ξ = %g eV: drude %.12g, plasma %.12g (tolerance %g)", gammaEV, xiEV, d, p, tol)
			}
		}
	}
}

// TestMonotone checks eps(iξ) ≥ 1 and non-increasing in ξ, a property of
// every causal passive medium (Landau & Lifshitz, Electrodynamics of
// Continuous Media, §82), for every library model.
func TestMonotone(t *testing.T) {
	for _, name := range Names() {
		m, err := Named(name)
		if err != nil {
			t.Fatal(err)
		}
		prev := m.Epsilon(0)
		for xi := 1e10; xi < 1e19; xi *= 1.5 {
			eps := m.Epsilon(xi)
			if !(eps >= 1) || eps > prev {
				t.Fatalf("%s: eps(iξ) = %g at ξ = %g rad/s after %g", name, eps, xi, prev)
			}
			prev = eps
		}
	}
}

func TestStatic(t *testing.T) {
	inf := math.Inf(1)
	wp := FromEV(9)
	tests := []struct {
		model Model
		want  Static
	}{
		{Perfect{}, Static{KindPerfect, inf, 0}},
		{Constant{4}, Static{KindDielectric, 4, 0}},
		{Plasma{9}, Static{KindPlasma, inf, wp}},
		{Drude{9, 0.035}, Static{KindDrude, inf, 0}},
		{Lorentz{[]Oscillator{{Strength: 2, ResonanceEV: 1}}}, Static{KindDielectric, 3, 0}},
		{Sum{Constant{2}, Lorentz{[]Oscillator{{Strength: 2, ResonanceEV: 1}}}}, Static{KindDielectric, 4, 0}},
		{Sum{Drude{9, 0.035}, Lorentz{[]Oscillator{{Strength: 2, ResonanceEV: 1}}}}, Static{KindDrude, inf, 0}},
		// ξ² eps → ω_p1² + ω_p2² for two plasma terms.
		{Sum{Plasma{3}, Plasma{4}}, Static{KindPlasma, inf, FromEV(5)}},
		{Sum{Plasma{9}, Drude{9, 0.035}}, Static{KindPlasma, inf, wp}},
		{Sum{Plasma{9}, Perfect{}}, Static{KindPerfect, inf, 0}},
	}
	for _, tc := range tests {
		got := tc.model.Static()
		if got.Kind != tc.want.Kind || got.Epsilon != tc.want.Epsilon || !near(got.PlasmaRadPerS, tc.want.PlasmaRadPerS, 1e-15) {
			t.Errorf("%s: Static() = %+v, want %+v", tc.model.Name(), got, tc.want)
		}
		if KindOf(tc.model) != tc.want.Kind {
			t.Errorf("%s: KindOf = %v", tc.model.Name(), KindOf(tc.model))
		}
	}
	// The static limit agrees with Epsilon(0).
	for _, m := range []Model{Constant{4}, Plasma{9}, Drude{9, 0.035}, Lorentz{[]Oscillator{{Strength: 2, ResonanceEV: 1}}}} {
		if m.Epsilon(0) != m.Static().Epsilon {
			t.Errorf("%s: Epsilon(0) = %g but Static().Epsilon = %g", m.Name(), m.Epsilon(0), m.Static().Epsilon)
		}
	}
}

func TestValidate(t *testing.T) {
	tests := []struct {
		model Model
		want  string // substring of the error, "" for valid
	}{
		{Perfect{}, ""},
		{Constant{1}, ""},
		{Constant{0.5}, "≥ 1"},
		{Constant{math.Inf(1)}, "perfect"},
		{Constant{math.NaN()}, "≥ 1"},
		{Plasma{0}, "plasma_eV"},
		{Drude{9, 0}, "use the plasma model"},
		{Drude{-1, 0.03}, "plasma_eV"},
		{Drude{9, -0.03}, "damping_eV"},
		{Lorentz{}, "no oscillators"},
		{Lorentz{[]Oscillator{{Strength: -1, ResonanceEV: 1}}}, "strength"},
		{Lorentz{[]Oscillator{{Strength: 1, ResonanceEV: 0}}}, "resonance_eV"},
		{Sum{}, "empty"},
		{Sum{Plasma{9}, Drude{9, 0}}, "term 2"},
		{nil, "no model"},
	}
	for _, tc := range tests {
		err := Validate(tc.model)
		switch {
		case tc.want == "" && err != nil:
			t.Errorf("%v: unexpected error %v", tc.model, err)
		case tc.want != "" && (err == nil || !strings.Contains(err.Error(), tc.want)):
			t.Errorf("%v: error %v, want one containing %q", tc.model, err, tc.want)
		}
	}
}

func TestKindString(t *testing.T) {
	for k, want := range map[Kind]string{KindDielectric: "dielectric", KindDrude: "drude", KindPlasma: "plasma", KindPerfect: "perfect", Kind(9): "Kind(9)"} {
		if k.String() != want {
			t.Errorf("%d: %q, want %q", int(k), k.String(), want)
		}
	}
}
