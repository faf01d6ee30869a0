package job

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// valid is a complete job used as the base of the error cases below.
const valid = `unit: um
temperature: 4.2
accuracy: 1e-4
bodies:
  - name: ball
    shape: {sphere: {radius: 1}}
    mesh_size: 0.2
    position: [0, 0, 0]
  - name: pad
    file: pad.stl
    position: [0, 0, 3]
    rotation: {axis: [0, 1, 0], degrees: 10}
sweep:
  body: ball
  direction: [0, 0, 2]
  gaps: [0.5, 1, 2]
`

func TestDecodeValid(t *testing.T) {
	j, err := Decode(filepath.Join("jobs", "plate.yaml"), []byte(valid))
	if err != nil {
		t.Fatal(err)
	}
	if j.Name != "plate" || j.Dir != "jobs" {
		t.Errorf("name %q dir %q, want plate, jobs", j.Name, j.Dir)
	}
	if j.Unit != 1e-6 || j.Temperature != 4.2 || j.Accuracy != 1e-4 {
		t.Errorf("unit %v temperature %v accuracy %v", j.Unit, j.Temperature, j.Accuracy)
	}
	if len(j.Bodies) != 2 {
		t.Fatalf("%d bodies, want 2", len(j.Bodies))
	}
	ball, pad := j.Bodies[0], j.Bodies[1]
	if ball.Shape == nil || ball.Shape.Kind != Sphere || ball.Shape.Radius != 1 || ball.MeshSize != 0.2 || ball.Line != 5 {
		t.Errorf("ball = %+v shape %+v", ball, ball.Shape)
	}
	if pad.File != filepath.Join("jobs", "pad.stl") || pad.Position != (r3.Vec{Z: 3}) || pad.Line != 9 {
		t.Errorf("pad = %+v", pad)
	}
	if pad.Rotation == nil || pad.Rotation.Axis != (r3.Vec{Y: 1}) || pad.Rotation.Degrees != 10 {
		t.Errorf("pad rotation = %+v", pad.Rotation)
	}
	sw := j.Sweep
	// The direction is normalised exactly: (0, 0, 2)/2.
	if sw.Body != 0 || sw.Direction != (r3.Vec{Z: 1}) || len(sw.Offsets) != 0 {
		t.Errorf("sweep = %+v", sw)
	}
	if want := []float64{0.5, 1, 2}; !slices.Equal(sw.Gaps, want) || !slices.Equal(sw.Lines, []int{16, 16, 16}) {
		t.Errorf("gaps %v lines %v, want %v on line 16", sw.Gaps, sw.Lines, want)
	}
	if sw.Len() != 3 {
		t.Errorf("Len = %d, want 3", sw.Len())
	}
}

func TestDecodeDefaultsAndShapes(t *testing.T) {
	src := `unit: nm
bodies:
  - name: a
    shape: {box: {size: [1, 2, 3]}}
    mesh_size: 0.5
  - name: b
    shape:
      plate: {width: 4, depth: 5, thickness: 0.5}
    mesh_size: 0.5
  - name: c
    shape: {cylinder: {radius: 1, height: 2}}
    mesh_size: 0.5
sweep:
  body: c
  direction: [1, 1, 0]
  offsets: [-1, 0, 2.5]
`
	j, err := Decode("x.yml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	if j.Temperature != DefaultTemperature || j.Accuracy != DefaultAccuracy || j.Unit != 1e-9 {
		t.Errorf("defaults: T %v accuracy %v unit %v", j.Temperature, j.Accuracy, j.Unit)
	}
	want := []Shape{
		{Kind: Box, Size: r3.Vec{X: 1, Y: 2, Z: 3}},
		{Kind: Plate, Width: 4, Depth: 5, Thickness: 0.5},
		{Kind: Cylinder, Radius: 1, Height: 2},
	}
	for i, w := range want {
		if got := *j.Bodies[i].Shape; got != w {
			t.Errorf("body %d shape %+v, want %+v", i, got, w)
		}
	}
	// |(1, 1, 0)| = √2; the unit vector's components are 1/√2 to rounding.
	d := j.Sweep.Direction
	if math.Abs(d.X-math.Sqrt2/2) > 1e-15 || math.Abs(d.Y-math.Sqrt2/2) > 1e-15 || d.Z != 0 {
		t.Errorf("direction %v, want (1, 1, 0)/√2", d)
	}
	if j.Sweep.Body != 2 || !slices.Equal(j.Sweep.Offsets, []float64{-1, 0, 2.5}) || j.Sweep.Gaps != nil {
		t.Errorf("sweep %+v", j.Sweep)
	}
	if got := j.Bodies[1].Source(); got != "plate 4 x 5 x 0.5 mesh_size 0.5" {
		t.Errorf("source %q", got)
	}
}

