package plot

import (
	"bytes"
	"cmp"
	"encoding/json"
	"flag"
	"math"
	"os"
	"path/filepath"
	"slices"
	"testing"

	"github.com/fluctus/fluctus/scatter/sticking"
)

// The result.json fixtures in testdata/plot are generated here, so what each
// one holds is written down in code. Run
// "go test ./cmd/internal/plot -run TestFixtures -update" to rewrite them.
//
// Their numbers are invented for these tests (demo data, not computed
// results): they are shaped like a sphere of radius 1 µm over a flat
// conductor, with the proximity-force formulas of DESIGN §7 (Derjaguin 1934
// with Casimir's 1948 plate pressure), E_PFA = -π³ħcR/(720 d²) and
// F_PFA = π³ħcR/(360 d³) towards the plate, and an "exact" energy that falls
// below the PFA by an invented factor 1/(1 + b d/R). The plotting tests check files
// and plot objects, not physics.
var update = flag.Bool("update", false, "rewrite the result.json fixtures in testdata/plot")

// fixtureDir holds the fixtures, relative to this package.
var fixtureDir = filepath.Join("..", "..", "..", "testdata", "plot")

const (
	hbarC  = 3.161526773e-26 // J m, CODATA 2018
	radius = 1e-6            // m, the sphere of the fixtures
	micron = 1e-6            // m
)

var fixtureGaps = []float64{0.2, 0.3, 0.45, 0.7, 1, 1.5} // µm

// pfaEnergy and pfaForce are the sphere–plane PFA at gap d (m), in J and N.
func pfaEnergy(d float64) float64 { return -math.Pow(math.Pi, 3) * hbarC * radius / (720 * d * d) }
func pfaForce(d float64) float64  { return math.Pow(math.Pi, 3) * hbarC * radius / (360 * d * d * d) }

// b sets the invented ratio to PFA of the fixtures, 1/(1 + b d/R).
const b = 0.8

func invented(d float64) float64 { return 1 / (1 + b*d/radius) }

// force and slope are F·ê = dE/dg (the gap shrinks as the body advances
// along ê) and d(F·ê)/dg for the invented E = -A/(d² (1 + βd)), with
// A = π³ħcR/720 and β = b/R: F·ê = A (2 + 3βd)/(d³ (1 + βd)²).
func force(d float64) float64 {
	a, beta := math.Pow(math.Pi, 3)*hbarC*radius/720, b/radius
	return a * (2 + 3*beta*d) / (math.Pow(d, 3) * math.Pow(1+beta*d, 2))
}

func slope(d float64) float64 {
	a, beta := math.Pow(math.Pi, 3)*hbarC*radius/720, b/radius
	q := 1 + beta*d
	return a * (3*beta/(math.Pow(d, 3)*q*q) - 3*(2+3*beta*d)/(math.Pow(d, 4)*q*q) - 2*beta*(2+3*beta*d)/(math.Pow(d, 3)*q*q*q))
}

// samples returns invented integrand samples at gap d (µm): values shaped
// like -A exp(-2κd) (1 + 2κd) on a mapped grid κ = t/((1-t) d).
func samples(d float64) []map[string]any {
	var s []map[string]any
	for _, t := range []float64{0.02, 0.08, 0.18, 0.3, 0.45, 0.6, 0.75, 0.87, 0.95} {
		k := t / ((1 - t) * d)
		s = append(s, map[string]any{"kappa_per_unit": k, "integrand": -0.3 / d * math.Exp(-2*k*d) * (1 + 2*k*d)})
	}
	return s
}

// header returns the common part of a result.
func header(job string, bodies []map[string]any) map[string]any {
	return map[string]any{
		"notice":        DefaultNotice,
		"job":           job,
		"mode":          "solver",
		"unit":          "um",
		"temperature_K": 0,
		"accuracy":      1e-3,
		"unknowns":      1290,
		"matrix_bytes":  int64(1290 * 1290 * 8 * 3),
		"bodies":        bodies,
		"sweep":         map[string]any{"body": bodies[0]["name"], "direction": []float64{0, 0, -1}, "by": "gaps"},
	}
}

func body(name, source string, tris int) map[string]any {
	return map[string]any{"name": name, "source": source, "triangles": tris, "unknowns": tris * 3 / 2}
}

