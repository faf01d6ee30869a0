package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/cmd/internal/report"
	"github.com/fluctus/fluctus/scatter"
)

// physics makes the stand-in solver return invented but physics-shaped
// numbers (test data, not results): at each point the true gap g (from
// scatter.Gaps), an attraction along the sweep direction
// F = 1e-2 (1 + g)/g⁴ ħc/L0² (not a power law, so the sticking analysis
// asks for more points), its stiffness -dF/ds = dF/dg, an energy
// E = -(1 + 0.1 h²)/g³ with h the mean triangle size of the meshes (so a
// convergence study sees an h² error), and PFA values E/0.8 and F/0.9. For
// an angle sweep the torque about the axis is 1e-3/g³ and its stiffness
// -dτ/dθ comes from the gaps at θ ± 1e-6.
func (h *harness) physics() {
	h.app.energies = func(ctx context.Context, b []scatter.Body, sw scatter.Sweep, set scatter.Settings) ([]scatter.Point, error) {
		h.record(b, sw, set)
		gaps, err := scatter.Gaps(b, sw, set.Substrate)
		if err != nil {
			return nil, err
		}
		var area float64
		var tris int
		for _, body := range b {
			st := body.Mesh.Stats()
			area += st.Area
			tris += st.Triangles
		}
		size := math.Sqrt(area / float64(tris))
		e := r3.Unit(sw.Direction)
		var ps []scatter.Point
		for i, g := range gaps {
			f := 1e-2 * (1 + g) / math.Pow(g, 4)
			df := 1e-2 * (-3/math.Pow(g, 4) - 4/math.Pow(g, 5))
			en := -(1 + 0.1*size*size) / (g * g * g)
			p := scatter.Point{Offset: sw.Offsets[i], Gap: g, Energy: en, EnergyError: 1e-4 * math.Abs(en),
				PFA:   scatter.PFA{FromMoving: en / 0.7, FromFixed: en / 0.9, Mean: en / 0.8, Force: f / 0.9},
				Force: r3.Scale(f, e), ForceError: 1e-4 * f, Stiffness: df, StiffnessError: 1e-4 * math.Abs(df),
				Samples: []scatter.Sample{{Kappa: 1 / g, Value: -0.1}}}
			if len(sw.Turns) > 0 {
				t := sw.Turns[i]
				p.Turn = t
				n := r3.Unit(t.Axis)
				tau := 1e-3 / (g * g * g)
				shifted := func(d float64) float64 {
					s := sw
					s.Turns = []scatter.Turn{{Axis: t.Axis, Angle: t.Angle + d, Pivot: t.Pivot}}
					s.Offsets = []r3.Vec{sw.Offsets[i]}
					gs, err := scatter.Gaps(b, s, set.Substrate)
					if err != nil {
						return math.NaN()
					}
					return 1e-3 / (gs[0] * gs[0] * gs[0])
				}
				p.Torque = r3.Scale(tau, n)
				p.Stiffness = -(shifted(1e-6) - shifted(-1e-6)) / 2e-6
			}
			ps = append(ps, p)
		}
		if set.Progress != nil {
			set.Progress(len(ps), len(ps))
		}
		return ps, nil
	}
}

// result reads the result.json of dir.
func readResult(t *testing.T, dir string) (map[string]json.RawMessage, []map[string]any) {
	t.Helper()
	data, err := os.ReadFile(filepath.Join(dir, report.JSONName))
	if err != nil {
		t.Fatal(err)
	}
	var top map[string]json.RawMessage
	if err := json.Unmarshal(data, &top); err != nil {
		t.Fatal(err)
	}
	var points []map[string]any
	if err := json.Unmarshal(top["points"], &points); err != nil {
		t.Fatal(err)
	}
	return top, points
}

// readRows reads the result.csv of dir as rows keyed by the header.
func readRows(t *testing.T, dir string) []map[string]string {
	t.Helper()
	f, err := os.Open(filepath.Join(dir, report.CSVName))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var rows []map[string]string
	for _, rec := range recs[1:] {
		row := map[string]string{}
		for i, k := range recs[0] {
			row[k] = rec[i]
		}
		rows = append(rows, row)
	}
	return rows
}

