package report

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/cmd/internal/job"
	"github.com/fluctus/fluctus/mesh"
	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/scatter/sticking"
)

// scene returns a two-body scene (unit nm) swept by offsets.
func scene(t *testing.T) *job.Scene {
	t.Helper()
	a, err := mesh.Box(r3.Vec{X: 1, Y: 1, Z: 1}, 1)
	if err != nil {
		t.Fatal(err)
	}
	b := a.Translate(r3.Vec{Z: 3})
	j := &job.Job{Path: "j.yaml", Unit: 1e-9, Temperature: 300, Accuracy: 1e-3,
		Bodies: []job.Body{{Name: "a", File: "a.stl"}, {Name: "b", Shape: &job.Shape{Kind: job.Box, Size: r3.Vec{X: 1, Y: 1, Z: 1}}, MeshSize: 1}},
		Sweep:  job.Sweep{Body: 0, Direction: r3.Vec{Z: 1}, Offsets: []float64{0, 1}, Lines: []int{9, 9}}}
	return &job.Scene{Job: j,
		Bodies: []scatter.Body{{Name: "a", Mesh: a}, {Name: "b", Mesh: b}},
		Sweep:  scatter.Sweep{Body: 0, Direction: r3.Vec{Z: 1}, Offsets: []r3.Vec{{}, {Z: 1}}}}
}

// points are invented test values; the second has no PFA estimate.
func points() []scatter.Point {
	return []scatter.Point{
		{Offset: r3.Vec{}, Gap: 2, Energy: -2, EnergyError: 0.002, PFA: scatter.PFA{FromMoving: -2.2, FromFixed: -1.8, Mean: -2.5},
			Samples: []scatter.Sample{{Kappa: 1, Value: -0.5}}},
		{Offset: r3.Vec{X: math.Copysign(0, -1), Z: 1}, Gap: 1, Energy: -1, EnergyError: 0.001},
	}
}

func TestNew(t *testing.T) {
	r := New(scene(t), scatter.Cost{Unknowns: 36, MatrixBytes: 8 * 36 * 36}, points())
	if r.Unit != "nm" || r.TemperatureK != 300 || r.Unknowns != 36 || r.Notice != Notice || r.Sweep.By != "offsets" || r.Sweep.Body != "a" {
		t.Errorf("header %+v", r)
	}
	// A box with one cell per side: 12 triangles, 18 edges.
	if r.Bodies[0] != (Body{Name: "a", Source: "a.stl", Triangles: 12, Unknowns: 18}) ||
		r.Bodies[1].Source != "box size 1 x 1 x 1 mesh_size 1" {
		t.Errorf("bodies %+v", r.Bodies)
	}
	// ħc = 3.161526773e-26 J m (CODATA 2018, exact SI constants, given to
	// 10 digits); at L0 = 1 nm, E = -2 ħc/L0 is -6.323053546e-17 J.
	// Tolerance 1e-9: the rounding of the 10-digit ħc.
	p := r.Points[0]
	if want := -2 * 3.161526773e-26 / 1e-9; math.Abs(float64(p.EnergyJ)/want-1) > 1e-9 {
		t.Errorf("energy %g J, want %g", float64(p.EnergyJ), want)
	}
	// -2/-2.5 rounds to the double nearest 0.8; the moving PFA keeps its
	// ratio 1.1 to the energy through the common conversion factor up to
	// a few ulps (tolerance 1e-15).
	if p.RatioPFA != 0.8 || math.Abs(float64(p.PFAMovingJ)/float64(p.EnergyJ)-1.1) > 1e-15 {
		t.Errorf("ratio %v, moving PFA %v", p.RatioPFA, p.PFAMovingJ)
	}
	if !math.IsNaN(float64(r.Points[1].RatioPFA)) {
		t.Errorf("ratio without PFA %v, want NaN", r.Points[1].RatioPFA)
	}
}