// translation returns the points of a gap sweep; with forces also the
// force, its PFA and the stiffness.
func translation(forces bool, gaps ...float64) []map[string]any {
	var ps []map[string]any
	for _, g := range gaps {
		d := g * micron
		e := pfaEnergy(d) * invented(d)
		p := map[string]any{
			"gap": g, "offset": []float64{0, 0, g - 2},
			"energy_J": e, "energy_error_J": 2e-3 * math.Abs(e),
			"pfa_energy_J": pfaEnergy(d), "pfa_moving_J": 1.02 * pfaEnergy(d), "pfa_fixed_J": 0.98 * pfaEnergy(d),
			"ratio_pfa": invented(d), "samples": samples(g),
		}
		if forces {
			// ê is -z, so the attraction points down.
			f, k := force(d), slope(d)
			p["force_N"] = []float64{0, 0, -f}
			p["force_along_N"] = f
			p["force_error_N"] = 3e-3 * f
			p["pfa_force_N"] = pfaForce(d)
			p["ratio_force_pfa"] = f / pfaForce(d)
			p["torque_Nm"] = []float64{0, 0, 0}
			p["stiffness_N_per_m"] = k
		}
		ps = append(ps, p)
	}
	return ps
}

// stickingSection analyses the load samples on a spring with twice the
// smallest stiffness that holds the rest position (a FREE verdict with a
// stable and an unstable equilibrium) and returns the section of
// result.json: the report with its summary and samples.
func stickingSection(t testing.TB, s []sticking.Sample, rest float64, torsional bool) map[string]any {
	c, err := sticking.NewCurve(s)
	if err != nil {
		t.Fatal(err)
	}
	probe, err := sticking.Analyse(c, sticking.Spring{Stiffness: 1, Rest: rest, Torsional: torsional})
	if err != nil {
		t.Fatal(err)
	}
	rep, err := sticking.Analyse(c, sticking.Spring{Stiffness: 2 * probe.MinStiffness.Value, Rest: rest, Torsional: torsional})
	if err != nil {
		t.Fatal(err)
	}
	data, err := json.Marshal(rep)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(data, &m); err != nil {
		t.Fatal(err)
	}
	m["summary"] = rep.Summary()
	m["samples"] = s
	m["position"] = "gap_m"
	if torsional {
		m["position"] = "angle_from_contact_rad"
	}
	m["refinement_rounds"] = 0
	m["converged"] = true
	return m
}

// gapSamples returns the load samples of gap-sweep points with forces.
func gapSamples(points []map[string]any) []sticking.Sample {
	var s []sticking.Sample
	for _, p := range points {
		s = append(s, sticking.Sample{X: p["gap"].(float64) * micron, Load: p["force_along_N"].(float64), Slope: p["stiffness_N_per_m"].(float64)})
	}
	slices.SortFunc(s, func(a, b sticking.Sample) int { return cmp.Compare(a.X, b.X) })
	return s
}

