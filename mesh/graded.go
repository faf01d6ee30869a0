package mesh

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// This file grades meshes towards other bodies: fine near the closest
// approach, coarse elsewhere. Rule of thumb (common practice): near the
// closest approach the triangles should be at most half the gap.

// DefaultGrowth is the rate at which Grading lets the triangle size grow with
// the distance from the other bodies when Growth is zero. With Near = gap/2
// it keeps every triangle at most half its own distance from the other
// bodies: h = gap/2 + (s - gap)/2 = s/2.
const DefaultGrowth = 0.5

// Grading is a triangle size that is Near (L0) at the closest approach to
// the other bodies and grows linearly with the distance s from them,
//
//	h(p) = min(Far, Near + Growth·(s(p) - dmin)),
//
// where dmin is the gap (the smallest s). Growth is dimensionless (L0 of
// size per L0 of distance); zero means DefaultGrowth.
type Grading struct {
	Near, Far float64
	Growth    float64
}

// Validate returns an error unless 0 < Near ≤ Far, both finite, and Growth
// is finite and not negative.
func (g Grading) Validate() error {
	switch {
	case !(g.Near > 0) || math.IsInf(g.Near, 0):
		return fmt.Errorf("mesh: grading: near size %g: must be positive and finite", g.Near)
	case !(g.Far > 0) || math.IsInf(g.Far, 0):
		return fmt.Errorf("mesh: grading: far size %g: must be positive and finite", g.Far)
	case g.Far < g.Near:
		return fmt.Errorf("mesh: grading: far size %g is below the near size %g: far must be at least near", g.Far, g.Near)
	case !(g.Growth >= 0) || math.IsInf(g.Growth, 0):
		return fmt.Errorf("mesh: grading: growth %g: must be finite and not negative (0 means %g)", g.Growth, DefaultGrowth)
	}
	return nil
}

func (g Grading) growth() float64 {
	if g.Growth == 0 {
		return DefaultGrowth
	}
	return g.Growth
}

// SizeFunc returns h(p) of the grading for a body among others, whose gap to
// them is dmin (L0): s(p) is the exact distance from p to the nearest
// surface in others (Tree.Distance). Points closer than dmin get Near; with
// no others every point gets Far. The trees must be in the frame in which p
// is given. The function is safe for concurrent use.
func (g Grading) SizeFunc(others []*Tree, dmin float64) func(p r3.Vec) float64 {
	growth := g.growth()
	// Beyond this distance the size is Far, so nearer surfaces need not be
	// found exactly.
	cut := dmin + (g.Far-g.Near)/growth
	return func(p r3.Vec) float64 {
		lim2 := cut * cut
		if !(cut > 0) {
			lim2 = math.Inf(1)
		}
		s2 := lim2
		for _, t := range others {
			s2 = t.nearest(p, s2)
		}
		if math.IsNaN(s2) {
			return math.NaN()
		}
		if s2 >= lim2 {
			return g.Far
		}
		s := math.Sqrt(s2)
		return math.Min(g.Far, g.Near+growth*math.Max(0, s-dmin))
	}
}

// clamp returns size limited to [Near, Far]; nil size gives Far everywhere.
// NaN passes through (Refine reports it).
func (g Grading) clamp(size func(r3.Vec) float64) func(r3.Vec) float64 {
	if size == nil {
		return func(r3.Vec) float64 { return g.Far }
	}
	return func(p r3.Vec) float64 {
		s := size(p)
		if math.IsNaN(s) {
			return s
		}
		return math.Max(g.Near, math.Min(g.Far, s))
	}
}

// Distance returns the distance (L0) from p to the nearest point of the
// tree's mesh: exact for triangle meshes, found through the bounding-volume
// hierarchy. An empty tree gives +Inf and a non-finite p gives NaN.
func (t *Tree) Distance(p r3.Vec) float64 {
	return math.Sqrt(t.nearest(p, math.Inf(1)))
}

