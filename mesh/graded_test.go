package mesh

import (
	"math"
	"math/rand/v2"
	"sort"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// bruteDistance is the distance from p to m by visiting every triangle.
func bruteDistance(m *Mesh, p r3.Vec) float64 {
	best := math.Inf(1)
	for tr := range m.Triangles {
		a, b, c := m.Corners(tr)
		best = math.Min(best, r3.Norm2(r3.Sub(p, closestOnTriangle(p, a, b, c))))
	}
	return math.Sqrt(best)
}

// TestTreeDistance compares the point–mesh distance through the hierarchy
// with every triangle visited (the same closest-point routine, so they must
// agree exactly), and with the distance from a point to an axis-aligned box,
// sqrt(Σ max(0, |pᵢ| - hᵢ)²) outside it and min(hᵢ - |pᵢ|) inside (elementary
// geometry), which the box mesh represents exactly: agreement to 1e-14.
func TestTreeDistance(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	sphere, err := Sphere(1, 0.2)
	if err != nil {
		t.Fatal(err)
	}
	sphere = sphere.Translate(r3.Vec{X: 0.3, Y: -0.2, Z: 0.1})
	st := NewTree(sphere)
	for k := 0; k < 300; k++ {
		p := randVec(rng, 3)
		if got, want := st.Distance(p), bruteDistance(sphere, p); got != want {
			t.Fatalf("point %v: tree distance %v, brute force %v", p, got, want)
		}
	}
	half := r3.Vec{X: 0.5, Y: 1, Z: 1.5}
	box, err := Box(r3.Scale(2, half), 0.3)
	if err != nil {
		t.Fatal(err)
	}
	bt := NewTree(box)
	for k := 0; k < 300; k++ {
		p := randVec(rng, 3)
		out := r3.Vec{X: math.Max(0, math.Abs(p.X)-half.X), Y: math.Max(0, math.Abs(p.Y)-half.Y), Z: math.Max(0, math.Abs(p.Z)-half.Z)}
		want := r3.Norm(out)
		if want == 0 {
			want = math.Min(half.X-math.Abs(p.X), math.Min(half.Y-math.Abs(p.Y), half.Z-math.Abs(p.Z)))
		}
		if got := bt.Distance(p); math.Abs(got-want) > 1e-14 {
			t.Fatalf("point %v: distance to the box %v, want %v", p, got, want)
		}
	}
	if d := NewTree(&Mesh{}).Distance(r3.Vec{}); !math.IsInf(d, 1) {
		t.Errorf("empty tree: distance %v, want +Inf", d)
	}
	if d := bt.Distance(r3.Vec{X: math.NaN()}); !math.IsNaN(d) {
		t.Errorf("NaN point: distance %v, want NaN", d)
	}
}

// TestGradingSizeFunc evaluates the grading above the top face of a large
// plate, where the distance to the plate is the height z above it
// (elementary geometry), against h = min(Far, Near + Growth·(z - dmin)) to
// rounding (1e-15 relative).
func TestGradingSizeFunc(t *testing.T) {
	plate, err := Plate(100, 100, 1, 10)
	if err != nil {
		t.Fatal(err)
	}
	plate = plate.Translate(r3.Vec{Z: -0.5}) // top face at z = 0
	others := []*Tree{NewTree(plate)}
	cases := []struct {
		g    Grading
		dmin float64
		z    float64
		want float64
	}{
		{Grading{Near: 0.05, Far: 0.5}, 0.1, 0.1, 0.05},                  // at the gap
		{Grading{Near: 0.05, Far: 0.5}, 0.1, 0.3, 0.05 + 0.5*0.2},        // default growth 0.5
		{Grading{Near: 0.05, Far: 0.5}, 0.1, 2, 0.5},                     // capped at Far
		{Grading{Near: 0.05, Far: 0.5}, 0.1, 0.02, 0.05},                 // closer than dmin: Near
		{Grading{Near: 0.01, Far: 1, Growth: 0.2}, 0.1, 1.1, 0.01 + 0.2}, // own growth
		{Grading{Near: 0.2, Far: 0.2}, 0.1, 0.5, 0.2},                    // uniform
	}
	for _, c := range cases {
		got := c.g.SizeFunc(others, c.dmin)(r3.Vec{X: 1.3, Y: -2.1, Z: c.z})
		if math.Abs(got-c.want) > 1e-15*c.want {
			t.Errorf("%+v, dmin %g, height %g: size %v, want %v", c.g, c.dmin, c.z, got, c.want)
		}
	}
	if got := (Grading{Near: 0.1, Far: 0.7}).SizeFunc(nil, 1)(r3.Vec{}); got != 0.7 {
		t.Errorf("no other bodies: size %v, want Far", got)
	}
}

func TestGradingValidate(t *testing.T) {
	cases := []struct {
		g    Grading
		want string // "" for valid
	}{
		{Grading{Near: 0.1, Far: 1}, ""},
		{Grading{Near: 1, Far: 1, Growth: 2}, ""},
		{Grading{Near: 0, Far: 1}, "near size 0"},
		{Grading{Near: math.NaN(), Far: 1}, "near size NaN"},
		{Grading{Near: 0.1, Far: math.Inf(1)}, "far size +Inf"},
		{Grading{Near: 0.5, Far: 0.1}, "far must be at least near"},
		{Grading{Near: 0.1, Far: 1, Growth: -1}, "growth -1"},
	}
	for _, c := range cases {
		err := c.g.Validate()
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%+v: %v", c.g, err)
		case c.want != "" && (err == nil || !strings.Contains(err.Error(), c.want)):
			t.Errorf("%+v: error %v, want one saying %q", c.g, err, c.want)
		}
	}
	if _, err := GradedSphere(1, Grading{Near: 0.5, Far: 0.1}, nil); err == nil || !strings.Contains(err.Error(), "graded sphere") {
		t.Errorf("GradedSphere with a bad grading: %v", err)
	}
}