// A sphere on a spring above a plate: the job of the sticking tests.
const springJob = `unit: um
bodies:
  - name: ball
    shape: {sphere: {radius: 1}}
    mesh_size: 0.7
    position: [0, 0, 3]
  - name: pad
    shape: {plate: {width: 3, depth: 3, thickness: 0.5}}
    mesh_size: 1
sweep:
  body: ball
  direction: [0, 0, -1]
  gaps: [0.5, 0.75, 1, 1.5, 2]
spring: {stiffness: 1e-4, unit: N/m, rest_gap: 1.5}
`

func TestRunForcesAndSticking(t *testing.T) {
	h := newHarness(t)
	h.physics()
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	if err := h.run("run", writeJob(t, dir, "job.yaml", springJob), "--out", out, "-q"); err != nil {
		t.Fatal(err)
	}
	if !h.set.Forces || !h.set.Stiffness || h.set.Substrate != nil {
		t.Errorf("settings %+v", h.set)
	}
	// The torques are taken about the ball's centre, the volume centroid of
	// the icosphere (to rounding).
	if c := h.sweep.Centre; h.calls > 1 && math.Abs(c.X) > 1e-12 {
		t.Errorf("torque centre %v", c)
	}
	if h.calls < 2 {
		t.Errorf("the sticking analysis computed no extra points (%d solver calls)", h.calls)
	}

	top, points := readResult(t, out)
	if len(points) <= 5 {
		t.Fatalf("%d points, want the 5 of the sweep and some added", len(points))
	}
	for i, p := range points {
		for _, k := range []string{"force_N", "force_along_N", "force_error_N", "torque_Nm", "torque_error_Nm", "stiffness_N_per_m", "pfa_force_N", "ratio_force_pfa"} {
			if _, ok := p[k]; !ok {
				t.Errorf("point %d lacks %q", i, k)
			}
		}
		if fa := p["force_along_N"].(float64); !(fa > 0) {
			t.Errorf("point %d: force along the approach %g, want an attraction", i, fa)
		}
		if k := p["stiffness_N_per_m"].(float64); !(k < 0) {
			t.Errorf("point %d: stiffness %g, want negative", i, k)
		}
		// F/F_PFA = 0.9 by construction of the stand-in.
		if r := p["ratio_force_pfa"].(float64); math.Abs(r-0.9) > 1e-12 {
			t.Errorf("point %d: F/PFA %g", i, r)
		}
		if added := p["added_for"]; (i < 5) != (added == nil) || (i >= 5 && added != "sticking") {
			t.Errorf("point %d: added_for %v", i, added)
		}
	}
	// The force is converted from ħc/L0² with L0 = 1 µm: at the first
	// point, gap 0.5, F = 1e-2 · 1.5/0.5⁴ ħc/L0² with ħc = 3.161526773e-26
	// J m (CODATA 2018, exact SI constants, given to 10 digits). Tolerance
	// 1e-9: that rounding (and OffsetForGap's 1e-12 in the gap).
	if want := 1e-2 * 1.5 / math.Pow(0.5, 4) * 3.161526773e-26 / 1e-12; math.Abs(points[0]["force_along_N"].(float64)/want-1) > 1e-9 {
		t.Errorf("force %g N, want %g", points[0]["force_along_N"], want)
	}

	var st map[string]any
	if err := json.Unmarshal(top["sticking"], &st); err != nil {
		t.Fatalf("sticking section: %v", err)
	}
	for _, k := range []string{"verdict", "pull_in", "min_stiffness", "min_rest", "equilibria", "summary", "samples", "margin"} {
		if _, ok := st[k]; !ok {
			t.Errorf("sticking lacks %q", k)
		}
	}
	if st["position"] != "gap_m" || st["stiffness"] != 1e-4 || math.Abs(st["rest"].(float64)-1.5e-6) > 1e-18 {
		t.Errorf("sticking %v", st)
	}
	if n := len(st["samples"].([]any)); n != len(points) {
		t.Errorf("%d sticking samples for %d points", n, len(points))
	}
	stdout := h.stdout.String()
	flat := strings.Join(strings.Fields(stdout), " ")
	for _, w := range []string{"body ball: ", "triangles", "force [N]", "stiffness [N/m]", "F/PFA", "* computed for the sticking analysis",
		"Sticking analysis (k = 0.0001 N/m, rest gap 1.5 µm", "Results are idealised", "result.json"} {
		if !strings.Contains(flat, w) {
			t.Errorf("output lacks %q:\n%s", w, stdout)
		}
	}
	if i, j := strings.Index(stdout, "Sticking analysis"), strings.LastIndex(stdout, "Results are idealised"); !(i > j) {
		t.Errorf("the sticking summary does not end the report:\n%s", stdout)
	}

	rows := readRows(t, out)
	if len(rows) != len(points) {
		t.Fatalf("%d CSV rows for %d points", len(rows), len(points))
	}
	for _, k := range []string{"force_x_N", "force_along_N", "force_error_N", "pfa_force_N", "torque_y_Nm", "stiffness_N_per_m"} {
		if rows[0][k] == "" {
			t.Errorf("CSV lacks %q", k)
		}
	}
	if rows[len(rows)-1]["added_for"] != "sticking" || rows[0]["added_for"] != "" {
		t.Errorf("CSV added_for: %q, %q", rows[0]["added_for"], rows[len(rows)-1]["added_for"])
	}

	// Without forces: no force fields, no force table.
	h = newHarness(t)
	h.physics()
	noForces := strings.Replace(springJob, "spring: {stiffness: 1e-4, unit: N/m, rest_gap: 1.5}\n", "forces: false\n", 1)
	out2 := filepath.Join(dir, "out2")
	if err := h.run("run", writeJob(t, dir, "plain.yaml", noForces), "--out", out2, "-q"); err != nil {
		t.Fatal(err)
	}
	if h.set.Forces || h.set.Stiffness || h.calls != 1 {
		t.Errorf("settings %+v, %d calls", h.set, h.calls)
	}
	if _, points := readResult(t, out2); points[0]["force_N"] != nil {
		t.Errorf("force without forces: %v", points[0])
	}
	if strings.Contains(h.stdout.String(), "force [N]") {
		t.Errorf("force table without forces:\n%s", h.stdout.String())
	}
}

