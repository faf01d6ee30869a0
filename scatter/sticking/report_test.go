package sticking

import (
	"encoding/json"
	"reflect"
	"strings"
	"testing"
)

// reports returns analyses covering every verdict, an extrapolated limit
// and notes.
func reports(t *testing.T) map[string]Report {
	const g0 = 100e-9
	f := powerLaw(platesC, 4)
	wide := mustCurve(t, sampled(f, 0.3*g0, g0, 16))
	narrow := mustCurve(t, sampled(f, 0.85*g0, g0, 8))
	kMin := mustAnalyse(t, wide, Spring{Stiffness: 1, Rest: g0}).MinStiffness.Value
	return map[string]Report{
		"free":         mustAnalyse(t, wide, Spring{Stiffness: 2 * kMin, Rest: g0}),
		"sticks":       mustAnalyse(t, wide, Spring{Stiffness: 0.5 * kMin, Rest: g0}),
		"marginal":     mustAnalyse(t, wide, Spring{Stiffness: kMin, Rest: g0}),
		"undetermined": mustAnalyse(t, narrow, Spring{Stiffness: 1.01 * kMin, Rest: g0}),
		"soft":         mustAnalyse(t, wide, Spring{Stiffness: 0.01 * kMin, Rest: g0}),
	}
}

func TestReportJSON(t *testing.T) {
	for name, r := range reports(t) {
		r.Material = "gold (Drude)"
		b, err := json.Marshal(r)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		var back Report
		if err := json.Unmarshal(b, &back); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if !reflect.DeepEqual(back, r) {
			t.Errorf("%s: round trip changed the report:\n got %+v\nwant %+v", name, back, r)
		}
		for _, key := range []string{`"equilibria":`, `"pull_in":`, `"min_stiffness":`, `"min_rest":`, `"verdict":`, `"margin":`, `"stiffness_ratio":`, `"sampled_range":`, `"location":`, `"extrapolated":`} {
			if !strings.Contains(string(b), key) {
				t.Errorf("%s: JSON lacks %s: %s", name, key, b)
			}
		}
		if name == "free" && !strings.Contains(string(b), `"stiffness_margin":`) {
			t.Errorf("free: JSON lacks stiffness_margin: %s", b)
		}
	}
}

func TestSummary(t *testing.T) {
	want := map[string][]string{
		"free":         {"rest gap 100 nm", "is FREE", "stable equilibrium at", "2 times as stiff", "Pull-in would happen at"},
		"sticks":       {"STICKS", "0.5 times as stiff", "Pull-in happens at"},
		"marginal":     {"STICKS", "exactly at the pull-in limit", "no margin"},
		"undetermined": {"cannot decide", "it would be FREE", "compute the force down to about", "estimated: the tangency at 80 nm lies below the sampled range"},
		"soft":         {"STICKS", "estimated: its pull-in point lies above the sampled range"},
	}
	for name, r := range reports(t) {
		s := r.Summary()
		for _, w := range append(want[name], "idealised", "perfect conductors in vacuum", "roughness, patch charges or humidity", "margin", "qualification practice", "applicable standards") {
			if !strings.Contains(s, w) {
				t.Errorf("%s: summary lacks %q:\n%s", name, w, s)
			}
		}
	}
	r := reports(t)["free"]
	r.Material = "gold (Drude model)"
	if s := r.Summary(); !strings.Contains(s, "gold (Drude model) in vacuum") || strings.Contains(s, "perfect conductors") {
		t.Errorf("summary does not name the material: %s", s)
	}
	r.Body = "paddle"
	if s := r.Summary(); !strings.Contains(s, `body "paddle" is FREE`) || strings.Contains(s, "electrode") {
		t.Errorf("summary does not name the body: %s", s)
	}
}

func TestWithPrefix(t *testing.T) {
	for _, tc := range []struct {
		v    float64
		unit string
		want string
	}{
		{3.96e-7, "m", "396 nm"},
		{4e-7, "m", "400 nm"},
		{9.997e-7, "m", "1 µm"},
		{2.5, "N", "2.5 N"},
		{1.2e-9, "N", "1.2 nN"},
		{-3e-3, "rad", "-3 mrad"},
		{0, "m", "0 m"},
		{1e-25, "N m", "1e-07 aN m"},
	} {
		if got := withPrefix(tc.v, tc.unit); got != tc.want {
			t.Errorf("withPrefix(%g, %q) = %q, want %q", tc.v, tc.unit, got, tc.want)
		}
	}
}