// sphereOverPlate is a unit sphere at the origin above a 6×6×0.5 plate whose
// top face is at z = -(1 + gap).
func sphereOverPlate(t testing.TB, gap float64) (plate *Mesh, others []*Tree) {
	t.Helper()
	p, err := Plate(6, 6, 0.5, 1)
	if err != nil {
		t.Fatal(err)
	}
	p = p.Translate(r3.Vec{Z: -(1 + gap + 0.25)})
	return p, []*Tree{NewTree(p)}
}

// TestGradedSphereOverPlate grades a unit sphere towards a plate at gap
// d = 0.1 with Near = d/2 (common practice: h ≤ d/2 at the closest
// approach) and Far = 0.4. Checked: the mesh is valid and every triangle
// meets the grading at its centroid; the triangle nearest the plate is at
// most Near·1.05 (its centroid lies less than h²/R above the lowest point,
// where the grading has grown by at most 0.5·h²/R = 0.05 Near); every
// vertex lies on the sphere (1e-15); the upper half, at least 1 + d from the
// plate, where the grading asks for Far, has a median edge above 4·Near; and
// the mesh has several times fewer triangles than the uniform icosphere at
// Near (the ratio is logged).
func TestGradedSphereOverPlate(t *testing.T) {
	const d = 0.1
	g := Grading{Near: d / 2, Far: 0.4}
	_, others := sphereOverPlate(t, d)
	size := g.SizeFunc(others, d)
	m, err := GradedSphere(1, g, size)
	if err != nil {
		t.Fatal(err)
	}
	requireRefined(t, m, g.clamp(size))
	for i, v := range m.Vertices {
		if math.Abs(r3.Norm(v)-1) > 1e-15 {
			t.Fatalf("vertex %d at radius %v", i, r3.Norm(v))
		}
	}
	nearest, sNear := -1, math.Inf(1)
	var upper []float64
	for tr := range m.Triangles {
		c := m.Centroid(tr)
		if s := others[0].Distance(c); s < sNear {
			nearest, sNear = tr, s
		}
		if c.Z > 0 {
			upper = append(upper, m.Diameter(tr))
		}
	}
	if h := m.Diameter(nearest); h > 1.05*g.Near {
		t.Errorf("triangle %d nearest the plate (centroid %.4g from it) has longest edge %.4g > 1.05·Near", nearest, sNear, h)
	}
	sort.Float64s(upper)
	if med := upper[len(upper)/2]; med < 4*g.Near || upper[len(upper)-1] > g.Far {
		t.Errorf("upper half: median edge %.3g (want > 4·Near = %.3g), largest %.3g (want ≤ Far %.3g)", med, 4*g.Near, upper[len(upper)-1], g.Far)
	}
	uniform, err := Sphere(1, g.Near)
	if err != nil {
		t.Fatal(err)
	}
	ratio := float64(len(uniform.Triangles)) / float64(len(m.Triangles))
	t.Logf("%s: %d triangles, uniform icosphere at Near: %d (%.1f times more)", m.Name, len(m.Triangles), len(uniform.Triangles), ratio)
	if ratio < 3 {
		t.Errorf("graded mesh only %.2f times smaller than the uniform one", ratio)
	}
}

