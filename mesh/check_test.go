package mesh

import (
	"math"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

func TestCheckFindsEachKind(t *testing.T) {
	cases := []struct {
		name   string
		build  func() *Mesh
		kind   ProblemKind
		tri    int      // a triangle the problem must name
		phrase []string // text its String must contain
	}{
		{"open edge", func() *Mesh {
			m := unitCube()
			m.Triangles = slices.Delete(m.Triangles, 5, 6) // remove {1,5,4}
			return m
		}, OpenEdge, 4, []string{"open edge between (", "triangle 4", "close the hole"}},
		{"non-manifold edge", func() *Mesh {
			m := unitCube()
			m.Vertices = append(m.Vertices, r3.Vec{X: 0.5, Y: -1, Z: 0.5})
			m.Triangles = append(m.Triangles, [3]int{0, 1, 8}) // a fin on edge 0-1
			return m
		}, NonManifoldEdge, 12, []string{"shared by triangles", "12", "exactly two"}},
		{"inconsistent orientation", func() *Mesh {
			m := unitCube()
			m.Triangles[7] = [3]int{3, 7, 6}
			return m
		}, InconsistentOrientation, 7, []string{"same direction", "7"}},
		{"inward normals", func() *Mesh {
			m := unitCube()
			m.reverse()
			return m
		}, InwardNormals, 0, []string{"negative volume", "triangle 0", "flip"}},
		{"degenerate (collinear)", func() *Mesh {
			m := unitCube()
			m.Vertices = append(m.Vertices, r3.Vec{X: 0.5})
			m.Triangles = append(m.Triangles, [3]int{0, 8, 1})
			return m
		}, DegenerateTriangle, 12, []string{"triangle 12", "zero area", "(0.5, 0, 0)"}},
		{"degenerate (repeated vertex)", func() *Mesh {
			m := unitCube()
			m.Triangles = append(m.Triangles, [3]int{2, 2, 3})
			return m
		}, DegenerateTriangle, 12, []string{"triangle 12", "repeated"}},
		{"duplicate", func() *Mesh {
			m := unitCube()
			m.Triangles = append(m.Triangles, [3]int{4, 1, 5}) // same set as triangle 5
			return m
		}, DuplicateTriangle, 12, []string{"triangles 5 and 12", "delete the duplicate"}},
		{"non-finite", func() *Mesh {
			m := unitCube()
			m.Vertices[7] = r3.Vec{X: 1, Y: math.Inf(1), Z: 1}
			return m
		}, NonFinite, 3, []string{"NaN or Inf", "triangle 3"}},
		{"invalid index", func() *Mesh {
			m := unitCube()
			m.Triangles[2][1] = 42
			return m
		}, InvalidIndex, 2, []string{"triangle 2", "42"}},
	}
	for _, c := range cases {
		m := c.build()
		ps := m.Check()
		found := false
		for _, p := range ps {
			if p.Kind == c.kind && slices.Contains(p.Triangles, c.tri) {
				found = true
				s := p.String()
				for _, w := range c.phrase {
					if !strings.Contains(s, w) {
						t.Errorf("%s: %q does not contain %q", c.name, s, w)
					}
				}
			}
		}
		if !found {
			t.Errorf("%s: no %v problem naming triangle %d in %v", c.name, c.kind, c.tri, ps)
		}
		if err := m.Validate(); err == nil || !strings.HasPrefix(err.Error(), m.Name+": ") {
			t.Errorf("%s: Validate() = %v", c.name, err)
		}
	}
}

func TestCheckCleanMeshes(t *testing.T) {
	two := unitCube()
	other := unitCube().Translate(r3.Vec{X: 3})
	off := len(two.Vertices)
	two.Vertices = append(two.Vertices, other.Vertices...)
	for _, tr := range other.Triangles {
		two.Triangles = append(two.Triangles, [3]int{tr[0] + off, tr[1] + off, tr[2] + off})
	}
	far := unitCube().Translate(r3.Vec{X: 1e6, Y: -1e6, Z: 1e6}) // volume taken about the component
	tiny := unitCube().Scale(1e-9)                               // thresholds are relative to the size
	for _, m := range []*Mesh{unitCube(), two, far, tiny} {
		if ps := m.Check(); ps != nil {
			t.Errorf("%s: %v", m.Name, ps)
		}
		if err := m.Validate(); err != nil {
			t.Error(err)
		}
	}
}

func TestCheckCapsEachKind(t *testing.T) {
	// Removing every fourth triangle of an icosphere leaves far more than 20
	// open edges: 20 are listed plus one summary, and Validate counts all.
	m, _ := SphereLevel(1, 6)
	var kept [][3]int
	removed := 0
	for i, tr := range m.Triangles {
		if i%4 == 0 {
			removed++
			continue
		}
		kept = append(kept, tr)
	}
	m.Triangles = kept
	ps := m.Check()
	open := 0
	var summary *Problem
	for i, p := range ps {
		if p.Kind != OpenEdge {
			continue
		}
		if len(p.Triangles) == 0 {
			summary = &ps[i]
			continue
		}
		open++
	}
	if open != maxPerKind || summary == nil {
		t.Fatalf("%d open edges listed, summary %v", open, summary)
	}
	// The total is counted independently of Check.
	want := countOpenEdges(m)
	if !strings.Contains(summary.String(), "in all") || !strings.Contains(summary.Detail, strconv.Itoa(want)) {
		t.Errorf("summary %q, want total %d", summary, want)
	}
	err := m.Validate()
	if err == nil || !strings.Contains(err.Error(), strconv.Itoa(want)+" mesh problems") {
		t.Errorf("Validate: %v (want %d problems)", err, want)
	}
}

func countOpenEdges(m *Mesh) int {
	uses := map[edgeKey]int{}
	for _, tr := range m.Triangles {
		for k := 0; k < 3; k++ {
			uses[newEdgeKey(tr[k], tr[(k+1)%3])]++
		}
	}
	n := 0
	for _, u := range uses {
		if u == 1 {
			n++
		}
	}
	return n
}

func TestProblemKindString(t *testing.T) {
	for k := OpenEdge; k <= InvalidIndex; k++ {
		if s := k.String(); s == "" || strings.HasPrefix(s, "ProblemKind(") {
			t.Errorf("kind %d has no name", int(k))
		}
	}
	if s := ProblemKind(99).String(); s != "ProblemKind(99)" {
		t.Errorf("unknown kind: %q", s)
	}
}

func TestStats(t *testing.T) {
	// The unit cube [0,1]³: 8 vertices, 18 edges (12 sides + 6 face
	// diagonals), 12 triangles, area 6, volume 1, centroid (½,½,½), edges 1
	// and √2.
	s := unitCube().Stats()
	if s.Vertices != 8 || s.Edges != 18 || s.Triangles != 12 || s.Area != 6 || math.Abs(s.Volume-1) > 1e-15 {
		t.Errorf("%+v", s)
	}
	if r3.Norm(r3.Sub(s.Centroid, r3.Vec{X: .5, Y: .5, Z: .5})) > 1e-15 {
		t.Errorf("centroid %v", s.Centroid)
	}
	if s.MinEdge != 1 || math.Abs(s.MaxEdge-math.Sqrt2) > 1e-15 || math.Abs(s.MeanEdge-(12+6*math.Sqrt2)/18) > 1e-15 {
		t.Errorf("edges %v %v %v", s.MinEdge, s.MeanEdge, s.MaxEdge)
	}
	if s.Min != (r3.Vec{}) || s.Max != (r3.Vec{X: 1, Y: 1, Z: 1}) {
		t.Errorf("bounds %v %v", s.Min, s.Max)
	}
	// The volume centroid of an off-centre body follows it (translation
	// moves the centroid by the same vector, to rounding).
	sp, _ := SphereLevel(1, 3)
	c := sp.Translate(r3.Vec{X: 1, Y: 2, Z: 3}).Stats().Centroid
	if r3.Norm(r3.Sub(c, r3.Vec{X: 1, Y: 2, Z: 3})) > 1e-12 {
		t.Errorf("sphere centroid %v", c)
	}
}
