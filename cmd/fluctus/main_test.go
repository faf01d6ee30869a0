package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/cmd/internal/job"
	"github.com/fluctus/fluctus/cmd/internal/report"
	"github.com/fluctus/fluctus/mesh"
	"github.com/fluctus/fluctus/scatter"
)

// harness runs the command tree in-process with a stand-in solver.
type harness struct {
	t              *testing.T
	app            *app
	stdout, stderr bytes.Buffer

	mu     sync.Mutex
	calls  int
	sweep  scatter.Sweep
	bodies []scatter.Body
	set    scatter.Settings
}

// newHarness returns a harness whose solver fails the test if it is called
// and whose machine has 1 TiB of available memory.
func newHarness(t *testing.T) *harness {
	h := &harness{t: t}
	h.app = newApp(&h.stdout, &h.stderr, false)
	h.app.memAvailable = func() (int64, error) { return 1 << 40, nil }
	h.app.energies = func(ctx context.Context, b []scatter.Body, sw scatter.Sweep, set scatter.Settings) ([]scatter.Point, error) {
		h.record(b, sw, set)
		t.Error("the solver was called")
		return nil, errors.New("the solver must not be called in this test")
	}
	return h
}

func (h *harness) record(b []scatter.Body, sw scatter.Sweep, set scatter.Settings) {
	h.mu.Lock()
	defer h.mu.Unlock()
	h.calls++
	h.bodies, h.sweep, h.set = b, sw, set
}

// solve makes the stand-in solver return fakePoints.
func (h *harness) solve() {
	h.app.energies = func(ctx context.Context, b []scatter.Body, sw scatter.Sweep, set scatter.Settings) ([]scatter.Point, error) {
		h.record(b, sw, set)
		if set.Progress != nil {
			for i := range sw.Offsets {
				set.Progress(i+1, len(sw.Offsets))
			}
		}
		return fakePoints(sw), nil
	}
}

// fakePoints returns invented numbers (test data, not physics):
// E = -1/d² ħc/L0 with d = 1 + point index, error 1e-3 |E|, PFA estimates
// 1.2 E and 0.8 E with mean E/0.8 (so E/PFA = 0.8), two integrand samples.
func fakePoints(sw scatter.Sweep) []scatter.Point {
	var ps []scatter.Point
	for i, off := range sw.Offsets {
		d := 1 + float64(i)
		e := -1 / (d * d)
		ps = append(ps, scatter.Point{
			Offset: off, Gap: d, Energy: e, EnergyError: 1e-3 * math.Abs(e),
			PFA:     scatter.PFA{FromMoving: 1.2 * e, FromFixed: 0.8 * e, Mean: e / 0.8},
			Samples: []scatter.Sample{{Kappa: 0.5, Value: -0.1}, {Kappa: 2, Value: -0.01}},
		})
	}
	return ps
}

// run executes fluctus with args and returns the error it would exit with.
func (h *harness) run(args ...string) error {
	root := h.app.rootCommand()
	root.SetArgs(args)
	return root.ExecuteContext(context.Background())
}

// writeJob writes a job file into dir; "FIXTURES/" in src stands for the
// absolute path of testdata/jobs.
func writeJob(t *testing.T, dir, name, src string) string {
	t.Helper()
	abs, err := filepath.Abs(fixtureDir)
	if err != nil {
		t.Fatal(err)
	}
	src = strings.ReplaceAll(src, "FIXTURES/", filepath.ToSlash(abs)+"/")
	path := filepath.Join(dir, name)
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// noResults fails the test if dir holds a result file or a leftover
// temporary file.
func noResults(t *testing.T, dir string) {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if errors.Is(err, os.ErrNotExist) {
		return
	}
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		t.Errorf("output directory holds %s after a failed run", e.Name())
	}
}