// TestGradedShapes builds graded boxes, plates and cylinders towards a
// sphere and checks them like every refined mesh. Flat shapes keep their
// exact volume and area (to rounding, 1e-12 relative); on the cylinder every
// vertex stays on the surface: side and rim at the radius, caps in their
// planes (1e-12 relative), and the rim vertices, bent onto the circle,
// bring the volume closer to πR²H than the base mesh's (an inscribed
// polygon falls short of the circle, elementary geometry).
func TestGradedShapes(t *testing.T) {
	ball, err := Sphere(0.5, 0.1)
	if err != nil {
		t.Fatal(err)
	}
	g := Grading{Near: 0.03, Far: 0.5}
	t.Run("box", func(t *testing.T) {
		tree := NewTree(ball.Translate(r3.Vec{X: 1.2}))
		m, err := GradedBox(r3.Vec{X: 2, Y: 1, Z: 1}, g, g.SizeFunc([]*Tree{tree}, 0.2))
		if err != nil {
			t.Fatal(err)
		}
		requireRefined(t, m, g.clamp(g.SizeFunc([]*Tree{tree}, 0.2)))
		s := m.Stats()
		if math.Abs(s.Volume-2) > 1e-12*2 || math.Abs(s.Area-10) > 1e-12*10 {
			t.Errorf("%s: area %v, volume %v; want 10, 2", m.Name, s.Area, s.Volume)
		}
		t.Logf("%s: %d triangles", m.Name, s.Triangles)
	})
	t.Run("plate", func(t *testing.T) {
		tree := NewTree(ball.Translate(r3.Vec{Z: 0.05 + 0.1 + 0.5}))
		size := g.SizeFunc([]*Tree{tree}, 0.1)
		m, err := GradedPlate(3, 3, 0.1, g, size)
		if err != nil {
			t.Fatal(err)
		}
		requireRefined(t, m, g.clamp(size))
		s := m.Stats()
		if math.Abs(s.Volume-0.9) > 1e-12*0.9 || math.Abs(s.Area-(18+1.2)) > 1e-12*19.2 {
			t.Errorf("%s: area %v, volume %v; want 19.2, 0.9", m.Name, s.Area, s.Volume)
		}
		t.Logf("%s: %d triangles", m.Name, s.Triangles)
	})
	t.Run("cylinder", func(t *testing.T) {
		const R, H = 1.0, 1.5
		// A ball near the top rim, so rim, side and cap all get refined.
		tree := NewTree(ball.Translate(r3.Vec{X: 1.3, Z: 1.2}))
		size := g.SizeFunc([]*Tree{tree}, 0.2)
		m, err := GradedCylinder(R, H, g, size)
		if err != nil {
			t.Fatal(err)
		}
		requireRefined(t, m, g.clamp(size))
		base, err := Cylinder(R, H, g.Far)
		if err != nil {
			t.Fatal(err)
		}
		rim := 0
		for i, v := range m.Vertices {
			rho, cap := math.Hypot(v.X, v.Y), math.Abs(math.Abs(v.Z)-H/2) <= 1e-12
			switch {
			case cap && math.Abs(rho-R) <= 1e-12:
				rim++
			case cap && rho < R:
			case !cap && math.Abs(rho-R) <= 1e-12:
			default:
				t.Fatalf("vertex %d at %v is neither on the side nor in a cap", i, v)
			}
		}
		baseRim := 0
		for _, v := range base.Vertices {
			if math.Abs(math.Abs(v.Z)-H/2) <= 1e-12 && math.Abs(math.Hypot(v.X, v.Y)-R) <= 1e-12 {
				baseRim++
			}
		}
		exact := math.Pi * R * R * H
		v0, v1 := base.Volume(), m.Volume()
		t.Logf("%s: %d triangles, %d rim vertices (base %d), volume error %.3e -> %.3e", m.Name, len(m.Triangles), rim, baseRim, 1-v0/exact, 1-v1/exact)
		if rim <= baseRim {
			t.Errorf("the rim was not refined: %d vertices, base %d", rim, baseRim)
		}
		if !(v1 > v0 && v1 < exact) {
			t.Errorf("volume %v: want between the base mesh's %v and πR²H = %v", v1, v0, exact)
		}
	})
}

