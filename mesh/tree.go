package mesh

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Tree is a bounding-volume hierarchy of axis-aligned boxes over the
// triangles of a mesh, for distance, intersection and ray queries. It holds a
// copy of the triangle corners: later changes to the mesh are not seen.
// A Tree is safe for concurrent queries.
type Tree struct {
	mesh  *Mesh
	nodes []node
	// tris lists triangle indices so that every node covers a contiguous
	// range; corners[i] holds the corners of triangle tris[i].
	tris    []int
	corners [][3]r3.Vec
}

type node struct {
	lo, hi      r3.Vec
	left, right int32 // children, or -1 for a leaf
	start, n    int32 // leaf: range in tris
}

// leafSize is the most triangles a leaf holds.
const leafSize = 4

// NewTree builds the bounding-volume hierarchy of m's triangles by splitting
// at the median centroid along the longest axis, in O(n log n).
func NewTree(m *Mesh) *Tree {
	nt := len(m.Triangles)
	t := &Tree{mesh: m, tris: make([]int, nt), corners: make([][3]r3.Vec, nt)}
	if nt == 0 {
		return t
	}
	cent := make([]r3.Vec, nt)
	for i := range t.tris {
		t.tris[i] = i
		cent[i] = m.Centroid(i)
	}
	t.nodes = make([]node, 0, 2*nt/leafSize+1)
	t.build(cent, 0, nt)
	for i, tr := range t.tris {
		a, b, c := m.Corners(tr)
		t.corners[i] = [3]r3.Vec{a, b, c}
	}
	return t
}

// build makes the node covering tris[start:end] and returns its index.
func (t *Tree) build(cent []r3.Vec, start, end int) int32 {
	id := int32(len(t.nodes))
	t.nodes = append(t.nodes, node{left: -1, right: -1, start: int32(start), n: int32(end - start)})
	if end-start <= leafSize {
		lo, hi := boxInf()
		for _, tr := range t.tris[start:end] {
			a, b, c := t.mesh.Corners(tr)
			lo, hi = grow(lo, hi, a)
			lo, hi = grow(lo, hi, b)
			lo, hi = grow(lo, hi, c)
		}
		t.nodes[id].lo, t.nodes[id].hi = lo, hi
		return id
	}
	clo, chi := boxInf()
	for _, tr := range t.tris[start:end] {
		clo, chi = grow(clo, chi, cent[tr])
	}
	ext := r3.Sub(chi, clo)
	axis := 0
	switch {
	case ext.Y >= ext.X && ext.Y >= ext.Z:
		axis = 1
	case ext.Z >= ext.X && ext.Z >= ext.Y:
		axis = 2
	}
	key := make([]float64, end-start)
	for i, tr := range t.tris[start:end] {
		key[i] = [3]float64{cent[tr].X, cent[tr].Y, cent[tr].Z}[axis]
	}
	selectMedian(key, t.tris[start:end])
	mid := (start + end) / 2
	l := t.build(cent, start, mid)
	r := t.build(cent, mid, end)
	n := &t.nodes[id]
	n.left, n.right = l, r
	n.lo, n.hi = grow(t.nodes[l].lo, t.nodes[l].hi, t.nodes[r].lo)
	n.lo, n.hi = grow(n.lo, n.hi, t.nodes[r].hi)
	return id
}

func boxInf() (lo, hi r3.Vec) {
	inf := math.Inf(1)
	return r3.Vec{X: inf, Y: inf, Z: inf}, r3.Vec{X: -inf, Y: -inf, Z: -inf}
}

// grow extends the box [lo, hi] to contain p (NaN coordinates are ignored).
func grow(lo, hi, p r3.Vec) (r3.Vec, r3.Vec) {
	if p.X < lo.X {
		lo.X = p.X
	}
	if p.Y < lo.Y {
		lo.Y = p.Y
	}
	if p.Z < lo.Z {
		lo.Z = p.Z
	}
	if p.X > hi.X {
		hi.X = p.X
	}
	if p.Y > hi.Y {
		hi.Y = p.Y
	}
	if p.Z > hi.Z {
		hi.Z = p.Z
	}
	return lo, hi
}

