package mesh

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/spatial/r3"
)

// MaxTriangles is the largest triangle count a shape constructor will build.
// A dense boundary-element matrix on more triangles could not be stored, so a
// request beyond it is almost certainly a unit or size mistake.
const MaxTriangles = 2_000_000

// icosahedron returns the 12 vertices and 20 outward-oriented faces of the
// regular icosahedron with vertices (0, ±1, ±φ) and their cyclic permutations
// (edge length 2, circumradius sqrt(1+φ²)).
func icosahedron() ([]r3.Vec, [][3]int) {
	phi := (1 + math.Sqrt(5)) / 2
	var v []r3.Vec
	for _, s1 := range []float64{-1, 1} {
		for _, s2 := range []float64{-1, 1} {
			v = append(v,
				r3.Vec{X: 0, Y: s1, Z: s2 * phi},
				r3.Vec{X: s1, Y: s2 * phi, Z: 0},
				r3.Vec{X: s2 * phi, Y: 0, Z: s1},
			)
		}
	}
	// The faces are exactly the triples of mutually adjacent vertices
	// (pairwise distance 2).
	adjacent := func(i, j int) bool { return math.Abs(r3.Norm(r3.Sub(v[i], v[j]))-2) < 1e-9 }
	var faces [][3]int
	for i := 0; i < len(v); i++ {
		for j := i + 1; j < len(v); j++ {
			if !adjacent(i, j) {
				continue
			}
			for k := j + 1; k < len(v); k++ {
				if !adjacent(i, k) || !adjacent(j, k) {
					continue
				}
				f := [3]int{i, j, k}
				n := r3.Cross(r3.Sub(v[j], v[i]), r3.Sub(v[k], v[i]))
				if r3.Dot(n, v[i]) < 0 {
					f[1], f[2] = f[2], f[1]
				}
				faces = append(faces, f)
			}
		}
	}
	return v, faces
}

// icosahedronEdgeAngle is the angle subtended at the centre by one edge of the
// regular icosahedron: 2 asin(1/sqrt(1+φ²)) ≈ 1.1071 rad.
func icosahedronEdgeAngle() float64 {
	phi := (1 + math.Sqrt(5)) / 2
	return 2 * math.Asin(1/math.Sqrt(1+phi*phi))
}

// Sphere returns a closed, outward-oriented icosphere of the given radius
// whose longest edge does not exceed size: every face of the regular
// icosahedron is divided into n² triangles with the smallest n ≥ 1 for which
// the longest edge, after the vertices are projected onto the sphere, is at
// most size; see SphereLevel. All vertices lie on the sphere (the faceted body
// is inscribed, so its area and volume fall short of 4πR² and 4πR³/3 by
// O((size/R)²)).
//
// The mesh has 20n² triangles, 30n² edges and 10n²+2 vertices. Sphere returns
// an error for a non-positive or non-finite radius or size, or when more than
// MaxTriangles triangles would be needed.
func Sphere(radius, size float64) (*Mesh, error) {
	if !(radius > 0) || math.IsInf(radius, 0) {
		return nil, fmt.Errorf("mesh: sphere radius %g: must be positive and finite", radius)
	}
	if !(size > 0) || math.IsInf(size, 0) {
		return nil, fmt.Errorf("mesh: sphere edge size %g: must be positive and finite", size)
	}
	nmax := int(math.Sqrt(MaxTriangles / 20))
	// The n chords along one icosahedron edge span the whole edge's chord, so
	// the longest of them is at least 2R sin(θ/2)/n: n below that bound can
	// never satisfy the size limit and the search starts there.
	lower := 2 * radius * math.Sin(icosahedronEdgeAngle()/2) / size
	if lower > float64(nmax) {
		return nil, fmt.Errorf("mesh: sphere r=%g with edges ≤ %g needs more than %d triangles: use a larger size", radius, size, MaxTriangles)
	}
	n := max(1, int(math.Floor(lower)))
	for ; n <= nmax; n++ {
		if sphereLongestEdge(radius, n) <= size {
			m, err := SphereLevel(radius, n)
			if err != nil {
				return nil, err
			}
			m.Name = fmt.Sprintf("sphere r=%g h=%g", radius, size)
			return m, nil
		}
	}
	return nil, fmt.Errorf("mesh: sphere r=%g with edges ≤ %g needs more than %d triangles: use a larger size", radius, size, MaxTriangles)
}