func TestOutputs(t *testing.T) {
	r := New(scene(t), scatter.Cost{Unknowns: 36}, points())

	var js bytes.Buffer
	if err := WriteJSON(&js, r); err != nil {
		t.Fatal(err)
	}
	var back map[string]any
	if err := json.Unmarshal(js.Bytes(), &back); err != nil {
		t.Fatalf("%v\n%s", err, js.String())
	}
	pts := back["points"].([]any)
	if pts[1].(map[string]any)["ratio_pfa"] != nil {
		t.Errorf("undefined ratio is %v in JSON, want null", pts[1].(map[string]any)["ratio_pfa"])
	}
	if off := pts[1].(map[string]any)["offset"].([]any); len(off) != 3 || off[2] != 1.0 {
		t.Errorf("offset %v", off)
	}

	var cs bytes.Buffer
	if err := WriteCSV(&cs, r); err != nil {
		t.Fatal(err)
	}
	rows := readCSV(t, cs.String())
	if len(rows) != 2 || !strings.HasPrefix(strings.Join(CSVHeader("nm"), ","), "gap_nm,offset_x_nm,offset_y_nm,offset_z_nm,energy_J,energy_error_J,pfa_energy_J,pfa_moving_J,pfa_fixed_J,ratio_pfa,") {
		t.Errorf("csv:\n%s", cs.String())
	}
	if rows[1]["gap_nm"] != "1" || rows[1]["offset_z_nm"] != "1" || rows[1]["offset_x_nm"] != "0" || rows[1]["ratio_pfa"] != "" ||
		rows[0]["ratio_pfa"] != "0.8" || rows[0]["force_along_N"] != "" || rows[0]["added_for"] != "" {
		t.Errorf("csv rows:\n%s", cs.String())
	}

	var tab bytes.Buffer
	if err := WriteTable(&tab, r); err != nil {
		t.Fatal(err)
	}
	out := tab.String()
	for _, w := range []string{"gap [nm]", "-6.3231e-17", "0.8000", "Results are idealised", "patch charges", "humidity", "keep margin", "qualification practice", "applicable standards"} {
		if !strings.Contains(strings.ToLower(strings.Join(strings.Fields(out), " ")), strings.ToLower(w)) {
			t.Errorf("table lacks %q:\n%s", w, out)
		}
	}
	for _, l := range strings.Split(out, "\n") {
		if len(l) > 78 && !strings.Contains(l, "[J]") {
			t.Errorf("line longer than 78 characters: %q", l)
		}
	}
}

func TestFloatJSON(t *testing.T) {
	for _, c := range []struct {
		x    float64
		want string
	}{{1.5, "1.5"}, {-3.161526773e-20, "-3.161526773e-20"}, {math.NaN(), "null"}, {math.Inf(-1), "null"}, {0, "0"}} {
		b, err := json.Marshal(Float(c.x))
		if err != nil || string(b) != c.want {
			t.Errorf("Float(%g) = %s, %v; want %s", c.x, b, err, c.want)
		}
	}
}

func TestWriteFilesAtomic(t *testing.T) {
	r := New(scene(t), scatter.Cost{}, points())
	dir := t.TempDir()
	if err := WriteFiles(dir, r); err != nil {
		t.Fatal(err)
	}
	for _, n := range []string{JSONName, CSVName} {
		if fi, err := os.Stat(filepath.Join(dir, n)); err != nil || fi.Size() == 0 {
			t.Errorf("%s: %v", n, err)
		}
	}
	if err := RemoveStale(dir); err != nil {
		t.Fatal(err)
	}
	assertEmpty(t, dir)

	// A directory in the way of result.csv makes its rename fail: neither
	// result file nor any temporary file may remain.
	if err := os.Mkdir(filepath.Join(dir, CSVName), 0o755); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(dir, CSVName, "x"), []byte("x"), 0o644)
	if err := WriteFiles(dir, r); err == nil {
		t.Fatal("no error with a directory in place of result.csv")
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if e.Name() != CSVName {
			t.Errorf("left behind: %s", e.Name())
		}
	}

	// A missing directory fails before anything is written.
	if err := WriteFiles(filepath.Join(dir, "none"), r); err == nil {
		t.Error("no error for a missing directory")
	}
}

func assertEmpty(t *testing.T, dir string) {
	t.Helper()
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		t.Errorf("left behind: %s", e.Name())
	}
}

func TestMeshStats(t *testing.T) {
	m, err := mesh.Box(r3.Vec{X: 2, Y: 2, Z: 2}, 2)
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := WriteRows(&b, MeshStats(m, "um")); err != nil {
		t.Fatal(err)
	}
	// A cube of side 2: area 24, volume 8, bounding box ±1, edges 2 and
	// face diagonals 2√2 = 2.828.
	for _, w := range []string{"triangles          12", "area               24 um²", "volume             8 um³",
		"(-1, -1, -1) to (1, 1, 1) um", "centroid           (0, 0, 0) um", "max 2.828 um"} {
		if !strings.Contains(b.String(), w) {
			t.Errorf("stats lack %q:\n%s", w, b.String())
		}
	}
}

