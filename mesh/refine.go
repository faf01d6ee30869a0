package mesh

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// This file refines a closed mesh by conforming longest-edge bisection: a
// triangle is split at the midpoint of its longest edge, together with the
// neighbour across that edge, after the neighbour has been split along its
// own longer edges as far as needed for that edge to be its longest (M.-C.
// Rivara, Int. J. Numer. Meth. Eng. 20, 745 (1984); the path-following form
// used here, the "longest-edge propagation path", is in M.-C. Rivara, Int. J.
// Numer. Meth. Eng. 40, 3313 (1997), recalled from memory). Every split
// divides two triangles sharing their longest edge, so no vertex ever hangs
// in the middle of another triangle's edge. Each triangle made this way
// descends from a triangle of the input by repeated longest-edge bisection,
// so on flat faces its smallest angle is at least half the smallest angle of
// that ancestor (I. G. Rosenberg and F. Stenger, Math. Comp. 29, 390 (1975),
// recalled from memory).

// Refine returns a copy of m whose triangles have been bisected until every
// triangle's longest edge is at most size(c) (L0), where c is the triangle's
// centroid. m must pass Check; the result is again a closed, conforming,
// outward-oriented 2-manifold. Triangles already small enough are kept as
// they are.
//
// A new vertex is placed at the midpoint of the bisected edge and then mapped
// through project when project is non-nil, to put it on the exact surface the
// mesh approximates (SphereProjector for spheres); with project nil it stays
// on the straight edge, so flat faces stay flat and the volume and area of
// the mesh do not change (for imported STL files). To grade a mesh towards
// other bodies pass Grading.SizeFunc as size; GradedSphere, GradedBox,
// GradedPlate and GradedCylinder do this for the standard shapes.
//
// size may return +Inf (no limit there). Refine returns an error naming the
// triangle and the point when size returns a value that is not positive, when
// project returns a non-finite point or one that folds a triangle over
// (reverses its normal or flattens it), and, naming the smallest size asked
// for, when more than MaxTriangles triangles would be needed. The name of the
// result records the refinement.
func Refine(m *Mesh, size func(p r3.Vec) float64, project func(p r3.Vec) r3.Vec) (*Mesh, error) {
	return RefineContext(context.Background(), m, size, project)
}

// RefineContext is Refine with a context: it stops with ctx.Err() (wrapped)
// when ctx is cancelled.
func RefineContext(ctx context.Context, m *Mesh, size func(p r3.Vec) float64, project func(p r3.Vec) r3.Vec) (*Mesh, error) {
	var mid func(a, b r3.Vec) r3.Vec
	if project != nil {
		mid = func(a, b r3.Vec) r3.Vec { return project(midpoint(a, b)) }
	}
	return refine(ctx, m, size, mid, MaxTriangles)
}

func midpoint(a, b r3.Vec) r3.Vec { return r3.Scale(0.5, r3.Add(a, b)) }

// refiner holds a mesh being bisected. Triangle t has corners tris[t] and
// nbr[t][k] is the triangle across its edge k, which runs from corner k to
// corner k+1 (mod 3); -1 marks an open edge (never in a mesh that passes
// Check, but harmless).
type refiner struct {
	name  string
	n0    int // triangles of the input
	verts []r3.Vec
	tris  [][3]int
	nbr   [][3]int32
	mid   func(a, b r3.Vec) r3.Vec // nil: plain midpoint
	limit int

	// Work list of triangles whose size must be (re)checked.
	stack  []int32
	queued []bool
	// target[t] is the size asked for at the centroid of t when it was last
	// checked; at the end every triangle has been checked in its final state.
	target []float64
	// Smallest size asked for so far, and where.
	minSize float64
	minAt   r3.Vec

	path []int32 // longest-edge propagation path (scratch)
}

