package bem

import (
	"fmt"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
)

// Surface is the RWG basis of one body together with the panel geometry and
// quadrature points the assembly needs, in scene coordinates (L0).
type Surface struct {
	Basis  *mesh.Basis
	Panels []Panel

	// coef[t][k] is the RWG coefficient ±l/(2A) of the half-function on panel
	// t for its local edge k (free vertex V[k]); edge[t][k] its basis index.
	coef [][3]float64
	edge [][3]int
	// colors partitions the panels so that no two panels of one color share
	// an edge: panels of one color write disjoint matrix rows.
	colors [][]int
	// points[rule][t] are the points of rule panelRules[rule] on panel t.
	points [][][]qpoint
	// exp[t] are the moments of panel t for the far-pair expansion.
	exp []expPanel
}

// qpoint is a quadrature point with its weight (area included) and its
// position relative to the panel centroid.
type qpoint struct {
	x, rel r3.Vec
	w      float64
}

// panelRules are the rules whose points every Surface precomputes: the far
// levels in order of increasing degree (indices 0-4), the outer rule of a
// panel with itself, the outer rules of panels sharing corner v
// (ruleVertex+v) and of panels sharing the side opposite corner a
// (ruleSide+a).
var panelRules = []*Rule{
	Centroid(), Strang3(), Radon7(), mustCollapsed(4), mustCollapsed(6),
	mustEdgeGraded(5),
	must(VertexGraded(5, 0)), must(VertexGraded(5, 1)), must(VertexGraded(5, 2)),
	must(SideGraded(6, 0)), must(SideGraded(6, 1)), must(SideGraded(6, 2)),
}

// Indices in panelRules.
const (
	ruleRadon7     = 2
	ruleCollapsed4 = 3
	ruleEdgeGraded = 5
	ruleVertex     = 6
	ruleSide       = 9
)

// NewSurface prepares the basis b for assembly. The mesh must be closed and
// free of degenerate triangles (mesh.Validate).
func NewSurface(b *mesh.Basis) (*Surface, error) {
	m := b.Mesh
	s := &Surface{Basis: b}
	nt := len(m.Triangles)
	s.Panels = make([]Panel, nt)
	s.coef = make([][3]float64, nt)
	s.edge = make([][3]int, nt)
	for t := range m.Triangles {
		a, bb, c := m.Corners(t)
		p := NewPanel(a, bb, c)
		if !(p.Area > 0) {
			return nil, fmt.Errorf("bem: mesh %s: triangle %d has zero area: remove degenerate triangles", m.Name, t)
		}
		s.Panels[t] = p
		for k := 0; k < 3; k++ {
			e := b.TriEdge[t][k]
			s.edge[t][k] = e
			s.coef[t][k] = b.TriSign[t][k] * b.Edges[e].Length / (2 * p.Area)
		}
	}
	s.colors = colorPanels(b)
	s.exp = expPanels(s.Panels)
	s.points = make([][][]qpoint, len(panelRules))
	for lv, r := range panelRules {
		s.points[lv] = make([][]qpoint, nt)
		for t := range s.Panels {
			s.points[lv][t] = panelPoints(&s.Panels[t], r)
		}
	}
	return s, nil
}

func panelPoints(p *Panel, r *Rule) []qpoint {
	q := make([]qpoint, r.Len())
	for i, b := range r.Bary {
		x := p.Point(b)
		q[i] = qpoint{x: x, rel: r3.Sub(x, p.Centroid), w: r.Weight[i] * p.Area}
	}
	return q
}

// Len returns the number of unknowns (RWG functions) of the surface.
func (s *Surface) Len() int { return len(s.Basis.Edges) }

