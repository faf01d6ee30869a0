package mesh

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// torus returns a closed torus of radii R and r on an n×m grid, outward
// oriented: genus 1.
func torus(R, r float64, n, m int) *Mesh {
	ms := &Mesh{Name: "torus"}
	for i := 0; i < n; i++ {
		u := 2 * math.Pi * float64(i) / float64(n)
		for j := 0; j < m; j++ {
			v := 2 * math.Pi * float64(j) / float64(m)
			ms.Vertices = append(ms.Vertices, r3.Vec{X: (R + r*math.Cos(v)) * math.Cos(u), Y: (R + r*math.Cos(v)) * math.Sin(u), Z: r * math.Sin(v)})
		}
	}
	id := func(i, j int) int { return (i%n)*m + j%m }
	for i := 0; i < n; i++ {
		for j := 0; j < m; j++ {
			a, b, c, d := id(i, j), id(i+1, j), id(i+1, j+1), id(i, j+1)
			ms.Triangles = append(ms.Triangles, [3]int{a, b, c}, [3]int{a, c, d})
		}
	}
	return ms
}

func loopTreeOf(t *testing.T, m *Mesh) (*Basis, *LoopTree) {
	t.Helper()
	b, err := NewBasis(m)
	if err != nil {
		t.Fatal(err)
	}
	lt, err := NewLoopTree(b)
	if err != nil {
		t.Fatal(err)
	}
	return b, lt
}

// TestLoopTreeCounts checks Euler's count (common practice: V - E + F = 2
// per closed genus-0 component): V - 1 loops and F - 1 trees per component,
// E functions in all, for one sphere and for two spheres in one mesh.
func TestLoopTreeCounts(t *testing.T) {
	s, err := SphereLevel(1, 3)
	if err != nil {
		t.Fatal(err)
	}
	two := s.Clone()
	off := len(two.Vertices)
	for _, v := range s.Vertices {
		two.Vertices = append(two.Vertices, r3.Add(v, r3.Vec{Z: 3}))
	}
	for _, tri := range s.Triangles {
		two.Triangles = append(two.Triangles, [3]int{tri[0] + off, tri[1] + off, tri[2] + off})
	}
	for _, tc := range []struct {
		name  string
		m     *Mesh
		comps int
	}{{"sphere", s, 1}, {"two spheres", two, 2}} {
		b, lt := loopTreeOf(t, tc.m)
		v, f := len(tc.m.Vertices), len(tc.m.Triangles)
		if lt.Loops() != v-tc.comps || lt.Len()-lt.Loops() != f-tc.comps || lt.Len() != b.Len() {
			t.Errorf("%s: %d loops and %d trees of %d, want %d and %d", tc.name, lt.Loops(), lt.Len()-lt.Loops(), b.Len(), v-tc.comps, f-tc.comps)
		}
	}
}

// TestLoopTreeDivergenceFree checks that each loop column carries no charge:
// the divergence of Σ c_e f_e, c_e l_e/A on T+ and -c_e l_e/A on T- (the RWG
// divergence, mesh.Edge), vanishes on every triangle to rounding (1e-12 of
// the terms).
func TestLoopTreeDivergenceFree(t *testing.T) {
	s, err := SphereLevel(1, 4)
	if err != nil {
		t.Fatal(err)
	}
	b, lt := loopTreeOf(t, s)
	for j := 0; j < lt.Loops(); j++ {
		edges, coefs := lt.Column(j)
		div := map[int]float64{}
		for k, e := range edges {
			ed := b.Edges[e]
			div[ed.Plus] += coefs[k] * ed.Length / s.Area(ed.Plus)
			div[ed.Minus] -= coefs[k] * ed.Length / s.Area(ed.Minus)
		}
		for tri, d := range div {
			if math.Abs(d) > 1e-12/s.Area(tri) {
				t.Fatalf("loop %d: divergence %g on triangle %d", j, d, tri)
			}
		}
	}
}

// TestLoopTreeMaps checks the four maps on random 3-column matrices against
// each other: Solve inverts Mul and SolveTrans inverts MulTrans (to 1e-11:
// the vertex-tree solves accumulate rounding along paths of up to a few
// dozen edges), and <T y, x> = <y, Tᵀ x> (1e-12).
func TestLoopTreeMaps(t *testing.T) {
	s, err := SphereLevel(1, 5)
	if err != nil {
		t.Fatal(err)
	}
	_, lt := loopTreeOf(t, s)
	const k = 3
	n := lt.Len()
	rng := rand.New(rand.NewPCG(1, 2))
	rnd := func() []float64 {
		x := make([]float64, n*k)
		for i := range x {
			x[i] = rng.NormFloat64()
		}
		return x
	}
	maxDiff := func(a, b []float64) float64 {
		d, s := 0.0, 0.0
		for i := range a {
			d, s = math.Max(d, math.Abs(a[i]-b[i])), math.Max(s, math.Abs(b[i]))
		}
		return d / s
	}
	y, x := rnd(), rnd()
	ty, back := make([]float64, n*k), make([]float64, n*k)
	lt.Mul(ty, y, k)
	lt.Solve(back, ty, k)
	if d := maxDiff(back, y); d > 1e-11 {
		t.Errorf("T^-1 T y differs from y by %g", d)
	}
	tx := make([]float64, n*k)
	lt.MulTrans(tx, x, k)
	lt.SolveTrans(back, tx, k)
	if d := maxDiff(back, x); d > 1e-11 {
		t.Errorf("T^-T Tᵀ x differs from x by %g", d)
	}
	lt.Solve(back, x, k)
	lt.Mul(ty, back, k)
	if d := maxDiff(ty, x); d > 1e-11 {
		t.Errorf("T T^-1 x differs from x by %g", d)
	}
	lt.Mul(ty, y, k)
	var a, c, scale float64
	for i := range ty {
		a += ty[i] * x[i]
		c += y[i] * tx[i]
		scale += math.Abs(ty[i] * x[i])
	}
	if math.Abs(a-c) > 1e-12*scale {
		t.Errorf("<T y, x> = %g, <y, Tᵀ x> = %g", a, c)
	}
}

// TestLoopTreeHandles checks that a torus (genus 1: V - E + F = 0) is
// refused with ErrHandles, and a flipped triangle with an error naming it.
func TestLoopTreeHandles(t *testing.T) {
	b, err := NewBasis(torus(2, 0.5, 16, 8))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := NewLoopTree(b); !errors.Is(err, ErrHandles) {
		t.Errorf("torus: error %v, want ErrHandles", err)
	}
	s, err := SphereLevel(1, 2)
	if err != nil {
		t.Fatal(err)
	}
	s.Triangles[5][1], s.Triangles[5][2] = s.Triangles[5][2], s.Triangles[5][1]
	b, err = NewBasis(s)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := NewLoopTree(b); err == nil {
		t.Error("flipped triangle: no error")
	} else {
		t.Log(err)
	}
}