// refine is RefineContext with an edge-midpoint map (nil: plain midpoint) and
// a triangle limit.
func refine(ctx context.Context, m *Mesh, size func(r3.Vec) float64, mid func(a, b r3.Vec) r3.Vec, limit int) (*Mesh, error) {
	switch {
	case m == nil:
		return nil, fmt.Errorf("mesh: refine: no mesh")
	case size == nil:
		return nil, fmt.Errorf("mesh: refining %s: no size function", m.Name)
	case len(m.Triangles) > limit:
		return nil, fmt.Errorf("mesh: refining %s: it already has %d triangles, more than the limit %d", m.Name, len(m.Triangles), limit)
	}
	if err := m.Validate(); err != nil {
		return nil, fmt.Errorf("mesh: cannot refine: %w", err)
	}
	r := newRefiner(m, mid, limit)
	for t := range r.tris {
		r.push(int32(t))
	}
	for pops := 0; len(r.stack) > 0; pops++ {
		if pops%1024 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, fmt.Errorf("mesh: refining %s: %w", m.Name, err)
			}
		}
		t := r.stack[len(r.stack)-1]
		r.stack = r.stack[:len(r.stack)-1]
		r.queued[t] = false
		c := r.centroid(t)
		s := size(c)
		if !(s > 0) {
			return nil, fmt.Errorf("mesh: refining %s: the size function gave %g at %s (centroid of %s): it must give a positive length (L0) everywhere on the surface",
				m.Name, s, fmtPoint(c), r.which(t))
		}
		r.target[t] = s
		if s < r.minSize {
			r.minSize, r.minAt = s, c
		}
		if r.diameter(t) > s {
			if err := r.split(t); err != nil {
				return nil, err
			}
		}
	}
	return r.result(), nil
}

func newRefiner(m *Mesh, mid func(a, b r3.Vec) r3.Vec, limit int) *refiner {
	nt := len(m.Triangles)
	r := &refiner{
		name:    m.Name,
		n0:      nt,
		verts:   append([]r3.Vec(nil), m.Vertices...),
		tris:    append([][3]int(nil), m.Triangles...),
		nbr:     make([][3]int32, nt),
		mid:     mid,
		limit:   limit,
		queued:  make([]bool, nt),
		target:  make([]float64, nt),
		minSize: math.Inf(1),
	}
	// Directed edge -> (triangle, local edge). A mesh that passes Check has
	// every edge used once in each direction.
	type dirEdge struct{ from, to int }
	type slot struct {
		t int32
		k int8
	}
	half := make(map[dirEdge]slot, 3*nt)
	for t, tri := range r.tris {
		for k := 0; k < 3; k++ {
			half[dirEdge{tri[k], tri[(k+1)%3]}] = slot{int32(t), int8(k)}
		}
	}
	for t, tri := range r.tris {
		for k := 0; k < 3; k++ {
			o, ok := half[dirEdge{tri[(k+1)%3], tri[k]}]
			if !ok {
				r.nbr[t][k] = -1
				continue
			}
			r.nbr[t][k] = o.t
		}
	}
	return r
}

// which names triangle t for messages: the pieces of input triangle i keep
// its index for one of them, new pieces have indices beyond the input's.
func (r *refiner) which(t int32) string {
	if int(t) < r.n0 {
		return fmt.Sprintf("triangle %d of the input or a piece of it", t)
	}
	return "a triangle made by the refinement"
}

func (r *refiner) push(t int32) {
	if !r.queued[t] {
		r.queued[t] = true
		r.stack = append(r.stack, t)
	}
}

func (r *refiner) centroid(t int32) r3.Vec {
	tri := r.tris[t]
	return r3.Scale(1.0/3, r3.Add(r3.Add(r.verts[tri[0]], r.verts[tri[1]]), r.verts[tri[2]]))
}

// edgeLen2 is the squared length of the edge between vertices i and j,
// computed in a fixed vertex order so both triangles on an edge see the same
// value to the last bit.
func (r *refiner) edgeLen2(i, j int) float64 {
	if i > j {
		i, j = j, i
	}
	return r3.Norm2(r3.Sub(r.verts[j], r.verts[i]))
}

