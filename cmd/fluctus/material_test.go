package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/scatter/lifshitz"
	"github.com/fluctus/fluctus/scatter/material"
)

// eV is the angular frequency of a 1 eV photon, e/ħ in rad/s (CODATA 2018).
const eV = 1.602176634e-19 / 1.054571817e-34

// tableRows returns the numeric rows of a printed table whose first cell
// parses as a number.
func tableRows(t *testing.T, out string) [][]float64 {
	t.Helper()
	var rows [][]float64
	for _, line := range strings.Split(out, "\n") {
		f := strings.Fields(line)
		if len(f) == 0 {
			continue
		}
		if _, err := strconv.ParseFloat(f[0], 64); err != nil {
			continue
		}
		row := make([]float64, len(f))
		for i, s := range f {
			x, err := strconv.ParseFloat(s, 64)
			if err != nil {
				t.Fatalf("cell %q of %q is not a number", s, line)
			}
			row[i] = x
		}
		rows = append(rows, row)
	}
	return rows
}

// TestMaterialShow checks the table of material show against the closed
// forms of the models (DESIGN §13): Drude eps(iξ) = 1 + ω_p²/(ξ(ξ + γ))
// with gold's ħω_p = 9 eV, ħγ = 35 meV, plasma 1 + (ω_p/ξ)². Tolerance 1e-5
// relative: the table prints eps to 6 significant digits (it is compared
// at the grid's nominal frequencies, ħξ = 0.01 × 10^(k/2) eV).
func TestMaterialShow(t *testing.T) {
	drude := func(xi float64) float64 { return 1 + math.Pow(9*eV, 2)/(xi*(xi+0.035*eV)) }
	plasma := func(xi float64) float64 { return 1 + math.Pow(9*eV/xi, 2) }
	cases := []struct {
		args   []string
		models []func(float64) float64
		want   []string
	}{
		{[]string{"material", "show", "gold-drude", "--from", "0.01", "--to", "10", "--per-decade", "2"},
			[]func(float64) float64{drude}, []string{"material: gold-drude", "Drude metal", "TE reflection vanishes", "Lambrecht and S. Reynaud"}},
		{[]string{"material", "show", "{drude: {plasma_eV: 9, damping_eV: 0.035}}", "--from", "0.01", "--to", "10", "--per-decade", "2"},
			[]func(float64) float64{drude}, []string{"Drude metal", "given on the command line"}},
		{[]string{"material", "show", "gold", "--from", "0.01", "--to", "10", "--per-decade", "2"},
			[]func(float64) float64{drude, plasma}, []string{"gold: 2 models", "gold-drude", "gold-plasma", "TE reflection stays finite"}},
	}
	for _, c := range cases {
		t.Run(strings.Join(c.args[2:3], " "), func(t *testing.T) {
			h := newHarness(t)
			if err := h.run(c.args...); err != nil {
				t.Fatal(err)
			}
			out := h.stdout.String()
			for _, w := range c.want {
				if !strings.Contains(out, w) {
					t.Errorf("output lacks %q:\n%s", w, out)
				}
			}
			rows := tableRows(t, out)
			const n = 7 // 0.01 to 10 eV, two per decade
			if len(rows) != n*len(c.models) {
				t.Fatalf("%d rows, want %d:\n%s", len(rows), n*len(c.models), out)
			}
			for i, r := range rows {
				xi, energy, eps := r[0], r[1], r[2]
				if wantE := 0.01 * math.Pow(10, float64(i%n)/2); math.Abs(energy/wantE-1) > 1e-3 {
					t.Errorf("row %d: ħξ = %g eV, want %g", i, energy, wantE)
				}
				if math.Abs(xi/(energy*eV)-1) > 1e-3 {
					t.Errorf("row %d: ξ = %g rad/s is not ħξ = %g eV", i, xi, energy)
				}
				wantE := 0.01 * math.Pow(10, float64(i%n)/2) // the grid's nominal photon energy
				if want := c.models[i/n](wantE * eV); math.Abs(eps/want-1) > 1e-5 {
					t.Errorf("row %d: eps(iξ) = %g, want %g", i, eps, want)
				}
			}
		})
	}
}

// TestMaterialList checks that --list names every library material and
// that each has a source.
func TestMaterialList(t *testing.T) {
	h := newHarness(t)
	if err := h.run("material", "show", "--list"); err != nil {
		t.Fatal(err)
	}
	for _, name := range material.Names() {
		if citations[name] == "" {
			t.Errorf("material %s has no source in citations", name)
		}
		if !strings.Contains(h.stdout.String(), name+": "+citations[name]) {
			t.Errorf("--list lacks %s with its source", name)
		}
	}
}

