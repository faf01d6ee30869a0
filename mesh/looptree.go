package mesh

import (
	"errors"
	"fmt"
	"math"
)

// ErrHandles tells that a surface has handles (genus > 0): its
// divergence-free currents are not all sums of vertex loops, so a loop–tree
// basis would need global loops, which LoopTree does not build.
var ErrHandles = errors.New("surface with handles")

// LoopTree is a second basis of the currents of an RWG basis, x = T y, in
// which the divergence-free (solenoidal) part and the charge-carrying part
// are apart:
//
//   - loops: one per vertex v but one per connected component (the root),
//     Λ_v = Σ_{e ∋ v} ±f_e / l_e, the RWG functions of the edges at v, which
//     is n̂ × ∇φ_v for the hat function φ_v of v: divergence-free;
//   - trees: the RWG functions f_e of the edges of a spanning tree of each
//     component's dual graph (triangles joined across edges), whose
//     divergences span the charges of zero total.
//
// On a closed surface of genus 0 with V vertices, E edges and F triangles
// there are V - 1 loops and F - 1 trees per component, E in all (Euler:
// V - E + F = 2), and T is invertible; the edges outside the dual tree then
// form a spanning tree of the vertices, along which T and Tᵀ are solved in
// O(E). Columns 0 … Loops()-1 of T are the loops, the rest the trees.
type LoopTree struct {
	basis *Basis
	// loop[j] lists the terms of loop column j; tree[k] is the edge of tree
	// column Loops()+k.
	loop [][]loopTerm
	tree []int
	// col[e] is the tree column of edge e, or -1 for the edges of the
	// vertex trees.
	col []int
	// order lists the non-root vertices of each vertex tree from its root
	// outwards, with the edge to their parent.
	order    []treeStep
	byVertex []int // loop column of each vertex, -1 for roots and unused ones
}

type loopTerm struct {
	edge int
	c    float64
}

// treeStep is one non-root vertex of a vertex tree in root-outward order:
// its loop column, the edge to its parent and the parent's loop column (-1
// for a root), with the coefficients of that edge in both loops.
type treeStep struct {
	col, edge, parent int
	self, up          float64
}