// diameter is the longest edge of t, computed exactly as Mesh.Diameter
// computes it, so the result meets the size limit by that measure too.
func (r *refiner) diameter(t int32) float64 {
	tri := r.tris[t]
	a, b, c := r.verts[tri[0]], r.verts[tri[1]], r.verts[tri[2]]
	return math.Max(r3.Norm(r3.Sub(b, a)), math.Max(r3.Norm(r3.Sub(c, b)), r3.Norm(r3.Sub(a, c))))
}

// longest returns the local index of the longest edge of t. Ties are broken
// by the vertex indices of the edges, so "longest" is a strict total order on
// edges: propagation paths strictly lengthen and cannot cycle, and two
// triangles agree on whether their common edge is the longest of both.
func (r *refiner) longest(t int32) int {
	tri := r.tris[t]
	best := 0
	bl := r.edgeLen2(tri[0], tri[1])
	bk := newEdgeKey(tri[0], tri[1])
	for k := 1; k < 3; k++ {
		i, j := tri[k], tri[(k+1)%3]
		l := r.edgeLen2(i, j)
		e := newEdgeKey(i, j)
		if l > bl || (l == bl && (e.a > bk.a || (e.a == bk.a && e.b > bk.b))) {
			best, bl, bk = k, l, e
		}
	}
	return best
}

// localEdge returns the local index of the edge of t that runs from vertex i
// to vertex j, or -1.
func (r *refiner) localEdge(t int32, i, j int) int {
	tri := r.tris[t]
	for k := 0; k < 3; k++ {
		if tri[k] == i && tri[(k+1)%3] == j {
			return k
		}
	}
	return -1
}

// split bisects t along its longest edge, first bisecting the triangles of
// its longest-edge propagation path from the far end back: the path goes
// from t to the neighbour across its longest edge, and on, until two
// triangles share their longest edge (or an open edge is reached); that pair
// is bisected together, and the walk resumes from the triangle before it.
func (r *refiner) split(t int32) error {
	r.path = append(r.path[:0], t)
	for len(r.path) > 0 {
		cur := r.path[len(r.path)-1]
		k := r.longest(cur)
		n := r.nbr[cur][k]
		kn := -1
		if n >= 0 {
			tri := r.tris[cur]
			kn = r.localEdge(n, tri[(k+1)%3], tri[k])
			if kn < 0 {
				return fmt.Errorf("mesh: refining %s: internal error: triangles %d and %d disagree about their common edge", r.name, cur, n)
			}
			if r.longest(n) != kn {
				r.path = append(r.path, n)
				continue
			}
		}
		if err := r.bisect(cur, k, n, kn); err != nil {
			return err
		}
		r.path = r.path[:len(r.path)-1]
	}
	return nil
}

// bisect splits triangle t at the midpoint of its edge k and, when n ≥ 0,
// the neighbour n across it, whose edge kn is the same edge.
//
// With t = (a, b, c), edge k = a→b, and n = (b, a, d), the new vertex m
// gives t → (a, m, c) and (m, b, c), n → (b, m, d) and (m, a, d); each
// first child keeps the parent's index. The vertex order, and so the
// outward normal, is kept.
func (r *refiner) bisect(t int32, k int, n int32, kn int) error {
	add := 1
	if n >= 0 {
		add = 2
	}
	if len(r.tris)+add > r.limit {
		return fmt.Errorf("mesh: refining %s: more than %d triangles would be needed; the smallest size asked for is %.4g at %s: ask for a larger size there (or check the length unit)",
			r.name, r.limit, r.minSize, fmtPoint(r.minAt))
	}
	tri := r.tris[t]
	a, b, c := tri[k], tri[(k+1)%3], tri[(k+2)%3]
	pa, pb := r.verts[a], r.verts[b]
	p := midpoint(pa, pb)
	if r.mid != nil {
		p = r.mid(pa, pb)
		if !finite(p) {
			return fmt.Errorf("mesh: refining %s: the projection of the midpoint of the edge from %s to %s (on %s) is %s: it must be a finite point",
				r.name, fmtPoint(pa), fmtPoint(pb), r.which(t), fmtPoint(p))
		}
	}
	mv := len(r.verts)
	r.verts = append(r.verts, p)

	// Normals before the split, to detect a projection that folds a child.
	nt := r.areaVector(tri)
	var nn r3.Vec
	var ntri [3]int
	if n >= 0 {
		ntri = r.tris[n]
		nn = r.areaVector(ntri)
	}

	n1, n2 := r.nbr[t][(k+1)%3], r.nbr[t][(k+2)%3] // across b→c and c→a
	t2 := int32(len(r.tris))
	r.tris[t] = [3]int{a, mv, c}
	r.nbr[t] = [3]int32{-1, t2, n2}
	r.appendTriangle([3]int{mv, b, c}, [3]int32{-1, n1, t})
	r.relink(n1, t, t2)
	if err := r.checkChildren(nt, t, t2, p); err != nil {
		return err
	}
	if n >= 0 {
		d := ntri[(kn+2)%3]
		m1, m2 := r.nbr[n][(kn+1)%3], r.nbr[n][(kn+2)%3] // across a→d and d→b
		s2 := int32(len(r.tris))
		r.tris[n] = [3]int{b, mv, d}
		r.nbr[n] = [3]int32{t2, s2, m2}
		r.appendTriangle([3]int{mv, a, d}, [3]int32{t, m1, n})
		r.relink(m1, n, s2)
		r.nbr[t][0] = s2
		r.nbr[t2][0] = n
		if err := r.checkChildren(nn, n, s2, p); err != nil {
			return err
		}
		r.push(n)
		r.push(s2)
	}
	r.push(t)
	r.push(t2)
	return nil
}

