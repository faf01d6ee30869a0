package material

import (
	"slices"
	"strings"
	"testing"
)

// TestNamed checks the library's parameters against the values they are
// documented with (see library(); the sources are cited there).
func TestNamed(t *testing.T) {
	tests := []struct {
		name string
		want Model
	}{
		{"gold-plasma", Plasma{9.0}},
		{"gold-drude", Drude{9.0, 0.035}},
		{"aluminium-plasma", Plasma{11.5}},
		{"aluminium-drude", Drude{11.5, 0.050}},
		{"Aluminum-Drude", Drude{11.5, 0.050}},
		{"perfect", Perfect{}},
	}
	for _, tc := range tests {
		m, err := Named(tc.name)
		if err != nil {
			t.Fatal(err)
		}
		if m.Static() != tc.want.Static() {
			t.Errorf("%s: static %+v, want %+v", tc.name, m.Static(), tc.want.Static())
		}
		for _, xi := range []float64{1e13, 1e15, 1e17} {
			if got, want := m.Epsilon(xi), tc.want.Epsilon(xi); got != want && !near(got, want, 1e-15) {
				t.Errorf("%s: eps(i %g) = %g, want %g", tc.name, xi, got, want)
			}
		}
		if err := Validate(m); err != nil {
			t.Errorf("%s: %v", tc.name, err)
		}
	}
	// Silicon: eps(0) = 11.87 and eps(i ω0) = eps_∞ + (eps_0 - eps_∞)/2 with
	// eps_0 = 11.87, eps_∞ = 1.035, ω0 = 6.6e15 rad/s (Lambrecht, Pirozhenko,
	// Duraffourg & Andreucci, EPL 77, 44006 (2007); recalled from memory).
	// Rounding only: tolerance 1e-14.
	si, err := Named("silicon")
	if err != nil {
		t.Fatal(err)
	}
	if got := si.Static(); got.Kind != KindDielectric || !near(got.Epsilon, 11.87, 1e-14) {
		t.Errorf("silicon static %+v, want dielectric with eps(0) = 11.87", got)
	}
	if got, want := si.Epsilon(6.6e15), 1.035+(11.87-1.035)/2; !near(got, want, 1e-14) {
		t.Errorf("silicon eps(i ω0) = %.15g, want %.15g", got, want)
	}
	if si.Name() != "silicon" {
		t.Errorf("silicon name %q", si.Name())
	}
}

func TestNames(t *testing.T) {
	names := Names()
	for _, want := range []string{"gold-plasma", "gold-drude", "aluminium-plasma", "aluminium-drude", "silicon", "perfect"} {
		if !slices.Contains(names, want) {
			t.Errorf("Names() = %v lacks %s", names, want)
		}
	}
	if !slices.IsSorted(names) {
		t.Errorf("Names() = %v is not sorted", names)
	}
	_, err := Named("unobtainium")
	if err == nil || !strings.Contains(err.Error(), "gold-drude") || !strings.Contains(err.Error(), "unobtainium") {
		t.Errorf("unknown name: error %v should name it and list the known names", err)
	}
}
