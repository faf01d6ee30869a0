package job

import (
	"math"
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
	// Cells of side 1 have mean edges near 1.2, above half of 0.5 but
	// below half of 3.
	if w := s.Warnings([]float64{0.5, 2}); len(w) != 2 || !strings.Contains(w[0], `body "block"`) || !strings.Contains(w[0], "half the smallest gap 0.5 mm") {
		t.Errorf("warnings %q", w)
	}
	if w := s.Warnings([]float64{3}); len(w) != 0 {
		t.Errorf("warnings %q at a wide gap", w)
	}
}
