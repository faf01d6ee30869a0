package report

import (
	"bytes"
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
	lines := strings.Split(strings.TrimSpace(cs.String()), "\n")
	if len(lines) != 3 || lines[0] != "gap_nm,offset_x_nm,offset_y_nm,offset_z_nm,energy_J,energy_error_J,pfa_energy_J,pfa_moving_J,pfa_fixed_J,ratio_pfa" {
		t.Errorf("csv:\n%s", cs.String())
	}
	if !strings.HasPrefix(lines[2], "1,0,0,1,") || !strings.HasSuffix(lines[2], ",0,0,0,") || !strings.HasSuffix(lines[1], ",0.8") {
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