// sphereLongestEdge returns the longest edge of SphereLevel(radius, n). All
// faces of the icosahedron are congruent, so one face suffices.
func sphereLongestEdge(radius float64, n int) float64 {
	v, f := icosahedron()
	a, b, c := v[f[0][0]], v[f[0][1]], v[f[0][2]]
	verts, tris := subdivideFace(a, b, c, n)
	for i := range verts {
		verts[i] = r3.Scale(radius/r3.Norm(verts[i]), verts[i])
	}
	longest := 0.0
	for _, t := range tris {
		for k := 0; k < 3; k++ {
			longest = math.Max(longest, r3.Norm(r3.Sub(verts[t[k]], verts[t[(k+1)%3]])))
		}
	}
	return longest
}

// subdivideFace returns the lattice points a(n-i-j)/n + b i/n + c j/n of the
// flat triangle (a,b,c) and its n² sub-triangles, oriented like (a,b,c).
// Point (i,j) has index latticeIndex(n, i, j).
func subdivideFace(a, b, c r3.Vec, n int) ([]r3.Vec, [][3]int) {
	var verts []r3.Vec
	for i := 0; i <= n; i++ {
		for j := 0; j <= n-i; j++ {
			verts = append(verts, latticePoint(a, b, c, n, i, j))
		}
	}
	var tris [][3]int
	for i := 0; i < n; i++ {
		for j := 0; j < n-i; j++ {
			tris = append(tris, [3]int{latticeIndex(n, i, j), latticeIndex(n, i+1, j), latticeIndex(n, i, j+1)})
			if i+j < n-1 {
				tris = append(tris, [3]int{latticeIndex(n, i+1, j), latticeIndex(n, i+1, j+1), latticeIndex(n, i, j+1)})
			}
		}
	}
	return verts, tris
}

func latticePoint(a, b, c r3.Vec, n, i, j int) r3.Vec {
	wa := float64(n-i-j) / float64(n)
	wb := float64(i) / float64(n)
	wc := float64(j) / float64(n)
	return r3.Add(r3.Add(r3.Scale(wa, a), r3.Scale(wb, b)), r3.Scale(wc, c))
}

// latticeIndex numbers the points (i, j), i+j ≤ n, row by row in i.
func latticeIndex(n, i, j int) int {
	// Rows 0..i-1 hold (n+1) + n + ... + (n-i+2) points.
	return i*(n+1) - i*(i-1)/2 + j
}

