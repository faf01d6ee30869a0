package mesh

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

const refineFixtures = "../testdata/mesh/refine"

// tetraCorners are the corners of the fixture tetrahedron: the right-angled
// corner at the origin with legs 2, 1 and 0.5 along x, y and z.
var tetraCorners = [4]r3.Vec{{}, {X: 2}, {Y: 1}, {Z: 0.5}}

// tetraSTL is the fixture tetra.stl, an ASCII STL file as a CAD program
// would export it: unshared vertices, unit normals, outward vertex order.
func tetraSTL() []byte {
	o, a, b, c := tetraCorners[0], tetraCorners[1], tetraCorners[2], tetraCorners[3]
	faces := [][3]r3.Vec{{o, b, a}, {o, a, c}, {o, c, b}, {a, b, c}}
	var s strings.Builder
	s.WriteString("solid tetra\n")
	for _, f := range faces {
		n := r3.Unit(r3.Cross(r3.Sub(f[1], f[0]), r3.Sub(f[2], f[0])))
		fmt.Fprintf(&s, "facet normal %.9g %.9g %.9g\n  outer loop\n", n.X, n.Y, n.Z)
		for _, v := range f {
			fmt.Fprintf(&s, "    vertex %g %g %g\n", v.X, v.Y, v.Z)
		}
		s.WriteString("  endloop\nendfacet\n")
	}
	s.WriteString("endsolid tetra\n")
	return []byte(s.String())
}

// TestRefineFixtures keeps testdata/mesh/refine in step with its generator;
// run with -update to rewrite the files.
func TestRefineFixtures(t *testing.T) {
	path := filepath.Join(refineFixtures, "tetra.stl")
	want := tetraSTL()
	if *update {
		if err := os.MkdirAll(refineFixtures, 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, want, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	got, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test ./mesh -run TestRefineFixtures -update)", err)
	}
	if string(got) != string(want) {
		t.Errorf("%s differs from its generator (run with -update)", path)
	}
}

func loadTetra(t testing.TB) *Mesh {
	t.Helper()
	m, err := Load(filepath.Join(refineFixtures, "tetra.stl"))
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func constSize(h float64) func(r3.Vec) float64 { return func(r3.Vec) float64 { return h } }

// requireRefined checks what Refine promises: Check finds nothing (closed,
// manifold, consistently and outward oriented, no degenerate or duplicate
// triangles: a hanging node would leave open edges), the Euler
// characteristic V - E + F is 2 (genus 0, Euler's polyhedron formula), the
// volume is positive, no two vertices coincide, and every triangle's longest
// edge is at most size at its centroid (exactly: Refine compares the same
// numbers).
func requireRefined(t *testing.T, m *Mesh, size func(r3.Vec) float64) {
	t.Helper()
	if ps := m.Check(); len(ps) != 0 {
		t.Fatalf("%s: Check found %d problems, first: %v", m.Name, len(ps), ps[0])
	}
	s := m.Stats()
	if chi := s.Vertices - s.Edges + s.Triangles; chi != 2 {
		t.Errorf("%s: Euler characteristic V-E+F = %d-%d+%d = %d, want 2", m.Name, s.Vertices, s.Edges, s.Triangles, chi)
	}
	if s.Volume <= 0 {
		t.Errorf("%s: volume %g, want > 0", m.Name, s.Volume)
	}
	seen := make(map[r3.Vec]int, len(m.Vertices))
	for i, v := range m.Vertices {
		if j, ok := seen[v]; ok {
			t.Fatalf("%s: vertices %d and %d coincide at %v", m.Name, j, i, v)
		}
		seen[v] = i
	}
	for tr := range m.Triangles {
		if h, want := m.Diameter(tr), size(m.Centroid(tr)); h > want {
			t.Fatalf("%s: triangle %d has longest edge %g > size %g at its centroid", m.Name, tr, h, want)
		}
	}
}

// TestRefineFlatKeepsShape refines meshes with flat faces uniformly, without
// projection. The new vertices lie on the old edges, so the surface is
// unchanged: area and volume equal those of the input to rounding (relative
// 1e-12 covers sums of up to ~1e5 terms of relative error 1e-16), and equal
// the exact values of the solid, where the solid is a polyhedron: the unit
// cube (area 6, volume 1) and the tetrahedron with legs 2, 1, 0.5 (volume
// 2·1·0.5/6; area 1 + 0.5 + 0.25 of the right-angled faces plus
// |(0.5, 1, 2)|/2 of the slanted one; elementary geometry).
func TestRefineFlatKeepsShape(t *testing.T) {
	box, err := Box(r3.Vec{X: 1, Y: 2, Z: 3}, 1)
	if err != nil {
		t.Fatal(err)
	}
	plate, err := Plate(4, 3, 0.2, 1)
	if err != nil {
		t.Fatal(err)
	}
	cyl, err := Cylinder(1, 2, 0.7)
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name         string
		m            *Mesh
		h            float64
		area, volume float64 // exact solid; 0: compare with the input only
	}{
		{"unit cube", unitCube(), 0.1, 6, 1},
		{"tetra.stl", loadTetra(t), 0.05, 1.75 + 0.5*math.Sqrt(5.25), 1.0 / 6},
		{"box", box, 0.13, 2 * (2 + 6 + 3), 6},
		{"plate", plate, 0.3, 2 * (12 + 0.8 + 0.6), 2.4},
		{"faceted cylinder", cyl, 0.25, 0, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			in := c.m.Stats()
			r, err := Refine(c.m, constSize(c.h), nil)
			if err != nil {
				t.Fatal(err)
			}
			requireRefined(t, r, constSize(c.h))
			out := r.Stats()
			t.Logf("%s: %d -> %d triangles, edges %.3g..%.3g", r.Name, in.Triangles, out.Triangles, out.MinEdge, out.MaxEdge)
			const tol = 1e-12
			if math.Abs(out.Area-in.Area) > tol*in.Area || math.Abs(out.Volume-in.Volume) > tol*in.Volume {
				t.Errorf("area %v -> %v, volume %v -> %v: must not change", in.Area, out.Area, in.Volume, out.Volume)
			}
			if c.area > 0 && (math.Abs(out.Area-c.area) > tol*c.area || math.Abs(out.Volume-c.volume) > tol*c.volume) {
				t.Errorf("area %v, volume %v; want %v, %v", out.Area, out.Volume, c.area, c.volume)
			}
			if !strings.HasPrefix(r.Name, c.m.Name+" refined to h=") {
				t.Errorf("name %q does not record the refinement of %q", r.Name, c.m.Name)
			}
		})
	}
}