// A sphere of radius 1 (mesh size 0.7: 80 triangles) above a plate.
const spherePlate = `unit: um
bodies:
  - name: ball
    shape: {sphere: {radius: 1}}
    mesh_size: 0.7
    position: [0, 0, 2]
  - name: pad
    shape: {plate: {width: 3, depth: 3, thickness: 0.5}}
    mesh_size: 1
sweep:
  body: ball
  direction: [0, 0, -1]
  gaps: [2, 1]
`

// fileBody is a job with a sphere and a body read from FILE.
const fileBody = `unit: um
bodies:
  - name: ball
    shape: {sphere: {radius: 1}}
    mesh_size: 0.7
    position: [0, 0, 5]
  - name: part
    file: FILE
sweep:
  body: ball
  direction: [0, 0, -1]
  gaps: [1]
`

func withFile(name string) string {
	return strings.Replace(fileBody, "FILE", "FIXTURES/"+name, 1)
}

func TestRunBadInput(t *testing.T) {
	cases := []struct {
		name string
		job  string   // job file content
		args []string // extra arguments
		est  *scatter.Cost
		want []string // substrings of the one-line error
	}{
		{name: "missing STL", job: withFile("missing.stl"),
			want: []string{"job.yaml:7:", `body "part"`, "missing.stl", "no such file"}},
		{name: "truncated STL", job: withFile("truncated.stl"),
			want: []string{"job.yaml:7:", "truncated.stl", "truncated"}},
		{name: "wrong triangle count", job: withFile("wrongcount.stl"),
			want: []string{"job.yaml:7:", "wrongcount.stl", "declares 13 triangles"}},
		{name: "open mesh", job: withFile("open.stl"),
			want: []string{"job.yaml:7:", `body "part"`, "open.stl", "open edge"}},
		{name: "non-manifold mesh", job: withFile("nonmanifold.stl"),
			want: []string{"job.yaml:7:", "nonmanifold.stl", "non-manifold edge"}},
		{name: "overlap at a sweep point", job: `unit: um
bodies:
  - name: a
    shape: {sphere: {radius: 1}}
    mesh_size: 0.7
  - name: b
    shape: {sphere: {radius: 1}}
    mesh_size: 0.7
    position: [0, 0, 3]
sweep:
  body: a
  direction: [0, 0, 1]
  offsets: [0, 1.5]
`, want: []string{"job.yaml:13:", "sweep point 2 (offset 1.5 um)", `bodies "a" and "b" touch or overlap`}},
		{name: "touching at a sweep point", job: `unit: mm
bodies:
  - name: a
    shape: {box: {size: [1, 1, 1]}}
    mesh_size: 0.5
  - name: b
    shape: {box: {size: [1, 1, 1]}}
    mesh_size: 0.5
    position: [0, 0, 1]
sweep:
  body: b
  direction: [0, 0, 1]
  offsets:
    - 1
    - 0
`, want: []string{"job.yaml:15:", "sweep point 2 (offset 0 mm)", `bodies "b" and "a" touch or overlap`}},
		{name: "one body inside the other", job: `unit: nm
bodies:
  - name: shell
    shape: {sphere: {radius: 10}}
    mesh_size: 8
  - name: core
    shape: {sphere: {radius: 1}}
    mesh_size: 1
sweep:
  body: core
  direction: [1, 0, 0]
  offsets: [0]
`, want: []string{"sweep point 1 (offset 0 nm)", `bodies "core" and "shell" overlap (one lies inside the other)`}},
		{name: "fixed bodies overlap", job: `unit: um
bodies:
  - name: a
    shape: {sphere: {radius: 1}}
    mesh_size: 0.7
  - name: b
    shape: {sphere: {radius: 1}}
    mesh_size: 0.7
    position: [5, 0, 0]
  - name: c
    shape: {sphere: {radius: 1}}
    mesh_size: 0.7
    position: [5.5, 0, 0]
sweep:
  body: a
  direction: [0, 0, 1]
  offsets: [0]
`, want: []string{"job.yaml:10:", "the fixed bodies", `"b" and "c"`}},
		{name: "zero gap", job: strings.Replace(spherePlate, "gaps: [2, 1]", "gaps: [2, 0]", 1),
			want: []string{"job.yaml:13:", "sweep.gaps[1]: gap 0: must be greater than zero"}},
		{name: "negative gap", job: strings.Replace(spherePlate, "gaps: [2, 1]", "gaps: [-0.1]", 1),
			want: []string{"job.yaml:13:", "sweep.gaps[0]: gap -0.1: must be greater than zero"}},
		{name: "missing unit", job: strings.Replace(spherePlate, "unit: um\n", "", 1),
			want: []string{"job.yaml:1:", "unit: missing"}},
		{name: "unknown key", job: strings.Replace(spherePlate, "    mesh_size: 1\n", "    mesh_size: 1\n    roughness: 1\n", 1),
			want: []string{"job.yaml:10:", `unknown key "roughness" in bodies[1]`}},
		{name: "does not fit in memory", job: spherePlate, est: &scatter.Cost{Unknowns: 40000, MatrixBytes: 3 * 8 * 40000 * 40000},
			args: []string{"--memory-limit", "1000000000"},
			want: []string{"refusing to start", "40000 unknowns need 35.8 GiB", "only 953.7 MiB is available (--memory-limit)"}},
		{name: "does not fit in available memory", job: spherePlate, est: &scatter.Cost{Unknowns: 100, MatrixBytes: 2 << 40},
			want: []string{"refusing to start", "need 2.0 TiB", "1.0 TiB is available (MemAvailable in /proc/meminfo)"}},
		{name: "negative threads", job: spherePlate, args: []string{"--threads", "-2"},
			want: []string{"--threads -2"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			h := newHarness(t)
			if c.est != nil {
				cost := *c.est
				h.app.estimate = func([]scatter.Body) scatter.Cost { return cost }
			}
			dir := t.TempDir()
			path := writeJob(t, dir, "job.yaml", c.job)
			out := filepath.Join(dir, "out")
			err := h.run(append([]string{"run", path, "--out", out}, c.args...)...)
			checkFailure(t, err, c.want)
			noResults(t, out)
			if h.calls != 0 {
				t.Errorf("the solver was called %d times", h.calls)
			}
		})
	}
}