// readCSV parses CSV text into rows keyed by the header.
func readCSV(t *testing.T, text string) []map[string]string {
	t.Helper()
	recs, err := csv.NewReader(strings.NewReader(text)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var rows []map[string]string
	for _, rec := range recs[1:] {
		if len(rec) != len(recs[0]) {
			t.Fatalf("row of %d fields under %d columns", len(rec), len(recs[0]))
		}
		row := map[string]string{}
		for i, k := range recs[0] {
			row[k] = rec[i]
		}
		rows = append(rows, row)
	}
	return rows
}

// forceScene is scene with forces on: a gap sweep along -z at L0 = 1 µm.
func forceScene(t *testing.T) *job.Scene {
	s := scene(t)
	s.Job.Unit = 1e-6
	s.Job.Forces = true
	s.Job.Sweep = job.Sweep{Body: 0, Direction: r3.Vec{Z: -1}, Gaps: []float64{2, 1}, Lines: []int{9, 9}}
	s.Sweep.Direction = r3.Vec{Z: -1}
	return s
}

// forcePoints are invented: an attraction of 3 ħc/L0² along -z with a
// lateral part, a torque and a stiffness.
func forcePoints() []scatter.Point {
	return []scatter.Point{{Gap: 2, Energy: -2, EnergyError: 0.002,
		PFA:   scatter.PFA{FromMoving: -2.2, FromFixed: -1.8, Mean: -2.5, Force: 4},
		Force: r3.Vec{X: 0.5, Z: -3}, ForceError: 0.01, Torque: r3.Vec{Y: 0.25}, TorqueError: 0.001,
		Stiffness: -6, StiffnessError: 0.05}}
}

func TestNewForces(t *testing.T) {
	r := New(forceScene(t), scatter.Cost{}, forcePoints())
	p := r.Points[0]
	u := scatter.Unit(1e-6)
	// Conversions of scatter.Unit: ħc/L0² → N, ħc/L0 → N m, ħc/L0³ → N/m
	// (exact products; 1e-15 relative for rounding).
	near := func(got *Float, want float64) bool { return got != nil && math.Abs(float64(*got)/want-1) < 1e-15 }
	if p.ForceN == nil || float64(p.ForceN[0]) != u.Newtons(0.5) || float64(p.ForceN[2]) != u.Newtons(-3) ||
		!near(p.ForceAlongN, u.Newtons(3)) || !near(p.ForceErrorN, u.Newtons(0.01)) || !near(p.PFAForceN, u.Newtons(4)) ||
		!near(p.RatioForce, 0.75) {
		t.Errorf("force fields %+v", p)
	}
	if p.TorqueNm == nil || float64(p.TorqueNm[1]) != u.NewtonMetres(0.25) || p.TorqueAlongNm != nil || !near(p.TorqueErrorNm, u.NewtonMetres(0.001)) {
		t.Errorf("torque fields %+v", p)
	}
	if !near(p.StiffnessNPerM, u.NewtonsPerMetre(-6)) || !near(p.StiffnessErrorNPerM, u.NewtonsPerMetre(0.05)) || p.TorsionalStiffness != nil || p.AngleDeg != nil {
		t.Errorf("stiffness fields %+v", p)
	}

	var js bytes.Buffer
	if err := WriteJSON(&js, r); err != nil {
		t.Fatal(err)
	}
	var back struct {
		Forces bool             `json:"forces"`
		Points []map[string]any `json:"points"`
	}
	if err := json.Unmarshal(js.Bytes(), &back); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"force_N", "force_along_N", "force_error_N", "torque_Nm", "torque_error_Nm", "stiffness_N_per_m", "stiffness_error_N_per_m", "pfa_force_N", "ratio_force_pfa"} {
		if _, ok := back.Points[0][k]; !ok {
			t.Errorf("result.json point lacks %q", k)
		}
	}
	for _, k := range []string{"torsional_stiffness_Nm_per_rad", "angle_deg", "added_for"} {
		if _, ok := back.Points[0][k]; ok {
			t.Errorf("result.json point of a gap sweep has %q", k)
		}
	}
	if !back.Forces {
		t.Error("forces: false")
	}

	var tab bytes.Buffer
	if err := WriteTable(&tab, r); err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{"force [N]", "stiffness [N/m]", "F/PFA", "0.7500", "Results are idealised"} {
		if !strings.Contains(tab.String(), w) {
			t.Errorf("table lacks %q:\n%s", w, tab.String())
		}
	}
	checkWidth(t, tab.String())
}

