package mesh

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

func randVec(rng *rand.Rand, s float64) r3.Vec {
	return r3.Vec{X: s * (2*rng.Float64() - 1), Y: s * (2*rng.Float64() - 1), Z: s * (2*rng.Float64() - 1)}
}

// inTriangle reports whether p lies in triangle t to within tol, by its
// distance to the nearest point found by dense barycentric sampling refined
// with the plane projection.
func onTriangle(p r3.Vec, t [3]r3.Vec, tol float64) bool {
	q := closestOnTriangle(p, t[0], t[1], t[2])
	return r3.Norm(r3.Sub(p, q)) <= tol
}

// sampledDistance is the smallest distance between points of two triangles
// on an n-step barycentric grid: an upper bound on the true distance that
// exceeds it by at most (longest edge of either)/n (each triangle point is
// within edge/n of a grid point; common practice).
func sampledDistance(a, b [3]r3.Vec, n int) float64 {
	grid := func(t [3]r3.Vec) []r3.Vec {
		var ps []r3.Vec
		for i := 0; i <= n; i++ {
			for j := 0; j <= n-i; j++ {
				ps = append(ps, latticePoint(t[0], t[1], t[2], n, i, j))
			}
		}
		return ps
	}
	pa, pb := grid(a), grid(b)
	best := math.Inf(1)
	for _, p := range pa {
		for _, q := range pb {
			best = math.Min(best, r3.Norm(r3.Sub(p, q)))
		}
	}
	return best
}

func longestEdge(t [3]r3.Vec) float64 {
	return math.Max(r3.Norm(r3.Sub(t[1], t[0])), math.Max(r3.Norm(r3.Sub(t[2], t[1])), r3.Norm(r3.Sub(t[0], t[2]))))
}

// TestTriangleDistanceAgainstSampling compares the exact triangle–triangle
// distance with brute-force sampling: the exact value must not exceed the
// sampled one (beyond rounding, 1e-12) and must lie within the sampling
// bound (edge/n) below it; the returned points must lie on their triangles
// (1e-12) and be the stated distance apart.
func TestTriangleDistanceAgainstSampling(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	const n = 40
	for k := 0; k < 100; k++ {
		var a, b [3]r3.Vec
		off := randVec(rng, 1.5)
		for i := range a {
			a[i] = randVec(rng, 1)
			b[i] = r3.Add(off, randVec(rng, 1))
		}
		if k%10 == 0 { // parallel planes and shared geometry are the hard cases
			for i := range b {
				b[i] = r3.Add(a[i], r3.Vec{X: 0.3, Z: 0.1 * float64(k%3)})
			}
		}
		d2, pa, pb := triangleDistance(&a, &b)
		d := math.Sqrt(d2)
		s := sampledDistance(a, b, n)
		bound := math.Max(longestEdge(a), longestEdge(b)) / n
		if d > s+1e-12 || d < s-bound-1e-12 {
			t.Fatalf("case %d: exact %v, sampled %v (bound %v)", k, d, s, bound)
		}
		if !onTriangle(pa, a, 1e-12) || !onTriangle(pb, b, 1e-12) {
			t.Fatalf("case %d: closest points off their triangles", k)
		}
		if math.Abs(r3.Norm(r3.Sub(pa, pb))-d) > 1e-12 {
			t.Fatalf("case %d: |pa-pb| = %v, d = %v", k, r3.Norm(r3.Sub(pa, pb)), d)
		}
	}
}

