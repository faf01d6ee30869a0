package mesh

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"
)

// ProblemKind classifies a defect found by Check.
type ProblemKind int

const (
	// OpenEdge: an edge used by only one triangle (a hole in the surface).
	OpenEdge ProblemKind = iota
	// NonManifoldEdge: an edge shared by more than two triangles.
	NonManifoldEdge
	// InconsistentOrientation: two triangles traverse their shared edge in
	// the same direction, so one of them is flipped.
	InconsistentOrientation
	// InwardNormals: a closed, consistently oriented component encloses
	// negative volume (all its normals point inward).
	InwardNormals
	// DegenerateTriangle: a triangle of (near) zero area, with collinear or
	// repeated corners.
	DegenerateTriangle
	// DuplicateTriangle: a triangle with the same three vertices as another.
	DuplicateTriangle
	// NonFinite: a triangle with a NaN or infinite coordinate.
	NonFinite
	// InvalidIndex: a triangle refers to a vertex that does not exist.
	InvalidIndex
)

var kindNames = [...]string{
	OpenEdge:                "open edge",
	NonManifoldEdge:         "non-manifold edge",
	InconsistentOrientation: "inconsistent orientation",
	InwardNormals:           "inward normals",
	DegenerateTriangle:      "degenerate triangle",
	DuplicateTriangle:       "duplicate triangle",
	NonFinite:               "non-finite coordinate",
	InvalidIndex:            "invalid vertex index",
}

// String returns the name of the kind, e.g. "open edge".
func (k ProblemKind) String() string {
	if k >= 0 && int(k) < len(kindNames) {
		return kindNames[k]
	}
	return fmt.Sprintf("ProblemKind(%d)", int(k))
}

// Problem is one defect found by Check. Triangles and Points locate it (their
// meaning depends on Kind: for an edge problem Points are the edge's end
// points, for a triangle problem its corners). A summary entry standing for
// further problems of the same kind that were not listed has no Triangles and
// says how many in Detail.
type Problem struct {
	Kind      ProblemKind
	Triangles []int
	Points    []r3.Vec
	Detail    string
}

// maxPerKind caps the number of problems of one kind that Check lists.
const maxPerKind = 20

func fmtPoint(p r3.Vec) string { return fmt.Sprintf("(%.9g, %.9g, %.9g)", p.X, p.Y, p.Z) }

func fmtTriangles(ts []int) string {
	s := make([]string, len(ts))
	for i, t := range ts {
		s[i] = fmt.Sprint(t)
	}
	switch len(s) {
	case 1:
		return "triangle " + s[0]
	case 2:
		return "triangles " + s[0] + " and " + s[1]
	}
	return "triangles " + strings.Join(s, ", ")
}

func (p Problem) point(i int) string {
	if i < len(p.Points) {
		return fmtPoint(p.Points[i])
	}
	return "(?)"
}

// String describes the problem, naming the triangles and coordinates, and
// says how to fix it.
func (p Problem) String() string {
	if len(p.Triangles) == 0 {
		return p.Kind.String() + ": " + p.Detail
	}
	ts := fmtTriangles(p.Triangles)
	var s string
	switch p.Kind {
	case OpenEdge:
		s = fmt.Sprintf("open edge between %s and %s on %s: the surface must be closed; close the hole in your CAD tool or re-export as a solid",
			p.point(0), p.point(1), ts)
	case NonManifoldEdge:
		s = fmt.Sprintf("non-manifold edge between %s and %s is shared by %s: each edge must join exactly two triangles; remove internal faces, or separate bodies that touch along an edge",
			p.point(0), p.point(1), ts)
	case InconsistentOrientation:
		s = fmt.Sprintf("inconsistent orientation: %s run through their common edge between %s and %s in the same direction, so one is flipped; recompute or unify the normals in your CAD tool and re-export",
			ts, p.point(0), p.point(1))
	case InwardNormals:
		s = fmt.Sprintf("inward normals: the closed part containing %s (corner %s) encloses negative volume, so its normals point inward; flip its normals (reverse the vertex order) in your CAD tool, or, if it is the wall of a cavity inside another body, remove it",
			ts, p.point(0))
	case DegenerateTriangle:
		s = fmt.Sprintf("degenerate triangle: %s with corners %s, %s, %s has (near) zero area; remove it or re-mesh the surface there",
			ts, p.point(0), p.point(1), p.point(2))
	case DuplicateTriangle:
		s = fmt.Sprintf("duplicate triangle: %s use the same corners %s, %s, %s; delete the duplicate",
			ts, p.point(0), p.point(1), p.point(2))
	case NonFinite:
		s = fmt.Sprintf("non-finite coordinate (NaN or Inf) on %s with corners %s, %s, %s: fix the file or re-export it",
			ts, p.point(0), p.point(1), p.point(2))
	case InvalidIndex:
		s = fmt.Sprintf("invalid vertex index on %s: the triangle refers to a vertex that does not exist", ts)
	default:
		s = fmt.Sprintf("%v on %s", p.Kind, ts)
	}
	if p.Detail != "" {
		s += " (" + p.Detail + ")"
	}
	return s
}