// NewLoopTree builds the loop–tree basis of b. It returns an error wrapping
// ErrHandles for a component with handles, and one naming the triangle for
// a mesh whose orientation is not consistent (run Check for a full report).
func NewLoopTree(b *Basis) (*LoopTree, error) {
	m := b.Mesh
	nv, nf, ne := len(m.Vertices), len(m.Triangles), len(b.Edges)
	lt := &LoopTree{basis: b, col: make([]int, ne), byVertex: make([]int, nv)}
	// Dual spanning trees: breadth first over the triangles of each
	// component, across edges.
	inDual := make([]bool, ne)
	seen := make([]bool, nf)
	comp := make([]int, nf) // component of each triangle
	var roots []int         // one triangle per component
	for t0 := range m.Triangles {
		if seen[t0] {
			continue
		}
		c := len(roots)
		roots = append(roots, t0)
		seen[t0], comp[t0] = true, c
		queue := []int{t0}
		for len(queue) > 0 {
			t := queue[0]
			queue = queue[1:]
			for _, e := range b.TriEdge[t] {
				o := b.Edges[e].Plus
				if o == t {
					o = b.Edges[e].Minus
				}
				if !seen[o] {
					seen[o], comp[o] = true, c
					inDual[e] = true
					queue = append(queue, o)
				}
			}
		}
	}
	// Loop coefficients: +1/l on an edge leaving v in its T+ triangle's
	// counter-clockwise order, -1/l on one arriving; with consistent
	// orientation the divergences cancel on every triangle at v.
	terms := make([][]loopTerm, nv)
	for e, ed := range b.Edges {
		terms[ed.Vertices[0]] = append(terms[ed.Vertices[0]], loopTerm{e, 1 / ed.Length})
		terms[ed.Vertices[1]] = append(terms[ed.Vertices[1]], loopTerm{e, -1 / ed.Length})
	}
	if err := lt.checkLoops(terms); err != nil {
		return nil, err
	}
	// Vertex trees: the edges outside the dual trees, breadth first from a
	// root vertex of each component.
	adj := make([][]int, nv)
	for e, ed := range b.Edges {
		if !inDual[e] {
			adj[ed.Vertices[0]] = append(adj[ed.Vertices[0]], e)
			adj[ed.Vertices[1]] = append(adj[ed.Vertices[1]], e)
		}
	}
	for v := range lt.byVertex {
		lt.byVertex[v] = -1
	}
	visited := make([]bool, nv)
	for c, t0 := range roots {
		r := m.Triangles[t0][0]
		visited[r] = true
		queue := []int{r}
		verts := 1
		for len(queue) > 0 {
			v := queue[0]
			queue = queue[1:]
			for _, e := range adj[v] {
				ed := b.Edges[e]
				w := ed.Vertices[0]
				if w == v {
					w = ed.Vertices[1]
				}
				if visited[w] {
					continue
				}
				visited[w] = true
				verts++
				j := len(lt.loop)
				lt.byVertex[w] = j
				lt.loop = append(lt.loop, terms[w])
				lt.order = append(lt.order, treeStep{col: j, edge: e, parent: lt.byVertex[v], self: coefOf(terms[w], e), up: coefOf(terms[v], e)})
				queue = append(queue, w)
			}
		}
		// Per component: V - 1 vertex-tree edges and F - 1 dual-tree edges
		// make E exactly when the genus is 0.
		nonDual := 0
		for e, ed := range b.Edges {
			if comp[ed.Plus] == c && !inDual[e] {
				nonDual++
			}
		}
		if nonDual != verts-1 {
			genus := (nonDual - (verts - 1)) / 2
			return nil, fmt.Errorf("mesh %s: the component of triangle %d has %d handle(s): %w", m.Name, t0, genus, ErrHandles)
		}
	}
	for e := range lt.col {
		lt.col[e] = -1
	}
	for e := range b.Edges {
		if inDual[e] {
			lt.col[e] = len(lt.loop) + len(lt.tree)
			lt.tree = append(lt.tree, e)
		}
	}
	if n := len(lt.loop) + len(lt.tree); n != ne {
		return nil, fmt.Errorf("mesh %s: loop–tree basis has %d functions for %d edges", m.Name, n, ne)
	}
	return lt, nil
}

// checkLoops verifies that every vertex loop is divergence-free on each of
// its triangles, which needs a consistently oriented mesh.
func (lt *LoopTree) checkLoops(terms [][]loopTerm) error {
	b := lt.basis
	div := map[int]float64{}
	for v, ts := range terms {
		clear(div)
		scale := 0.0
		for _, tm := range ts {
			ed := b.Edges[tm.edge]
			div[ed.Plus] += tm.c * ed.Length
			div[ed.Minus] -= tm.c * ed.Length
			scale = math.Max(scale, math.Abs(tm.c*ed.Length))
		}
		for t, d := range div {
			if math.Abs(d) > 1e-9*scale {
				return fmt.Errorf("mesh %s: the loop around vertex %d does not close on triangle %d: the orientation is inconsistent near it (run the mesh check)", b.Mesh.Name, v, t)
			}
		}
	}
	return nil
}

// Len is the number of functions, that of the RWG basis.
func (lt *LoopTree) Len() int { return len(lt.col) }

// Loops is the number of loop functions, columns 0 … Loops()-1 of T.
func (lt *LoopTree) Loops() int { return len(lt.loop) }

// Column returns the RWG edges and coefficients of column j of T.
func (lt *LoopTree) Column(j int) (edges []int, coefs []float64) {
	if j < len(lt.loop) {
		for _, tm := range lt.loop[j] {
			edges, coefs = append(edges, tm.edge), append(coefs, tm.c)
		}
		return edges, coefs
	}
	return []int{lt.tree[j-len(lt.loop)]}, []float64{1}
}

// The four maps below act on the k columns of row-major N×k matrices
// (row i of a matrix is data[i*k : (i+1)*k]), N = Len(); dst and src must
// not overlap.