func TestTriangleDistanceCases(t *testing.T) {
	tri := func(a, b, c r3.Vec) [3]r3.Vec { return [3]r3.Vec{a, b, c} }
	base := tri(r3.Vec{}, r3.Vec{X: 1}, r3.Vec{Y: 1})
	cases := []struct {
		name string
		b    [3]r3.Vec
		want float64 // by hand
	}{
		{"vertex over face", tri(r3.Vec{X: .2, Y: .2, Z: .5}, r3.Vec{X: .2, Y: .2, Z: 2}, r3.Vec{X: .3, Y: .2, Z: 2}), 0.5},
		{"crossing edges", tri(r3.Vec{X: .5, Y: -1}, r3.Vec{X: .5, Y: 1}, r3.Vec{X: .5, Y: 0, Z: 3}), 0},
		{"edge above edge", tri(r3.Vec{X: .5, Y: -1, Z: .25}, r3.Vec{X: .5, Y: 1, Z: .25}, r3.Vec{X: .5, Y: 0, Z: 3}), 0.25},
		{"edge over edge", tri(r3.Vec{X: -1, Y: -.5, Z: 1}, r3.Vec{X: -1, Y: .5, Z: 1}, r3.Vec{X: -2, Y: 0, Z: 1}), math.Sqrt2},
		{"piercing", tri(r3.Vec{X: .2, Y: .2, Z: -1}, r3.Vec{X: .2, Y: .2, Z: 1}, r3.Vec{X: 5, Y: 5, Z: 0.5}), 0},
		{"coplanar apart", tri(r3.Vec{X: 2}, r3.Vec{X: 3}, r3.Vec{X: 2, Y: 1}), 1},
		{"coplanar overlapping", tri(r3.Vec{X: .1, Y: .1}, r3.Vec{X: .2, Y: .1}, r3.Vec{X: .1, Y: .2}), 0},
		{"shared vertex", tri(r3.Vec{}, r3.Vec{X: -1}, r3.Vec{Z: 1}), 0},
		{"parallel above", tri(r3.Vec{Z: 2}, r3.Vec{X: 1, Z: 2}, r3.Vec{Y: 1, Z: 2}), 2},
	}
	for _, c := range cases {
		d2, _, _ := triangleDistance(&base, &c.b)
		if math.Abs(math.Sqrt(d2)-c.want) > 1e-15 {
			t.Errorf("%s: %v, want %v", c.name, math.Sqrt(d2), c.want)
		}
		d2, _, _ = triangleDistance(&c.b, &base)
		if math.Abs(math.Sqrt(d2)-c.want) > 1e-15 {
			t.Errorf("%s (swapped): %v, want %v", c.name, math.Sqrt(d2), c.want)
		}
	}
}

// bruteGap measures every triangle pair.
func bruteGap(a, b *Mesh) float64 {
	best := math.Inf(1)
	for i := range a.Triangles {
		p0, p1, p2 := a.Corners(i)
		ta := [3]r3.Vec{p0, p1, p2}
		for j := range b.Triangles {
			q0, q1, q2 := b.Corners(j)
			tb := [3]r3.Vec{q0, q1, q2}
			d2, _, _ := triangleDistance(&ta, &tb)
			best = math.Min(best, d2)
		}
	}
	return math.Sqrt(best)
}

// TestGapTreeMatchesBruteForce checks the hierarchy's pruning: the tree
// search must return exactly the brute-force minimum.
func TestGapTreeMatchesBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	s1, _ := SphereLevel(1, 2)
	c1, _ := Cylinder(0.5, 2, 0.4)
	b1, _ := Box(r3.Vec{X: 1, Y: 0.5, Z: 2}, 0.4)
	for k := 0; k < 30; k++ {
		a := []*Mesh{s1, c1, b1}[k%3]
		b := []*Mesh{s1, c1, b1}[(k/3)%3]
		// Centres 0.5 to 3.5 apart: overlapping, close and separated.
		off := r3.Scale(0.5+3*rng.Float64(), r3.Unit(randVec(rng, 1)))
		b = b.Rotate(randVec(rng, 1), rng.Float64()*6, r3.Vec{}).Translate(off)
		d, pa, pb := Gap(a, b)
		if want := bruteGap(a, b); d != want {
			t.Fatalf("case %d: tree %v, brute force %v", k, d, want)
		}
		if math.Abs(r3.Norm(r3.Sub(pa, pb))-d) > 1e-12 {
			t.Fatalf("case %d: points %v apart, d = %v", k, r3.Norm(r3.Sub(pa, pb)), d)
		}
	}
}

