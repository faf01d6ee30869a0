package mesh

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Mesh is a triangulated surface. Triangles index Vertices; the vertex order of
// each triangle is counter-clockwise seen from outside the body (outward
// right-hand normal).
type Mesh struct {
	// Name labels the mesh in messages: a file name or a shape description.
	Name      string
	Vertices  []r3.Vec
	Triangles [][3]int
}

// Corners returns the three vertices of triangle t.
func (m *Mesh) Corners(t int) (a, b, c r3.Vec) {
	tri := m.Triangles[t]
	return m.Vertices[tri[0]], m.Vertices[tri[1]], m.Vertices[tri[2]]
}

// Centroid returns the centroid of triangle t.
func (m *Mesh) Centroid(t int) r3.Vec {
	a, b, c := m.Corners(t)
	return r3.Scale(1.0/3, r3.Add(r3.Add(a, b), c))
}

// AreaVector returns the normal of triangle t scaled by its area (right-hand
// rule over its vertex order).
func (m *Mesh) AreaVector(t int) r3.Vec {
	a, b, c := m.Corners(t)
	return r3.Scale(0.5, r3.Cross(r3.Sub(b, a), r3.Sub(c, a)))
}

// Area returns the area of triangle t.
func (m *Mesh) Area(t int) float64 { return r3.Norm(m.AreaVector(t)) }

// Normal returns the unit normal of triangle t (zero for a degenerate triangle).
func (m *Mesh) Normal(t int) r3.Vec {
	n := m.AreaVector(t)
	l := r3.Norm(n)
	if l == 0 {
		return r3.Vec{}
	}
	return r3.Scale(1/l, n)
}

// Diameter returns the longest edge of triangle t.
func (m *Mesh) Diameter(t int) float64 {
	a, b, c := m.Corners(t)
	return math.Max(r3.Norm(r3.Sub(b, a)), math.Max(r3.Norm(r3.Sub(c, b)), r3.Norm(r3.Sub(a, c))))
}

// Clone returns a deep copy of m.
func (m *Mesh) Clone() *Mesh {
	c := &Mesh{Name: m.Name}
	c.Vertices = append([]r3.Vec(nil), m.Vertices...)
	c.Triangles = append([][3]int(nil), m.Triangles...)
	return c
}