// checkFailure checks that err is a one-line error holding every wanted
// substring and that the program would exit with status 1.
func checkFailure(t *testing.T, err error, want []string) {
	t.Helper()
	if err == nil {
		t.Fatal("no error")
	}
	var line bytes.Buffer
	if code := exit(&line, err); code != 1 {
		t.Errorf("exit status %d, want 1", code)
	}
	msg := line.String()
	if strings.Count(msg, "\n") != 1 || !strings.HasPrefix(msg, "fluctus: ") {
		t.Errorf("error is not one line: %q", msg)
	}
	for _, w := range want {
		if !strings.Contains(msg, w) {
			t.Errorf("error lacks %q: %s", w, msg)
		}
	}
}

// TestRunMemoryLimitFlag checks the hidden --memory-limit flag against the
// solver's own estimate.
func TestRunMemoryLimitFlag(t *testing.T) {
	h := newHarness(t)
	dir := t.TempDir()
	path := writeJob(t, dir, "job.yaml", spherePlate)
	j, err := job.Load(path)
	if err != nil {
		t.Fatal(err)
	}
	s, err := j.Build()
	if err != nil {
		t.Fatal(err)
	}
	cost := scatter.Estimate(s.Bodies)
	if cost.MatrixBytes == 0 {
		t.Skip("scatter.Estimate returns no memory estimate yet")
	}
	err = h.run("run", path, "--out", filepath.Join(dir, "out"), "--memory-limit", "1")
	checkFailure(t, err, []string{"refusing to start", "1 B is available (--memory-limit)"})
	if !strings.Contains(h.stdout.String(), "unknowns") {
		t.Errorf("the estimate was not printed before refusing: %q", h.stdout.String())
	}
	noResults(t, filepath.Join(dir, "out"))
}