// TestRefineSphereConvergence refines the icosahedron uniformly with the new
// vertices projected onto the unit sphere. The inscribed polyhedron's area
// and volume fall short of 4π and 4π/3 by O(h²) (the chord of a circle of
// radius R deviates from it by h²/8R; common practice), so with the number
// of triangles N ∝ h⁻² the relative errors times N stay constant: the
// observed order log(e₁/e₂)/log(N₂/N₁) must be 1 within 0.15 (longest-edge
// bisection mixes triangle shapes from level to level, which moves the
// constant by some per cent), and every vertex must lie on the sphere to
// rounding (1e-15).
func TestRefineSphereConvergence(t *testing.T) {
	ico, err := SphereLevel(1, 1)
	if err != nil {
		t.Fatal(err)
	}
	proj := SphereProjector(r3.Vec{}, 1)
	var prevA, prevV, prevN float64
	for _, h := range []float64{0.3, 0.15, 0.075, 0.0375} {
		m, err := Refine(ico, constSize(h), proj)
		if err != nil {
			t.Fatal(err)
		}
		requireRefined(t, m, constSize(h))
		for i, v := range m.Vertices {
			if math.Abs(r3.Norm(v)-1) > 1e-15 {
				t.Fatalf("h=%g: vertex %d at radius %v", h, i, r3.Norm(v))
			}
		}
		s := m.Stats()
		eA := 1 - s.Area/(4*math.Pi)
		eV := 1 - s.Volume/(4*math.Pi/3)
		n := float64(s.Triangles)
		if eA <= 0 || eV <= 0 {
			t.Fatalf("h=%g: an inscribed polyhedron must fall short: errors %g, %g", h, eA, eV)
		}
		if prevN > 0 {
			pA := math.Log(prevA/eA) / math.Log(n/prevN)
			pV := math.Log(prevV/eV) / math.Log(n/prevN)
			t.Logf("h=%g: %d triangles, area error %.3e (order in 1/N %.3f), volume error %.3e (order %.3f)", h, s.Triangles, eA, pA, eV, pV)
			if math.Abs(pA-1) > 0.15 || math.Abs(pV-1) > 0.15 {
				t.Errorf("h=%g: orders %.3f, %.3f in 1/N, want 1 ± 0.15 (error ∝ h²)", h, pA, pV)
			}
		}
		prevA, prevV, prevN = eA, eV, n
	}
}

