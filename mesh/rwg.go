package mesh

import (
	"fmt"

	"gonum.org/v1/gonum/spatial/r3"
)

// Edge is one RWG basis function: an interior edge shared by the triangles Plus
// (T+) and Minus (T-). On T+ the function is +Length/(2 A+) (x - p+), on T- it
// is -Length/(2 A-) (x - p-), where p± are the free vertices (the corners of T±
// opposite the edge). Its surface divergence is +Length/A+ on T+ and
// -Length/A- on T-.
type Edge struct {
	Vertices  [2]int  // end points of the edge
	Plus      int     // triangle T+
	Minus     int     // triangle T-
	PlusFree  int     // free vertex of T+
	MinusFree int     // free vertex of T-
	Length    float64 // edge length, L0
}

// Basis is the RWG basis of a closed mesh: one function per edge.
type Basis struct {
	Mesh  *Mesh
	Edges []Edge
	// TriEdge[t][k] is the index in Edges of the edge of triangle t that lies
	// opposite its local vertex k, so the free vertex of that half-function on t
	// is Mesh.Triangles[t][k].
	TriEdge [][3]int
	// TriSign[t][k] is +1 when t is T+ of edge TriEdge[t][k] and -1 when it is T-.
	TriSign [][3]float64
}

// NewBasis builds the RWG basis of m. Every edge must be shared by exactly two
// triangles (a closed 2-manifold); otherwise the error names the first
// offending triangle and edge. Run Check first for a full report.
func NewBasis(m *Mesh) (*Basis, error) {
	type key struct{ a, b int }
	nt := len(m.Triangles)
	b := &Basis{Mesh: m, TriEdge: make([][3]int, nt), TriSign: make([][3]float64, nt)}
	index := make(map[key]int, 3*nt/2)
	for t, tri := range m.Triangles {
		for k := 0; k < 3; k++ {
			// Local edge k joins the two vertices other than k, in the
			// triangle's counter-clockwise order.
			i, j := tri[(k+1)%3], tri[(k+2)%3]
			lo, hi := i, j
			if lo > hi {
				lo, hi = hi, lo
			}
			kk := key{lo, hi}
			e, seen := index[kk]
			if !seen {
				e = len(b.Edges)
				index[kk] = e
				b.Edges = append(b.Edges, Edge{
					Vertices: [2]int{i, j},
					Plus:     t, PlusFree: tri[k],
					Minus: -1, MinusFree: -1,
					Length: r3.Norm(r3.Sub(m.Vertices[j], m.Vertices[i])),
				})
				b.TriEdge[t][k] = e
				b.TriSign[t][k] = 1
				continue
			}
			ed := &b.Edges[e]
			if ed.Minus >= 0 {
				return nil, fmt.Errorf("mesh %s: edge (%d,%d) of triangle %d is shared by more than two triangles (%d, %d, %d): the surface is not a 2-manifold",
					m.Name, i, j, t, ed.Plus, ed.Minus, t)
			}
			ed.Minus, ed.MinusFree = t, tri[k]
			b.TriEdge[t][k] = e
			b.TriSign[t][k] = -1
		}
	}
	for _, ed := range b.Edges {
		if ed.Minus < 0 {
			return nil, fmt.Errorf("mesh %s: edge (%d,%d) of triangle %d is open (on one triangle only): the surface must be closed",
				m.Name, ed.Vertices[0], ed.Vertices[1], ed.Plus)
		}
	}
	return b, nil
}

// Len returns the number of basis functions (unknowns).
func (b *Basis) Len() int { return len(b.Edges) }