func TestRunMissingJobFile(t *testing.T) {
	h := newHarness(t)
	err := h.run("run", filepath.Join(t.TempDir(), "nothing.yaml"))
	checkFailure(t, err, []string{"reading job file", "nothing.yaml"})
	err = h.run("run")
	checkFailure(t, err, []string{"accepts 1 arg(s), received 0"})
}

func TestRunWritesResults(t *testing.T) {
	h := newHarness(t)
	h.solve()
	h.app.showProgress = true // the bar writes to the stderr buffer
	dir := t.TempDir()
	path := writeJob(t, dir, "plate.yaml", spherePlate)
	if err := h.run("run", path, "--threads", "3"); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "plate.out") // the default: next to the job file
	if h.calls != 1 {
		t.Fatalf("solver called %d times", h.calls)
	}
	if h.set.Threads != 3 || h.set.Accuracy != job.DefaultAccuracy || h.set.ThermalWavenumber != 0 || h.set.Progress == nil {
		t.Errorf("settings %+v", h.set)
	}

	// The gap sweep: the ball moves along -z to offsets that leave the
	// requested closest distances to the pad (mesh.Gap is exact for the
	// meshes; OffsetForGap bisects to 1e-12 relative, so 1e-9 is ample).
	if len(h.sweep.Offsets) != 2 || h.sweep.Body != 0 || h.sweep.Direction != (r3.Vec{Z: -1}) {
		t.Fatalf("sweep %+v", h.sweep)
	}
	for i, want := range []float64{2, 1} {
		off := h.sweep.Offsets[i]
		if off.X != 0 || off.Y != 0 {
			t.Errorf("offset %d = %v is not along the direction", i, off)
		}
		// The ball starts above the pad and approaches it moving down: it
		// stays above, its centre at 0.25 + gap + radius 1.
		if z := 2 + off.Z; math.Abs(z-(1.25+want)) > 1e-9 {
			t.Errorf("point %d: ball centre at z = %g, want %g", i, z, 1.25+want)
		}
		d, _, _ := mesh.Gap(h.bodies[0].Mesh.Translate(off), h.bodies[1].Mesh)
		if math.Abs(d-want) > 1e-9 {
			t.Errorf("point %d: gap %.12g, want %g", i, d, want)
		}
	}

	stdout := h.stdout.String()
	flat := strings.Join(strings.Fields(stdout), " ")
	for _, w := range []string{"2 bodies, 2 sweep points", "gap [um]", "energy [J]", "E/PFA", "0.8000", "Results are idealised", "qualification practice", "result.json"} {
		if !strings.Contains(flat, w) {
			t.Errorf("output lacks %q:\n%s", w, stdout)
		}
	}

	data, err := os.ReadFile(filepath.Join(out, report.JSONName))
	if err != nil {
		t.Fatal(err)
	}
	var res struct {
		Notice       string  `json:"notice"`
		Unit         string  `json:"unit"`
		Unknowns     *int    `json:"unknowns"`
		TemperatureK float64 `json:"temperature_K"`
		Accuracy     float64 `json:"accuracy"`
		Bodies       []struct {
			Name      string `json:"name"`
			Source    string `json:"source"`
			Triangles int    `json:"triangles"`
			Unknowns  int    `json:"unknowns"`
		} `json:"bodies"`
		Points []map[string]json.RawMessage `json:"points"`
	}
	if err := json.Unmarshal(data, &res); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(res.Notice, "idealised") || res.Unit != "um" || res.Unknowns == nil || res.Accuracy != 1e-3 {
		t.Errorf("result header %+v", res)
	}
	if len(res.Bodies) != 2 || res.Bodies[0].Name != "ball" || res.Bodies[0].Source != "sphere radius 1 mesh_size 0.7" ||
		res.Bodies[0].Triangles == 0 || res.Bodies[0].Unknowns != 3*res.Bodies[0].Triangles/2 {
		t.Errorf("bodies %+v", res.Bodies)
	}
	if len(res.Points) != 2 {
		t.Fatalf("%d points", len(res.Points))
	}
	for _, k := range []string{"gap", "offset", "energy_J", "energy_error_J", "pfa_energy_J", "pfa_moving_J", "pfa_fixed_J", "ratio_pfa", "samples"} {
		if _, ok := res.Points[0][k]; !ok {
			t.Errorf("point lacks %q", k)
		}
	}
	var energy float64
	json.Unmarshal(res.Points[1]["energy_J"], &energy)
	// Point 2 of fakePoints has E = -1/4 ħc/L0; with ħc = 3.161526773e-26 J m
	// (CODATA 2018, exact SI constants, given to 10 digits) and L0 = 1 um that
	// is -7.9038169325e-21 J. Tolerance 1e-9: the rounding of that ħc.
	if want := -0.25 * 3.161526773e-26 / 1e-6; math.Abs(energy/want-1) > 1e-9 {
		t.Errorf("energy_J %g, want %g", energy, want)
	}
	var samples []map[string]float64
	json.Unmarshal(res.Points[0]["samples"], &samples)
	if len(samples) != 2 || samples[1]["kappa_per_unit"] != 2 || samples[1]["integrand"] != -0.01 {
		t.Errorf("samples %v", samples)
	}

	f, err := os.Open(filepath.Join(out, report.CSVName))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 3 || strings.Join(rows[0], ",") != strings.Join(report.CSVHeader("um"), ",") {
		t.Errorf("csv %v", rows)
	}
}