// report collects problems, keeping at most maxPerKind of each kind.
type report struct {
	list  []Problem
	count map[ProblemKind]int
}

func (r *report) add(p Problem) {
	if r.count == nil {
		r.count = make(map[ProblemKind]int)
	}
	r.count[p.Kind]++
	if r.count[p.Kind] <= maxPerKind {
		r.list = append(r.list, p)
	}
}

func (r *report) total() int {
	n := 0
	for _, c := range r.count {
		n += c
	}
	return n
}

// problems returns the listed problems in order of kind, each kind followed
// by a summary entry when some were left out.
func (r *report) problems() []Problem {
	sort.SliceStable(r.list, func(i, j int) bool { return r.list[i].Kind < r.list[j].Kind })
	var out []Problem
	for i := 0; i < len(r.list); {
		k := r.list[i].Kind
		for ; i < len(r.list) && r.list[i].Kind == k; i++ {
			out = append(out, r.list[i])
		}
		if more := r.count[k] - maxPerKind; more > 0 {
			out = append(out, Problem{Kind: k, Detail: fmt.Sprintf("%d more not listed (%d in all)", more, r.count[k])})
		}
	}
	return out
}

// Check returns every problem that keeps m from being a closed, orientable,
// outward-oriented 2-manifold with well-shaped triangles, in order of kind (at
// most 20 per kind, followed by a summary entry when there are more). It
// returns nil for a valid mesh.
//
// A triangle is degenerate when it repeats a vertex, when its area is below
// 1e-12 × (bounding-box diagonal)², or when its corners are collinear to
// rounding (twice its area below 1e-10 × its longest edge squared). Inward
// normals are reported for each connected component that is closed and
// consistently oriented but whose signed volume (Volume) is negative.
func (m *Mesh) Check() []Problem {
	r := m.check()
	return r.problems()
}

// Validate returns nil when Check finds nothing, otherwise an error that
// names the mesh, counts the problems and lists the first few.
func (m *Mesh) Validate() error {
	r := m.check()
	n := r.total()
	if n == 0 {
		return nil
	}
	ps := r.problems()
	const show = 3
	var b strings.Builder
	plural := "s"
	if n == 1 {
		plural = ""
	}
	fmt.Fprintf(&b, "%s: %d mesh problem%s: ", m.Name, n, plural)
	for i := 0; i < len(ps) && i < show; i++ {
		if i > 0 {
			b.WriteString("; ")
		}
		b.WriteString(ps[i].String())
	}
	if n > show {
		fmt.Fprintf(&b, "; and %d more (see the full check report)", n-show)
	}
	return fmt.Errorf("%s", b.String())
}

