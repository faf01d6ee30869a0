package job

import (
	"math"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

const twoBoxes = `unit: mm
bodies:
  - name: block
    shape: {box: {size: [1, 2, 3]}}
    mesh_size: 1
    position: [1, 0, 5]
    rotation: {axis: [0, 0, 1], degrees: 90}
  - name: base
    shape: {box: {size: [4, 4, 1]}}
    mesh_size: 1
sweep:
  body: block
  direction: [0, 0, 1]
  gaps: [0.5, 2]
`

func TestBuildPlacement(t *testing.T) {
	j, err := Decode("boxes.yaml", []byte(twoBoxes))
	if err != nil {
		t.Fatal(err)
	}
	s, err := j.Build()
	if err != nil {
		t.Fatal(err)
	}
	// Turned by 90° about z about its own origin, then moved to (1, 0, 5):
	// the 1 × 2 × 3 block spans x 0..2, y -0.5..0.5, z 3.5..6.5. Had the
	// rotation come after the translation, it would be centred at (0, 1, 5).
	// Tolerance 1e-12: rounding of cos 90° (6e-17) times coordinates of
	// order 1.
	st := s.Bodies[0].Mesh.Stats()
	want := [2]r3.Vec{{X: 0, Y: -0.5, Z: 3.5}, {X: 2, Y: 0.5, Z: 6.5}}
	if r3.Norm(r3.Sub(st.Min, want[0])) > 1e-12 || r3.Norm(r3.Sub(st.Max, want[1])) > 1e-12 {
		t.Errorf("block spans %v..%v, want %v..%v", st.Min, st.Max, want[0], want[1])
	}
	if s.Bodies[0].Name != "block" || s.Bodies[0].Mesh.Name != "block" {
		t.Errorf("body name %q, mesh name %q", s.Bodies[0].Name, s.Bodies[0].Mesh.Name)
	}
	if s.Sweep.Body != 0 || s.Sweep.Direction != (r3.Vec{Z: 1}) || len(s.Sweep.Offsets) != 2 {
		t.Fatalf("sweep %+v", s.Sweep)
	}
	gaps, err := s.Clearance()
	if err != nil {
		t.Fatal(err)
	}
	// Each requested gap must be met to the bisection accuracy of
	// OffsetForGap (1e-12 relative; 1e-9 absolute is ample). The block
	// starts above the base and approaches it along +z, so it is placed
	// below: its top face at -0.5 - gap.
	for i, g := range []float64{0.5, 2} {
		if math.Abs(gaps[i]-g) > 1e-9 {
			t.Errorf("point %d: gap %.12g, want %g", i, gaps[i], g)
		}
		top := 6.5 + s.Sweep.Offsets[i].Z
		if math.Abs(top-(-0.5-g)) > 1e-9 {
			t.Errorf("point %d: block top at z = %g, want %g", i, top, -0.5-g)
		}
	}
}

func TestBuildErrors(t *testing.T) {
	cases := []struct {
		name, old, new string
		want           []string
	}{
		{"missing file", "    shape: {box: {size: [4, 4, 1]}}\n    mesh_size: 1\n", "    file: none.stl\n",
			[]string{"boxes.yaml:8:", `body "base"`, "none.stl"}},
		{"shape too fine", "    mesh_size: 1\n    position", "    mesh_size: 1e-6\n    position",
			[]string{"boxes.yaml:3:", `body "block"`, "box size 1 x 2 x 3", "divisions"}},
		{"unreachable gap", "direction: [0, 0, 1]", "direction: [0, 1, 0]",
			[]string{"boxes.yaml:14:", "sweep.gaps[0]", `cannot place body "block" at gap 0.5`, "choose another direction"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if !strings.Contains(twoBoxes, c.old) {
				t.Fatalf("%q not in the job", c.old)
			}
			j, err := Decode("boxes.yaml", []byte(strings.Replace(twoBoxes, c.old, c.new, 1)))
			if err != nil {
				t.Fatal(err)
			}
			_, err = j.Build()
			if err == nil {
				t.Fatal("no error")
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error lacks %q: %v", w, err)
				}
			}
		})
	}
}