// Mesh returns the mesh the tree was built from.
func (t *Tree) Mesh() *Mesh { return t.mesh }

// boxDist2 returns the squared distance between box a shifted by s and box b.
func boxDist2(a *node, s r3.Vec, b *node) float64 {
	gap := func(alo, ahi, blo, bhi float64) float64 {
		if d := blo - ahi; d > 0 {
			return d * d
		}
		if d := alo - bhi; d > 0 {
			return d * d
		}
		return 0
	}
	return gap(a.lo.X+s.X, a.hi.X+s.X, b.lo.X, b.hi.X) +
		gap(a.lo.Y+s.Y, a.hi.Y+s.Y, b.lo.Y, b.hi.Y) +
		gap(a.lo.Z+s.Z, a.hi.Z+s.Z, b.lo.Z, b.hi.Z)
}

func (n *node) leaf() bool { return n.left < 0 }

func (n *node) size2() float64 { return r3.Norm2(r3.Sub(n.hi, n.lo)) }

// Gap returns the smallest distance between the surfaces of t's and o's
// meshes and a pair of closest points pa (on t's mesh) and pb (on o's). It is
// exact for triangle meshes (see Gap). Intersecting surfaces give 0.
// Either tree being empty gives +Inf.
func (t *Tree) Gap(o *Tree) (d float64, pa, pb r3.Vec) {
	d2, pa, pb, _ := t.gap(r3.Vec{}, o, 0)
	return math.Sqrt(d2), pa, pb
}

// gap is Gap with t's mesh translated by shift, stopping early once a pair
// at squared distance ≤ stop2 is found (stop2 = 0: only at contact, where no
// closer pair can exist). It also returns the number of triangle pairs whose
// distance was computed.
func (t *Tree) gap(shift r3.Vec, o *Tree, stop2 float64) (d2 float64, pa, pb r3.Vec, pairs int) {
	d2 = math.Inf(1)
	if len(t.nodes) == 0 || len(o.nodes) == 0 {
		return d2, pa, pb, 0
	}
	var visit func(i, j int32)
	visit = func(i, j int32) {
		a, b := &t.nodes[i], &o.nodes[j]
		if a.leaf() && b.leaf() {
			for p := a.start; p < a.start+a.n; p++ {
				ta := t.corners[p]
				for k := range ta {
					ta[k] = r3.Add(ta[k], shift)
				}
				for q := b.start; q < b.start+b.n; q++ {
					pairs++
					e, x, y := triangleDistance(&ta, &o.corners[q])
					if e < d2 {
						d2, pa, pb = e, x, y
					}
				}
			}
			return
		}
		// Descend into the larger box (or the only inner node), nearer
		// child first.
		if b.leaf() || (!a.leaf() && a.size2() >= b.size2()) {
			l, r := a.left, a.right
			dl, dr := boxDist2(&t.nodes[l], shift, b), boxDist2(&t.nodes[r], shift, b)
			if dr < dl {
				l, r, dl, dr = r, l, dr, dl
			}
			if dl < d2 && d2 > stop2 {
				visit(l, j)
			}
			if dr < d2 && d2 > stop2 {
				visit(r, j)
			}
			return
		}
		l, r := b.left, b.right
		dl, dr := boxDist2(a, shift, &o.nodes[l]), boxDist2(a, shift, &o.nodes[r])
		if dr < dl {
			l, r, dl, dr = r, l, dr, dl
		}
		if dl < d2 && d2 > stop2 {
			visit(i, l)
		}
		if dr < d2 && d2 > stop2 {
			visit(i, r)
		}
	}
	visit(0, 0)
	// Closest points of the shifted mesh are reported where they are.
	return d2, pa, pb, pairs
}