// TestMaterialShowPlotAndErrors draws a figure and checks the messages of
// bad input.
func TestMaterialShowPlotAndErrors(t *testing.T) {
	dir := t.TempDir()
	png := filepath.Join(dir, "silicon.png")
	h := newHarness(t)
	if err := h.run("material", "show", "silicon", "--plot", png); err != nil {
		t.Fatal(err)
	}
	data, err := os.ReadFile(png)
	if err != nil || !bytes.HasPrefix(data, []byte("\x89PNG\r\n\x1a\n")) {
		t.Fatalf("no PNG written (%v)", err)
	}
	for _, c := range []struct {
		args []string
		want []string
	}{
		{[]string{"material", "show", "unobtainium"}, []string{`unknown material "unobtainium"`, "gold-drude"}},
		{[]string{"material", "show", "{drude: {plasma_eV: 9}}"}, []string{"missing damping_eV"}},
		{[]string{"material", "show", "perfect", "--plot", filepath.Join(dir, "p.png")}, []string{"nothing to draw"}},
		{[]string{"material", "show", "silicon", "--plot", filepath.Join(dir, "p.pdf")}, []string{".png or .svg"}},
		{[]string{"material", "show", "silicon", "--from", "10", "--to", "1"}, []string{"0 < from < to"}},
		{[]string{"material", "show"}, []string{"give one material", "--list"}},
	} {
		checkFailure(t, newHarness(t).run(c.args...), c.want)
	}
}

// readCSV returns the records of a CSV file keyed by its header.
func readCSV(t *testing.T, path string) []map[string]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var out []map[string]string
	for _, r := range recs[1:] {
		m := map[string]string{}
		for i, k := range recs[0] {
			m[k] = r[i]
		}
		out = append(out, m)
	}
	return out
}

func csvFloat(t *testing.T, rec map[string]string, key string) float64 {
	t.Helper()
	x, err := strconv.ParseFloat(rec[key], 64)
	if err != nil {
		t.Fatalf("column %s: %q: %v", key, rec[key], err)
	}
	return x
}

// TestLifshitzCommand checks the lifshitz table against closed forms.
// Perfect conductors: Casimir's E/A = -π²ħc/(720 d³), P = -π²ħc/(240 d⁴)
// (Casimir 1948), tolerance 1e-5 (the command's tolerance 1e-6, with room).
// Plasma gold (ħω_p = 9 eV, δ = c/ω_p = 21.9 nm) at d = 300 δ: η_E ≈ 1 - 4δ/d
// and η_P ≈ 1 - (16/3)δ/d (recalled from memory of the review literature,
// e.g. M. Bordag, U. Mohideen and V. M. Mostepanenko, Phys. Rep. 353, 1
// (2001)), tolerance 30 (δ/d)² = 3.3e-4 for the second-order terms (their
// coefficients, recalled as 72/5 and 24, are below 30; the first-order
// corrections checked are 1.3e-2 and 1.8e-2). The
// thermal columns must be those of lifshitz.Plates at 300 K (tolerance
// 1e-12: the CSV holds every digit). Gaps given in nm and in um must agree.
func TestLifshitzCommand(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "plates.csv")
	h := newHarness(t)
	if err := h.run("lifshitz", "--material", "perfect", "--gap", "100nm,0.5um", "--temperature", "0", "--out", out); err != nil {
		t.Fatal(err)
	}
	recs := readCSV(t, out)
	if len(recs) != 2 || !strings.Contains(h.stdout.String(), "gap [nm]") {
		t.Fatalf("%d rows:\n%s", len(recs), h.stdout.String())
	}
	for i, d := range []float64{100e-9, 0.5e-6} {
		r := recs[i]
		if g := csvFloat(t, r, "gap_m"); math.Abs(g/d-1) > 1e-12 {
			t.Errorf("row %d: gap %g m, want %g", i, g, d)
		}
		e := -math.Pi * math.Pi * scatter.HbarC / (720 * d * d * d)
		p := -math.Pi * math.Pi * scatter.HbarC / (240 * d * d * d * d)
		if got := csvFloat(t, r, "energy_J_per_m2"); math.Abs(got/e-1) > 1e-5 {
			t.Errorf("d = %g m: E/A %g, Casimir %g", d, got, e)
		}
		if got := csvFloat(t, r, "pressure_Pa"); math.Abs(got/p-1) > 1e-5 {
			t.Errorf("d = %g m: P %g, Casimir %g", d, got, p)
		}
		if r["free_energy_J_per_m2"] != "" {
			t.Errorf("T = 0 run has thermal values %q", r["free_energy_J_per_m2"])
		}
	}

	delta := scatter.LightC / (9 * eV)
	d := 300 * delta
	tol := 30 * (delta / d) * (delta / d)
	h = newHarness(t)
	gap := strconv.FormatFloat(d*1e9, 'g', -1, 64) + "nm"
	if err := h.run("lifshitz", "--material", "gold-plasma", "--gap", gap, "--temperature", "300K", "--out", out); err != nil {
		t.Fatal(err)
	}
	r := readCSV(t, out)[0]
	if eta := csvFloat(t, r, "eta_E"); math.Abs(eta-(1-4*delta/d)) > tol {
		t.Errorf("η_E = %.6f, want 1 - 4δ/d = %.6f", eta, 1-4*delta/d)
	}
	if eta := csvFloat(t, r, "eta_P"); math.Abs(eta-(1-16*delta/(3*d))) > tol {
		t.Errorf("η_P = %.6f, want 1 - (16/3)δ/d = %.6f", eta, 1-16*delta/(3*d))
	}
	gold, _ := material.Named("gold-plasma")
	want, err := lifshitz.Plates(context.Background(), gold, gold, csvFloat(t, r, "gap_m"), 300, lifshitz.DefaultTolerance)
	if err != nil {
		t.Fatal(err)
	}
	for key, w := range map[string]float64{"free_energy_J_per_m2": want.Energy, "pressure_T_Pa": want.Pressure, "eta_E_T": want.EnergyRatio, "eta_P_T": want.PressureRatio} {
		if got := csvFloat(t, r, key); math.Abs(got/w-1) > 1e-12 {
			t.Errorf("%s = %g, lifshitz.Plates %g", key, got, w)
		}
	}
	if s := h.stdout.String(); !strings.Contains(s, "gold-plasma: plasma (TE reflection kept at n = 0") || !strings.Contains(s, "T = 0 and T = 300 K") {
		t.Errorf("output does not state the n = 0 model:\n%s", s)
	}
	um := newHarness(t)
	if err := um.run("lifshitz", "--material", "gold-plasma", "--gap", strconv.FormatFloat(d*1e6, 'g', -1, 64)+"um", "--temperature", "300"); err != nil {
		t.Fatal(err)
	}
	a, b := tableRows(t, h.stdout.String()), tableRows(t, um.stdout.String())
	if len(a) != 1 || len(b) != 1 || a[0][1] != b[0][1] || a[0][5] != b[0][5] {
		t.Errorf("gaps in nm and um disagree:\n%v\n%v", a, b)
	}
}