// minAngle returns the smallest interior angle (radians) of m's triangles.
func minAngle(m *Mesh) float64 {
	best := math.Pi
	for tr := range m.Triangles {
		a, b, c := m.Corners(tr)
		for _, p := range [3][3]r3.Vec{{a, b, c}, {b, c, a}, {c, a, b}} {
			u, v := r3.Sub(p[1], p[0]), r3.Sub(p[2], p[0])
			best = math.Min(best, math.Atan2(r3.Norm(r3.Cross(u, v)), r3.Dot(u, v)))
		}
	}
	return best
}

// TestRefineMinAngle checks the angle bound of longest-edge bisection: every
// triangle made by repeated longest-edge bisection of a triangle with
// smallest angle α has all angles ≥ α/2 (Rosenberg & Stenger, Math. Comp.
// 29, 390 (1975); Rivara, Int. J. Numer. Meth. Eng. 20, 745 (1984); recalled
// from memory). Strongly graded sizes make propagation split many triangles
// that were not marked. On flat faces the bound is a theorem and is checked
// with no slack. On the sphere the projected midpoints move the vertices
// by O(h²/R), outside the theorem, and the bound is checked as observed
// behaviour.
func TestRefineMinAngle(t *testing.T) {
	plate, err := Plate(4, 4, 0.5, 1)
	if err != nil {
		t.Fatal(err)
	}
	cyl, err := Cylinder(1, 1.5, 0.6)
	if err != nil {
		t.Fatal(err)
	}
	ico, err := SphereLevel(1, 2)
	if err != nil {
		t.Fatal(err)
	}
	// Fine near a point on each surface, coarse away from it.
	graded := func(p0 r3.Vec, near float64) func(r3.Vec) float64 {
		return func(p r3.Vec) float64 { return near + 0.3*r3.Norm(r3.Sub(p, p0)) }
	}
	cases := []struct {
		name    string
		m       *Mesh
		size    func(r3.Vec) float64
		project func(r3.Vec) r3.Vec
	}{
		{"tetra.stl", loadTetra(t), graded(r3.Vec{X: 0.5, Y: 0.2}, 0.005), nil},
		{"plate", plate, graded(r3.Vec{X: 0.3, Y: -0.2, Z: 0.25}, 0.01), nil},
		{"faceted cylinder", cyl, graded(r3.Vec{X: 1, Z: 0.2}, 0.01), nil},
		{"sphere", ico, graded(r3.Vec{Z: -1}, 0.01), SphereProjector(r3.Vec{}, 1)},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := Refine(c.m, c.size, c.project)
			if err != nil {
				t.Fatal(err)
			}
			requireRefined(t, r, c.size)
			a0, a1 := minAngle(c.m), minAngle(r)
			t.Logf("%d -> %d triangles; smallest angle %.2f° -> %.2f° (bound %.2f°)",
				len(c.m.Triangles), len(r.Triangles), a0*180/math.Pi, a1*180/math.Pi, a0*90/math.Pi)
			if a1 < a0/2 {
				t.Errorf("smallest angle %.4f° below half the initial %.4f°", a1*180/math.Pi, a0*180/math.Pi)
			}
		})
	}
}

// TestRefineKeepsFineMesh: a mesh already within the size comes back with
// the same triangles.
func TestRefineKeepsFineMesh(t *testing.T) {
	m, err := SphereLevel(1, 3)
	if err != nil {
		t.Fatal(err)
	}
	r, err := Refine(m, constSize(1), SphereProjector(r3.Vec{}, 1))
	if err != nil {
		t.Fatal(err)
	}
	if !sameGeometry(m, r, 0) {
		t.Errorf("%s: changed a mesh that needs no refinement (%d -> %d triangles)", r.Name, len(m.Triangles), len(r.Triangles))
	}
	// Size +Inf means no limit.
	if r, err = Refine(m, constSize(math.Inf(1)), nil); err != nil || !sameGeometry(m, r, 0) {
		t.Errorf("size +Inf: err %v, changed %v", err, err == nil && !sameGeometry(m, r, 0))
	}
}

// TestRefineTetrahedron refines the smallest closed mesh, in which every
// vertex has degree 3 and each pair of triangles is adjacent.
func TestRefineTetrahedron(t *testing.T) {
	m := &Mesh{Name: "tetrahedron", Vertices: tetraCorners[:], Triangles: [][3]int{{0, 2, 1}, {0, 1, 3}, {0, 3, 2}, {1, 2, 3}}}
	if err := m.Validate(); err != nil {
		t.Fatal(err)
	}
	for _, h := range []float64{2, 1.5, 1, 0.5} {
		r, err := Refine(m, constSize(h), nil)
		if err != nil {
			t.Fatal(err)
		}
		requireRefined(t, r, constSize(h))
	}
}