// nearest returns the smaller of best2 and the squared distance from p to
// the mesh; subtrees at or beyond best2 are not searched.
func (t *Tree) nearest(p r3.Vec, best2 float64) float64 {
	if !finite(p) {
		return math.NaN()
	}
	if len(t.nodes) == 0 {
		return best2
	}
	var buf [64]int32
	stack := append(buf[:0], 0)
	for len(stack) > 0 {
		i := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		n := &t.nodes[i]
		if pointBoxDist2(p, n) >= best2 {
			continue
		}
		if n.leaf() {
			for k := n.start; k < n.start+n.n; k++ {
				c := &t.corners[k]
				if d2 := r3.Norm2(r3.Sub(p, closestOnTriangle(p, c[0], c[1], c[2]))); d2 < best2 {
					best2 = d2
				}
			}
			continue
		}
		// Push the farther child first so the nearer one is searched first.
		l, r := n.left, n.right
		dl, dr := pointBoxDist2(p, &t.nodes[l]), pointBoxDist2(p, &t.nodes[r])
		if dl < dr {
			l, r, dl, dr = r, l, dr, dl
		}
		if dl < best2 {
			stack = append(stack, l)
		}
		if dr < best2 {
			stack = append(stack, r)
		}
	}
	return best2
}

// nearestTriangle returns the smaller of best2 and the squared distance from
// triangle tri to the mesh.
func (t *Tree) nearestTriangle(tri *[3]r3.Vec, best2 float64) float64 {
	if len(t.nodes) == 0 {
		return best2
	}
	box := node{}
	box.lo, box.hi = boxInf()
	for _, v := range tri {
		box.lo, box.hi = grow(box.lo, box.hi, v)
	}
	var buf [64]int32
	stack := append(buf[:0], 0)
	for len(stack) > 0 {
		i := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		n := &t.nodes[i]
		if boxDist2(&box, r3.Vec{}, n) >= best2 {
			continue
		}
		if n.leaf() {
			for k := n.start; k < n.start+n.n; k++ {
				if d2, _, _ := triangleDistance(tri, &t.corners[k]); d2 < best2 {
					best2 = d2
				}
			}
			continue
		}
		stack = append(stack, n.left, n.right)
	}
	return best2
}

// pointBoxDist2 is the squared distance from p to box n.
func pointBoxDist2(p r3.Vec, n *node) float64 {
	d := func(x, lo, hi float64) float64 {
		switch {
		case x < lo:
			return (lo - x) * (lo - x)
		case x > hi:
			return (x - hi) * (x - hi)
		}
		return 0
	}
	return d(p.X, n.lo.X, n.hi.X) + d(p.Y, n.lo.Y, n.hi.Y) + d(p.Z, n.lo.Z, n.hi.Z)
}

// SphereProjector returns the map that moves a point radially onto the
// sphere of the given centre and radius (L0), for Refine. The centre itself
// is left where it is.
func SphereProjector(centre r3.Vec, radius float64) func(p r3.Vec) r3.Vec {
	return func(p r3.Vec) r3.Vec {
		d := r3.Sub(p, centre)
		l := r3.Norm(d)
		if l == 0 {
			return p
		}
		return r3.Add(centre, r3.Scale(radius/l, d))
	}
}

// CylinderProjector returns the map, for Refine, that moves a point of the
// side of the cylinder of the given radius about the z axis, with caps at
// z = ±halfHeight (L0), radially onto the cylinder. Points in the cap planes
// (|z| ≥ halfHeight up to a relative 1e-9) are left where they are, so the
// caps stay flat; this also leaves edges along the rim straight, where
// GradedCylinder, which sees both ends of an edge, bends them onto the
// circle.
func CylinderProjector(radius, halfHeight float64) func(p r3.Vec) r3.Vec {
	return func(p r3.Vec) r3.Vec {
		if onCapPlane(p, halfHeight) {
			return p
		}
		return radial(p, radius)
	}
}

func onCapPlane(p r3.Vec, halfHeight float64) bool {
	return math.Abs(math.Abs(p.Z)-halfHeight) <= 1e-9*halfHeight || math.Abs(p.Z) > halfHeight
}