// TestCylinderProjector checks the projections at points whose images are
// known exactly; 1e-15 allows the rounding of one division and square root.
func TestCylinderProjector(t *testing.T) {
	p := CylinderProjector(2, 1)
	cases := []struct{ in, want r3.Vec }{
		{r3.Vec{X: 1, Y: 1, Z: 0.3}, r3.Vec{X: math.Sqrt2, Y: math.Sqrt2, Z: 0.3}}, // side: radial
		{r3.Vec{X: 1, Y: 1, Z: 1}, r3.Vec{X: 1, Y: 1, Z: 1}},                       // cap: stays
		{r3.Vec{X: 0.5, Z: -1}, r3.Vec{X: 0.5, Z: -1}},                             // cap: stays
		{r3.Vec{Z: 0.2}, r3.Vec{Z: 0.2}},                                           // axis: stays
	}
	for _, c := range cases {
		if got := p(c.in); r3.Norm(r3.Sub(got, c.want)) > 1e-15 {
			t.Errorf("%v -> %v, want %v", c.in, got, c.want)
		}
	}
	s := SphereProjector(r3.Vec{X: 1}, 2)
	if got := s(r3.Vec{X: 1, Y: 0.5}); got != (r3.Vec{X: 1, Y: 2}) {
		t.Errorf("sphere projection %v", got)
	}
}

// bruteCoarse is CoarseNear's rule evaluated by visiting every pair of
// triangles: near means within 3·gap of the plate, coarse means a longest
// edge above max(gap, s)/2 with s the centroid's distance.
func bruteCoarse(m, other *Mesh, gap float64) map[int]bool {
	out := make(map[int]bool)
	for tr := range m.Triangles {
		h := m.Diameter(tr)
		s := bruteDistance(other, m.Centroid(tr))
		if !(h > 0.5*math.Max(gap, s)*(1+1e-12)) {
			continue
		}
		a, b, c := m.Corners(tr)
		ta := [3]r3.Vec{a, b, c}
		near := false
		for o := range other.Triangles {
			p, q, r := other.Corners(o)
			tb := [3]r3.Vec{p, q, r}
			if d2, _, _ := triangleDistance(&ta, &tb); d2 < 9*gap*gap {
				near = true
				break
			}
		}
		if near {
			out[tr] = true
		}
	}
	return out
}