// edit returns valid with old replaced by new (which must occur once).
func edit(t *testing.T, old, new string) string {
	t.Helper()
	if strings.Count(valid, old) != 1 {
		t.Fatalf("%q does not occur exactly once in the base job", old)
	}
	return strings.Replace(valid, old, new, 1)
}

func TestDecodeErrors(t *testing.T) {
	cases := []struct {
		name string
		old  string // replaced in valid; empty: src is the whole file
		new  string
		line int      // expected line in the message (0: none)
		want []string // substrings of the message
	}{
		{"unknown top key", "temperature: 4.2\n", "temperature: 4.2\ntemprature: 3\n", 3, []string{`unknown key "temprature"`, "at the top level"}},
		{"unknown body key", "    mesh_size: 0.2\n", "    mesh_size: 0.2\n    colour: red\n", 8, []string{`unknown key "colour" in bodies[0]`, "name, shape, file"}},
		{"unknown shape parameter", "{radius: 1}", "{radius: 1, radious: 2}", 6, []string{`unknown key "radious" in bodies[0].shape.sphere`}},
		{"unknown shape", "{sphere: {radius: 1}}", "{cone: {radius: 1}}", 6, []string{`unknown key "cone"`, "sphere, box, plate, cylinder"}},
		{"unknown sweep key", "  gaps: [0.5, 1, 2]\n", "  gaps: [0.5, 1, 2]\n  steps: 3\n", 17, []string{`unknown key "steps" in sweep`}},
		{"duplicate key", "unit: um\n", "unit: um\nunit: nm\n", 2, []string{"unit: given twice (first at line 1)"}},
		{"missing unit", "unit: um\n", "", 1, []string{"unit: missing", "nm, um, mm, m"}},
		{"empty unit", "unit: um\n", "unit:\n", 1, []string{"unit: want a length unit", "no value"}},
		{"bad unit", "unit: um\n", "unit: inch\n", 1, []string{`unknown length unit "inch"`}},
		{"negative temperature", "temperature: 4.2", "temperature: -1", 2, []string{"temperature: must not be negative", "kelvin"}},
		{"temperature text", "temperature: 4.2", "temperature: warm", 2, []string{"temperature: want a number", `"warm"`}},
		{"quoted number", "temperature: 4.2", `temperature: "4.2"`, 2, []string{"want a number"}},
		{"infinite number", "temperature: 4.2", "temperature: .inf", 2, []string{"want a finite number"}},
		{"overflowing number", "temperature: 4.2", "temperature: 1e400", 2, []string{`the number "1e400" is out of range`}},
		{"accuracy too large", "accuracy: 1e-4", "accuracy: 2", 3, []string{"accuracy: must lie between 0 and 1"}},
		{"accuracy zero", "accuracy: 1e-4", "accuracy: 0", 3, []string{"accuracy: must lie between 0 and 1"}},
		{"one body", "  - name: pad\n    file: pad.stl\n    position: [0, 0, 3]\n    rotation: {axis: [0, 1, 0], degrees: 10}\n", "", 5, []string{"at least two bodies, got 1"}},
		{"bodies not a list", "", "unit: um\nbodies: {a: 1}\nsweep: {body: a}\n", 2, []string{"bodies: want a list of bodies", "a mapping"}},
		{"missing name", "  - name: ball\n    shape:", "  - shape:", 5, []string{"bodies[0].name: missing"}},
		{"duplicate name", "  - name: pad\n", "  - name: ball\n", 9, []string{`the name "ball" is already used by the body at line 5`}},
		{"shape and file", "    mesh_size: 0.2\n", "    mesh_size: 0.2\n    file: x.stl\n", 8, []string{`body "ball" has both shape (line 6) and file`}},
		{"neither shape nor file", "    file: pad.stl\n", "", 9, []string{`body "pad" has neither shape nor file`}},
		{"missing mesh size", "    mesh_size: 0.2\n", "", 6, []string{"bodies[0].mesh_size: missing", "target triangle edge"}},
		{"mesh size on a file", "    file: pad.stl\n", "    file: pad.stl\n    mesh_size: 1\n", 11, []string{"a single size applies to generated shapes only", "used as is", "{near: ..., far: ...}"}},
		{"zero mesh size", "mesh_size: 0.2", "mesh_size: 0", 7, []string{"mesh_size: must be greater than zero, got 0"}},
		{"negative radius", "{radius: 1}", "{radius: -1}", 6, []string{"bodies[0].shape.sphere.radius: must be greater than zero, got -1"}},
		{"missing radius", "{radius: 1}", "{}", 6, []string{"bodies[0].shape.sphere.radius: missing"}},
		{"two shapes", "{sphere: {radius: 1}}", "{sphere: {radius: 1}, box: {size: [1, 1, 1]}}", 6, []string{"give exactly one of sphere, box, plate, cylinder, got 2"}},
		{"box side zero", "{sphere: {radius: 1}}", "{box: {size: [1, 0, 1]}}", 6, []string{"size: every side must be greater than zero"}},
		{"short position", "position: [0, 0, 0]", "position: [0, 0]", 8, []string{"bodies[0].position: want three numbers", "a list of 2"}},
		{"position text", "position: [0, 0, 0]", "position: [0, a, 0]", 8, []string{"bodies[0].position[1]: want a number"}},
		{"zero axis", "axis: [0, 1, 0]", "axis: [0, 0, 0]", 12, []string{"rotation.axis: must be a non-zero vector"}},
		{"missing degrees", "{axis: [0, 1, 0], degrees: 10}", "{axis: [0, 1, 0]}", 12, []string{"rotation.degrees: missing"}},
		{"missing sweep", "sweep:\n  body: ball\n  direction: [0, 0, 2]\n  gaps: [0.5, 1, 2]\n", "", 1, []string{"sweep: missing"}},
		{"unknown moving body", "  body: ball\n", "  body: bal\n", 14, []string{`no body is named "bal"`, "ball, pad"}},
		{"zero direction", "direction: [0, 0, 2]", "direction: [0, 0, 0]", 15, []string{"sweep.direction: must be a non-zero vector"}},
		{"missing direction", "  direction: [0, 0, 2]\n", "", 14, []string{"sweep.direction: missing"}},
		{"gaps and offsets", "  gaps: [0.5, 1, 2]\n", "  gaps: [0.5, 1, 2]\n  offsets: [1]\n", 17, []string{"has both gaps (line 16) and offsets"}},
		{"neither gaps nor offsets", "  gaps: [0.5, 1, 2]\n", "", 14, []string{"has neither gaps nor offsets"}},
		{"zero gap", "gaps: [0.5, 1, 2]", "gaps: [0.5, 0, 2]", 16, []string{"sweep.gaps[1]: gap 0: must be greater than zero"}},
		{"negative gap", "gaps: [0.5, 1, 2]", "gaps:\n    - 0.5\n    - -1\n", 18, []string{"sweep.gaps[1]: gap -1: must be greater than zero"}},
		{"empty gaps", "gaps: [0.5, 1, 2]", "gaps: []", 16, []string{"sweep.gaps: the list is empty"}},
		{"gaps not a list", "gaps: [0.5, 1, 2]", "gaps: 1", 16, []string{"sweep.gaps: want a list of gaps"}},
		{"yaml syntax", "  body: ball\n", "  body: ball: x\n", 14, []string{"invalid YAML: mapping values are not allowed"}},
		{"tab indentation", "  body: ball\n", "\tbody: ball\n", 14, []string{"invalid YAML"}},
		{"two documents", "", valid + "---\nunit: nm\n", 17, []string{"a second YAML document"}},
		{"empty file", "", "", 0, []string{"the job file is empty"}},
		{"comment only", "", "# nothing\n", 0, []string{"the job file is empty"}},
		{"not a mapping", "", "- 1\n- 2\n", 1, []string{"want a mapping of unit"}},
		{"scalar document", "", "hello\n", 1, []string{"want a mapping of unit"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := c.new
			if c.old != "" {
				src = edit(t, c.old, c.new)
			}
			_, err := Decode("job.yaml", []byte(src))
			if err == nil {
				t.Fatalf("no error for\n%s", src)
			}
			msg := err.Error()
			var je *Error
			if !errors.As(err, &je) {
				t.Fatalf("error %T is not an *Error: %v", err, err)
			}
			if je.Line != c.line {
				t.Errorf("line %d, want %d: %s", je.Line, c.line, msg)
			}
			prefix := "job.yaml: "
			if c.line > 0 {
				prefix = "job.yaml:" + strconv.Itoa(c.line) + ": "
			}
			if !strings.HasPrefix(msg, prefix) {
				t.Errorf("message does not start with %q: %s", prefix, msg)
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

func TestDecodeAliases(t *testing.T) {
	// Anchors and aliases are ordinary YAML and may be used for repeated
	// values.
	src := strings.Replace(valid, "position: [0, 0, 0]", "position: &origin [0, 0, 0]", 1)
	src = strings.Replace(src, "position: [0, 0, 3]", "position: *origin", 1)
	j, err := Decode("job.yaml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	if j.Bodies[1].Position != (r3.Vec{}) {
		t.Errorf("aliased position %v, want origin", j.Bodies[1].Position)
	}
}

func TestLoad(t *testing.T) {
	if _, err := Load(filepath.Join(t.TempDir(), "none.yaml")); err == nil || !strings.Contains(err.Error(), "none.yaml") {
		t.Errorf("missing job file: error %v, want one naming the file", err)
	}
	j, err := Load(filepath.Join("..", "..", "..", "testdata", "jobs", "example.yaml"))
	if err != nil {
		t.Fatalf("shipped example: %v", err)
	}
	if j.Name != "example" {
		t.Errorf("example name %q", j.Name)
	}
}

func TestJobName(t *testing.T) {
	for _, c := range []struct{ path, want string }{
		{"a/b/plate.yaml", "plate"},
		{"plate.yml", "plate"},
		{"plate", "plate"},
		{"v1.2.yaml", "v1.2"},
		{".hidden", ".hidden"},
	} {
		if got := jobName(c.path); got != c.want {
			t.Errorf("jobName(%q) = %q, want %q", c.path, got, c.want)
		}
	}
}

// FuzzDecodeJob checks that the decoder never panics and that whatever it
// accepts satisfies the job file's rules.
func FuzzDecodeJob(f *testing.F) {
	f.Add([]byte(valid))
	f.Add([]byte(""))
	f.Add([]byte("unit: um\nbodies: [{name: a}, {name: a}]\n"))
	f.Add([]byte("a: &a [*a]\n"))
	f.Add([]byte("unit: um\nbodies:\n  - &b {name: x, shape: {sphere: {radius: 1}}, mesh_size: 1}\n  - *b\nsweep: {body: x, direction: [1, 0, 0], offsets: [1]}\n"))
	if data, err := os.ReadFile(filepath.Join("..", "..", "..", "testdata", "jobs", "example.yaml")); err == nil {
		f.Add(data)
	}
	if data, err := os.ReadFile(filepath.Join("..", "..", "fluctus", "demo.yaml")); err == nil {
		f.Add(data)
	}
	f.Add([]byte(overSubstrate))
	f.Add([]byte(tilted))
	f.Fuzz(func(t *testing.T, data []byte) {
		j, err := Decode("fuzz.yaml", data)
		if err != nil {
			var je *Error
			if !errors.As(err, &je) {
				t.Fatalf("error %T is not an *Error: %v", err, err)
			}
			if !strings.HasPrefix(err.Error(), "fuzz.yaml") {
				t.Fatalf("error does not name the file: %v", err)
			}
			return
		}
		if !(j.Unit > 0) || j.Temperature < 0 || !(j.Accuracy > 0 && j.Accuracy < 1) {
			t.Fatalf("accepted unit %v temperature %v accuracy %v", j.Unit, j.Temperature, j.Accuracy)
		}
		if len(j.Bodies) < 2 && (j.Substrate == nil || len(j.Bodies) < 1) {
			t.Fatalf("accepted %d bodies (substrate %v)", len(j.Bodies), j.Substrate)
		}
		if sub := j.Substrate; sub != nil && math.Abs(r3.Norm(sub.Normal)-1) > 1e-12 {
			t.Fatalf("substrate normal %v", sub.Normal)
		}
		names := map[string]bool{}
		for _, b := range j.Bodies {
			if names[b.Name] || b.Name == "" {
				t.Fatalf("accepted duplicate or empty name %q", b.Name)
			}
			names[b.Name] = true
			if (b.Shape == nil) == (b.File == "") {
				t.Fatalf("body %q: shape %v file %q", b.Name, b.Shape, b.File)
			}
			if b.Shape != nil && !(b.MeshSize > 0) && b.Grading == nil {
				t.Fatalf("body %q: mesh size %v", b.Name, b.MeshSize)
			}
			if g := b.Grading; g != nil && !(g.Near > 0 && g.Far >= g.Near) {
				t.Fatalf("body %q: grading %+v", b.Name, *g)
			}
		}
		sw := j.Sweep
		if sw.Body < 0 || sw.Body >= len(j.Bodies) {
			t.Fatalf("sweep body %d of %d", sw.Body, len(j.Bodies))
		}
		// A normalised direction has length 1 to rounding (a few ulps); an
		// angle sweep may leave it zero.
		if l := r3.Norm(sw.Direction); math.Abs(l-1) > 1e-12 && !(sw.Rotate != nil && l == 0) {
			t.Fatalf("direction %v has length %v", sw.Direction, l)
		}
		kinds := 0
		for _, given := range []bool{len(sw.Gaps) > 0, len(sw.Offsets) > 0, sw.Rotate != nil} {
			if given {
				kinds++
			}
		}
		if kinds != 1 || sw.Len() == 0 || len(sw.Lines) != sw.Len() {
			t.Fatalf("sweep %+v", sw)
		}
		if sp := j.Spring; sp != nil {
			lo, hi := sw.Range()
			if !(sp.Stiffness > 0) || sp.Torsional != (sw.Rotate != nil) || !j.Forces ||
				(sw.Kind() != ByOffsets && (sp.Rest < lo || sp.Rest > hi)) {
				t.Fatalf("accepted spring %+v for sweep %+v", *sp, sw)
			}
		}
		for _, g := range sw.Gaps {
			if !(g > 0) {
				t.Fatalf("accepted gap %v", g)
			}
		}
	})
}
