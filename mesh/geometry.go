package mesh

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// This file holds exact closest-point and intersection primitives for points,
// segments and triangles.

// closestOnTriangle returns the point of triangle (a, b, c) nearest to p. It
// classifies p by the Voronoi regions of the triangle's vertices, edges and
// face, using barycentric coordinates; degenerate triangles fall back to
// their edges.
func closestOnTriangle(p, a, b, c r3.Vec) r3.Vec {
	ab, ac, ap := r3.Sub(b, a), r3.Sub(c, a), r3.Sub(p, a)
	d1, d2 := r3.Dot(ab, ap), r3.Dot(ac, ap)
	if d1 <= 0 && d2 <= 0 {
		return a // vertex region a
	}
	bp := r3.Sub(p, b)
	d3, d4 := r3.Dot(ab, bp), r3.Dot(ac, bp)
	if d3 >= 0 && d4 <= d3 {
		return b // vertex region b
	}
	vc := d1*d4 - d3*d2
	if vc <= 0 && d1 >= 0 && d3 <= 0 {
		return r3.Add(a, r3.Scale(d1/(d1-d3), ab)) // edge ab
	}
	cp := r3.Sub(p, c)
	d5, d6 := r3.Dot(ab, cp), r3.Dot(ac, cp)
	if d6 >= 0 && d5 <= d6 {
		return c // vertex region c
	}
	vb := d5*d2 - d1*d6
	if vb <= 0 && d2 >= 0 && d6 <= 0 {
		return r3.Add(a, r3.Scale(d2/(d2-d6), ac)) // edge ac
	}
	va := d3*d6 - d5*d4
	if va <= 0 && d4-d3 >= 0 && d5-d6 >= 0 {
		return r3.Add(b, r3.Scale((d4-d3)/((d4-d3)+(d5-d6)), r3.Sub(c, b))) // edge bc
	}
	den := va + vb + vc
	if !(den > 0) || math.IsInf(den, 0) {
		// Degenerate triangle: the nearest point lies on an edge.
		q := closestOnSegment(p, a, b)
		best := r3.Norm2(r3.Sub(p, q))
		for _, e := range [2][2]r3.Vec{{b, c}, {c, a}} {
			if r := closestOnSegment(p, e[0], e[1]); r3.Norm2(r3.Sub(p, r)) < best {
				q, best = r, r3.Norm2(r3.Sub(p, r))
			}
		}
		return q
	}
	v, w := vb/den, vc/den
	return r3.Add(a, r3.Add(r3.Scale(v, ab), r3.Scale(w, ac))) // face
}

// closestOnSegment returns the point of segment [a, b] nearest to p.
func closestOnSegment(p, a, b r3.Vec) r3.Vec {
	ab := r3.Sub(b, a)
	l2 := r3.Norm2(ab)
	if l2 == 0 {
		return a
	}
	t := math.Max(0, math.Min(1, r3.Dot(r3.Sub(p, a), ab)/l2))
	return r3.Add(a, r3.Scale(t, ab))
}

// closestSegments returns the closest points c1 on [p1, q1] and c2 on
// [p2, q2]. It minimises |p1 + s d1 - p2 - t d2|² over the unit square,
// clamping s and t; degenerate (zero-length) segments are points.
func closestSegments(p1, q1, p2, q2 r3.Vec) (c1, c2 r3.Vec) {
	d1, d2 := r3.Sub(q1, p1), r3.Sub(q2, p2)
	r := r3.Sub(p1, p2)
	a, e, f := r3.Norm2(d1), r3.Norm2(d2), r3.Dot(d2, r)
	var s, t float64
	switch {
	case a == 0 && e == 0:
		return p1, p2
	case a == 0:
		t = clamp01(f / e)
	default:
		c := r3.Dot(d1, r)
		if e == 0 {
			s = clamp01(-c / a)
		} else {
			b := r3.Dot(d1, d2)
			den := a*e - b*b // ≥ 0; zero for parallel segments
			if den > 0 {
				s = clamp01((b*f - c*e) / den)
			}
			// t for the clamped s, then s again for the clamped t.
			t = (b*s + f) / e
			if t < 0 {
				t, s = 0, clamp01(-c/a)
			} else if t > 1 {
				t, s = 1, clamp01((b-c)/a)
			}
		}
	}
	return r3.Add(p1, r3.Scale(s, d1)), r3.Add(p2, r3.Scale(t, d2))
}

func clamp01(x float64) float64 { return math.Max(0, math.Min(1, x)) }

