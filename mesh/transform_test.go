package mesh

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// TestRigidTransforms checks that rigid motions and reflections preserve area
// and |volume| (isometries, common practice), that Mirror keeps the volume
// positive by reversing the vertex order, and that the mesh stays valid.
// Tolerance: relative 1e-12, rounding of ~1e3 rotated vertices.
func TestRigidTransforms(t *testing.T) {
	base, err := SphereLevel(1, 4)
	if err != nil {
		t.Fatal(err)
	}
	base = base.Translate(r3.Vec{X: 0.3, Y: -0.2, Z: 0.1}) // off-centre so transforms matter
	s0 := base.Stats()
	cases := []struct {
		name string
		m    *Mesh
		move func(r3.Vec) r3.Vec // expected image of a vertex
	}{
		{"translate", base.Translate(r3.Vec{X: 1, Y: 2, Z: 3}),
			func(p r3.Vec) r3.Vec { return r3.Add(p, r3.Vec{X: 1, Y: 2, Z: 3}) }},
		// A quarter turn about +z through the origin maps (x,y,z) to (-y,x,z)
		// (right-hand rule).
		{"rotate z 90°", base.Rotate(r3.Vec{Z: 2}, math.Pi/2, r3.Vec{}),
			func(p r3.Vec) r3.Vec { return r3.Vec{X: -p.Y, Y: p.X, Z: p.Z} }},
		// Half turn about the x axis through (0,1,0): (x,y,z) -> (x, 2-y, -z).
		{"rotate x 180° about (0,1,0)", base.Rotate(r3.Vec{X: 1}, math.Pi, r3.Vec{Y: 1}),
			func(p r3.Vec) r3.Vec { return r3.Vec{X: p.X, Y: 2 - p.Y, Z: -p.Z} }},
		{"rotate oblique", base.Rotate(r3.Vec{X: 1, Y: 2, Z: -1}, 0.7, r3.Vec{X: 5}), nil},
		// Reflection through the plane z = 1: (x,y,z) -> (x,y,2-z).
		{"mirror z=1", base.Mirror(r3.Vec{Z: 1}, r3.Vec{Z: -3}),
			func(p r3.Vec) r3.Vec { return r3.Vec{X: p.X, Y: p.Y, Z: 2 - p.Z} }},
		{"mirror oblique", base.Mirror(r3.Vec{X: 1, Y: 1}, r3.Vec{X: 1, Y: 1, Z: 1}), nil},
		{"scale -1", base.Scale(-1), func(p r3.Vec) r3.Vec { return r3.Scale(-1, p) }},
	}
	for _, c := range cases {
		if c.m.Name != base.Name {
			t.Errorf("%s: name %q, want %q", c.name, c.m.Name, base.Name)
		}
		if ps := c.m.Check(); len(ps) != 0 {
			t.Errorf("%s: %v", c.name, ps[0])
		}
		s := c.m.Stats()
		if math.Abs(s.Area-s0.Area) > 1e-12*s0.Area {
			t.Errorf("%s: area %v, want %v", c.name, s.Area, s0.Area)
		}
		if math.Abs(s.Volume-s0.Volume) > 1e-12*s0.Volume {
			t.Errorf("%s: volume %v, want %v (positive)", c.name, s.Volume, s0.Volume)
		}
		if c.move == nil {
			continue
		}
		for i, p := range base.Vertices {
			if d := r3.Norm(r3.Sub(c.m.Vertices[i], c.move(p))); d > 1e-14 {
				t.Fatalf("%s: vertex %d at %v, want %v", c.name, i, c.m.Vertices[i], c.move(p))
			}
		}
	}
	// The original is untouched.
	if s := base.Stats(); s != s0 {
		t.Error("transform modified its receiver")
	}
}

func TestScale(t *testing.T) {
	// Scaling by f multiplies area by f² and volume by f³ (exact to rounding).
	m, _ := SphereLevel(1, 3)
	s0 := m.Stats()
	for _, f := range []float64{2, 0.5, 1e-3, 7} {
		s := m.Scale(f).Stats()
		if math.Abs(s.Area/s0.Area-f*f) > 1e-12*f*f || math.Abs(s.Volume/s0.Volume-f*f*f) > 1e-12*f*f*f {
			t.Errorf("f=%g: area ratio %v, volume ratio %v", f, s.Area/s0.Area, s.Volume/s0.Volume)
		}
	}
}

func TestEquivalentRadius(t *testing.T) {
	// The volume-equivalent radius of a box of volume V is (3V/4π)^(1/3).
	b, _ := Box(r3.Vec{X: 1, Y: 2, Z: 3}, 0.5)
	want := math.Cbrt(3 * 6 / (4 * math.Pi))
	if got := b.EquivalentRadius(); math.Abs(got-want) > 1e-14 {
		t.Errorf("box: %v, want %v", got, want)
	}
	// An inscribed icosphere is smaller than its circumsphere; its
	// equivalent radius approaches R as the mesh is refined.
	prev := 0.0
	for _, n := range []int{1, 2, 4, 8} {
		s, _ := SphereLevel(1, n)
		r := s.EquivalentRadius()
		if r <= prev || r >= 1 {
			t.Errorf("n=%d: equivalent radius %v not increasing towards 1", n, r)
		}
		t.Logf("n=%d (%d triangles): equivalent radius %.5f", n, 20*n*n, r)
		prev = r
	}
}