// TestRunFailureRemovesStaleResults checks the documented policy: results of
// an earlier run are removed once the computation starts, and a failed
// computation leaves none.
func TestRunFailureRemovesStaleResults(t *testing.T) {
	h := newHarness(t)
	h.solve()
	dir := t.TempDir()
	path := writeJob(t, dir, "job.yaml", spherePlate)
	out := filepath.Join(dir, "out")
	if err := h.run("run", path, "--out", out); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(out, report.JSONName)); err != nil {
		t.Fatal(err)
	}

	// A job that fails its checks leaves the earlier results alone.
	bad := writeJob(t, dir, "bad.yaml", strings.Replace(spherePlate, "gaps: [2, 1]", "gaps: [0]", 1))
	if err := h.run("run", bad, "--out", out); err == nil {
		t.Fatal("no error for a bad job")
	}
	if _, err := os.Stat(filepath.Join(out, report.CSVName)); err != nil {
		t.Errorf("a job that failed its checks removed the earlier results: %v", err)
	}

	// A computation that fails removes them and writes nothing.
	h.app.energies = func(context.Context, []scatter.Body, scatter.Sweep, scatter.Settings) ([]scatter.Point, error) {
		return nil, errors.New("matrix not positive definite at κ = 40")
	}
	err := h.run("run", path, "--out", out)
	checkFailure(t, err, []string{"computing the energies: matrix not positive definite"})
	noResults(t, out)
}

func TestRunInterrupted(t *testing.T) {
	h := newHarness(t)
	ctx, cancel := context.WithCancel(context.Background())
	h.app.energies = func(ctx context.Context, b []scatter.Body, sw scatter.Sweep, set scatter.Settings) ([]scatter.Point, error) {
		cancel() // as Ctrl-C would, through signal.NotifyContext
		<-ctx.Done()
		return nil, ctx.Err()
	}
	dir := t.TempDir()
	path := writeJob(t, dir, "job.yaml", spherePlate)
	out := filepath.Join(dir, "out")
	root := h.app.rootCommand()
	root.SetArgs([]string{"run", path, "--out", out, "--quiet"})
	err := root.ExecuteContext(ctx)
	if err == nil || !strings.Contains(err.Error(), "interrupted, no results written") {
		t.Fatalf("error %v", err)
	}
	var line bytes.Buffer
	if code := exit(&line, err); code != 130 {
		t.Errorf("exit status %d, want 130", code)
	}
	noResults(t, out)
}