// A ball over the substrate, alone.
const substrateJob = `unit: nm
substrate: {point: [0, 0, 0], normal: [0, 0, 1]}
bodies:
  - name: ball
    shape: {sphere: {radius: 100}}
    mesh_size: {near: 30, far: 60}
    position: [0, 0, 500]
sweep:
  body: ball
  direction: [0, 0, -1]
  gaps: [60, 100]
`

func TestRunSubstrate(t *testing.T) {
	h := newHarness(t)
	h.physics()
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	if err := h.run("run", writeJob(t, dir, "job.yaml", substrateJob), "--out", out, "-q"); err != nil {
		t.Fatal(err)
	}
	if h.set.Substrate == nil || h.set.Substrate.Normal != (r3.Vec{Z: 1}) || len(h.bodies) != 1 {
		t.Fatalf("settings %+v, %d bodies", h.set, len(h.bodies))
	}
	// The lowest point of the graded ball is at each gap above the plane
	// (1e-9: rounding).
	for i, g := range []float64{60, 100} {
		m := h.bodies[0].Mesh.Translate(h.sweep.Offsets[i])
		if low := m.Stats().Min.Z; math.Abs(low-g) > 1e-9 {
			t.Errorf("point %d: lowest point at %g, want %g", i, low, g)
		}
	}
	top, points := readResult(t, out)
	var sub report.Plane
	if err := json.Unmarshal(top["substrate"], &sub); err != nil || sub.Normal != [3]float64{0, 0, 1} {
		t.Errorf("substrate %s: %v", top["substrate"], err)
	}
	if points[0]["gap"] != 60.0 {
		t.Errorf("gap %v", points[0]["gap"])
	}
	if !strings.Contains(h.stdout.String(), "substrate: the conducting plane through (0, 0, 0)") {
		t.Errorf("output:\n%s", h.stdout.String())
	}
	if strings.Contains(h.stderr.String(), "warning") {
		t.Errorf("the graded ball warns: %s", h.stderr.String())
	}
}

