package job

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/fluctus/fluctus/scatter/material"
)

// withMaterial is a valid two-body job whose first body's material is
// replaced by the cases below (line 6).
const withMaterial = `unit: nm
bodies:
  - name: ball
    shape: {sphere: {radius: 100}}
    mesh_size: 60
    material: MATERIAL
  - name: pad
    shape: {plate: {width: 300, depth: 300, thickness: 50}}
    mesh_size: 80
    position: [0, 0, -150]
sweep:
  body: ball
  direction: [0, 0, -1]
  gaps: [50, 100]
`

func materialJob(spec string) string {
	if spec == "" {
		return strings.Replace(withMaterial, "    material: MATERIAL\n", "", 1)
	}
	return strings.Replace(withMaterial, "MATERIAL", spec, 1)
}

// TestDecodeMaterials decodes every form of the material key and checks
// eps(iξ) of the result against the closed forms of DESIGN §13 (plasma
// eps = 1 + (ω_p/ξ)², Drude eps = 1 + ω_p²/(ξ(ξ + γ)), Lorentz
// eps = 1 + Σ f_j ω_j²/(ω_j² + ξ² + γ_j ξ), a constant), with ħω in eV
// converted by ω = E e/ħ (CODATA 2018). Tolerance 1e-12 relative: the same
// formulas in another order, rounding only.
func TestDecodeMaterials(t *testing.T) {
	const eV = 1.602176634e-19 / 1.054571817e-34 // rad/s per eV
	xi := 0.7 * eV
	cases := []struct {
		name, spec string
		kind       material.Kind
		eps        float64 // eps(iξ); 0: perfect (no model)
		label      string
	}{
		{"no key", "", material.KindPerfect, 0, "perfect"},
		{"perfect", "perfect", material.KindPerfect, 0, "perfect"},
		{"named plasma", "gold-plasma", material.KindPlasma, 1 + math.Pow(9*eV/xi, 2), "gold-plasma"},
		{"named drude", "Gold-Drude", material.KindDrude, 1 + math.Pow(9*eV, 2)/(xi*(xi+0.035*eV)), "gold-drude"},
		{"named, American spelling", "aluminum-drude", material.KindDrude, 1 + math.Pow(11.5*eV, 2)/(xi*(xi+0.05*eV)), "aluminium-drude"},
		{"inline drude", "{drude: {plasma_eV: 9, damping_eV: 0.035}}", material.KindDrude, 1 + math.Pow(9*eV, 2)/(xi*(xi+0.035*eV)), ""},
		{"inline plasma", "{plasma: {plasma_eV: 7.5}}", material.KindPlasma, 1 + math.Pow(7.5*eV/xi, 2), ""},
		{"inline lorentz", "{lorentz: [{strength: 10.8, resonance_eV: 4.34, damping_eV: 0.1}]}", material.KindDielectric,
			1 + 10.8*math.Pow(4.34*eV, 2)/(math.Pow(4.34*eV, 2)+xi*xi+0.1*eV*xi), ""},
		{"inline permittivity", "{permittivity: 11.7}", material.KindDielectric, 11.7, "permittivity(11.7)"},
		{"block form", "\n      drude:\n        plasma_eV: 9\n        damping_eV: 0.035", material.KindDrude, 1 + math.Pow(9*eV, 2)/(xi*(xi+0.035*eV)), ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			j, err := Decode("job.yaml", []byte(materialJob(c.spec)))
			if err != nil {
				t.Fatal(err)
			}
			b := j.Bodies[0]
			if j.Bodies[1].Material != nil {
				t.Errorf("pad has material %v, want none (perfect)", j.Bodies[1].Material)
			}
			if c.eps == 0 {
				if b.Material != nil || j.RealMaterials() || b.MaterialName() != "perfect" {
					t.Errorf("material %v (%q), real %v: want a perfect conductor (nil)", b.Material, b.MaterialName(), j.RealMaterials())
				}
				return
			}
			if b.Material == nil {
				t.Fatal("no material")
			}
			if k := material.KindOf(b.Material); k != c.kind {
				t.Errorf("kind %v, want %v", k, c.kind)
			}
			if got := b.Material.Epsilon(xi); math.Abs(got/c.eps-1) > 1e-12 {
				t.Errorf("eps(iξ) = %.15g, want %.15g", got, c.eps)
			}
			if c.label != "" && b.MaterialName() != c.label {
				t.Errorf("name %q, want %q", b.MaterialName(), c.label)
			}
			if !j.RealMaterials() || b.MaterialLine != 6 {
				t.Errorf("real %v, line %d (want true, 6)", j.RealMaterials(), b.MaterialLine)
			}
		})
	}
}