// TestLifshitzErrors checks the messages of bad options.
func TestLifshitzErrors(t *testing.T) {
	for _, c := range []struct {
		args []string
		want []string
	}{
		{[]string{"lifshitz", "--gap", "100nm"}, []string{"--material", "gold-drude"}},
		{[]string{"lifshitz", "--material", "gold-drude"}, []string{"--gap", "100nm"}},
		{[]string{"lifshitz", "--material", "gold", "--gap", "100nm"}, []string{"--material", "gold-drude or gold-plasma"}},
		{[]string{"lifshitz", "--material", "gold-drude", "--gap", "100"}, []string{`"100" has no unit`, "100nm"}},
		{[]string{"lifshitz", "--material", "gold-drude", "--gap", "100pc"}, []string{`unknown length unit "pc"`}},
		{[]string{"lifshitz", "--material", "gold-drude", "--gap", "-5nm"}, []string{"greater than zero"}},
		{[]string{"lifshitz", "--material", "gold-drude", "--gap", "1um:10nm:3"}, []string{"FROM below TO"}},
		{[]string{"lifshitz", "--material", "gold-drude", "--gap", "10nm:1um:x"}, []string{"number of points"}},
		{[]string{"lifshitz", "--material", "gold-drude", "--gap", "10nm", "--temperature", "-3K"}, []string{"--temperature", "≥ 0"}},
	} {
		checkFailure(t, newHarness(t).run(c.args...), c.want)
	}
}

// TestParseGaps checks the gap syntax: units as in a job file, lists and
// log-spaced ranges (exact decades: tolerance 1e-12).
func TestParseGaps(t *testing.T) {
	gaps, unit, err := parseGaps([]string{"10nm:1um:3", "2mm", "1e-3m", "0.5 um"})
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{1e-8, 1e-7, 1e-6, 2e-3, 1e-3, 5e-7}
	if unit != 1e-9 || len(gaps) != len(want) {
		t.Fatalf("gaps %v unit %v", gaps, unit)
	}
	for i := range want {
		if math.Abs(gaps[i]/want[i]-1) > 1e-12 {
			t.Errorf("gap %d: %g, want %g", i, gaps[i], want[i])
		}
	}
}

