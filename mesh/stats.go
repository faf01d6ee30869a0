package mesh

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Stats summarises a mesh. Lengths are in L0, Area in L0², Volume in L0³.
type Stats struct {
	Vertices, Triangles, Edges int
	// Area is the total surface area; Volume the signed enclosed volume (see
	// Mesh.Volume).
	Area, Volume float64
	// Centroid is the volume centroid for a closed mesh with non-zero volume,
	// otherwise the area centroid of the surface.
	Centroid r3.Vec
	// MinEdge, MeanEdge and MaxEdge are over the distinct (undirected) edges.
	MinEdge, MeanEdge, MaxEdge float64
	// Min and Max are the corners of the axis-aligned bounding box of the
	// vertices.
	Min, Max r3.Vec
}

// Volume returns the signed volume enclosed by m, by the divergence theorem:
//
//	V = (1/6) Σ_t a_t · (b_t × c_t)
//
// over the triangles (a_t, b_t, c_t). It is positive for a closed mesh with
// outward normals and negative when they all point inward; for an open mesh
// it depends on the origin and has no meaning.
func (m *Mesh) Volume() float64 {
	var v float64
	for t := range m.Triangles {
		a, b, c := m.Corners(t)
		v += r3.Dot(a, r3.Cross(b, c))
	}
	return v / 6
}

// EquivalentRadius returns the radius of the ball with the volume of m,
// (3V/4π)^(1/3) (zero for non-positive volume).
func (m *Mesh) EquivalentRadius() float64 {
	v := m.Volume()
	if v <= 0 {
		return 0
	}
	return math.Cbrt(3 * v / (4 * math.Pi))
}

// bounds returns the bounding box of the vertices (zero for an empty mesh).
func (m *Mesh) bounds() (lo, hi r3.Vec) {
	if len(m.Vertices) == 0 {
		return
	}
	lo, hi = m.Vertices[0], m.Vertices[0]
	for _, v := range m.Vertices[1:] {
		lo = r3.Vec{X: math.Min(lo.X, v.X), Y: math.Min(lo.Y, v.Y), Z: math.Min(lo.Z, v.Z)}
		hi = r3.Vec{X: math.Max(hi.X, v.X), Y: math.Max(hi.Y, v.Y), Z: math.Max(hi.Z, v.Z)}
	}
	return lo, hi
}

// diagonal returns the length of the bounding-box diagonal.
func (m *Mesh) diagonal() float64 {
	lo, hi := m.bounds()
	return r3.Norm(r3.Sub(hi, lo))
}

// edgeKey is an undirected edge, lower vertex index first.
type edgeKey struct{ a, b int }

func newEdgeKey(i, j int) edgeKey {
	if i > j {
		i, j = j, i
	}
	return edgeKey{i, j}
}

// Stats returns the counts, sizes and bounding box of m.
func (m *Mesh) Stats() Stats {
	s := Stats{Vertices: len(m.Vertices), Triangles: len(m.Triangles)}
	s.Min, s.Max = m.bounds()
	uses := make(map[edgeKey]int, 3*len(m.Triangles)/2)
	var order []edgeKey // first appearance, so sums do not depend on map order
	var areaCentroid, volCentroid r3.Vec
	for t, tri := range m.Triangles {
		for k := 0; k < 3; k++ {
			e := newEdgeKey(tri[k], tri[(k+1)%3])
			if uses[e] == 0 {
				order = append(order, e)
			}
			uses[e]++
		}
		a, b, c := m.Corners(t)
		area := m.Area(t)
		s.Area += area
		areaCentroid = r3.Add(areaCentroid, r3.Scale(area/3, r3.Add(r3.Add(a, b), c)))
		// The tetrahedron (0, a, b, c) has signed volume a·(b×c)/6 and
		// centroid (a+b+c)/4.
		vol6 := r3.Dot(a, r3.Cross(b, c)) // 6 × signed volume
		s.Volume += vol6
		volCentroid = r3.Add(volCentroid, r3.Scale(vol6/4, r3.Add(r3.Add(a, b), c)))
	}
	s.Volume /= 6
	volCentroid = r3.Scale(1.0/6, volCentroid)
	s.Edges = len(uses)
	closed := len(uses) > 0
	s.MinEdge = math.Inf(1)
	var sum float64
	for _, e := range order {
		if uses[e] != 2 {
			closed = false
		}
		l := r3.Norm(r3.Sub(m.Vertices[e.b], m.Vertices[e.a]))
		sum += l
		s.MinEdge = math.Min(s.MinEdge, l)
		s.MaxEdge = math.Max(s.MaxEdge, l)
	}
	if len(uses) == 0 {
		s.MinEdge = 0
	} else {
		s.MeanEdge = sum / float64(len(uses))
	}
	switch {
	case closed && s.Volume != 0:
		s.Centroid = r3.Scale(1/s.Volume, volCentroid)
	case s.Area > 0:
		s.Centroid = r3.Scale(1/s.Area, areaCentroid)
	}
	return s
}