func (r *refiner) appendTriangle(tri [3]int, nbr [3]int32) {
	r.tris = append(r.tris, tri)
	r.nbr = append(r.nbr, nbr)
	r.queued = append(r.queued, false)
	r.target = append(r.target, 0)
}

// relink makes triangle x, which bordered old, border new instead.
func (r *refiner) relink(x, old, new int32) {
	if x < 0 {
		return
	}
	for k := range r.nbr[x] {
		if r.nbr[x][k] == old {
			r.nbr[x][k] = new
			return
		}
	}
}

func (r *refiner) areaVector(tri [3]int) r3.Vec {
	a, b, c := r.verts[tri[0]], r.verts[tri[1]], r.verts[tri[2]]
	return r3.Scale(0.5, r3.Cross(r3.Sub(b, a), r3.Sub(c, a)))
}

// checkChildren reports a child of a split that a projected midpoint p has
// folded over (its normal turned against the parent's normal) or flattened
// (Check's degeneracy test: twice the area below 1e-10 times the longest
// edge squared). Plain midpoints never do either.
func (r *refiner) checkChildren(parent r3.Vec, c1, c2 int32, p r3.Vec) error {
	for _, c := range []int32{c1, c2} {
		av := r.areaVector(r.tris[c])
		d := r.diameter(c)
		if r3.Dot(av, parent) <= 0 || 2*r3.Norm(av) < 1e-10*d*d {
			return fmt.Errorf("mesh: refining %s: the new vertex %s folds or flattens %s: the projection must move midpoints only slightly, onto the surface the mesh approximates",
				r.name, fmtPoint(p), r.which(c))
		}
	}
	return nil
}

// result returns the refined mesh, named after the input and the range of
// sizes asked for.
func (r *refiner) result() *Mesh {
	lo, hi, longest := math.Inf(1), 0.0, 0.0
	for t := range r.tris {
		s := r.target[t]
		lo = math.Min(lo, s)
		if !math.IsInf(s, 1) {
			hi = math.Max(hi, s)
		}
		longest = math.Max(longest, r.diameter(int32(t)))
	}
	if math.IsInf(lo, 1) { // no finite size was asked for
		lo, hi = longest, longest
	}
	rng := fmt.Sprintf("%.3g", lo)
	if fmt.Sprintf("%.3g", hi) != rng {
		rng += ".." + fmt.Sprintf("%.3g", hi)
	}
	return &Mesh{
		Name:      fmt.Sprintf("%s refined to h=%s", r.name, rng),
		Vertices:  r.verts,
		Triangles: r.tris,
	}
}