// A paddle tilted towards a pad on a torsional spring.
const tiltJob = `unit: um
bodies:
  - name: paddle
    shape: {plate: {width: 2, depth: 1, thickness: 0.1}}
    mesh_size: 0.25
    position: [0, 0, 1]
  - name: pad
    shape: {plate: {width: 4, depth: 4, thickness: 0.2}}
    mesh_size: 0.5
sweep:
  body: paddle
  rotate: {axis: [0, 1, 0], point: [0, 0, 1], degrees: [0, 10, 20, 30, 40]}
spring: {stiffness: 1e-15, unit: N m/rad, rest_angle: 10}
`

func TestRunAngleSweep(t *testing.T) {
	h := newHarness(t)
	h.physics()
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	if err := h.run("run", writeJob(t, dir, "tilt.yaml", tiltJob), "--out", out, "-q"); err != nil {
		t.Fatal(err)
	}
	if len(h.sweep.Turns) == 0 || h.sweep.Centre != (r3.Vec{Z: 1}) {
		t.Fatalf("sweep %+v", h.sweep)
	}
	top, points := readResult(t, out)
	for i, p := range points[:5] {
		if p["angle_deg"] == nil || p["torsional_stiffness_Nm_per_rad"] == nil || p["torque_along_Nm"] == nil || p["stiffness_N_per_m"] != nil {
			t.Errorf("point %d: %v", i, p)
		}
	}
	if points[2]["angle_deg"] != 20.0 {
		t.Errorf("angle %v", points[2]["angle_deg"])
	}
	var st map[string]any
	if err := json.Unmarshal(top["sticking"], &st); err != nil {
		t.Fatal(err)
	}
	// Contact where the corner of the paddle meets the pad: sin θ + 0.05
	// cos θ = 0.9 (TestBuildAngleSweep), 63.3 degrees; 1e-6 for the
	// bisection.
	want := (math.Asin(0.9/math.Hypot(1, 0.05)) - math.Atan(0.05)) * 180 / math.Pi
	if c, _ := st["contact_angle_deg"].(float64); math.Abs(c-want) > 1e-6 || st["position"] != "angle_from_contact_rad" || st["torsional"] != true {
		t.Errorf("sticking %v (contact angle want %g)", st, want)
	}
	for _, w := range []string{"angle [deg]", "torque [N m]", "stiffness [N m/rad]", "Sticking analysis (k = 1e-15 N m/rad"} {
		if !strings.Contains(strings.Join(strings.Fields(h.stdout.String()), " "), w) {
			t.Errorf("output lacks %q:\n%s", w, h.stdout.String())
		}
	}
}

func TestRunPFAOnly(t *testing.T) {
	h := newHarness(t) // fails the test if the solver is called
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	if err := h.run("run", writeJob(t, dir, "job.yaml", springJob), "--out", out, "--pfa-only"); err != nil {
		t.Fatal(err)
	}
	top, points := readResult(t, out)
	if string(top["mode"]) != `"pfa-only"` || len(points) != 5 {
		t.Fatalf("mode %s, %d points", top["mode"], len(points))
	}
	for i, p := range points {
		if p["energy_J"] != nil || !(p["pfa_energy_J"].(float64) < 0) || !(p["pfa_force_N"].(float64) > 0) || p["force_N"] != nil {
			t.Errorf("point %d: %v", i, p)
		}
		if m, f := p["pfa_moving_J"].(float64), p["pfa_fixed_J"].(float64); math.Abs(p["pfa_energy_J"].(float64)-(m+f)/2) > 1e-12*math.Abs(m) {
			t.Errorf("point %d: mean %v of %v and %v", i, p["pfa_energy_J"], m, f)
		}
	}
	for _, w := range []string{"PFA moving [J]", "PFA force [N]", "estimates only", "needs the exact forces", "Results are idealised"} {
		if !strings.Contains(strings.Join(strings.Fields(h.stdout.String()), " "), w) {
			t.Errorf("output lacks %q:\n%s", w, h.stdout.String())
		}
	}
	if h.calls != 0 {
		t.Errorf("the solver was called %d times", h.calls)
	}
}