func TestRunExample(t *testing.T) {
	// The example the README runs: a sphere over the tilted pad.stl.
	h := newHarness(t)
	h.solve()
	out := t.TempDir()
	if err := h.run("run", filepath.Join(fixtureDir, "example.yaml"), "--out", out, "-q"); err != nil {
		t.Fatal(err)
	}
	if len(h.sweep.Offsets) != 2 || h.bodies[1].Name != "pad" {
		t.Fatalf("sweep %+v", h.sweep)
	}
	// The pad (4 × 4 × 0.5) is turned by 10° about y, so its largest x is
	// 2 cos 10° + 0.25 sin 10°. Tolerance 1e-6: pad.stl stores float32
	// coordinates (relative rounding 6e-8).
	pad := h.bodies[1].Mesh
	st := pad.Stats()
	if math.Abs(st.Max.X-(2*math.Cos(10*math.Pi/180)+0.25*math.Sin(10*math.Pi/180))) > 1e-6 {
		t.Errorf("pad bounding box %v..%v does not show the 10° turn", st.Min, st.Max)
	}
	if _, err := os.Stat(filepath.Join(out, report.JSONName)); err != nil {
		t.Error(err)
	}
}

func TestDemo(t *testing.T) {
	h := newHarness(t)
	h.physics()
	out := filepath.Join(t.TempDir(), "demo")
	// The stand-in's force is far weaker than the demo's spring, so the
	// analysis would ask for points below the sweep; none are computed here.
	if err := h.run("demo", "--out", out, "--sticking-rounds", "0"); err != nil {
		t.Fatal(err)
	}
	if len(h.sweep.Offsets) != 3 || len(h.bodies) != 2 || !h.set.Forces || !h.set.Stiffness {
		t.Fatalf("demo sweep %+v, settings %+v", h.sweep, h.set)
	}
	if !strings.Contains(h.stdout.String(), "Sticking analysis (k = 0.0005 N/m, rest gap 20 nm") {
		t.Errorf("the demo prints no sticking verdict:\n%s", h.stdout.String())
	}
	// Keep the demo coarse: a few hundred triangles per body.
	for _, b := range h.bodies {
		if n := len(b.Mesh.Triangles); n > 600 {
			t.Errorf("demo body %s has %d triangles", b.Name, n)
		}
	}
	if strings.Contains(h.stderr.String(), "warning") {
		t.Errorf("the demo warns: %s", h.stderr.String())
	}
	for _, name := range []string{report.JSONName, report.CSVName} {
		if _, err := os.Stat(filepath.Join(out, name)); err != nil {
			t.Error(err)
		}
	}

	h = newHarness(t)
	if err := h.run("demo", "--print-job"); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(h.stdout.Bytes(), demoJob) {
		t.Error("--print-job does not print the demo job")
	}
}

func TestVersion(t *testing.T) {
	h := newHarness(t)
	if err := h.run("--version"); err != nil {
		t.Fatal(err)
	}
	if got := h.stdout.String(); got != "fluctus version "+version+"\n" {
		t.Errorf("--version printed %q", got)
	}
}