func (m *Mesh) check() *report {
	r := &report{}
	nv := len(m.Vertices)
	diag := m.diagonal()
	if math.IsNaN(diag) || math.IsInf(diag, 0) {
		diag = finiteDiagonal(m.Vertices)
	}
	areaTol := 1e-12 * diag * diag

	// bad marks triangles that cannot take part in geometric tests.
	bad := make([]bool, len(m.Triangles))
	for t, tri := range m.Triangles {
		if tri[0] < 0 || tri[0] >= nv || tri[1] < 0 || tri[1] >= nv || tri[2] < 0 || tri[2] >= nv {
			bad[t] = true
			r.add(Problem{Kind: InvalidIndex, Triangles: []int{t},
				Detail: fmt.Sprintf("vertex indices %d, %d, %d; the mesh has %d vertices", tri[0], tri[1], tri[2], nv)})
			continue
		}
		a, b, c := m.Corners(t)
		if !finite(a) || !finite(b) || !finite(c) {
			bad[t] = true
			r.add(Problem{Kind: NonFinite, Triangles: []int{t}, Points: []r3.Vec{a, b, c}})
			continue
		}
		if tri[0] == tri[1] || tri[1] == tri[2] || tri[2] == tri[0] {
			r.add(Problem{Kind: DegenerateTriangle, Triangles: []int{t}, Points: []r3.Vec{a, b, c}, Detail: "a vertex is repeated"})
			continue
		}
		area := m.Area(t)
		d := m.Diameter(t)
		if area < areaTol || 2*area < 1e-10*d*d {
			r.add(Problem{Kind: DegenerateTriangle, Triangles: []int{t}, Points: []r3.Vec{a, b, c}, Detail: fmt.Sprintf("area %.3g", area)})
		}
	}

	// Duplicates: same vertex set.
	first := make(map[[3]int]int, len(m.Triangles))
	for t, tri := range m.Triangles {
		if bad[t] {
			continue
		}
		k := tri
		sort.Ints(k[:])
		if o, ok := first[k]; ok {
			a, b, c := m.Corners(t)
			r.add(Problem{Kind: DuplicateTriangle, Triangles: []int{o, t}, Points: []r3.Vec{a, b, c}})
			continue
		}
		first[k] = t
	}

	// Edges: which triangles use each undirected edge, and in which direction.
	type use struct {
		t       int
		forward bool // traversed from the lower to the higher vertex index
	}
	edges := make(map[edgeKey][]use, 3*len(m.Triangles)/2)
	var order []edgeKey // deterministic report order
	for t, tri := range m.Triangles {
		if bad[t] {
			continue
		}
		for k := 0; k < 3; k++ {
			i, j := tri[k], tri[(k+1)%3]
			if i == j {
				continue
			}
			e := newEdgeKey(i, j)
			if _, ok := edges[e]; !ok {
				order = append(order, e)
			}
			edges[e] = append(edges[e], use{t, i < j})
		}
	}
	// Components of triangles joined through edges; a component is sound
	// (eligible for the volume test) when all its edges join exactly two
	// triangles with opposite directions.
	parent := make([]int, len(m.Triangles))
	for i := range parent {
		parent[i] = i
	}
	var find func(int) int
	find = func(i int) int {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	unsound := make(map[int]bool)
	var flawed []int
	for _, e := range order {
		us := edges[e]
		for _, u := range us[1:] {
			parent[find(u.t)] = find(us[0].t)
		}
		pts := []r3.Vec{m.Vertices[e.a], m.Vertices[e.b]}
		ts := make([]int, len(us))
		for i, u := range us {
			ts[i] = u.t
		}
		switch {
		case len(us) == 1:
			r.add(Problem{Kind: OpenEdge, Triangles: ts, Points: pts})
			flawed = append(flawed, us[0].t)
		case len(us) > 2:
			r.add(Problem{Kind: NonManifoldEdge, Triangles: ts, Points: pts, Detail: fmt.Sprintf("%d triangles", len(us))})
			flawed = append(flawed, us[0].t)
		case us[0].forward == us[1].forward:
			r.add(Problem{Kind: InconsistentOrientation, Triangles: ts, Points: pts})
			flawed = append(flawed, us[0].t)
		}
	}
	for _, t := range flawed {
		unsound[find(t)] = true
	}
	for t := range m.Triangles {
		if bad[t] {
			unsound[find(t)] = true
		}
	}
	// Signed volume per sound component, measured about the component's
	// first vertex to keep the sum well conditioned far from the origin.
	type comp struct {
		first  int
		origin r3.Vec
		vol    float64
		n      int
	}
	comps := make(map[int]*comp)
	var roots []int
	for t := range m.Triangles {
		root := find(t)
		if unsound[root] {
			continue
		}
		c, ok := comps[root]
		if !ok {
			c = &comp{first: t, origin: m.Vertices[m.Triangles[t][0]]}
			comps[root] = c
			roots = append(roots, root)
		}
		a, b, cc := m.Corners(t)
		a, b, cc = r3.Sub(a, c.origin), r3.Sub(b, c.origin), r3.Sub(cc, c.origin)
		c.vol += r3.Dot(a, r3.Cross(b, cc)) / 6
		c.n++
	}
	for _, root := range roots {
		c := comps[root]
		if c.vol < 0 {
			a, b, cc := m.Corners(c.first)
			r.add(Problem{Kind: InwardNormals, Triangles: []int{c.first}, Points: []r3.Vec{a, b, cc},
				Detail: fmt.Sprintf("%d triangles, volume %.6g", c.n, c.vol)})
		}
	}
	return r
}

func finite(v r3.Vec) bool {
	return !math.IsNaN(v.X) && !math.IsNaN(v.Y) && !math.IsNaN(v.Z) &&
		!math.IsInf(v.X, 0) && !math.IsInf(v.Y, 0) && !math.IsInf(v.Z, 0)
}

// finiteDiagonal is the bounding-box diagonal of the finite vertices.
func finiteDiagonal(vs []r3.Vec) float64 {
	lo, hi := finiteBounds(vs)
	return r3.Norm(r3.Sub(hi, lo))
}