// TestBuildTableMaterial reads a {table: FILE} material relative to the job
// file at Build (Decode reads no file) and hands it to the scene's bodies.
// The table holds the Drude model of gold (ħω_p = 9 eV, ħγ = 35 meV), so
// its Kramers–Kronig eps(iξ) must match the Drude closed form; tolerance 1 %
// (the table's Kramers–Kronig integral of linearly interpolated data, see
// scatter/material's own table tests for its accuracy).
func TestBuildTableMaterial(t *testing.T) {
	dir := t.TempDir()
	data, err := os.ReadFile(filepath.Join("..", "..", "..", "testdata", "material", "drude-gold-eps2.txt"))
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "gold.txt"), data, 0o644); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "job.yaml")
	j, err := Decode(path, []byte(materialJob("{table: gold.txt}")))
	if err != nil {
		t.Fatal(err)
	}
	if !j.RealMaterials() || j.Bodies[0].MaterialName() != "table gold.txt" {
		t.Errorf("before Build: real %v, name %q", j.RealMaterials(), j.Bodies[0].MaterialName())
	}
	s, err := j.Build()
	if err != nil {
		t.Fatal(err)
	}
	m := s.Bodies[0].Material
	if m == nil || s.Bodies[1].Material != nil {
		t.Fatalf("scene materials %v, %v: want the table and none", m, s.Bodies[1].Material)
	}
	const eV = 1.602176634e-19 / 1.054571817e-34
	for _, xi := range []float64{0.1 * eV, 1 * eV, 5 * eV} {
		want := 1 + math.Pow(9*eV, 2)/(xi*(xi+0.035*eV))
		if got := m.Epsilon(xi); math.Abs(got/want-1) > 0.01 {
			t.Errorf("ξ = %.3g rad/s: eps %.6g, want the Drude %.6g", xi, got, want)
		}
	}

	// A missing table fails at Build, naming the file, the line and the body.
	j, err = Decode(path, []byte(materialJob("{table: missing.txt}")))
	if err != nil {
		t.Fatal(err)
	}
	_, err = j.Build()
	if err == nil {
		t.Fatal("no error for a missing table")
	}
	for _, w := range []string{path + ":6:", `body "ball"`, "missing.txt"} {
		if !strings.Contains(err.Error(), w) {
			t.Errorf("message lacks %q: %v", w, err)
		}
	}
}

// TestDecodeMaterialErrors checks that bad materials are errors naming the
// job file, the line, the body and the fix.
func TestDecodeMaterialErrors(t *testing.T) {
	cases := []struct {
		name, spec string
		want       []string
	}{
		{"family name", "gold", []string{`unknown material "gold"`, "gold-drude or gold-plasma", "material show --list"}},
		{"unknown name", "unobtainium", []string{`unknown material "unobtainium"`, "gold-drude", "silicon", "{drude: ...}"}},
		{"bare number", "11.7", []string{"{permittivity: 11.7}"}},
		{"unknown model", "{debye: {tau: 1}}", []string{`unknown key "debye"`, "permittivity, plasma, drude, lorentz, table"}},
		{"drude without damping", "{drude: {plasma_eV: 9}}", []string{"missing damping_eV", "0.035 for gold"}},
		{"drude zero damping", "{drude: {plasma_eV: 9, damping_eV: 0}}", []string{"damping_eV is 0", "plasma model"}},
		{"permittivity below one", "{permittivity: 0.5}", []string{"must be ≥ 1", "0.5"}},
		{"parameter not a number", "{plasma: {plasma_eV: high}}", []string{"plasma_eV", "want a number"}},
		{"table without a name", "{table: 3}", []string{"table: want the name of an optical-data file"}},
		{"empty", "{}", []string{"empty mapping"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Decode("job.yaml", []byte(materialJob(c.spec)))
			if err == nil {
				t.Fatalf("no error for material: %s", c.spec)
			}
			var je *Error
			if !errors.As(err, &je) {
				t.Fatalf("error %T is not an *Error: %v", err, err)
			}
			msg := err.Error()
			if !strings.HasPrefix(msg, "job.yaml:"+strconv.Itoa(6)+": bodies[0].material: body \"ball\": ") {
				t.Errorf("message does not start with the file, line, key and body: %s", msg)
			}
			for _, w := range c.want {
				if !strings.Contains(msg, w) {
					t.Errorf("message lacks %q: %s", w, msg)
				}
			}
			if strings.Contains(msg, "\n") {
				t.Errorf("message spans several lines: %q", msg)
			}
		})
	}
}