func TestWarnings(t *testing.T) {
	j, err := Decode("boxes.yaml", []byte(twoBoxes))
	if err != nil {
		t.Fatal(err)
	}
	s, err := j.Build()
	if err != nil {
		t.Fatal(err)
	}
	gaps, err := s.Clearance()
	if err != nil {
		t.Fatal(err)
	}
	// Cells of side 1 (longest edges √2) are far more than half of the
	// closest gap 0.5 (rule of thumb, common practice: h ≤ gap/2).
	w := s.Warnings(gaps)
	if len(w) != 2 {
		t.Fatalf("warnings %q", w)
	}
	for k, name := range []string{`body "block"`, `body "base"`} {
		for _, want := range []string{name, "sweep point 1 (gap 0.5 mm)", "larger than half the local gap", "refine with mesh_size {near: 0.25", "lengths in mm"} {
			if !strings.Contains(w[k], want) {
				t.Errorf("warning lacks %q: %s", want, w[k])
			}
		}
	}
	// At gaps of 3 and more the same meshes are fine.
	far := strings.Replace(twoBoxes, "gaps: [0.5, 2]", "gaps: [3, 4]", 1)
	if j, err = Decode("boxes.yaml", []byte(far)); err != nil {
		t.Fatal(err)
	}
	if s, err = j.Build(); err != nil {
		t.Fatal(err)
	}
	if gaps, err = s.Clearance(); err != nil {
		t.Fatal(err)
	}
	if w := s.Warnings(gaps); len(w) != 0 {
		t.Errorf("warnings %q at a wide gap", w)
	}
}