// TestGapBoxes compares with distances worked out by hand for unit cubes
// (the faceted surface is the box itself). Tolerance 1e-14: a few roundings.
func TestGapBoxes(t *testing.T) {
	cube, _ := Box(r3.Vec{X: 1, Y: 1, Z: 1}, 0.5)
	cases := []struct {
		name  string
		other *Mesh
		want  float64
	}{
		{"face to face", cube.Translate(r3.Vec{X: 2}), 1},
		{"edge to edge", cube.Translate(r3.Vec{X: 2, Y: 3}), math.Sqrt(1 + 4)},
		{"corner to corner", cube.Translate(r3.Vec{X: 2, Y: 3, Z: 4}), math.Sqrt(1 + 4 + 9)},
		{"offset faces", cube.Translate(r3.Vec{X: 1.25, Y: 0.5, Z: -0.3}), 0.25},
		// Turned 45° about z, the cube reaches √2/2 along x.
		{"edge to face", cube.Rotate(r3.Vec{Z: 1}, math.Pi/4, r3.Vec{}).Translate(r3.Vec{X: 2}), 2 - 0.5 - math.Sqrt2/2},
		// Turned about the body diagonal's perpendicular so a corner
		// points along x: half body diagonal √3/2.
		{"corner to face", cube.Rotate(r3.Vec{Y: 1, Z: -1}, math.Acos(1/math.Sqrt(3)), r3.Vec{}).Translate(r3.Vec{X: 3}), 3 - 0.5 - math.Sqrt(3)/2},
		{"touching", cube.Translate(r3.Vec{X: 1}), 0},
		{"overlapping", cube.Translate(r3.Vec{X: 0.5, Y: 0.2}), 0},
	}
	for _, c := range cases {
		d, _, _ := Gap(cube, c.other)
		if math.Abs(d-c.want) > 1e-14 {
			t.Errorf("%s: gap %.16g, want %.16g", c.name, d, c.want)
		}
	}
}

// TestGapSpheres: two icospheres of radius R with centres L apart. For a
// sphere and its mirror image through the mid-plane the exact faceted gap is
// twice the smallest distance of a vertex to that plane (the segment between
// a point and any point of the mirror body crosses the plane). For any
// orientation it lies between L - 2R (the circumspheres) and L - 2 r_in (the
// inspheres, r_in = smallest distance of a face plane from the centre).
func TestGapSpheres(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for _, c := range []struct {
		n    int
		L    float64
		axis r3.Vec
	}{
		{4, 2.5, r3.Vec{X: 1}},
		{8, 2.1, r3.Vec{X: 1, Y: 1, Z: 0.3}},
		{16, 2.05, r3.Vec{X: -0.2, Y: 1, Z: 0.7}},
	} {
		const R = 1
		a, _ := SphereLevel(R, c.n)
		a = a.Rotate(randVec(rng, 1), 1, r3.Vec{})
		u := r3.Unit(c.axis)
		centre := r3.Scale(c.L/2, u)
		mirror := a.Mirror(centre, u)
		minPlane := math.Inf(1)
		for _, v := range a.Vertices {
			minPlane = math.Min(minPlane, c.L/2-r3.Dot(v, u))
		}
		d, pa, pb := Gap(a, mirror)
		if math.Abs(d-2*minPlane) > 1e-13 {
			t.Errorf("n=%d mirror: gap %.16g, want %.16g", c.n, d, 2*minPlane)
		}
		if math.Abs(r3.Dot(r3.Add(pa, pb), u)/2-c.L/2) > 1e-12 {
			t.Errorf("n=%d: closest points not symmetric about the mid-plane", c.n)
		}
		rIn := math.Inf(1)
		for tr := range a.Triangles {
			rIn = math.Min(rIn, r3.Dot(a.Normal(tr), a.Vertices[a.Triangles[tr][0]]))
		}
		b := a.Rotate(randVec(rng, 1), 2, r3.Vec{}).Translate(r3.Scale(c.L, u))
		d, _, _ = Gap(a, b)
		if d < c.L-2*R-1e-14 || d > c.L-2*rIn+1e-14 {
			t.Errorf("n=%d: gap %v outside [%v, %v]", c.n, d, c.L-2*R, c.L-2*rIn)
		}
	}
}