// checkWidth fails for table lines wider than 78 characters (the energy
// table's header with its [J] columns may be wider).
func checkWidth(t *testing.T, out string) {
	t.Helper()
	for _, l := range strings.Split(out, "\n") {
		if len([]rune(l)) > 78 && !strings.Contains(l, "[J]") {
			t.Errorf("line longer than 78 characters: %q", l)
		}
	}
}

func TestAngleSweepAndSticking(t *testing.T) {
	s := forceScene(t)
	s.Job.Sweep = job.Sweep{Body: 0, Rotate: &job.Turning{Axis: r3.Vec{Y: 1}, Degrees: []float64{0, 1}}, Lines: []int{9, 9}}
	s.Sweep.Turns = []scatter.Turn{{Axis: r3.Vec{Y: 1}}, {Axis: r3.Vec{Y: 1}, Angle: math.Pi / 180}}
	pts := forcePoints()
	pts[0].Turn = scatter.Turn{Axis: r3.Vec{Y: 1}, Angle: math.Pi / 180}
	r := New(s, scatter.Cost{}, pts)
	p := r.Points[0]
	u := scatter.Unit(1e-6)
	if p.AngleDeg == nil || math.Abs(float64(*p.AngleDeg)-1) > 1e-14 || p.TorqueAlongNm == nil || float64(*p.TorqueAlongNm) != u.NewtonMetres(0.25) ||
		p.TorsionalStiffness == nil || float64(*p.TorsionalStiffness) != u.NewtonMetres(-6) || p.StiffnessNPerM != nil {
		t.Errorf("angle point %+v", p)
	}
	if r.Sweep.By != "angles" || r.Sweep.Axis == nil || *r.Sweep.Axis != [3]float64{0, 1, 0} {
		t.Errorf("sweep %+v", r.Sweep)
	}
	extra := forcePoints()
	extra[0].Turn.Angle = 2 * math.Pi / 180
	r.Add(s, extra, AddedForSticking)
	rep := sticking.Report{Stiffness: 1e-9, Rest: 0.2, Torsional: true, Verdict: sticking.Free, Settled: 0.19,
		Equilibria: []sticking.Equilibrium{{X: 0.19, Load: 1e-11, Stable: true}}, SampledRange: [2]float64{0.1, 0.3}}
	r.SetSticking(rep, []sticking.Sample{{X: 0.1, Load: 1, Slope: -1}}, 1, true, 12)

	var tab bytes.Buffer
	if err := WriteTable(&tab, r); err != nil {
		t.Fatal(err)
	}
	out := tab.String()
	flat := strings.Join(strings.Fields(out), " ")
	for _, w := range []string{"angle [deg]", "torque [N m]", "stiffness [N m/rad]", "* computed for the sticking analysis",
		"Sticking analysis (k = 1e-09 N m/rad, at rest at the sweep angle 0.5408 degrees, 200 mrad before contact at 12 degrees; the angles below are measured from contact; 1 refinement round(s)",
		"FREE", "Results are idealised"} {
		if !strings.Contains(flat, w) {
			t.Errorf("table lacks %q:\n%s", w, out)
		}
	}
	// The printed report ends with the sticking summary, itself ending with
	// the caveat.
	if !strings.HasSuffix(strings.TrimSpace(out), "applicable standards.") {
		t.Errorf("table does not end with the summary's caveat:\n%s", out)
	}
	checkWidth(t, out)

	var js bytes.Buffer
	if err := WriteJSON(&js, r); err != nil {
		t.Fatal(err)
	}
	var back struct {
		Points   []map[string]any `json:"points"`
		Sticking map[string]any   `json:"sticking"`
	}
	if err := json.Unmarshal(js.Bytes(), &back); err != nil {
		t.Fatal(err)
	}
	if back.Points[1]["added_for"] != "sticking" || back.Points[0]["added_for"] != nil {
		t.Errorf("added_for %v, %v", back.Points[0]["added_for"], back.Points[1]["added_for"])
	}
	st := back.Sticking
	if st["verdict"] != "free" || st["position"] != "angle_from_contact_rad" || st["contact_angle_deg"] != 12.0 ||
		!strings.Contains(st["summary"].(string), "FREE") || st["refinement_rounds"] != 1.0 || len(st["samples"].([]any)) != 1 {
		t.Errorf("sticking %v", st)
	}
	var cs bytes.Buffer
	if err := WriteCSV(&cs, r); err != nil {
		t.Fatal(err)
	}
	rows := readCSV(t, cs.String())
	if rows[1]["added_for"] != "sticking" || rows[1]["angle_deg"] != "2" || rows[0]["torsional_stiffness_Nm_per_rad"] == "" {
		t.Errorf("csv rows %v", rows)
	}
}