// TestCoarseNear: a coarse sphere above a plate at gap 0.1 has triangles
// near the closest approach larger than half the gap (common practice:
// h ≤ d/2 there); CoarseNear must find exactly those of the rule evaluated by
// brute force, name them in the summary, and find none once the sphere is
// graded with Near = d/2, nor on a uniform sphere of edges below d/2.
func TestCoarseNear(t *testing.T) {
	const d = 0.1
	plate, others := sphereOverPlate(t, d)
	coarse, err := Sphere(1, 0.4)
	if err != nil {
		t.Fatal(err)
	}
	cs := CoarseNear(coarse, others, d)
	want := bruteCoarse(coarse, plate, d)
	if len(cs) == 0 || len(cs) != len(want) {
		t.Fatalf("found %d coarse triangles, brute force %d", len(cs), len(want))
	}
	nearest, sNear := -1, math.Inf(1)
	for tr := range coarse.Triangles {
		if s := bruteDistance(plate, coarse.Centroid(tr)); s < sNear {
			nearest, sNear = tr, s
		}
	}
	found := false
	for _, c := range cs {
		if !want[c.Triangle] {
			t.Errorf("%v: not coarse by the brute-force rule", c)
		}
		if c.Centroid != coarse.Centroid(c.Triangle) || c.Size != coarse.Diameter(c.Triangle) || c.Distance != bruteDistance(plate, c.Centroid) {
			t.Errorf("%v: wrong centroid, size or distance", c)
		}
		found = found || c.Triangle == nearest
	}
	if !found {
		t.Errorf("triangle %d nearest the plate not reported", nearest)
	}
	sum := CoarseSummary(cs, d)
	t.Log(sum)
	for _, w := range []string{"triangles near the closest approach are larger than half the local gap (smallest gap 0.1)", "largest 0.", "refine with mesh_size {near: 0.05, far: 0."} {
		if !strings.Contains(sum, w) {
			t.Errorf("summary %q does not say %q", sum, w)
		}
	}
	if strings.Contains(sum, "\n") {
		t.Errorf("summary spans several lines: %q", sum)
	}
	if !strings.HasPrefix(cs[0].String(), "triangle ") {
		t.Errorf("String() = %q", cs[0].String())
	}

	g := Grading{Near: d / 2, Far: 0.4}
	graded, err := GradedSphere(1, g, g.SizeFunc(others, d))
	if err != nil {
		t.Fatal(err)
	}
	if cs := CoarseNear(graded, others, d); len(cs) != 0 {
		t.Errorf("graded sphere (%d triangles): %s; first %v", len(graded.Triangles), CoarseSummary(cs, d), cs[0])
	}
	fine, err := Sphere(1, d/2)
	if err != nil {
		t.Fatal(err)
	}
	if cs := CoarseNear(fine, others, d); len(cs) != 0 {
		t.Errorf("uniform sphere at d/2: %s", CoarseSummary(cs, d))
	}
	if CoarseSummary(nil, d) != "" || CoarseNear(coarse, nil, d) != nil || CoarseNear(coarse, others, 0) != nil {
		t.Error("empty input must give nothing")
	}
}

// BenchmarkRefineGradedSphere grades a unit sphere towards a plate at gap
// R/25 with Near = R/50 and Far = R/4, and reports the triangles made per
// second and their number.
func BenchmarkRefineGradedSphere(b *testing.B) {
	const d = 1.0 / 25
	_, others := sphereOverPlate(b, d)
	g := Grading{Near: d / 2, Far: 0.25}
	size := g.SizeFunc(others, d)
	var n int
	for b.Loop() {
		m, err := GradedSphere(1, g, size)
		if err != nil {
			b.Fatal(err)
		}
		n = len(m.Triangles)
	}
	b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "triangles/s")
	b.ReportMetric(float64(n), "triangles")
}
