package mesh

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// requireClosedSphereLike checks what every shape must satisfy: Check finds
// nothing, the volume is positive and the Euler characteristic V - E + F is 2
// (Euler's polyhedron formula for a surface of genus 0).
func requireClosedSphereLike(t *testing.T, m *Mesh) {
	t.Helper()
	if ps := m.Check(); len(ps) != 0 {
		t.Fatalf("%s: Check found %d problems, first: %v", m.Name, len(ps), ps[0])
	}
	s := m.Stats()
	if s.Volume <= 0 {
		t.Errorf("%s: volume %g, want > 0 (outward normals)", m.Name, s.Volume)
	}
	if chi := s.Vertices - s.Edges + s.Triangles; chi != 2 {
		t.Errorf("%s: Euler characteristic V-E+F = %d-%d+%d = %d, want 2", m.Name, s.Vertices, s.Edges, s.Triangles, chi)
	}
	// Every triangle must face away from the body's centre: for these convex
	// shapes centred at the origin the outward normal has a positive
	// component along the centroid direction.
	for tr := range m.Triangles {
		if r3.Dot(m.AreaVector(tr), m.Centroid(tr)) <= 0 {
			t.Fatalf("%s: triangle %d faces inward", m.Name, tr)
		}
	}
	// No duplicate vertices (exact coincidence).
	seen := make(map[r3.Vec]int, len(m.Vertices))
	for i, v := range m.Vertices {
		if j, ok := seen[v]; ok {
			t.Fatalf("%s: vertices %d and %d coincide at %v", m.Name, j, i, v)
		}
		seen[v] = i
	}
}

func TestSphereLevelCounts(t *testing.T) {
	// An n² subdivision of the icosahedron has 20n² faces, 30n² edges and
	// 10n²+2 vertices (Euler's formula with F = 20n², E = 3F/2).
	for _, n := range []int{1, 2, 3, 4, 7} {
		m, err := SphereLevel(2, n)
		if err != nil {
			t.Fatal(err)
		}
		requireClosedSphereLike(t, m)
		s := m.Stats()
		if s.Triangles != 20*n*n || s.Edges != 30*n*n || s.Vertices != 10*n*n+2 {
			t.Errorf("n=%d: V,E,F = %d,%d,%d, want %d,%d,%d", n, s.Vertices, s.Edges, s.Triangles, 10*n*n+2, 30*n*n, 20*n*n)
		}
		// All vertices on the sphere to rounding (relative 1e-15 per
		// operation, a few operations).
		for i, v := range m.Vertices {
			if d := math.Abs(r3.Norm(v) - 2); d > 1e-14 {
				t.Fatalf("n=%d: vertex %d at radius %v", n, i, r3.Norm(v))
			}
		}
	}
}

func TestIcosahedronEdge(t *testing.T) {
	// The regular icosahedron inscribed in the unit sphere has edge
	// 4/sqrt(10+2 sqrt 5) ≈ 1.0515 (standard solid geometry, common
	// practice); all 30 edges equal to rounding.
	m, err := SphereLevel(1, 1)
	if err != nil {
		t.Fatal(err)
	}
	want := 4 / math.Sqrt(10+2*math.Sqrt(5))
	s := m.Stats()
	if math.Abs(s.MinEdge-want) > 1e-14 || math.Abs(s.MaxEdge-want) > 1e-14 {
		t.Errorf("edges in [%v, %v], want %v", s.MinEdge, s.MaxEdge, want)
	}
	// Its volume is (5/12)(3+sqrt5) a³ (common practice).
	wantV := 5.0 / 12 * (3 + math.Sqrt(5)) * want * want * want
	if math.Abs(s.Volume-wantV) > 1e-13 {
		t.Errorf("volume %v, want %v", s.Volume, wantV)
	}
}

func TestSphereSize(t *testing.T) {
	for _, c := range []struct {
		r, size float64
		wantN   int // -1: do not check
	}{
		{1, 10, 1}, // any size above the icosahedron's edge gives the icosahedron
		{1, 1.06, 1},
		{1, 0.2, -1},
		{3, 0.25, -1},
		{0.01, 0.001, -1},
	} {
		m, err := Sphere(c.r, c.size)
		if err != nil {
			t.Fatal(err)
		}
		requireClosedSphereLike(t, m)
		n := int(math.Round(math.Sqrt(float64(len(m.Triangles)) / 20)))
		if c.wantN > 0 && n != c.wantN {
			t.Errorf("Sphere(%g,%g): n = %d, want %d", c.r, c.size, n, c.wantN)
		}
		if got := m.Stats().MaxEdge; got > c.size {
			t.Errorf("Sphere(%g,%g): longest edge %g exceeds size", c.r, c.size, got)
		}
		if n > 1 {
			// n is the smallest: one level coarser violates the size.
			coarser, _ := SphereLevel(c.r, n-1)
			if got := coarser.Stats().MaxEdge; got <= c.size {
				t.Errorf("Sphere(%g,%g): n-1 = %d already has longest edge %g", c.r, c.size, n-1, got)
			}
		}
		if m.Name == "" {
			t.Error("unnamed mesh")
		}
	}
	if m, _ := Sphere(1, 0.2); m.Name != "sphere r=1 h=0.2" {
		t.Errorf("name %q", m.Name)
	}
}