// SphereLevel returns the icosphere of the given radius in which every face
// of the regular icosahedron is divided into n² triangles (n ≥ 1) and every
// vertex is projected onto the sphere. n = 1 is the icosahedron itself (20
// triangles); n = 4 gives 320 triangles. Vertices on the icosahedron's edges
// and corners are shared between faces, so the mesh is closed and has
// 10n²+2 vertices.
func SphereLevel(radius float64, n int) (*Mesh, error) {
	if !(radius > 0) || math.IsInf(radius, 0) {
		return nil, fmt.Errorf("mesh: sphere radius %g: must be positive and finite", radius)
	}
	if n < 1 {
		return nil, fmt.Errorf("mesh: sphere subdivision %d: must be at least 1", n)
	}
	if float64(n)*float64(n)*20 > MaxTriangles {
		return nil, fmt.Errorf("mesh: sphere subdivision %d gives %d triangles, more than %d: use a smaller subdivision", n, 20*n*n, MaxTriangles)
	}
	cv, cf := icosahedron()
	// A lattice point is identified exactly by the icosahedron corners it
	// depends on and their integer weights, so shared points on edges and
	// corners get one index without any floating-point comparison.
	type weight struct{ corner, w int }
	type pointKey [3]weight
	index := make(map[pointKey]int, 10*n*n+2)
	m := &Mesh{Name: fmt.Sprintf("sphere r=%g n=%d", radius, n)}
	m.Vertices = make([]r3.Vec, 0, 10*n*n+2)
	m.Triangles = make([][3]int, 0, 20*n*n)
	local := make([]int, (n+1)*(n+2)/2)
	for _, f := range cf {
		for i := 0; i <= n; i++ {
			for j := 0; j <= n-i; j++ {
				ws := []weight{{f[0], n - i - j}, {f[1], i}, {f[2], j}}
				sort.Slice(ws, func(p, q int) bool { return ws[p].corner < ws[q].corner })
				var key pointKey
				k := 0
				for _, w := range ws {
					if w.w != 0 {
						key[k] = w
						k++
					}
				}
				for ; k < 3; k++ {
					key[k] = weight{-1, 0}
				}
				id, ok := index[key]
				if !ok {
					p := latticePoint(cv[f[0]], cv[f[1]], cv[f[2]], n, i, j)
					id = len(m.Vertices)
					m.Vertices = append(m.Vertices, r3.Scale(radius/r3.Norm(p), p))
					index[key] = id
				}
				local[latticeIndex(n, i, j)] = id
			}
		}
		for i := 0; i < n; i++ {
			for j := 0; j < n-i; j++ {
				m.Triangles = append(m.Triangles, [3]int{local[latticeIndex(n, i, j)], local[latticeIndex(n, i+1, j)], local[latticeIndex(n, i, j+1)]})
				if i+j < n-1 {
					m.Triangles = append(m.Triangles, [3]int{local[latticeIndex(n, i+1, j)], local[latticeIndex(n, i+1, j+1)], local[latticeIndex(n, i, j+1)]})
				}
			}
		}
	}
	return m, nil
}

// divisions returns ceil(length/h), at least 1, or an error when the count
// is absurd.
func divisions(what string, length, h float64) (int, error) {
	d := math.Ceil(length/h - 1e-9)
	if d < 1 {
		d = 1
	}
	if d > MaxTriangles {
		return 0, fmt.Errorf("%s %g with cell size %g needs more than %d divisions: use a larger cell size", what, length, h, MaxTriangles)
	}
	return int(d), nil
}

func checkLength(what string, v float64) error {
	if !(v > 0) || math.IsInf(v, 0) {
		return fmt.Errorf("mesh: %s %g: must be positive and finite", what, v)
	}
	return nil
}

// Box returns the closed, outward-oriented surface of the axis-aligned box
// with side lengths size.X, size.Y, size.Z centred at the origin. Each face is
// divided into a grid of rectangles whose sides are at most h (ceil(side/h)
// cells along each side), each split into two triangles; faces share their
// vertices along the box edges. Box returns an error for non-positive or
// non-finite sizes and when more than MaxTriangles triangles would be needed.
func Box(size r3.Vec, h float64) (*Mesh, error) {
	for _, c := range []struct {
		what string
		v    float64
	}{{"box size x", size.X}, {"box size y", size.Y}, {"box size z", size.Z}, {"box cell size", h}} {
		if err := checkLength(c.what, c.v); err != nil {
			return nil, err
		}
	}
	var n [3]int
	for a, l := range [3]float64{size.X, size.Y, size.Z} {
		d, err := divisions("mesh: box side", l, h)
		if err != nil {
			return nil, err
		}
		n[a] = d
	}
	tris := 4 * (float64(n[0])*float64(n[1]) + float64(n[1])*float64(n[2]) + float64(n[2])*float64(n[0]))
	if tris > MaxTriangles {
		return nil, fmt.Errorf("mesh: box %g×%g×%g with cells ≤ %g needs %.0f triangles, more than %d: use a larger cell size",
			size.X, size.Y, size.Z, h, tris, MaxTriangles)
	}
	m := boxGrid(size, n)
	m.Name = fmt.Sprintf("box %gx%gx%g h=%g", size.X, size.Y, size.Z, h)
	return m, nil
}