// segmentHitsTriangle reports whether the segment [p, q] crosses triangle
// (a, b, c) at a single point (not lying in its plane), and returns that
// point. Touching the boundary counts as crossing.
func segmentHitsTriangle(p, q, a, b, c r3.Vec) (r3.Vec, bool) {
	d := r3.Sub(q, p)
	e1, e2 := r3.Sub(b, a), r3.Sub(c, a)
	h := r3.Cross(d, e2)
	det := r3.Dot(e1, h)
	// Parallel (or degenerate) within rounding: leave it to the distance
	// tests, which are exact for coplanar contact.
	scale := math.Sqrt(r3.Norm2(d) * r3.Norm2(e1) * r3.Norm2(e2))
	if math.Abs(det) <= 1e-14*scale {
		return r3.Vec{}, false
	}
	inv := 1 / det
	s := r3.Sub(p, a)
	u := inv * r3.Dot(s, h)
	if u < 0 || u > 1 {
		return r3.Vec{}, false
	}
	qv := r3.Cross(s, e1)
	v := inv * r3.Dot(d, qv)
	if v < 0 || u+v > 1 {
		return r3.Vec{}, false
	}
	t := inv * r3.Dot(e2, qv)
	if t < 0 || t > 1 {
		return r3.Vec{}, false
	}
	return r3.Add(p, r3.Scale(t, d)), true
}

// rayTriangle returns the distance t ≥ 0 along the unit direction u from o to
// triangle (a, b, c), if the ray hits it.
func rayTriangle(o, u, a, b, c r3.Vec) (float64, bool) {
	e1, e2 := r3.Sub(b, a), r3.Sub(c, a)
	h := r3.Cross(u, e2)
	det := r3.Dot(e1, h)
	if math.Abs(det) <= 1e-14*math.Sqrt(r3.Norm2(e1)*r3.Norm2(e2)) {
		return 0, false
	}
	inv := 1 / det
	s := r3.Sub(o, a)
	bu := inv * r3.Dot(s, h)
	if bu < 0 || bu > 1 {
		return 0, false
	}
	qv := r3.Cross(s, e1)
	bv := inv * r3.Dot(u, qv)
	if bv < 0 || bu+bv > 1 {
		return 0, false
	}
	t := inv * r3.Dot(e2, qv)
	if t < 0 {
		return 0, false
	}
	return t, true
}

// triangleDistance returns the squared distance between the triangles
// a and b (each three corners) and a closest pair of points pa ∈ a, pb ∈ b.
// It is exact: intersecting triangles give 0 (with a common point);
// otherwise the minimum is attained between a vertex and the other face or
// between two edges, and all 6 + 9 such pairs are measured.
func triangleDistance(a, b *[3]r3.Vec) (d2 float64, pa, pb r3.Vec) {
	for i := 0; i < 3; i++ {
		if x, ok := segmentHitsTriangle(a[i], a[(i+1)%3], b[0], b[1], b[2]); ok {
			return 0, x, x
		}
		if x, ok := segmentHitsTriangle(b[i], b[(i+1)%3], a[0], a[1], a[2]); ok {
			return 0, x, x
		}
	}
	d2 = math.Inf(1)
	try := func(p, q r3.Vec) {
		if e := r3.Norm2(r3.Sub(p, q)); e < d2 {
			d2, pa, pb = e, p, q
		}
	}
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			p, q := closestSegments(a[i], a[(i+1)%3], b[j], b[(j+1)%3])
			try(p, q)
		}
	}
	for i := 0; i < 3; i++ {
		try(a[i], closestOnTriangle(a[i], b[0], b[1], b[2]))
		try(closestOnTriangle(b[i], a[0], a[1], a[2]), b[i])
	}
	return d2, pa, pb
}

// solidAngle returns the signed solid angle subtended at p by triangle
// (a, b, c): positive when p lies behind the triangle (on the side opposite
// its right-hand normal), so the angles of all triangles of a closed,
// outward-oriented mesh sum to 4π at an inside point and to 0 outside:
//
//	tan(Ω/2) = A·(B×C) / (|A||B||C| + (A·B)|C| + (A·C)|B| + (B·C)|A|),
//
// with A = a - p, B = b - p, C = c - p.
func solidAngle(p, a, b, c r3.Vec) float64 {
	A, B, C := r3.Sub(a, p), r3.Sub(b, p), r3.Sub(c, p)
	la, lb, lc := r3.Norm(A), r3.Norm(B), r3.Norm(C)
	num := r3.Dot(A, r3.Cross(B, C))
	den := la*lb*lc + r3.Dot(A, B)*lc + r3.Dot(A, C)*lb + r3.Dot(B, C)*la
	return 2 * math.Atan2(num, den)
}
