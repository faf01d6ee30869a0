package mesh

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Weld returns a copy of m in which vertices closer than tol (L0) are merged,
// and the number of vertices that were merged into another. Vertices are
// taken in order; each joins the first kept vertex within tol of it, or is
// kept. Vertices no triangle uses are dropped. Triangles are renumbered but
// never removed: a triangle whose corners merge becomes degenerate and is
// reported by Check. With tol ≤ 0 only exactly coincident vertices merge.
// Non-finite vertices are never merged.
//
// Weld runs in O(n) expected time: vertices are binned in a hash grid of cell
// size tol, so only the 27 cells around a vertex are searched.
func Weld(m *Mesh, tol float64) (*Mesh, int) {
	out := &Mesh{Name: m.Name, Triangles: make([][3]int, len(m.Triangles))}
	used := make([]bool, len(m.Vertices))
	for _, t := range m.Triangles {
		for _, i := range t {
			if i >= 0 && i < len(used) {
				used[i] = true
			}
		}
	}
	// newIndex[i] is the index in out.Vertices of vertex i.
	newIndex := make([]int, len(m.Vertices))
	merged := 0
	lo, _ := finiteBounds(m.Vertices)
	type cell [3]int64
	grid := make(map[cell][]int) // cell -> kept vertices (indices into out.Vertices)
	exact := make(map[r3.Vec]int)
	key := func(v r3.Vec) cell {
		f := func(x, o float64) int64 {
			c := math.Floor((x - o) / tol)
			// Clamp: coordinates this far apart in units of tol cannot be
			// within tol of each other anyway.
			c = math.Max(-1<<62, math.Min(1<<62, c))
			return int64(c)
		}
		return cell{f(v.X, lo.X), f(v.Y, lo.Y), f(v.Z, lo.Z)}
	}
	tol2 := tol * tol
	for i, v := range m.Vertices {
		newIndex[i] = -1
		if !used[i] {
			continue
		}
		keep := func() {
			newIndex[i] = len(out.Vertices)
			out.Vertices = append(out.Vertices, v)
		}
		switch {
		case !finite(v):
			keep()
		case tol <= 0:
			if j, ok := exact[v]; ok {
				newIndex[i] = j
				merged++
				continue
			}
			keep()
			exact[v] = newIndex[i]
		default:
			c := key(v)
			found := -1
		search:
			for dx := int64(-1); dx <= 1; dx++ {
				for dy := int64(-1); dy <= 1; dy++ {
					for dz := int64(-1); dz <= 1; dz++ {
						for _, j := range grid[cell{c[0] + dx, c[1] + dy, c[2] + dz}] {
							if r3.Norm2(r3.Sub(out.Vertices[j], v)) < tol2 {
								found = j
								break search
							}
						}
					}
				}
			}
			if found >= 0 {
				newIndex[i] = found
				merged++
				continue
			}
			keep()
			grid[c] = append(grid[c], newIndex[i])
		}
	}
	for t, tri := range m.Triangles {
		for k, i := range tri {
			if i >= 0 && i < len(newIndex) {
				out.Triangles[t][k] = newIndex[i]
			} else {
				out.Triangles[t][k] = -1 // invalid; Check reports it
			}
		}
	}
	return out, merged
}

// finiteBounds returns the bounding box of the finite vertices.
func finiteBounds(vs []r3.Vec) (lo, hi r3.Vec) {
	seen := false
	for _, v := range vs {
		if !finite(v) {
			continue
		}
		if !seen {
			lo, hi, seen = v, v, true
			continue
		}
		lo = r3.Vec{X: math.Min(lo.X, v.X), Y: math.Min(lo.Y, v.Y), Z: math.Min(lo.Z, v.Z)}
		hi = r3.Vec{X: math.Max(hi.X, v.X), Y: math.Max(hi.Y, v.Y), Z: math.Max(hi.Z, v.Z)}
	}
	return lo, hi
}