func TestMeshInfo(t *testing.T) {
	cases := []struct {
		name    string
		args    []string
		ok      bool
		stdout  []string
		errWant []string
	}{
		{"closed ASCII cube", []string{"cube.stl", "--unit", "mm"}, true,
			[]string{"triangles          12", "area               6 mm²", "volume             1 mm³", "problems           none"}, nil},
		{"binary plate", []string{"pad.stl", "--unit", "um"}, true,
			[]string{"triangles          320", "bounding box       (-2, -2, -0.25) to (2, 2, 0.25) um"}, nil},
		{"open", []string{"open.stl", "--unit", "um"}, false,
			[]string{"triangles          11", "open edge"}, []string{"open.stl: the mesh has problems"}},
		{"non-manifold", []string{"nonmanifold.stl", "--unit", "um"}, false,
			[]string{"non-manifold edge"}, []string{"the mesh has problems"}},
		{"truncated", []string{"truncated.stl", "--unit", "um"}, false, nil, []string{"truncated.stl", "truncated"}},
		{"wrong count", []string{"wrongcount.stl", "--unit", "um"}, false, nil, []string{"declares 13 triangles"}},
		{"missing", []string{"missing.stl", "--unit", "um"}, false, nil, []string{"missing.stl", "no such file"}},
		{"no unit", []string{"cube.stl"}, false, nil, []string{`required flag(s) "unit" not set`}},
		{"bad unit", []string{"cube.stl", "--unit", "ft"}, false, nil, []string{`--unit: unknown length unit "ft"`}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			h := newHarness(t)
			args := append([]string{"mesh", "info", filepath.Join(fixtureDir, c.args[0])}, c.args[1:]...)
			err := h.run(args...)
			if c.ok && err != nil {
				t.Fatal(err)
			}
			if !c.ok {
				checkFailure(t, err, c.errWant)
			}
			for _, w := range c.stdout {
				if !strings.Contains(h.stdout.String(), w) {
					t.Errorf("output lacks %q:\n%s", w, h.stdout.String())
				}
			}
		})
	}
}

func TestMeshMake(t *testing.T) {
	cases := []struct {
		name      string
		args      []string
		triangles int    // expected count (0: an error is expected)
		err       string // substring of the error
	}{
		// Icosphere: 20 n² triangles; edges ≤ 0.7 on radius 1 need n = 2.
		{"sphere", []string{"sphere", "--radius", "1", "--mesh-size", "0.7"}, 80, ""},
		// Box 1×2×3 with cells ≤ 1: 1×2×3 cells, 4 (1·2 + 2·3 + 3·1) = 44 triangles.
		{"box", []string{"box", "--size", "1,2,3", "--mesh-size", "1"}, 44, ""},
		{"plate", []string{"plate", "--width", "4", "--depth", "4", "--thickness", "0.5", "--mesh-size", "0.5"}, 320, ""},
		{"cylinder", []string{"cylinder", "--radius", "1", "--height", "2", "--mesh-size", "0.5"}, -1, ""},
		{"wrong flag", []string{"sphere", "--radius", "1", "--height", "2", "--mesh-size", "0.5"}, 0, "--height does not apply to a sphere (it needs --radius)"},
		{"missing flag", []string{"plate", "--width", "4", "--thickness", "0.5", "--mesh-size", "0.5"}, 0, "a plate needs --depth (it needs --width, --depth and --thickness)"},
		{"short size", []string{"box", "--size", "1,2", "--mesh-size", "1"}, 0, "--size wants three side lengths"},
		{"bad radius", []string{"sphere", "--radius", "-1", "--mesh-size", "1"}, 0, "radius"},
		{"unknown shape", []string{"cone", "--mesh-size", "1"}, 0, `unknown shape "cone"`},
		{"no mesh size", []string{"sphere", "--radius", "1"}, 0, `"mesh-size" not set`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			h := newHarness(t)
			path := filepath.Join(t.TempDir(), "shape.stl")
			err := h.run(append(append([]string{"mesh", "make"}, c.args...), "-o", path)...)
			if c.triangles == 0 {
				checkFailure(t, err, []string{c.err})
				if _, err := os.Stat(path); err == nil {
					t.Error("a file was written")
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			m, err := mesh.Load(path)
			if err != nil {
				t.Fatal(err)
			}
			if err := m.Validate(); err != nil {
				t.Error(err)
			}
			if c.triangles > 0 && len(m.Triangles) != c.triangles {
				t.Errorf("%d triangles, want %d", len(m.Triangles), c.triangles)
			}
			if !strings.Contains(h.stdout.String(), "wrote "+path) {
				t.Errorf("output %q", h.stdout.String())
			}
		})
	}
}