func TestContains(t *testing.T) {
	sph, _ := SphereLevel(1, 4)
	rIn := 0.98 // below the insphere radius of the 320-triangle sphere (0.9822, computed as in TestGapSpheres)
	box, _ := Box(r3.Vec{X: 2, Y: 1, Z: 0.5}, 0.2)
	cases := []struct {
		name string
		m    *Mesh
		p    r3.Vec
		want bool
	}{
		{"sphere centre", sph, r3.Vec{}, true},
		{"sphere inside", sph, r3.Vec{X: rIn * 0.6, Y: rIn * 0.6, Z: 0.1}, true},
		{"sphere outside", sph, r3.Vec{X: 1.01}, false},
		{"sphere far", sph, r3.Vec{X: 100, Y: -3}, false},
		{"box inside near face", box, r3.Vec{X: 0.999, Y: 0.1}, true},
		{"box outside near face", box, r3.Vec{X: 1.001, Y: 0.1}, false},
		{"box on a vertex's ray", box, r3.Vec{X: 0.2, Y: 0.1, Z: 0.05}, true}, // grid vertex at x=0.2
		{"reversed box inside", box.Mirror(r3.Vec{}, r3.Vec{Z: 1}).Scale(1), r3.Vec{}, true},
	}
	for _, c := range cases {
		if got := Contains(c.m, c.p); got != c.want {
			t.Errorf("%s: Contains = %v, want %v (winding %v)", c.name, got, c.want, windingNumber(c.m, c.p))
		}
	}
	// The winding number of an inside point is 1 to rounding (solid
	// angles sum to 4π; tolerance 1e-12 for ~300 terms).
	if w := windingNumber(sph, r3.Vec{X: 0.3}); math.Abs(w-1) > 1e-12 {
		t.Errorf("winding number %v", w)
	}
	if w := windingNumber(sph, r3.Vec{X: 3}); math.Abs(w) > 1e-12 {
		t.Errorf("outside winding number %v", w)
	}
}

func TestOverlap(t *testing.T) {
	s1, _ := SphereLevel(1, 4)
	small, _ := SphereLevel(0.3, 2)
	cube, _ := Box(r3.Vec{X: 1, Y: 1, Z: 1}, 0.5)
	cases := []struct {
		name string
		a, b *Mesh
		want bool
	}{
		{"apart", s1, s1.Translate(r3.Vec{X: 2.1}), false},
		{"intersecting", s1, s1.Translate(r3.Vec{X: 1.5}), true},
		{"nested, not touching", s1, small.Translate(r3.Vec{X: 0.2}), true},
		{"nested, other way round", small, s1, true},
		{"touching faces", cube, cube.Translate(r3.Vec{X: 1}), true},
		{"just apart", cube, cube.Translate(r3.Vec{X: 1 + 1e-9}), false},
	}
	for _, c := range cases {
		if got := Overlap(c.a, c.b); got != c.want {
			t.Errorf("%s: Overlap = %v, want %v", c.name, got, c.want)
		}
	}
}