func TestRefineErrors(t *testing.T) {
	open, err := Load(filepath.Join(fixtures, "open_cube.stl"))
	if err != nil {
		t.Fatal(err)
	}
	ico, err := SphereLevel(1, 1)
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name    string
		m       *Mesh
		size    func(r3.Vec) float64
		project func(r3.Vec) r3.Vec
		want    []string
	}{
		{"no mesh", nil, constSize(1), nil, []string{"no mesh"}},
		{"no size", ico, nil, nil, []string{"no size function"}},
		{"open mesh", open, constSize(0.1), nil, []string{"cannot refine", "open edge"}},
		{"negative size", ico, constSize(-1), nil, []string{"size function gave -1", "triangle", "of the input", "positive length"}},
		{"NaN size", ico, func(p r3.Vec) float64 {
			if p.Z > 0.5 {
				return math.NaN()
			}
			return 1
		}, nil, []string{"size function gave NaN", "centroid of "}},
		{"folding projection", ico, constSize(0.5), func(p r3.Vec) r3.Vec { return r3.Scale(-1, p) }, []string{"folds or flattens "}},
		{"non-finite projection", ico, constSize(0.5), func(r3.Vec) r3.Vec { return r3.Vec{X: math.Inf(1)} }, []string{"must be a finite point"}},
		{"too fine", unitCube(), constSize(1e-4), nil, []string{"more than 2000000 triangles", "smallest size asked for is 0.0001", "larger size"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Refine(c.m, c.size, c.project)
			if err == nil {
				t.Fatal("no error")
			}
			t.Log(err)
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not say %q", err, w)
				}
			}
		})
	}
}

// TestRefineLimit names the smallest size asked for and where when the
// triangle limit is reached (the limit lowered to keep the test fast).
func TestRefineLimit(t *testing.T) {
	size := func(p r3.Vec) float64 { return 0.001 + 0.1*math.Abs(p.X-0.75) }
	_, err := refine(context.Background(), unitCube(), size, nil, 5000)
	if err == nil {
		t.Fatal("no error")
	}
	for _, w := range []string{"more than 5000 triangles", "smallest size asked for is 0.00"} {
		if !strings.Contains(err.Error(), w) {
			t.Errorf("error %q does not say %q", err, w)
		}
	}
}

func TestRefineContextCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := RefineContext(ctx, unitCube(), constSize(0.01), nil)
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("err = %v, want context.Canceled", err)
	}
}

// TestRefineRandomSizes refines several meshes with random size functions,
// smooth and discontinuous (a step across a random plane makes propagation
// reach far into the coarse side), and checks every result like any refined
// mesh; the input must not change.
func TestRefineRandomSizes(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	ico, err := SphereLevel(1, 2)
	if err != nil {
		t.Fatal(err)
	}
	cyl, err := Cylinder(1, 1.5, 0.6)
	if err != nil {
		t.Fatal(err)
	}
	bases := []struct {
		m   *Mesh
		mid func(a, b r3.Vec) r3.Vec
	}{
		{loadTetra(t), nil},
		{unitCube(), nil},
		{ico, func(a, b r3.Vec) r3.Vec { return r3.Unit(midpoint(a, b)) }},
		{cyl, cylinderMidpoint(1, 0.75)},
	}
	for k := 0; k < 24; k++ {
		base := bases[k%len(bases)]
		p0, n := randVec(rng, 1), r3.Unit(randVec(rng, 1))
		fine, slope := 0.01+0.04*rng.Float64(), rng.Float64()
		size := func(p r3.Vec) float64 { return fine + slope*r3.Norm(r3.Sub(p, p0)) }
		if k%2 == 1 {
			size = func(p r3.Vec) float64 {
				if r3.Dot(r3.Sub(p, p0), n) > 0 {
					return 4 * fine
				}
				return 1
			}
		}
		before := base.m.Clone()
		m, err := refine(context.Background(), base.m, size, base.mid, MaxTriangles)
		if err != nil {
			t.Fatal(err)
		}
		requireRefined(t, m, size)
		if !sameGeometry(before, base.m, 0) || before.Name != base.m.Name {
			t.Fatalf("case %d: the input mesh changed", k)
		}
	}
}