// build decodes and builds a job, failing the test on any error.
func build(t *testing.T, src string) (*Scene, []float64) {
	t.Helper()
	j, err := Decode("job.yaml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	s, err := j.Build()
	if err != nil {
		t.Fatal(err)
	}
	gaps, err := s.Clearance()
	if err != nil {
		t.Fatal(err)
	}
	return s, gaps
}

// buildError decodes and builds a job (with Clearance and CheckSweep) and
// returns the first error.
func buildError(t *testing.T, src string) error {
	t.Helper()
	j, err := Decode("job.yaml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	s, err := j.Build()
	if err != nil {
		return err
	}
	gaps, err := s.Clearance()
	if err != nil {
		return err
	}
	return s.CheckSweep(gaps)
}

const ballOverSubstrate = `unit: um
substrate: {point: [0, 0, -1], normal: [0, 0, 1]}
bodies:
  - name: ball
    shape: {sphere: {radius: 1}}
    mesh_size: 0.7
    position: [3, 0, 5]
sweep:
  body: ball
  direction: [0.6, 0, -0.8]
  gaps: [0.5, 2]
`

func TestBuildSubstrate(t *testing.T) {
	s, gaps := build(t, ballOverSubstrate)
	// The lowest vertex of the icosphere (a pole, at -1 below the centre)
	// is placed at each height above the plane z = -1 moving along the
	// oblique direction: the centre at z = -1 + gap + 1. Exact to rounding
	// (1e-12).
	for i, g := range []float64{0.5, 2} {
		if math.Abs(gaps[i]-g) > 1e-12 {
			t.Errorf("point %d: gap %.15g, want %g", i, gaps[i], g)
		}
		off := s.Sweep.Offsets[i]
		if z := 5 + off.Z; math.Abs(z-g) > 1e-12 {
			t.Errorf("point %d: centre at z = %g, want %g", i, z, g)
		}
		// The offset runs along the direction: x/z = 0.6/-0.8.
		if math.Abs(off.X*0.8+off.Z*0.6) > 1e-12 {
			t.Errorf("point %d: offset %v not along the direction", i, off)
		}
	}
	if s.Substrate == nil || s.Substrate.Normal != (r3.Vec{Z: 1}) {
		t.Errorf("substrate %+v", s.Substrate)
	}
	// The torques are taken about the ball's volume centroid, its centre
	// (to rounding of the icosphere's symmetric vertices).
	if c := s.Sweep.Centre; r3.Norm(r3.Sub(c, r3.Vec{X: 3, Z: 5})) > 1e-12 {
		t.Errorf("torque centre %v", c)
	}
	extra, err := s.SweepAt([]float64{0.25})
	if err != nil {
		t.Fatal(err)
	}
	if z := 5 + extra.Offsets[0].Z; math.Abs(z-0.25) > 1e-12 {
		t.Errorf("extra point: centre at z = %g, want 0.25", z)
	}
}

func TestBuildSubstrateErrors(t *testing.T) {
	cases := []struct {
		name, old, new string
		want           []string
	}{
		{"crossing at a sweep point", "  gaps: [0.5, 2]\n", "  offsets: [0, 7]\n",
			[]string{"job.yaml:11:", `body "ball" crosses the substrate at sweep point 2 (offset 7 um)`, "lowest point"}},
		{"direction away from the plane", "direction: [0.6, 0, -0.8]", "direction: [0.6, 0, 0.8]",
			[]string{"job.yaml:11:", "must point towards it", "negative component along the normal"}},
		{"fixed body below the plane", "sweep:", "  - name: post\n    shape: {box: {size: [1, 1, 1]}}\n    mesh_size: 1\n    position: [-3, 0, -1.2]\nsweep:",
			[]string{"job.yaml:8:", `body "post" crosses the substrate`, "raise it"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if !strings.Contains(ballOverSubstrate, c.old) {
				t.Fatalf("%q not in the job", c.old)
			}
			err := buildError(t, strings.Replace(ballOverSubstrate, c.old, c.new, 1))
			if err == nil {
				t.Fatal("no error")
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error lacks %q: %v", w, err)
				}
			}
		})
	}
}

const paddle = `unit: um
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
  rotate: {axis: [0, 1, 0], point: [0, 0, 1], degrees: [0, 5, 10]}
`

func TestBuildAngleSweep(t *testing.T) {
	s, gaps := build(t, paddle)
	if err := s.CheckSweep(gaps); err != nil {
		t.Fatal(err)
	}
	sw := s.Sweep
	if len(sw.Turns) != 3 || sw.Centre != (r3.Vec{Z: 1}) || sw.Turns[2].Pivot != (r3.Vec{Z: 1}) || sw.Turns[2].Axis != (r3.Vec{Y: 1}) {
		t.Fatalf("sweep %+v", sw)
	}
	// Turning by θ about y lowers the corner at x = +1, z = -0.05 (relative
	// to the pivot) to 1 - sin θ - 0.05 cos θ above the pad's top at 0.1.
	// Plate meshes are exact, so to rounding (1e-12).
	for i, deg := range []float64{0, 5, 10} {
		th := deg * math.Pi / 180
		if math.Abs(sw.Turns[i].Angle-th) > 1e-15 || sw.Offsets[i] != (r3.Vec{}) {
			t.Errorf("turn %d: %+v offset %v", i, sw.Turns[i], sw.Offsets[i])
		}
		if want := 1 - math.Sin(th) - 0.05*math.Cos(th) - 0.1; math.Abs(gaps[i]-want) > 1e-12 {
			t.Errorf("angle %g: gap %.12g, want %.12g", deg, gaps[i], want)
		}
	}
	// The default direction of the PFA estimate is from the paddle's
	// closest point to the pad's: straight down at every angle, as the
	// closest pair is the corner and the flat pad below it.
	if d := sw.Direction; r3.Norm(r3.Sub(d, r3.Vec{Z: -1})) > 1e-9 {
		t.Errorf("direction %v, want (0, 0, -1)", d)
	}
	// Contact: sin θ + 0.05 cos θ = 0.9, i.e. θ = asin(0.9/R) - atan(0.05)
	// with R = √(1 + 0.05²). Bisection to 1e-12 relative; 1e-10 is ample.
	theta, err := s.ContactAngle()
	if err != nil {
		t.Fatal(err)
	}
	want := math.Asin(0.9/math.Hypot(1, 0.05)) - math.Atan(0.05)
	if math.Abs(theta-want) > 1e-10 {
		t.Errorf("contact angle %.12g rad, want %.12g", theta, want)
	}
	extra, err := s.SweepAt([]float64{20})
	if err != nil || len(extra.Turns) != 1 || math.Abs(extra.Turns[0].Angle-20*math.Pi/180) > 1e-15 {
		t.Errorf("SweepAt: %+v, %v", extra, err)
	}

	// Angles on both sides of the parallel position: the gap grows again
	// from 0 to -5 degrees (the other end goes down).
	both := strings.Replace(paddle, "degrees: [0, 5, 10]", "degrees: [-5, 0, 5]", 1)
	err = buildError(t, both)
	if err == nil || !strings.Contains(err.Error(), "the gap does not shrink as the angle grows") || !strings.Contains(err.Error(), "flip the axis") {
		t.Errorf("angles on both sides: %v", err)
	}
	twice := strings.Replace(paddle, "degrees: [0, 5, 10]", "degrees: [0, 5, 5]", 1)
	if err := buildError(t, twice); err == nil || !strings.Contains(err.Error(), "given twice") {
		t.Errorf("repeated angle: %v", err)
	}
	into := strings.Replace(paddle, "degrees: [0, 5, 10]", "degrees: [0, 5, 70]", 1)
	if err := buildError(t, into); err == nil || !strings.Contains(err.Error(), "touch or overlap") || !strings.Contains(err.Error(), "angle 70 degrees") {
		t.Errorf("angle into the pad: %v", err)
	}
}

func TestBuildGraded(t *testing.T) {
	src := strings.Replace(ballOverSubstrate, "mesh_size: 0.7", "mesh_size: {near: 0.2, far: 0.7}", 1)
	s, gaps := build(t, src)
	m := s.Bodies[0].Mesh
	if err := m.Validate(); err != nil {
		t.Fatal(err)
	}
	uniform, _ := build(t, ballOverSubstrate)
	fine, _ := build(t, strings.Replace(ballOverSubstrate, "mesh_size: 0.7", "mesh_size: 0.2", 1))
	n, lo, hi := len(m.Triangles), len(uniform.Bodies[0].Mesh.Triangles), len(fine.Bodies[0].Mesh.Triangles)
	if !(n > lo && n < hi) {
		t.Errorf("graded sphere has %d triangles, want between the uniform far (%d) and near (%d) meshes", n, lo, hi)
	}
	// Graded at the closest placement (gap 0.5): the triangles at the
	// bottom are at most the near size, and the scene passes the coarse-mesh
	// check (DefaultGrowth keeps h ≤ d/2 away from the closest approach).
	placed := s.Placed(0)
	low, at := math.Inf(1), 0
	for k := range placed.Triangles {
		if z := placed.Centroid(k).Z; z < low {
			low, at = z, k
		}
	}
	if d := placed.Diameter(at); d > 0.2*(1+1e-12) {
		t.Errorf("lowest triangle %.4g across, want at most the near size 0.2", d)
	}
	if w := s.Warnings(gaps); len(w) != 0 {
		t.Errorf("graded mesh warns: %q", w)
	}
	// The gaps are met with the final mesh (to rounding).
	for i, g := range []float64{0.5, 2} {
		if math.Abs(gaps[i]-g) > 1e-12 {
			t.Errorf("point %d: gap %.15g, want %g", i, gaps[i], g)
		}
	}
}

func TestBuildGradedFile(t *testing.T) {
	src := `unit: um
bodies:
  - name: ball
    shape: {sphere: {radius: 1}}
    mesh_size: {near: 0.1, far: 0.5}
    position: [0, 0, 3]
  - name: pad
    file: ` + filepath.Join("..", "..", "..", "testdata", "jobs", "pad.stl") + `
    mesh_size: {near: 0.1, far: 0.5}
sweep:
  body: ball
  direction: [0, 0, -1]
  gaps: [0.25]
`
	s, gaps := build(t, src)
	pad := s.Bodies[1].Mesh
	if err := pad.Validate(); err != nil {
		t.Fatal(err)
	}
	// pad.stl has 320 triangles of edge 0.5; refined near the ball it has
	// more, flat faces stay flat (its volume 4 x 4 x 0.5 = 8 is kept to
	// float32 rounding, 1e-6 relative).
	if n := len(pad.Triangles); n <= 320 {
		t.Errorf("refined pad has %d triangles", n)
	}
	if v := pad.Volume(); math.Abs(v-8) > 8e-6 {
		t.Errorf("refined pad volume %g, want 8", v)
	}
	if w := s.Warnings(gaps); len(w) != 0 {
		t.Errorf("graded meshes warn: %q", w)
	}
	if !strings.Contains(s.Job.Bodies[1].Source(), "pad.stl mesh_size {near 0.1, far 0.5}") {
		t.Errorf("source %q", s.Job.Bodies[1].Source())
	}
	// Scaled by 1/2 for a convergence level, the graded sizes halve.
	half, err := s.Job.BuildScaled(0.5)
	if err != nil {
		t.Fatal(err)
	}
	if n, n1 := len(half.Bodies[0].Mesh.Triangles), len(s.Bodies[0].Mesh.Triangles); n < 2*n1 {
		t.Errorf("half-size level has %d ball triangles against %d", n, n1)
	}
}

func TestCheckSweepOffsetsSpring(t *testing.T) {
	src := strings.Replace(twoBoxes, "  gaps: [0.5, 2]\n", "  offsets: [-9, -10]\nspring: {stiffness: 1, unit: N/m, rest_gap: 5}\n", 1)
	err := buildError(t, src)
	if err == nil || !strings.Contains(err.Error(), "job.yaml:15: spring.rest_gap: rest gap 5 mm lies outside the gaps of the sweep's offsets") {
		t.Errorf("error %v", err)
	}
}