func TestRay(t *testing.T) {
	box, _ := Box(r3.Vec{X: 1, Y: 1, Z: 1}, 0.25)
	tb := NewTree(box)
	sph, _ := SphereLevel(1, 8)
	ts := NewTree(sph)
	cases := []struct {
		name        string
		tree        *Tree
		o, dir      r3.Vec
		want        float64 // distance along the unit direction; < 0: miss
		lo, hi      float64 // range instead of exact value (hi > 0)
		wantNormalX float64 // expected x of the hit triangle's normal (0: not checked)
	}{
		{name: "from inside along +x", tree: tb, dir: r3.Vec{X: 1}, want: 0.5, wantNormalX: 1},
		{name: "from outside, long dir", tree: tb, o: r3.Vec{X: -5, Y: 0.1, Z: 0.2}, dir: r3.Vec{X: 10}, want: 4.5, wantNormalX: -1},
		{name: "diagonal", tree: tb, o: r3.Vec{X: -1, Y: -1, Z: 0.1}, dir: r3.Vec{X: 1, Y: 1}, want: 0.5 * math.Sqrt2},
		{name: "miss", tree: tb, o: r3.Vec{X: -5, Y: 2}, dir: r3.Vec{X: 1}, want: -1},
		{name: "pointing away", tree: tb, o: r3.Vec{X: 2}, dir: r3.Vec{X: 1}, want: -1},
		{name: "zero dir", tree: tb, dir: r3.Vec{}, want: -1},
		// Inscribed polyhedron: the hit lies between the insphere and the
		// circumsphere (radii 0.9955 and 1 for n = 8).
		{name: "sphere from outside", tree: ts, o: r3.Vec{Z: -4}, dir: r3.Vec{Z: 1}, lo: 4 - 1 - 1e-12, hi: 4 - 0.99},
	}
	for _, c := range cases {
		d, tri, ok := c.tree.Ray(c.o, c.dir)
		switch {
		case c.hi > 0:
			if !ok || d < c.lo || d > c.hi {
				t.Errorf("%s: %v %v, want in [%v, %v]", c.name, d, ok, c.lo, c.hi)
			}
		case c.want < 0:
			if ok {
				t.Errorf("%s: hit at %v, want a miss", c.name, d)
			}
		default:
			if !ok || math.Abs(d-c.want) > 1e-14 {
				t.Errorf("%s: %v %v, want %v", c.name, d, ok, c.want)
			}
			if c.wantNormalX != 0 && ok && math.Abs(c.tree.Mesh().Normal(tri).X-c.wantNormalX) > 1e-15 {
				t.Errorf("%s: hit triangle %d with normal %v", c.name, tri, c.tree.Mesh().Normal(tri))
			}
		}
	}
	// Against a brute-force scan of all triangles, for random rays from
	// inside the sphere (every such ray hits exactly once).
	rng := rand.New(rand.NewPCG(7, 8))
	for k := 0; k < 200; k++ {
		o, dir := randVec(rng, 0.5), randVec(rng, 1)
		d, tri, ok := ts.Ray(o, dir)
		u := r3.Unit(dir)
		best, bt := math.Inf(1), -1
		for i := range sph.Triangles {
			a, b, c := sph.Corners(i)
			if s, hit := rayTriangle(o, u, a, b, c); hit && s < best {
				best, bt = s, i
			}
		}
		if !ok || d != best || tri != bt {
			t.Fatalf("ray %d: tree (%v, %d, %v), brute force (%v, %d)", k, d, tri, ok, best, bt)
		}
	}
}