func TestShapeErrors(t *testing.T) {
	nan := math.NaN()
	inf := math.Inf(1)
	cases := []struct {
		name string
		f    func() (*Mesh, error)
	}{
		{"sphere r=0", func() (*Mesh, error) { return Sphere(0, 0.1) }},
		{"sphere r<0", func() (*Mesh, error) { return Sphere(-1, 0.1) }},
		{"sphere r=NaN", func() (*Mesh, error) { return Sphere(nan, 0.1) }},
		{"sphere size=0", func() (*Mesh, error) { return Sphere(1, 0) }},
		{"sphere size=Inf", func() (*Mesh, error) { return Sphere(1, inf) }},
		{"sphere too fine", func() (*Mesh, error) { return Sphere(1, 1e-4) }},
		{"sphere level 0", func() (*Mesh, error) { return SphereLevel(1, 0) }},
		{"sphere level huge", func() (*Mesh, error) { return SphereLevel(1, 1000) }},
		{"box x=0", func() (*Mesh, error) { return Box(r3.Vec{X: 0, Y: 1, Z: 1}, 0.1) }},
		{"box h<0", func() (*Mesh, error) { return Box(r3.Vec{X: 1, Y: 1, Z: 1}, -0.1) }},
		{"box too fine", func() (*Mesh, error) { return Box(r3.Vec{X: 1, Y: 1, Z: 1}, 1e-4) }},
		{"plate thickness=0", func() (*Mesh, error) { return Plate(1, 1, 0, 0.1) }},
		{"cylinder r=0", func() (*Mesh, error) { return Cylinder(0, 1, 0.1) }},
		{"cylinder height NaN", func() (*Mesh, error) { return Cylinder(1, nan, 0.1) }},
		{"cylinder too fine", func() (*Mesh, error) { return Cylinder(1, 1, 1e-4) }},
	}
	for _, c := range cases {
		m, err := c.f()
		if err == nil {
			t.Errorf("%s: no error (mesh with %d triangles)", c.name, len(m.Triangles))
		}
	}
}

// TestSphereConvergence checks that the inscribed icosphere's area and
// volume approach 4πR² and 4πR³/3 with error O(h²): halving the edge size
// (doubling n) divides the error by about 4. The observed order
// log2(e_n/e_2n) must lie within 0.15 of 2 (the next term in the error is
// O(h⁴), so at n ≥ 4 the order is already within a few per cent of 2).
func TestSphereConvergence(t *testing.T) {
	const R = 1.5
	exactA := 4 * math.Pi * R * R
	exactV := 4.0 / 3 * math.Pi * R * R * R
	var prevA, prevV float64
	for _, n := range []int{4, 8, 16, 32} {
		m, err := SphereLevel(R, n)
		if err != nil {
			t.Fatal(err)
		}
		s := m.Stats()
		eA := (exactA - s.Area) / exactA
		eV := (exactV - s.Volume) / exactV
		if eA <= 0 || eV <= 0 {
			t.Fatalf("n=%d: inscribed polyhedron must fall short: area error %g, volume error %g", n, eA, eV)
		}
		if prevA > 0 {
			pA, pV := math.Log2(prevA/eA), math.Log2(prevV/eV)
			t.Logf("n=%d: rel. area error %.3e (order %.3f), rel. volume error %.3e (order %.3f)", n, eA, pA, eV, pV)
			if math.Abs(pA-2) > 0.15 || math.Abs(pV-2) > 0.15 {
				t.Errorf("n=%d: observed orders %.3f (area), %.3f (volume), want 2 ± 0.15", n, pA, pV)
			}
		}
		prevA, prevV = eA, eV
	}
}