func TestRunConvergence(t *testing.T) {
	h := newHarness(t)
	h.physics()
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	job := strings.Replace(springJob, "spring: {stiffness: 1e-4, unit: N/m, rest_gap: 1.5}\n", "", 1)
	if err := h.run("run", writeJob(t, dir, "job.yaml", job), "--out", out, "-q", "--convergence"); err != nil {
		t.Fatal(err)
	}
	if h.calls != 3 {
		t.Errorf("%d solver calls, want one per level", h.calls)
	}
	top, _ := readResult(t, out)
	var conv report.Convergence
	if err := json.Unmarshal(top["convergence"], &conv); err != nil {
		t.Fatal(err)
	}
	if len(conv.Levels) != 3 || conv.OrderAssumed || !(conv.Levels[0].MeshH > conv.Levels[1].MeshH && conv.Levels[1].MeshH > conv.Levels[2].MeshH) ||
		conv.Levels[2].Triangles[0] <= conv.Levels[0].Triangles[0] {
		t.Fatalf("levels %+v", conv.Levels)
	}
	// The stand-in's energy is -(1 + 0.1 h²)/g³ exactly, with the h the
	// levels report, so the extrapolation is -1/g³ and the order 2.
	// Tolerance 1e-6: the gaps of the levels differ by OffsetForGap's
	// bisection (1e-12), the rest is rounding.
	for i, cp := range conv.Points {
		g := float64(cp.Gap)
		want := scatter.Unit(1e-6).Joules(-1 / (g * g * g))
		if math.Abs(float64(cp.ExtrapolatedEnergyJ)/want-1) > 1e-6 || math.Abs(float64(cp.EnergyOrder)-2) > 1e-6 || len(cp.EnergyJ) != 3 {
			t.Errorf("point %d: %+v, want extrapolated %g", i, cp, want)
		}
	}
	for _, w := range []string{"Mesh convergence, 3 levels", "extrapolated", "order p", "level 3 (mesh sizes x 0.5)"} {
		if !strings.Contains(h.stdout.String(), w) {
			t.Errorf("output lacks %q:\n%s", w, h.stdout.String())
		}
	}

	h = newHarness(t)
	h.physics()
	if err := h.run("run", writeJob(t, dir, "job.yaml", job), "--out", out, "-q", "--convergence", "--levels", "2"); err != nil {
		t.Fatal(err)
	}
	top, _ = readResult(t, out)
	if err := json.Unmarshal(top["convergence"], &conv); err != nil || !conv.OrderAssumed || len(conv.Levels) != 2 || !strings.Contains(conv.Note, "assumed") {
		t.Errorf("two levels: %+v, %v", conv, err)
	}

	// With a spring: the sticking analysis runs on the finest level, and
	// its extra points are not part of the study.
	h = newHarness(t)
	h.physics()
	if err := h.run("run", writeJob(t, dir, "spring.yaml", springJob), "--out", out, "-q", "--convergence", "--levels", "2"); err != nil {
		t.Fatal(err)
	}
	top, points := readResult(t, out)
	var conv2 report.Convergence
	if err := json.Unmarshal(top["convergence"], &conv2); err != nil || len(conv2.Points) != 5 || len(points) <= 5 || top["sticking"] == nil {
		t.Errorf("convergence with a spring: %d study points, %d points, %v", len(conv2.Points), len(points), err)
	}
}