func TestOffsetForGap(t *testing.T) {
	cube, _ := Box(r3.Vec{X: 1, Y: 1, Z: 1}, 0.5)
	sph, _ := SphereLevel(1, 6)
	plate, _ := Plate(4, 4, 0.1, 0.5)
	other := cube.Translate(r3.Vec{X: 3})
	cases := []struct {
		name   string
		moving *Mesh
		others []*Mesh
		dir    r3.Vec
		gap    float64
		want   float64 // exact by hand; NaN: only check the gap
	}{
		{"cube recedes along +x", cube, []*Mesh{cube}, r3.Vec{X: 2}, 0.1, 1.1},
		{"cube approaches along -x", cube, []*Mesh{other}, r3.Vec{X: -1}, 0.25, -(3 - 1 - 0.25)},
		{"cube over a plate", cube, []*Mesh{plate}, r3.Vec{Z: 1}, 0.05, 0.5 + 0.05 + 0.05},
		{"two others, nearer wins", cube, []*Mesh{cube.Translate(r3.Vec{X: -5}), cube.Translate(r3.Vec{X: 0.5})}, r3.Vec{X: 1}, 0.2, 0.5 + 1 + 0.2},
		{"sphere off a sphere, oblique", sph, []*Mesh{sph}, r3.Vec{X: 1, Y: 1, Z: 0.2}, 0.2, math.NaN()},
		{"sphere over a plate", sph, []*Mesh{plate}, r3.Vec{Z: 1}, 0.01, math.NaN()},
		{"sphere next to a cube, glancing", sph, []*Mesh{cube.Translate(r3.Vec{Y: 1.6})}, r3.Vec{X: 1}, 0.3, math.NaN()},
	}
	for _, c := range cases {
		s, err := OffsetForGap(c.moving, c.others, c.dir, c.gap)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		moved := c.moving.Translate(r3.Scale(s, r3.Unit(c.dir)))
		got := math.Inf(1)
		for _, o := range c.others {
			d, _, _ := Gap(moved, o)
			got = math.Min(got, d)
		}
		// Bisection to 1e-12 relative in s moves the gap by at most as
		// much: 1e-11 absolute for these unit-size scenes.
		if math.Abs(got-c.gap) > 1e-11 {
			t.Errorf("%s: s = %v gives gap %.15g, want %g", c.name, s, got, c.gap)
		}
		if !math.IsNaN(c.want) && math.Abs(s-c.want) > 1e-11 {
			t.Errorf("%s: s = %.15g, want %.15g", c.name, s, c.want)
		}
		// Gap grows with s there.
		d, _, _ := Gap(c.moving.Translate(r3.Scale(s+1e-3, r3.Unit(c.dir))), c.others[0])
		if len(c.others) == 1 && d <= got {
			t.Errorf("%s: gap does not grow past the solution", c.name)
		}
	}
	errs := []struct {
		name   string
		others []*Mesh
		dir    r3.Vec
		gap    float64
		phrase string
	}{
		{"zero dir", []*Mesh{other}, r3.Vec{}, 0.1, "direction"},
		{"zero gap", []*Mesh{other}, r3.Vec{X: 1}, 0, "gap must be positive"},
		{"negative gap", []*Mesh{other}, r3.Vec{X: 1}, -1, "gap must be positive"},
		{"no others", nil, r3.Vec{X: 1}, 0.1, "no other bodies"},
		{"passes beside", []*Mesh{cube.Translate(r3.Vec{Y: 5})}, r3.Vec{X: 1}, 0.1, "never come within"},
	}
	for _, c := range errs {
		_, err := OffsetForGap(cube, c.others, c.dir, c.gap)
		if err == nil || !strings.Contains(err.Error(), c.phrase) || !strings.Contains(err.Error(), cube.Name) {
			t.Errorf("%s: error %v, want one naming %q and containing %q", c.name, err, cube.Name, c.phrase)
		}
	}
}

// BenchmarkGap measures the gap between two 5120-triangle icospheres 0.1
// apart (trees built once) and reports the triangle pairs whose distance was
// computed per second.
func BenchmarkGap(b *testing.B) {
	s, _ := SphereLevel(1, 16) // 5120 triangles
	o := s.Rotate(r3.Vec{X: 1, Y: 2, Z: 3}, 0.4, r3.Vec{}).Translate(r3.Vec{X: 2.1})
	ta, tb := NewTree(s), NewTree(o)
	pairs := 0
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		_, _, _, n := ta.gap(r3.Vec{}, tb, 0)
		pairs += n
	}
	b.ReportMetric(float64(pairs)/b.Elapsed().Seconds(), "pairs/s")
	b.ReportMetric(float64(pairs)/float64(b.N), "pairs/op")
}

// BenchmarkGapWithTrees includes building both trees.
func BenchmarkGapWithTrees(b *testing.B) {
	s, _ := SphereLevel(1, 16)
	o := s.Translate(r3.Vec{X: 2.1})
	for i := 0; i < b.N; i++ {
		Gap(s, o)
	}
}