func TestNewPFA(t *testing.T) {
	s := forceScene(t)
	r := NewPFA(s, []scatter.PFA{{FromMoving: -2.2, FromFixed: -1.8, Mean: -2, Force: 4}, {Mean: -1}}, []float64{2, 1})
	if r.Mode != ModePFAOnly || len(r.Points) != 2 || !math.IsNaN(float64(r.Points[0].EnergyJ)) || r.Points[0].PFAForceN == nil || r.Points[0].ForceN != nil {
		t.Fatalf("result %+v", r)
	}
	var js bytes.Buffer
	if err := WriteJSON(&js, r); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(js.String(), `"energy_J": null`) || !strings.Contains(js.String(), `"mode": "pfa-only"`) {
		t.Errorf("json:\n%s", js.String())
	}
	var tab bytes.Buffer
	if err := WriteTable(&tab, r); err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{"PFA moving [J]", "PFA force [N]", "estimates only", "Results are idealised"} {
		if !strings.Contains(tab.String(), w) {
			t.Errorf("table lacks %q:\n%s", w, tab.String())
		}
	}
}

func TestConvergence(t *testing.T) {
	// Three levels whose energies follow E(h) = -2 (1 + 0.1 h²) ħc/L0
	// exactly (invented): the extrapolation gives -2 ħc/L0 and the order 2.
	s := forceScene(t)
	hs := []float64{0.4, 0.4 / math.Sqrt2, 0.2}
	var results []*Result
	var levels []Level
	for _, h := range hs {
		pts := forcePoints()
		pts[0].Energy = -2 * (1 + 0.1*h*h)
		pts[0].Force.Z = -3 * (1 + 0.2*h*h)
		results = append(results, New(s, scatter.Cost{}, pts))
		levels = append(levels, Level{MeshScale: h / 0.4, MeshH: Float(h), Triangles: []int{12, 12}})
	}
	c, err := NewConvergence(levels, results)
	if err != nil {
		t.Fatal(err)
	}
	u := scatter.Unit(1e-6)
	// Tolerance 1e-9: rounding of the differences (Richardson is exact for
	// the model).
	cp := c.Points[0]
	if math.Abs(float64(cp.ExtrapolatedEnergyJ)/u.Joules(-2)-1) > 1e-9 || math.Abs(float64(cp.EnergyOrder)-2) > 1e-9 ||
		cp.LoadName != "force_along_N" || math.Abs(float64(*cp.ExtrapolatedLoad)/u.Newtons(3)-1) > 1e-9 || c.OrderAssumed {
		t.Errorf("convergence %+v", cp)
	}
	results[2].Convergence = c
	var tab bytes.Buffer
	if err := WriteTable(&tab, results[2]); err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{"Mesh convergence, 3 levels", "E [J] h3", "F [N] h1", "extrapolated", "2.00", "finest level"} {
		if !strings.Contains(tab.String(), w) {
			t.Errorf("table lacks %q:\n%s", w, tab.String())
		}
	}
	checkWidth(t, tab.String())
}

// TestBlockRanks checks that the solver's block-rank records reach the
// result file unchanged (the solver's numbers are invented).
func TestBlockRanks(t *testing.T) {
	pts := forcePoints()
	pts[0].Ranks = []scatter.BlockRank{{Rows: "a", Cols: "b", Rank: 37, Compressed: 12, Dense: 3}}
	r := New(forceScene(t), scatter.Cost{}, pts)
	want := []BlockRank{{Rows: "a", Cols: "b", Rank: 37, Compressed: 12, Dense: 3}}
	if got := r.Points[0].BlockRanks; len(got) != 1 || got[0] != want[0] {
		t.Errorf("block ranks %+v, want %+v", got, want)
	}
	var js bytes.Buffer
	if err := WriteJSON(&js, r); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(js.String(), `"block_ranks"`) || !strings.Contains(js.String(), `"max_rank": 37`) {
		t.Errorf("result.json lacks the block ranks:\n%s", js.String())
	}
}