// radial moves p along the radius from the z axis to distance radius; points
// on the axis stay.
func radial(p r3.Vec, radius float64) r3.Vec {
	rho := math.Hypot(p.X, p.Y)
	if rho == 0 {
		return p
	}
	return r3.Vec{X: p.X * radius / rho, Y: p.Y * radius / rho, Z: p.Z}
}

// cylinderMidpoint returns the edge-midpoint map for the cylinder: midpoints
// of side edges and of rim edges (both ends on the same cap's rim) go
// radially onto the cylinder, midpoints of the other cap edges stay in the
// flat cap.
func cylinderMidpoint(radius, halfHeight float64) func(a, b r3.Vec) r3.Vec {
	onRim := func(v r3.Vec) bool {
		return math.Abs(math.Abs(v.Z)-halfHeight) <= 1e-9*halfHeight &&
			math.Abs(math.Hypot(v.X, v.Y)-radius) <= 1e-9*radius
	}
	return func(a, b r3.Vec) r3.Vec {
		p := midpoint(a, b)
		sameCap := onCapPlane(a, halfHeight) && onCapPlane(b, halfHeight) && (a.Z > 0) == (b.Z > 0)
		if sameCap && !(onRim(a) && onRim(b)) {
			return p
		}
		return radial(p, radius)
	}
}

// GradedSphere returns a sphere of the given radius (L0) centred at the
// origin: the icosphere Sphere(radius, g.Far), refined by Refine until every
// triangle is at most size(centroid), with size limited to
// [g.Near, g.Far], and every new vertex projected onto the sphere. size is
// evaluated in the sphere's own frame: for a sphere to be placed at c, pass
// func(p) { return s(p + c) } with s from g.SizeFunc. A nil size gives the
// uniform icosphere at g.Far.
func GradedSphere(radius float64, g Grading, size func(p r3.Vec) float64) (*Mesh, error) {
	if err := g.Validate(); err != nil {
		return nil, fmt.Errorf("mesh: graded sphere r=%g: %w", radius, err)
	}
	base, err := Sphere(radius, g.Far)
	if err != nil {
		return nil, err
	}
	sp := SphereProjector(r3.Vec{}, radius)
	return refine(context.Background(), base, g.clamp(size), func(a, b r3.Vec) r3.Vec { return sp(midpoint(a, b)) }, MaxTriangles)
}

// GradedBox returns Box(size, g.Far) refined by Refine until every triangle
// is at most h(centroid) (h limited to [g.Near, g.Far], evaluated in the
// box's own frame, nil for g.Far everywhere), with flat faces.
func GradedBox(size r3.Vec, g Grading, h func(p r3.Vec) float64) (*Mesh, error) {
	if err := g.Validate(); err != nil {
		return nil, fmt.Errorf("mesh: graded box: %w", err)
	}
	base, err := Box(size, g.Far)
	if err != nil {
		return nil, err
	}
	return refine(context.Background(), base, g.clamp(h), nil, MaxTriangles)
}

// GradedPlate returns Plate(width, depth, thickness, g.Far) refined like
// GradedBox.
func GradedPlate(width, depth, thickness float64, g Grading, h func(p r3.Vec) float64) (*Mesh, error) {
	if err := g.Validate(); err != nil {
		return nil, fmt.Errorf("mesh: graded plate: %w", err)
	}
	base, err := Plate(width, depth, thickness, g.Far)
	if err != nil {
		return nil, err
	}
	return refine(context.Background(), base, g.clamp(h), nil, MaxTriangles)
}

// GradedCylinder returns Cylinder(radius, height, g.Far) refined like
// GradedBox, with the new vertices of the side and of the rim moved radially
// onto the cylinder and those inside the caps left in the flat caps.
func GradedCylinder(radius, height float64, g Grading, h func(p r3.Vec) float64) (*Mesh, error) {
	if err := g.Validate(); err != nil {
		return nil, fmt.Errorf("mesh: graded cylinder: %w", err)
	}
	base, err := Cylinder(radius, height, g.Far)
	if err != nil {
		return nil, err
	}
	return refine(context.Background(), base, g.clamp(h), cylinderMidpoint(radius, height/2), MaxTriangles)
}