// boxGrid builds the box surface on an n[0]×n[1]×n[2] lattice.
func boxGrid(size r3.Vec, n [3]int) *Mesh {
	m := &Mesh{}
	half := [3]float64{size.X / 2, size.Y / 2, size.Z / 2}
	index := make(map[[3]int]int)
	vertex := func(l [3]int) int {
		if id, ok := index[l]; ok {
			return id
		}
		var p [3]float64
		for a := 0; a < 3; a++ {
			// Exact ±half on the faces, uniform in between.
			switch l[a] {
			case 0:
				p[a] = -half[a]
			case n[a]:
				p[a] = half[a]
			default:
				p[a] = -half[a] + 2*half[a]*float64(l[a])/float64(n[a])
			}
		}
		id := len(m.Vertices)
		m.Vertices = append(m.Vertices, r3.Vec{X: p[0], Y: p[1], Z: p[2]})
		index[l] = id
		return id
	}
	for a := 0; a < 3; a++ {
		// In-plane axes u, v with e_u × e_v = e_a.
		u, v := (a+1)%3, (a+2)%3
		for _, side := range []int{0, n[a]} {
			for i := 0; i < n[u]; i++ {
				for j := 0; j < n[v]; j++ {
					var q [4][3]int
					for k, d := range [4][2]int{{0, 0}, {1, 0}, {1, 1}, {0, 1}} {
						q[k][a] = side
						q[k][u] = i + d[0]
						q[k][v] = j + d[1]
					}
					p := [4]int{vertex(q[0]), vertex(q[1]), vertex(q[2]), vertex(q[3])}
					if side == n[a] {
						// Seen from +e_a the quad p0 p1 p2 p3 is counter-clockwise.
						m.Triangles = append(m.Triangles, [3]int{p[0], p[1], p[2]}, [3]int{p[0], p[2], p[3]})
					} else {
						m.Triangles = append(m.Triangles, [3]int{p[0], p[2], p[1]}, [3]int{p[0], p[3], p[2]})
					}
				}
			}
		}
	}
	return m
}

// Plate returns a thin box of width (x) × depth (y) × thickness (z) centred at
// the origin, gridded like Box with cells of side at most h; the thickness is
// divided into at least one cell even when it is much smaller than h.
func Plate(width, depth, thickness, h float64) (*Mesh, error) {
	m, err := Box(r3.Vec{X: width, Y: depth, Z: thickness}, h)
	if err != nil {
		return nil, fmt.Errorf("mesh: plate: %w", err)
	}
	m.Name = fmt.Sprintf("plate %gx%gx%g h=%g", width, depth, thickness, h)
	return m, nil
}