func TestRunForcesBadInput(t *testing.T) {
	cases := []struct {
		name string
		job  string
		args []string
		want []string
	}{
		{name: "spring without rest gap", job: strings.Replace(springJob, ", rest_gap: 1.5}", "}", 1),
			want: []string{"job.yaml:14:", "spring.rest_gap: missing", "no rest position"}},
		{name: "non-positive stiffness", job: strings.Replace(springJob, "stiffness: 1e-4", "stiffness: -2", 1),
			want: []string{"job.yaml:14:", "spring.stiffness: must be greater than zero, got -2"}},
		{name: "rest gap outside the sweep", job: strings.Replace(springJob, "rest_gap: 1.5", "rest_gap: 4", 1),
			want: []string{"job.yaml:14:", "rest gap 4 um lies outside the sweep's range 0.5 to 2 um"}},
		{name: "rest gap outside the offsets' gaps", job: strings.Replace(springJob, "  gaps: [0.5, 0.75, 1, 1.5, 2]\n", "  offsets: [-1, -0.5]\n", 1),
			want: []string{"job.yaml:14:", "spring.rest_gap: rest gap 1.5 um lies outside the gaps of the sweep's offsets"}},
		{name: "body crossing the substrate", job: strings.Replace(substrateJob, "  gaps: [60, 100]\n", "  offsets: [0, 450]\n", 1),
			want: []string{"job.yaml:11:", `body "ball" crosses the substrate at sweep point 2 (offset 450 nm)`}},
		{name: "angles moving away", job: strings.Replace(tiltJob, "axis: [0, 1, 0], point: [0, 0, 1]", "axis: [0, -1, 0], point: [-1, 0, 1]", 1),
			want: []string{"the gap does not shrink as the angle grows", "flip the axis"}},
		{name: "pfa-only and convergence", job: springJob, args: []string{"--pfa-only", "--convergence"},
			want: []string{"--pfa-only and --convergence: choose one"}},
		{name: "four levels", job: springJob, args: []string{"--convergence", "--levels", "4"},
			want: []string{"--levels 4"}},
		{name: "convergence of files", job: "unit: um\nbodies:\n  - {name: cube, file: FIXTURES/cube.stl, position: [0, 0, 3]}\n  - {name: pad, file: FIXTURES/pad.stl}\nsweep: {body: cube, direction: [0, 0, -1], gaps: [1]}\n", args: []string{"--convergence"},
			want: []string{"--convergence: every body is an STL file", "graded mesh sizes"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			h := newHarness(t)
			dir := t.TempDir()
			path := writeJob(t, dir, "job.yaml", c.job)
			out := filepath.Join(dir, "out")
			err := h.run(append([]string{"run", path, "--out", out}, c.args...)...)
			checkFailure(t, err, c.want)
			noResults(t, out)
		})
	}
}

// TestRealSolver runs the real solver on a small scene — a coarse sphere
// over a coarse plate at two gaps, forces on, a spring — and checks the
// signs that hold for perfect conductors: the force pulls the sphere
// towards the plate (F·ê > 0 along the approach direction) and grows as
// the gap closes (stiffness -d(F·ê)/ds < 0), and the energy is negative.
// The meshes (20 and 32 triangles) are far too coarse for accurate numbers.
func TestRealSolver(t *testing.T) {
	const job = `unit: um
bodies:
  - name: ball
    shape: {sphere: {radius: 1}}
    mesh_size: 1.1
    position: [0, 0, 4]
  - name: pad
    shape: {plate: {width: 3, depth: 3, thickness: 0.5}}
    mesh_size: 1.5
sweep:
  body: ball
  direction: [0, 0, -1]
  gaps: [1.5, 2]
spring: {stiffness: 1e-7, unit: N/m, rest_gap: 2}
`
	a := newApp(&strings.Builder{}, &strings.Builder{}, false)
	var stdout strings.Builder
	a.stdout = &stdout
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	root := a.rootCommand()
	root.SetArgs([]string{"run", writeJob(t, dir, "job.yaml", job), "--out", out, "-q", "--sticking-rounds", "0"})
	if err := root.ExecuteContext(context.Background()); err != nil {
		t.Fatal(err)
	}
	top, points := readResult(t, out)
	if len(points) != 2 {
		t.Fatalf("%d points", len(points))
	}
	for i, p := range points {
		if f := p["force_along_N"].(float64); !(f > 0) {
			t.Errorf("point %d: force along the approach %g N, want an attraction", i, f)
		}
		if k := p["stiffness_N_per_m"].(float64); !(k < 0) {
			t.Errorf("point %d: stiffness %g N/m, want negative", i, k)
		}
		if e := p["energy_J"].(float64); !(e < 0) {
			t.Errorf("point %d: energy %g J", i, e)
		}
	}
	if points[0]["force_along_N"].(float64) <= points[1]["force_along_N"].(float64) {
		t.Errorf("the force does not grow as the gap closes: %v, %v", points[0]["force_along_N"], points[1]["force_along_N"])
	}
	if _, ok := top["sticking"]; !ok {
		t.Error("no sticking section")
	}
	t.Logf("\n%s", stdout.String())
}