// twoPlates is a gold lid above a perfectly conducting pad of the same
// size; every facing panel of the PFA sum sees the same gap.
const twoPlates = `unit: nm
bodies:
  - name: lid
    shape: {plate: {width: 2000, depth: 2000, thickness: 100}}
    mesh_size: 500
    position: [0, 0, 500]
    material: gold-drude
  - name: pad
    shape: {plate: {width: 2000, depth: 2000, thickness: 100}}
    mesh_size: 500
sweep:
  body: lid
  direction: [0, 0, -1]
  gaps: [200, 100]
`

// TestRunMaterialsPFA runs a job with a gold body. For parallel plates the
// PFA is the plate law times the area, so the material PFA must be the
// perfect one times η(d) = E_Lifshitz/E_Casimir of lifshitz.Plates (gold
// against a perfect conductor); tolerance 1e-4, the PFA table's stated
// interpolation accuracy. The solver gets the materials and the unit, and
// the reports name the materials; without the material key the job's
// settings are those of before (Length aside, which the solver ignores for
// perfect conductors).
func TestRunMaterialsPFA(t *testing.T) {
	dir := t.TempDir()
	gold := writeJob(t, dir, "gold.yaml", twoPlates)
	perfect := writeJob(t, dir, "perfect.yaml", strings.Replace(twoPlates, "    material: gold-drude\n", "", 1))
	read := func(path string) map[string]json.RawMessage {
		data, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		var res map[string]json.RawMessage
		if err := json.Unmarshal(data, &res); err != nil {
			t.Fatal(err)
		}
		return res
	}
	pfaOf := func(res map[string]json.RawMessage) []float64 {
		var pts []struct {
			Gap float64 `json:"gap"`
			PFA float64 `json:"pfa_energy_J"`
		}
		if err := json.Unmarshal(res["points"], &pts); err != nil {
			t.Fatal(err)
		}
		var out []float64
		for _, p := range pts {
			out = append(out, p.PFA)
		}
		return out
	}
	hp := newHarness(t)
	if err := hp.run("run", perfect, "--pfa-only", "--out", filepath.Join(dir, "p")); err != nil {
		t.Fatal(err)
	}
	hg := newHarness(t)
	if err := hg.run("run", gold, "--pfa-only", "--out", filepath.Join(dir, "g")); err != nil {
		t.Fatal(err)
	}
	ep, eg := pfaOf(read(filepath.Join(dir, "p", "result.json"))), pfaOf(read(filepath.Join(dir, "g", "result.json")))
	au, _ := material.Named("gold-drude")
	for i, d := range []float64{200e-9, 100e-9} {
		r, err := lifshitz.Plates(context.Background(), au, material.Perfect{}, d, 0, 1e-8)
		if err != nil {
			t.Fatal(err)
		}
		eta := r.Energy / lifshitz.CasimirEnergy(d)
		if got := eg[i] / ep[i]; math.Abs(got/eta-1) > 1e-4 {
			t.Errorf("gap %g m: PFA ratio gold/perfect %.6f, want η = %.6f", d, got, eta)
		}
	}
	if s := hp.stdout.String(); strings.Contains(s, ", material ") || strings.Contains(s, "Materials: ") || strings.Contains(s, "material models") {
		t.Errorf("a job without materials mentions them:\n%s", s)
	}
	flat := strings.Join(strings.Fields(hg.stdout.String()), " ") // undo the wrapping
	for _, w := range []string{"material gold-drude (drude)", "Materials: lid: gold-drude (drude); pad: perfect conductor", "stated material models", "Lifshitz energy per area"} {
		if !strings.Contains(flat, w) {
			t.Errorf("output lacks %q:\n%s", w, hg.stdout.String())
		}
	}

	// The solver path: the solver gets the materials and the length unit it
	// needs for its own material PFA (scatter.TestEnergiesMaterialPFA), and
	// the command writes what the solver returned.
	hs := newHarness(t)
	hs.solve()
	if err := hs.run("run", gold, "--out", filepath.Join(dir, "s")); err != nil {
		t.Fatal(err)
	}
	if hs.set.Length != 1e-9 || hs.bodies[0].Material == nil || hs.bodies[1].Material != nil {
		t.Errorf("solver got Length %g, materials %v, %v", hs.set.Length, hs.bodies[0].Material, hs.bodies[1].Material)
	}
	if hs.set.Plates == nil {
		t.Error("solver got no plate table: it would tabulate the Lifshitz law again")
	}
	res := read(filepath.Join(dir, "s", "result.json"))
	if got := pfaOf(res); len(got) == 0 || got[0] == eg[0] {
		t.Errorf("solver-run PFA %v: want the stand-in solver's own values, not recomputed by the command", got)
	}
	var bodies []struct{ Material, MaterialKind string }
	json.Unmarshal(res["bodies"], &bodies)
	if len(bodies) != 2 || bodies[0].Material != "gold-drude" || bodies[1].Material != "perfect" {
		t.Errorf("result.json bodies %+v", bodies)
	}
}
