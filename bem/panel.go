package bem

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Panel is a flat triangle with the geometry the integrals need. Edge i runs
// from V[i] to V[(i+1)%3], counter-clockwise about Normal.
type Panel struct {
	V        [3]r3.Vec
	Centroid r3.Vec
	Normal   r3.Vec // unit normal, right-hand rule over V
	Area     float64
	Size     float64 // longest edge, L0

	edgeDir [3]r3.Vec  // unit direction of edge i
	edgeLen [3]float64 // length of edge i
	edgeOut [3]r3.Vec  // in-plane outward normal of edge i: edgeDir × Normal
}

// NewPanel returns the panel with corners a, b, c. A degenerate triangle (zero
// area) gives a panel with zero Area; callers reject such meshes beforehand.
func NewPanel(a, b, c r3.Vec) Panel {
	p := Panel{V: [3]r3.Vec{a, b, c}}
	p.Centroid = r3.Scale(1.0/3, r3.Add(r3.Add(a, b), c))
	n := r3.Cross(r3.Sub(b, a), r3.Sub(c, a))
	l := r3.Norm(n)
	p.Area = l / 2
	if l > 0 {
		p.Normal = r3.Scale(1/l, n)
	}
	for i := 0; i < 3; i++ {
		e := r3.Sub(p.V[(i+1)%3], p.V[i])
		p.edgeLen[i] = r3.Norm(e)
		if p.edgeLen[i] > 0 {
			p.edgeDir[i] = r3.Scale(1/p.edgeLen[i], e)
		}
		p.edgeOut[i] = r3.Cross(p.edgeDir[i], p.Normal)
		p.Size = math.Max(p.Size, p.edgeLen[i])
	}
	return p
}

// Point returns the point with barycentric coordinates b.
func (p *Panel) Point(b [3]float64) r3.Vec {
	return r3.Add(r3.Add(r3.Scale(b[0], p.V[0]), r3.Scale(b[1], p.V[1])), r3.Scale(b[2], p.V[2]))
}