// Mul sets dst = T src: RWG coefficients from loop–tree ones.
func (lt *LoopTree) Mul(dst, src []float64, k int) {
	clear(dst[:lt.Len()*k])
	for j, ts := range lt.loop {
		s := src[j*k : (j+1)*k]
		for _, tm := range ts {
			axpyRow(tm.c, s, dst[tm.edge*k:(tm.edge+1)*k])
		}
	}
	for i, e := range lt.tree {
		j := len(lt.loop) + i
		axpyRow(1, src[j*k:(j+1)*k], dst[e*k:(e+1)*k])
	}
}

// MulTrans sets dst = Tᵀ src.
func (lt *LoopTree) MulTrans(dst, src []float64, k int) {
	clear(dst[:lt.Len()*k])
	for j, ts := range lt.loop {
		d := dst[j*k : (j+1)*k]
		for _, tm := range ts {
			axpyRow(tm.c, src[tm.edge*k:(tm.edge+1)*k], d)
		}
	}
	for i, e := range lt.tree {
		j := len(lt.loop) + i
		copy(dst[j*k:(j+1)*k], src[e*k:(e+1)*k])
	}
}

// Solve sets dst = T^-1 src: loop–tree coefficients of RWG ones. Along each
// vertex tree from its root, the tree edge of vertex w carries only the loops
// of w and of its parent, which fixes w's coefficient; the tree columns then
// take what the loops leave on their edges.
func (lt *LoopTree) Solve(dst, src []float64, k int) {
	for _, st := range lt.order {
		d := dst[st.col*k : (st.col+1)*k]
		copy(d, src[st.edge*k:(st.edge+1)*k])
		if st.parent >= 0 {
			axpyRow(-st.up, dst[st.parent*k:(st.parent+1)*k], d)
		}
		scaleRow(1/st.self, d)
	}
	for i, e := range lt.tree {
		j := len(lt.loop) + i
		d := dst[j*k : (j+1)*k]
		copy(d, src[e*k:(e+1)*k])
		ed := lt.basis.Edges[e]
		for _, v := range ed.Vertices {
			if c := lt.byVertex[v]; c >= 0 {
				axpyRow(-coefOf(lt.loop[c], e), dst[c*k:(c+1)*k], d)
			}
		}
	}
}

// SolveTrans sets dst = T^-T src. The tree columns fix the dual-tree edges
// directly; each loop equation, taken from the leaves of its vertex tree
// inwards, then leaves one unknown: the edge to the parent.
func (lt *LoopTree) SolveTrans(dst, src []float64, k int) {
	clear(dst[:lt.Len()*k])
	for i, e := range lt.tree {
		j := len(lt.loop) + i
		copy(dst[e*k:(e+1)*k], src[j*k:(j+1)*k])
	}
	// acc[j] gathers Σ c x_e over the edges of loop j already known.
	acc := make([]float64, len(lt.loop)*k)
	for j, ts := range lt.loop {
		a := acc[j*k : (j+1)*k]
		for _, tm := range ts {
			if lt.col[tm.edge] >= 0 {
				axpyRow(tm.c, dst[tm.edge*k:(tm.edge+1)*k], a)
			}
		}
	}
	for i := len(lt.order) - 1; i >= 0; i-- {
		st := lt.order[i]
		x := dst[st.edge*k : (st.edge+1)*k]
		copy(x, src[st.col*k:(st.col+1)*k])
		axpyRow(-1, acc[st.col*k:(st.col+1)*k], x)
		scaleRow(1/st.self, x)
		if st.parent >= 0 {
			axpyRow(st.up, x, acc[st.parent*k:(st.parent+1)*k])
		}
	}
}

// coefOf returns the coefficient of edge e among the terms of one loop.
func coefOf(terms []loopTerm, e int) float64 {
	for _, tm := range terms {
		if tm.edge == e {
			return tm.c
		}
	}
	return 0
}

func axpyRow(a float64, x, y []float64) {
	for i, v := range x {
		y[i] += a * v
	}
}

func scaleRow(a float64, x []float64) {
	for i := range x {
		x[i] *= a
	}
}