func TestMeshInfoNear(t *testing.T) {
	dir := t.TempDir()
	ball := filepath.Join(dir, "ball.stl")
	h := newHarness(t)
	if err := h.run("mesh", "make", "sphere", "--radius", "1", "--mesh-size", "0.7", "-o", ball); err != nil {
		t.Fatal(err)
	}
	pad := filepath.Join(fixtureDir, "pad.stl")
	// pad.stl's cells of 0.5 (diagonals 0.71) are too coarse at a gap of
	// 0.5 and fine at 2 (rule of thumb, common practice: h ≤ gap/2).
	h = newHarness(t)
	if err := h.run("mesh", "info", pad, "--unit", "um", "--near", ball, "--gap", "0.5"); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(h.stdout.String(), "0.5 um") || !strings.Contains(h.stderr.String(), "warning: ") ||
		!strings.Contains(h.stderr.String(), "refine with mesh_size {near: 0.25") {
		t.Errorf("stdout:\n%s\nstderr:\n%s", h.stdout.String(), h.stderr.String())
	}
	h = newHarness(t)
	if err := h.run("mesh", "info", pad, "--unit", "um", "--near", ball, "--gap", "2"); err != nil {
		t.Fatal(err)
	}
	if h.stderr.Len() != 0 || !strings.Contains(h.stdout.String(), "no triangle larger than half the local gap") {
		t.Errorf("stdout:\n%s\nstderr:\n%s", h.stdout.String(), h.stderr.String())
	}
	// As placed in the files, the ball sits inside the pad.
	h = newHarness(t)
	checkFailure(t, h.run("mesh", "info", pad, "--unit", "um", "--near", ball), []string{"touch or overlap as placed"})
	h = newHarness(t)
	checkFailure(t, h.run("mesh", "info", pad, "--unit", "um", "--gap", "1"), []string{"--gap needs --near"})
}

// TestRunStickingFails checks that a sticking analysis that cannot be done
// (here a repulsion, which a stand-in makes up) keeps the computed points:
// they are written and the run fails with a message that says so.
func TestRunStickingFails(t *testing.T) {
	h := newHarness(t)
	h.physics()
	attract := h.app.energies
	h.app.energies = func(ctx context.Context, b []scatter.Body, sw scatter.Sweep, set scatter.Settings) ([]scatter.Point, error) {
		ps, err := attract(ctx, b, sw, set)
		for i := range ps {
			ps[i].Force = r3.Scale(-1, ps[i].Force)
		}
		return ps, err
	}
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	err := h.run("run", writeJob(t, dir, "job.yaml", springJob), "--out", out, "-q")
	checkFailure(t, err, []string{"the points are written, but without a sticking verdict", "a repulsion", "gap 0.5 um"})
	if top, points := readResult(t, out); len(points) != 5 || top["sticking"] != nil {
		t.Errorf("%d points, sticking %s", len(points), top["sticking"])
	}
}