// Translate returns the surface moved rigidly by v, for its interactions
// with other surfaces (cross blocks, their rows, columns and gradients). The
// basis, the coloring and the expansion moments (relative to the centroids)
// are shared with s. Only the points of the rules a pair of panels on two
// surfaces uses are moved (the far levels and the outer rules of near pairs,
// panelRules up to ruleCollapsed6: 63 of the 321 points of each panel); the
// rules of panels that touch on one surface are left out, so the result is
// not for its own self block (Moments with same set panics on it): that
// block does not change under translation, assemble it on s. Moving every
// point took 10.5 ms on a 1280-panel sphere, against about 2 ms now, at
// every placement of every κ of a sweep.
func (s *Surface) Translate(v r3.Vec) *Surface {
	c := *s
	c.Panels = make([]Panel, len(s.Panels))
	for t, p := range s.Panels {
		for k := 0; k < 3; k++ {
			p.V[k] = r3.Add(p.V[k], v)
		}
		p.Centroid = r3.Add(p.Centroid, v)
		c.Panels[t] = p
	}
	c.points = make([][][]qpoint, len(s.points))
	for lv := range s.points[:ruleEdgeGraded] {
		n := 0
		for _, pts := range s.points[lv] {
			n += len(pts)
		}
		all := make([]qpoint, 0, n) // one allocation per rule
		c.points[lv] = make([][]qpoint, len(s.points[lv]))
		for t, pts := range s.points[lv] {
			start := len(all)
			for _, pt := range pts {
				all = append(all, qpoint{x: r3.Add(pt.x, v), rel: pt.rel, w: pt.w})
			}
			c.points[lv][t] = all[start:len(all):len(all)]
		}
	}
	return &c
}

// colorPanels greedily colors the dual graph of the mesh (panels adjacent
// when they share an edge); a closed triangle mesh needs at most four colors.
func colorPanels(b *mesh.Basis) [][]int {
	nt := len(b.TriEdge)
	color := make([]int, nt)
	for i := range color {
		color[i] = -1
	}
	var classes [][]int
	for t := 0; t < nt; t++ {
		used := 0
		for k := 0; k < 3; k++ {
			ed := b.Edges[b.TriEdge[t][k]]
			o := ed.Plus
			if o == t {
				o = ed.Minus
			}
			if c := color[o]; c >= 0 {
				used |= 1 << c
			}
		}
		c := 0
		for used&(1<<c) != 0 {
			c++
		}
		color[t] = c
		for len(classes) <= c {
			classes = append(classes, nil)
		}
		classes[c] = append(classes[c], t)
	}
	return classes
}

// contact classifies how panels s and t of one mesh touch: the number of
// shared vertices (0 to 3) and, for one shared vertex, its local index in s;
// for two, the local index in s of the corner not shared.
func contact(m *mesh.Mesh, s, t int) (shared, corner int) {
	a, b := m.Triangles[s], m.Triangles[t]
	corner = -1
	free := -1
	for k, i := range a {
		hit := false
		for _, j := range b {
			if i == j {
				hit = true
			}
		}
		if hit {
			shared++
			corner = k
		} else {
			free = k
		}
	}
	if shared == 2 {
		corner = free
	}
	return shared, corner
}

// sharesVertex reports whether panels s and t of the same mesh share a vertex.
func sharesVertex(m *mesh.Mesh, s, t int) bool {
	n, _ := contact(m, s, t)
	return n > 0
}

// Mirror returns the image of the surface in the plane through point with
// unit normal n: every point y goes to Py = y - 2((y - point)·n) n. The image
// of each RWG function keeps its coefficient (P maps the free vertex), so
// the block between a surface and a mirrored one is the image block of
// DESIGN §6. The basis and coloring are shared with s.
func (s *Surface) Mirror(point, n r3.Vec) *Surface {
	n = r3.Unit(n)
	reflect := func(y r3.Vec) r3.Vec { return r3.Sub(y, r3.Scale(2*r3.Dot(r3.Sub(y, point), n), n)) }
	flip := func(v r3.Vec) r3.Vec { return r3.Sub(v, r3.Scale(2*r3.Dot(v, n), n)) }
	c := *s
	c.Panels = make([]Panel, len(s.Panels))
	for t, p := range s.Panels {
		c.Panels[t] = NewPanel(reflect(p.V[0]), reflect(p.V[1]), reflect(p.V[2]))
	}
	c.exp = expPanels(c.Panels)
	c.points = make([][][]qpoint, len(s.points))
	for lv := range s.points {
		c.points[lv] = make([][]qpoint, len(s.points[lv]))
		for t, pts := range s.points[lv] {
			q := make([]qpoint, len(pts))
			for i, pt := range pts {
				q[i] = qpoint{x: reflect(pt.x), rel: flip(pt.rel), w: pt.w}
			}
			c.points[lv][t] = q
		}
	}
	return &c
}
