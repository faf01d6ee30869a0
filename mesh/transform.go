package mesh

import (
	"gonum.org/v1/gonum/spatial/r3"
)

// mapVertices returns a copy of m whose vertices are f applied to m's.
func (m *Mesh) mapVertices(f func(r3.Vec) r3.Vec) *Mesh {
	c := m.Clone()
	for i, v := range c.Vertices {
		c.Vertices[i] = f(v)
	}
	return c
}

// Translate returns a copy of m moved by v. The name is kept.
func (m *Mesh) Translate(v r3.Vec) *Mesh {
	return m.mapVertices(func(p r3.Vec) r3.Vec { return r3.Add(p, v) })
}

// Rotate returns a copy of m rotated by angle (radians, right-hand rule about
// axis) about the line through centre along axis. axis need not be unit; a
// zero axis or a zero angle leaves the vertices unchanged. The name is kept.
func (m *Mesh) Rotate(axis r3.Vec, angle float64, centre r3.Vec) *Mesh {
	if r3.Norm(axis) == 0 {
		return m.Clone()
	}
	rot := r3.NewRotation(angle, axis)
	return m.mapVertices(func(p r3.Vec) r3.Vec {
		return r3.Add(centre, rot.Rotate(r3.Sub(p, centre)))
	})
}

// Scale returns a copy of m scaled by f about the origin. A negative f is a
// point reflection (it reverses handedness), so then the vertex order of every
// triangle is reversed too, keeping the normals outward. f = 0 collapses the
// mesh to a point. The name is kept.
func (m *Mesh) Scale(f float64) *Mesh {
	c := m.mapVertices(func(p r3.Vec) r3.Vec { return r3.Scale(f, p) })
	if f < 0 {
		c.reverse()
	}
	return c
}

// reverse swaps the second and third vertex of every triangle, flipping
// every normal.
func (m *Mesh) reverse() {
	for i, t := range m.Triangles {
		m.Triangles[i] = [3]int{t[0], t[2], t[1]}
	}
}

// Mirror returns the reflection of m through the plane that passes through
// point with the given normal (need not be unit):
//
//	p' = p - 2 ((p - point)·n̂) n̂.
//
// A reflection reverses handedness, so Mirror also reverses the vertex order
// of every triangle (swapping its second and third vertices): the normals of
// the mirrored mesh stay outward and its volume stays positive. A zero normal
// returns an unchanged copy. The name is kept.
func (m *Mesh) Mirror(point, normal r3.Vec) *Mesh {
	l := r3.Norm(normal)
	if l == 0 {
		return m.Clone()
	}
	n := r3.Scale(1/l, normal)
	c := m.mapVertices(func(p r3.Vec) r3.Vec {
		return r3.Sub(p, r3.Scale(2*r3.Dot(r3.Sub(p, point), n), n))
	})
	c.reverse()
	return c
}