// fixtures returns the content of every result.json fixture by directory.
func fixtures(t testing.TB) map[string]map[string]any {
	// energy: energies only, body names that need escaping, and a job file
	// that does not exist (the scene is left out with a note).
	energy := header("gone/missing.yaml", []map[string]any{
		body("<script>alert(1)</script>", "sphere radius 1 mesh_size 0.5", 320),
		body("pad & co", "plate 4 x 4 x 0.5 mesh_size 1", 140),
	})
	energy["points"] = translation(false, fixtureGaps...)

	// forces: the sphere over a plate of sphere_plate.yaml with forces,
	// stiffness, a sticking analysis and one point the analysis added.
	forces := header("sphere_plate.yaml", []map[string]any{
		body("ball", "sphere radius 1 mesh_size 0.5", 320),
		body("pad", "plate 4 x 4 x 0.5 mesh_size 1", 140),
	})
	forces["forces"] = true
	pts := translation(true, append(fixtureGaps, 0.55)...)
	pts[len(pts)-1]["added_for"] = "sticking"
	forces["points"] = pts
	forces["sticking"] = stickingSection(t, gapSamples(pts), micron, false)

	// angle: a plate tilted about y over another; invented torques that
	// grow as the tilt closes the gap, which closes at 30°, and a torsional
	// sticking analysis in the angle from contact.
	angle := header("tilt.yaml", []map[string]any{
		body("flap", "plate 4 x 4 x 0.5 mesh_size 1", 140),
		body("base", "plate 6 x 6 x 0.5 mesh_size 1", 200),
	})
	angle["sweep"] = map[string]any{"body": "flap", "direction": []float64{0, 0, 0}, "by": "angles", "axis": []float64{0, 1, 0}}
	var aps []map[string]any
	for i, deg := range []float64{0, 2, 4, 6, 8, 10} {
		g := 1 - 2*math.Sin(deg*math.Pi/180) // µm: the flap's edge comes down
		e := 4 * pfaEnergy(g*micron) / radius * 1e-6
		tq := -1e-21 / (g * g * g)
		aps = append(aps, map[string]any{
			"gap": g, "offset": []float64{0, 0, 0}, "angle_deg": deg,
			"energy_J": e, "energy_error_J": 1e-3 * math.Abs(e),
			"pfa_energy_J": 1.1 * e, "pfa_moving_J": 1.1 * e, "pfa_fixed_J": 1.1 * e, "ratio_pfa": 1 / 1.1,
			"samples":   samples(g),
			"force_N":   []float64{0, 0, -3 * e / (g * micron)},
			"torque_Nm": []float64{0, tq, 0}, "torque_error_Nm": 2e-3 * math.Abs(tq),
			"torsional_stiffness_Nm_per_rad": -3e-21 / math.Pow(g, 4) * float64(i+1) / 6,
		})
	}
	angle["points"] = aps
	var ts []sticking.Sample
	contact := 30 * math.Pi / 180
	for _, deg := range []float64{10, 8, 6, 4, 2, 0} {
		x := contact - deg*math.Pi/180
		g := 1 - 2*math.Sin(deg*math.Pi/180)
		// L = 1e-21/g³ N m with dg/dx = 2 cos θ.
		ts = append(ts, sticking.Sample{X: x, Load: 1e-21 / (g * g * g), Slope: -3e-21 / (g * g * g * g) * 2 * math.Cos(deg*math.Pi/180)})
	}
	ast := stickingSection(t, ts, 0.45, true)
	ast["contact_angle_deg"] = 30
	angle["sticking"] = ast

	// substrate: one sphere over an infinite plane, energies only, at a
	// finite temperature (the κ = 0 sample is left out of the integrand).
	sub := header("", []map[string]any{body("ball", "sphere radius 1 mesh_size 0.5", 320)})
	sub["temperature_K"] = 300
	sub["substrate"] = map[string]any{"point": []float64{0, 0, 0}, "normal": []float64{0, 0, 1}}
	sp := translation(false, fixtureGaps...)
	for _, p := range sp {
		s := p["samples"].([]map[string]any)
		p["samples"] = append([]map[string]any{{"kappa_per_unit": 0, "integrand": s[0]["integrand"]}}, s...)
	}
	sub["points"] = sp

	// pfa_only: proximity-force estimates without exact values (null).
	pfa := header("", []map[string]any{body("ball", "sphere radius 1 mesh_size 0.5", 320), body("pad", "plate 4 x 4 x 0.5 mesh_size 1", 140)})
	pfa["mode"] = "pfa-only"
	pp := translation(false, fixtureGaps...)
	for _, p := range pp {
		p["energy_J"], p["energy_error_J"], p["ratio_pfa"], p["samples"] = nil, nil, nil, []any{}
	}
	pfa["points"] = pp

	return map[string]map[string]any{"energy": energy, "forces": forces, "angle": angle, "substrate": sub, "pfa_only": pfa}
}

func encodeFixture(t testing.TB, v any) []byte {
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetIndent("", "  ")
	if err := enc.Encode(v); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

func TestFixtures(t *testing.T) {
	for dir, v := range fixtures(t) {
		want := encodeFixture(t, v)
		path := filepath.Join(fixtureDir, dir, ResultName)
		if *update {
			if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(path, want, 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		got, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run with -update to create it)", err)
		}
		if !bytes.Equal(got, want) {
			t.Errorf("%s differs from its description in fixtures() (run with -update to rewrite it)", path)
		}
	}
}