// Ray returns the nearest intersection of the ray origin + s·û, s ≥ 0, with
// the mesh, where û = dir/|dir|: dist is the length along the ray (in L0,
// independent of |dir|) and tri the triangle hit. ok is false when the ray
// misses or dir is zero or not finite.
func (t *Tree) Ray(origin, dir r3.Vec) (dist float64, tri int, ok bool) {
	l := r3.Norm(dir)
	if len(t.nodes) == 0 || !(l > 0) || math.IsInf(l, 0) {
		return 0, -1, false
	}
	u := r3.Scale(1/l, dir)
	inv := r3.Vec{X: 1 / u.X, Y: 1 / u.Y, Z: 1 / u.Z}
	best, tri := math.Inf(1), -1
	stack := []int32{0}
	for len(stack) > 0 {
		i := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		n := &t.nodes[i]
		if tmin, hit := slab(origin, inv, n); !hit || tmin > best {
			continue
		}
		if !n.leaf() {
			stack = append(stack, n.left, n.right)
			continue
		}
		for p := n.start; p < n.start+n.n; p++ {
			c := &t.corners[p]
			if s, hit := rayTriangle(origin, u, c[0], c[1], c[2]); hit && s < best {
				best, tri = s, t.tris[p]
			}
		}
	}
	if tri < 0 {
		return 0, -1, false
	}
	return best, tri, true
}

// slab returns the entry distance of the ray o + s u (s ≥ 0, inv = 1/u
// componentwise) into box n, and whether it enters at all.
func slab(o, inv r3.Vec, n *node) (float64, bool) {
	tmin, tmax := 0.0, math.Inf(1)
	for _, ax := range [3][4]float64{
		{o.X, inv.X, n.lo.X, n.hi.X},
		{o.Y, inv.Y, n.lo.Y, n.hi.Y},
		{o.Z, inv.Z, n.lo.Z, n.hi.Z},
	} {
		t1 := (ax[2] - ax[0]) * ax[1]
		t2 := (ax[3] - ax[0]) * ax[1]
		if math.IsNaN(t1) || math.IsNaN(t2) {
			// The ray runs inside a face plane of the box (0·∞); it is in
			// the slab exactly when the origin is.
			if ax[0] < ax[2] || ax[0] > ax[3] {
				return 0, false
			}
			continue
		}
		if t1 > t2 {
			t1, t2 = t2, t1
		}
		tmin = math.Max(tmin, t1)
		tmax = math.Min(tmax, t2)
	}
	// Slack for rounding, so grazing hits on a box face are not lost.
	return tmin, tmin <= tmax*(1+1e-12)
}

// selectMedian reorders key (and ids alongside) so that the element at
// len/2 is the one a full sort would put there, with no larger key before it
// and no smaller key after it (quickselect, O(n) expected).
func selectMedian(key []float64, ids []int) {
	k := len(key) / 2
	lo, hi := 0, len(key)-1
	for lo < hi {
		// Median of three as pivot.
		mid := lo + (hi-lo)/2
		if key[mid] < key[lo] {
			key[mid], key[lo] = key[lo], key[mid]
			ids[mid], ids[lo] = ids[lo], ids[mid]
		}
		if key[hi] < key[lo] {
			key[hi], key[lo] = key[lo], key[hi]
			ids[hi], ids[lo] = ids[lo], ids[hi]
		}
		if key[hi] < key[mid] {
			key[hi], key[mid] = key[mid], key[hi]
			ids[hi], ids[mid] = ids[mid], ids[hi]
		}
		pivot := key[mid]
		i, j := lo, hi
		for i <= j {
			for key[i] < pivot {
				i++
			}
			for key[j] > pivot {
				j--
			}
			if i <= j {
				key[i], key[j] = key[j], key[i]
				ids[i], ids[j] = ids[j], ids[i]
				i++
				j--
			}
		}
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return
		}
	}
}
