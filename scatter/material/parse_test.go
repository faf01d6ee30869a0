package material

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gopkg.in/yaml.v3"
)

// decode reads a YAML value the way a job file is read.
func decode(t *testing.T, src string) any {
	t.Helper()
	var v any
	if err := yaml.Unmarshal([]byte(src), &v); err != nil {
		t.Fatalf("%s: %v", src, err)
	}
	return v
}

func TestParseForms(t *testing.T) {
	base, err := filepath.Abs(fixtureDir)
	if err != nil {
		t.Fatal(err)
	}
	xi := FromEV(1)
	tests := []struct {
		yaml string
		want Model
		kind Kind
	}{
		{`perfect`, Perfect{}, KindPerfect},
		{`gold-drude`, Drude{9, 0.035}, KindDrude},
		{`{drude: {plasma_eV: 9, damping_eV: 0.035}}`, Drude{9, 0.035}, KindDrude},
		{`{drude: {plasma_ev: 9, DAMPING_EV: 0.035}}`, Drude{9, 0.035}, KindDrude},
		{`{plasma: {plasma_eV: 9}}`, Plasma{9}, KindPlasma},
		{`{lorentz: [{strength: 2, resonance_eV: 3, damping_eV: 0.1}, {strength: 1, resonance_eV: 5}]}`,
			Lorentz{[]Oscillator{{2, 3, 0.1}, {1, 5, 0}}}, KindDielectric},
		{`{permittivity: 11.7}`, Constant{11.7}, KindDielectric},
		{`{permittivity: 4}`, Constant{4}, KindDielectric},
		{`{permittivity: 1.035, lorentz: [{strength: 10.835, resonance_eV: 4.344}]}`,
			Sum{Constant{1.035}, Lorentz{[]Oscillator{{10.835, 4.344, 0}}}}, KindDielectric},
		{`{drude: {plasma_eV: 9, damping_eV: 0.035}, lorentz: [{strength: 1, resonance_eV: 3}]}`,
			Sum{Drude{9, 0.035}, Lorentz{[]Oscillator{{1, 3, 0}}}}, KindDrude},
		{`{table: drude-gold-eps2.txt}`, Drude{9, 0.035}, KindDrude},
		{`{table: drude-gold-nk.csv, below: {drude: {plasma_eV: 9, damping_eV: 0.035}}}`, Drude{9, 0.035}, KindDrude},
		{`{table: drude-gold-nk.csv, below: fit}`, Drude{9, 0.035}, KindDrude},
	}
	for _, tc := range tests {
		m, err := Parse(decode(t, tc.yaml), base)
		if err != nil {
			t.Errorf("%s: %v", tc.yaml, err)
			continue
		}
		if KindOf(m) != tc.kind {
			t.Errorf("%s: kind %v, want %v", tc.yaml, KindOf(m), tc.kind)
		}
		// The tables reproduce the Drude model to 1e-3 (TestKramersKronigDrude);
		// the analytic forms are identical (1e-14).
		tol := 1e-14
		if _, ok := m.(*Table); ok {
			tol = 1e-3
		}
		if got, want := m.Epsilon(xi), tc.want.Epsilon(xi); !near(got, want, tol) {
			t.Errorf("%s: eps(i 1 eV) = %.12g, want %.12g", tc.yaml, got, want)
		}
	}
}

func TestParseTableBelowNone(t *testing.T) {
	dir := t.TempDir()
	// A transparent window then an absorption band: an insulator.
	src := "# eV eps''\n1 0\n2 0\n3 1\n4 0.5\n"
	if err := os.WriteFile(filepath.Join(dir, "ins.txt"), []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, spec := range []string{`{table: ins.txt}`, `{table: ins.txt, below: none}`} {
		m, err := Parse(decode(t, spec), dir)
		if err != nil {
			t.Fatalf("%s: %v", spec, err)
		}
		st := m.Static()
		if st.Kind != KindDielectric || !(st.Epsilon > 1) || math.IsInf(st.Epsilon, 0) {
			t.Errorf("%s: static %+v, want a dielectric with finite eps(0) > 1", spec, st)
		}
	}
}

func TestParseErrors(t *testing.T) {
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "rising.txt"), []byte("1 1\n2 2\n3 3\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		yaml string
		want []string // substrings of the error
	}{
		{`~`, []string{"no material given", "gold-drude"}},
		{`copper`, []string{`"copper"`, "gold-drude", "perfect"}},
		{`11.7`, []string{"bare number", "{permittivity: 11.7}"}},
		{`[1, 2]`, []string{"cannot read"}},
		{`{}`, []string{"empty mapping", "drude"}},
		{`{drude: {plasma_eV: 9}}`, []string{"drude", "missing damping_eV"}},
		{`{drude: {plasma_eV: 9, damping_eV: 0}}`, []string{"use the plasma model"}},
		{`{drude: {plasma_eV: 9, damping: 0.03}}`, []string{"drude", `unknown key "damping"`, "damping_eV"}},
		{`{drude: 9}`, []string{"drude", "want a mapping", "plasma_eV"}},
		{`{drude: {plasma_eV: nine, damping_eV: 0.03}}`, []string{"drude", "plasma_eV", "want a number"}},
		{`{plasma: {}}`, []string{"plasma", "missing plasma_eV"}},
		{`{plasma: {plasma_eV: -9}}`, []string{"plasma_eV", "> 0"}},
		{`{lorentz: {strength: 1}}`, []string{"lorentz", "want a list"}},
		{`{lorentz: [{strength: 1}]}`, []string{"lorentz oscillator 1", "missing resonance_eV"}},
		{`{lorentz: []}`, []string{"no oscillators"}},
		{`{permittivity: 0.5}`, []string{"permittivity", "≥ 1"}},
		{`{permittivity: .inf}`, []string{"perfect"}},
		{`{permittivity: high}`, []string{"permittivity", "want a number"}},
		{`{metal: gold}`, []string{`unknown key "metal"`, "drude", "table"}},
		{`{table: missing.txt}`, []string{"missing.txt"}},
		{`{table: 3}`, []string{"table", "file name"}},
		{`{table: rising.txt, permittivity: 2}`, []string{"table cannot be combined with permittivity"}},
		{`{below: none}`, []string{"below", "table: FILE"}},
		{`{table: rising.txt}`, []string{"rising.txt", "do not fit a Drude tail", "below: none"}},
		{`{table: rising.txt, below: fit}`, []string{"rising.txt", "do not fit"}},
		{`{table: rising.txt, below: maybe}`, []string{"below", `"maybe"`, "none, fit"}},
		{`{table: rising.txt, below: {plasma: {plasma_eV: 9}}}`, []string{"below", "drude"}},
		{`{table: rising.txt, below: {drude: {plasma_eV: 9}}}`, []string{"below", "missing damping_eV"}},
	}
	for _, tc := range tests {
		_, err := Parse(decode(t, tc.yaml), dir)
		if err == nil {
			t.Errorf("%s: no error", tc.yaml)
			continue
		}
		for _, w := range tc.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %q lacks %q", tc.yaml, err, w)
			}
		}
	}
}

// TestParseMapAnyKeys accepts mappings decoded with interface keys.
func TestParseMapAnyKeys(t *testing.T) {
	spec := map[any]any{"plasma": map[any]any{"plasma_eV": 9}}
	m, err := Parse(spec, "")
	if err != nil {
		t.Fatal(err)
	}
	if m.Static().Kind != KindPlasma {
		t.Errorf("kind %v", m.Static().Kind)
	}
}