// Cylinder returns the closed, outward-oriented surface of the cylinder of
// the given radius with its axis along z from -height/2 to +height/2.
// The side is a grid of nθ = max(6, ceil(2π radius/h)) vertices around and
// ceil(height/h) rings along the axis, each cell split into two triangles.
// Each cap is triangulated by nr = ceil(radius/h) concentric rings joined to a
// centre vertex; ring k has max(6, round(nθ k/nr)) vertices and the outermost
// ring is the side's end ring, so the caps conform to the side. Triangle
// edges are about h. Cylinder returns an error for non-positive or non-finite
// sizes and when more than MaxTriangles triangles would be needed.
func Cylinder(radius, height, h float64) (*Mesh, error) {
	for _, c := range []struct {
		what string
		v    float64
	}{{"cylinder radius", radius}, {"cylinder height", height}, {"cylinder cell size", h}} {
		if err := checkLength(c.what, c.v); err != nil {
			return nil, err
		}
	}
	nth, err := divisions("mesh: cylinder circumference", 2*math.Pi*radius, h)
	if err != nil {
		return nil, err
	}
	nth = max(nth, 6)
	nz, err := divisions("mesh: cylinder height", height, h)
	if err != nil {
		return nil, err
	}
	nr, err := divisions("mesh: cylinder radius", radius, h)
	if err != nil {
		return nil, err
	}
	ring := func(k int) int { // vertices on cap ring k = 1..nr
		if k == nr {
			return nth
		}
		return max(6, int(math.Round(float64(nth)*float64(k)/float64(nr))))
	}
	tris := 2 * float64(nth) * float64(nz)
	for k := 1; k <= nr; k++ {
		tris += 2 * float64(ring(k)+ring(k-1))
	}
	if tris > MaxTriangles {
		return nil, fmt.Errorf("mesh: cylinder r=%g height=%g with h=%g needs about %.0f triangles, more than %d: use a larger h",
			radius, height, h, tris, MaxTriangles)
	}

	m := &Mesh{Name: fmt.Sprintf("cylinder r=%g height=%g h=%g", radius, height, h)}
	add := func(p r3.Vec) int {
		m.Vertices = append(m.Vertices, p)
		return len(m.Vertices) - 1
	}
	// Side rings, bottom (z = -height/2) to top.
	side := make([][]int, nz+1)
	for l := 0; l <= nz; l++ {
		z := -height/2 + height*float64(l)/float64(nz)
		if l == nz {
			z = height / 2
		}
		side[l] = make([]int, nth)
		for i := 0; i < nth; i++ {
			s, c := math.Sincos(2 * math.Pi * float64(i) / float64(nth))
			side[l][i] = add(r3.Vec{X: radius * c, Y: radius * s, Z: z})
		}
	}
	for l := 0; l < nz; l++ {
		for i := 0; i < nth; i++ {
			i1 := (i + 1) % nth
			a, b, c, d := side[l][i], side[l][i1], side[l+1][i1], side[l+1][i]
			// a→b runs along +θ and b→c along +z, and θ̂ × ẑ = r̂: the quad
			// a b c d is counter-clockwise about the outward radial direction.
			m.Triangles = append(m.Triangles, [3]int{a, b, c}, [3]int{a, c, d})
		}
	}
	// Caps.
	for _, top := range []bool{false, true} {
		z, outer := -height/2, side[0]
		if top {
			z, outer = height/2, side[nz]
		}
		centre := add(r3.Vec{Z: z})
		rings := make([][]int, nr+1)
		rings[0] = []int{centre}
		for k := 1; k < nr; k++ {
			nk := ring(k)
			r := radius * float64(k) / float64(nr)
			rings[k] = make([]int, nk)
			for i := 0; i < nk; i++ {
				s, c := math.Sincos(2 * math.Pi * float64(i) / float64(nk))
				rings[k][i] = add(r3.Vec{X: r * c, Y: r * s, Z: z})
			}
		}
		rings[nr] = outer
		for k := 1; k <= nr; k++ {
			for _, t := range zipRings(rings[k-1], rings[k]) {
				if !top {
					t[1], t[2] = t[2], t[1]
				}
				m.Triangles = append(m.Triangles, t)
			}
		}
	}
	return m, nil
}

// zipRings triangulates the annulus between an inner ring and an outer ring
// of vertices, each listed at equally spaced angles 2πi/len counter-clockwise
// about +z starting at angle 0. The triangles are counter-clockwise seen from
// +z. An inner ring of one vertex is a centre point (a fan).
func zipRings(inner, outer []int) [][3]int {
	ni, no := len(inner), len(outer)
	var tris [][3]int
	if ni == 1 {
		for j := 0; j < no; j++ {
			tris = append(tris, [3]int{inner[0], outer[j], outer[(j+1)%no]})
		}
		return tris
	}
	// Advance along whichever ring has the next vertex at the smaller angle
	// (compared exactly in integers: i/ni < j/no  ⇔  i·no < j·ni).
	i, j := 0, 0
	for i < ni || j < no {
		advanceOuter := j < no && (i == ni || (j+1)*ni <= (i+1)*no)
		if advanceOuter {
			tris = append(tris, [3]int{inner[i%ni], outer[j], outer[(j+1)%no]})
			j++
		} else {
			tris = append(tris, [3]int{inner[i], outer[j%no], inner[(i+1)%ni]})
			i++
		}
	}
	return tris
}