// CoarseTriangle is a triangle that is too large for its distance from the
// other bodies (see CoarseNear). Lengths are in L0.
type CoarseTriangle struct {
	Triangle int
	Centroid r3.Vec
	// Size is the longest edge; Distance is the distance from the centroid
	// to the nearest other body, the local gap the size is measured against.
	Size, Distance float64
}

// String names the triangle, where it is and how large it is.
func (c CoarseTriangle) String() string {
	return fmt.Sprintf("triangle %d at (%.4g, %.4g, %.4g): longest edge %.3g, %.3g from the other bodies",
		c.Triangle, c.Centroid.X, c.Centroid.Y, c.Centroid.Z, c.Size, c.Distance)
}

// coarseBand is how far, in gaps, a triangle may be from the other bodies
// and still count as near the closest approach.
const coarseBand = 3

// CoarseNear returns, in order of index, the triangles of m near the closest
// approach that are larger than half the local gap: those within
// 3·gap of the other bodies (exact triangle distance) whose longest edge
// exceeds max(gap, s)/2, where s is the distance from the triangle's centroid
// to the other bodies (rule of thumb, common practice: h ≤ d/2 near the
// closest approach). At the closest approach this is half the gap; further
// out it allows the growth of the default grading, so a mesh made with
// Grading{Near: gap/2} and dmin = gap passes. gap (L0) is the smallest gap of
// the scene; a non-positive gap or no others give nil.
func CoarseNear(m *Mesh, others []*Tree, gap float64) []CoarseTriangle {
	if !(gap > 0) || math.IsInf(gap, 0) || len(others) == 0 {
		return nil
	}
	band2 := coarseBand * gap * coarseBand * gap
	var out []CoarseTriangle
	for t := range m.Triangles {
		h := m.Diameter(t)
		if !(h > gap/2) {
			continue
		}
		// Only a centroid closer than 2h can make the triangle too large.
		c := m.Centroid(t)
		s2 := 4 * h * h
		for _, o := range others {
			s2 = o.nearest(c, s2)
		}
		s := math.Sqrt(s2)
		// Relative slack 1e-12 so that a triangle refined to exactly the
		// grading's size is not reported for rounding.
		if !(h > 0.5*math.Max(gap, s)*(1+1e-12)) {
			continue
		}
		a, b, cc := m.Corners(t)
		tri := [3]r3.Vec{a, b, cc}
		d2 := band2 * (1 + 1e-12)
		for _, o := range others {
			d2 = o.nearestTriangle(&tri, d2)
		}
		if d2 >= band2*(1+1e-12) {
			continue
		}
		out = append(out, CoarseTriangle{Triangle: t, Centroid: c, Size: h, Distance: s})
	}
	return out
}

// CoarseSummary returns a one-line summary of cs, found by CoarseNear for
// the given gap (L0), with the largest triangle and the mesh size that would
// fix it; "" when cs is empty. Numbers are in L0.
func CoarseSummary(cs []CoarseTriangle, gap float64) string {
	if len(cs) == 0 {
		return ""
	}
	big := cs[0]
	for _, c := range cs[1:] {
		if c.Size > big.Size {
			big = c
		}
	}
	what := "triangles near the closest approach are"
	if len(cs) == 1 {
		what = "triangle near the closest approach is"
	}
	return fmt.Sprintf("%d %s larger than half the local gap (smallest gap %.3g); largest %.3g at (%.4g, %.4g, %.4g), %.3g from the other bodies: refine with mesh_size {near: %.3g, far: %.3g}",
		len(cs), what, gap, big.Size, big.Centroid.X, big.Centroid.Y, big.Centroid.Z, big.Distance, gap/2, big.Size)
}