func TestBoxExact(t *testing.T) {
	// The faceted box is the box itself: area 2(xy+yz+zx) and volume xyz
	// hold to rounding (relative 1e-13 covers summing ~1e4 terms).
	cases := []struct {
		size r3.Vec
		h    float64
		n    [3]int // expected divisions
	}{
		{r3.Vec{X: 1, Y: 1, Z: 1}, 2, [3]int{1, 1, 1}},
		{r3.Vec{X: 1, Y: 2, Z: 3}, 0.5, [3]int{2, 4, 6}},
		{r3.Vec{X: 0.3, Y: 0.7, Z: 1.1}, 0.1, [3]int{3, 7, 11}},
	}
	for _, c := range cases {
		m, err := Box(c.size, c.h)
		if err != nil {
			t.Fatal(err)
		}
		requireClosedSphereLike(t, m)
		s := m.Stats()
		x, y, z := c.size.X, c.size.Y, c.size.Z
		if wantA := 2 * (x*y + y*z + z*x); math.Abs(s.Area-wantA) > 1e-13*wantA {
			t.Errorf("%s: area %v, want %v", m.Name, s.Area, wantA)
		}
		if wantV := x * y * z; math.Abs(s.Volume-wantV) > 1e-13*wantV {
			t.Errorf("%s: volume %v, want %v", m.Name, s.Volume, wantV)
		}
		n := c.n
		if wantT := 4 * (n[0]*n[1] + n[1]*n[2] + n[2]*n[0]); s.Triangles != wantT {
			t.Errorf("%s: %d triangles, want %d", m.Name, s.Triangles, wantT)
		}
		if s.MaxEdge > c.h*math.Sqrt2*(1+1e-12) {
			t.Errorf("%s: longest edge %g exceeds the cell diagonal", m.Name, s.MaxEdge)
		}
		want := r3.Scale(0.5, c.size)
		if r3.Norm(r3.Sub(s.Max, want)) > 1e-15 || r3.Norm(r3.Add(s.Min, want)) > 1e-15 {
			t.Errorf("%s: bounding box %v..%v", m.Name, s.Min, s.Max)
		}
		if r3.Norm(s.Centroid) > 1e-14 {
			t.Errorf("%s: centroid %v, want origin", m.Name, s.Centroid)
		}
	}
}

func TestPlate(t *testing.T) {
	// A plate thinner than h still gets one division through its thickness.
	m, err := Plate(2, 1, 0.01, 0.25)
	if err != nil {
		t.Fatal(err)
	}
	requireClosedSphereLike(t, m)
	s := m.Stats()
	if want := 2 * 1 * 0.01; math.Abs(s.Volume-want) > 1e-13*want {
		t.Errorf("volume %v, want %v", s.Volume, want)
	}
	if s.Max.Z != 0.005 || s.Min.Z != -0.005 || s.Max.X != 1 || s.Max.Y != 0.5 {
		t.Errorf("bounding box %v..%v", s.Min, s.Max)
	}
	// 8×4 cells on top and bottom, 8×1 and 4×1 on the sides.
	if want := 4 * (8*4 + 4*1 + 1*8); s.Triangles != want {
		t.Errorf("%d triangles, want %d", s.Triangles, want)
	}
}

func TestCylinder(t *testing.T) {
	// The faceted cylinder is a prism on the regular nθ-gon inscribed in the
	// circle: volume (nθ/2) R² sin(2π/nθ) H and area 2·(nθ/2) R² sin(2π/nθ)
	// + nθ·2R sin(π/nθ)·H (elementary geometry), exact to rounding; caps
	// are planar so their triangulation does not change either number.
	cases := []struct{ r, height, h float64 }{
		{1, 2, 0.5},
		{1, 2, 0.1},
		{0.5, 3, 0.2},
		{2, 0.1, 0.3},
		{0.01, 1, 1}, // coarse: the minimum of 6 points around
	}
	for _, c := range cases {
		m, err := Cylinder(c.r, c.height, c.h)
		if err != nil {
			t.Fatal(err)
		}
		requireClosedSphereLike(t, m)
		nth := max(6, int(math.Ceil(2*math.Pi*c.r/c.h-1e-9)))
		poly := float64(nth) / 2 * c.r * c.r * math.Sin(2*math.Pi/float64(nth))
		s := m.Stats()
		if want := poly * c.height; math.Abs(s.Volume-want) > 1e-12*want {
			t.Errorf("%s: volume %v, want %v", m.Name, s.Volume, want)
		}
		wantA := 2*poly + float64(nth)*2*c.r*math.Sin(math.Pi/float64(nth))*c.height
		if math.Abs(s.Area-wantA) > 1e-12*wantA {
			t.Errorf("%s: area %v, want %v", m.Name, s.Area, wantA)
		}
		// Edges are about h: none longer than 2.5 h (the longest are the
		// diagonals of side cells and the stitches between cap rings).
		if s.MaxEdge > 2.5*math.Max(c.h, 2*math.Pi*c.r/6) {
			t.Errorf("%s: longest edge %g for h = %g", m.Name, s.MaxEdge, c.h)
		}
		// And the mesh converges to the true cylinder: πR²H to O(1/nθ²).
		if rel := math.Abs(s.Volume-math.Pi*c.r*c.r*c.height) / (math.Pi * c.r * c.r * c.height); rel > 4*math.Pi*math.Pi/(6*float64(nth*nth)) {
			t.Errorf("%s: volume %g off πR²H by %.3g", m.Name, s.Volume, rel)
		}
	}
}
