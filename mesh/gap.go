package mesh

import (
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"
)

// Gap returns the smallest distance d (L0) between the surfaces of a and b
// and a closest pair of points, pa on a and pb on b. It is exact for
// triangle meshes: every candidate pair of triangles is measured by its
// vertex–face and edge–edge distances, and intersecting triangles give 0.
// Candidate pairs are found with bounding-volume hierarchies (NewTree); to
// measure many placements of the same meshes, build the trees once and call
// Tree.Gap. Gap measures surfaces: it is positive when one closed body lies
// wholly inside another without touching it (see Overlap).
func Gap(a, b *Mesh) (d float64, pa, pb r3.Vec) {
	return NewTree(a).Gap(NewTree(b))
}

// Contains reports whether p lies inside the closed mesh m. It computes the
// generalized winding number, the sum over triangles of the solid angle they
// subtend at p divided by 4π, which is 1 inside a closed surface (either
// orientation gives ±1) and 0 outside, and is robust to small cracks and to
// rays through edges. Points on the surface may go either way. O(n) in the
// number of triangles.
func Contains(m *Mesh, p r3.Vec) bool {
	return math.Abs(windingNumber(m, p)) > 0.5
}

func windingNumber(m *Mesh, p r3.Vec) float64 {
	var w float64
	for t := range m.Triangles {
		a, b, c := m.Corners(t)
		w += solidAngle(p, a, b, c)
	}
	return w / (4 * math.Pi)
}

// Overlap reports whether the bodies bounded by a and b overlap: their
// surfaces intersect or touch (a pair of triangles at distance 0), or one
// body contains the other (a vertex of one lies inside the other).
func Overlap(a, b *Mesh) bool {
	return overlapShifted(NewTree(a), r3.Vec{}, NewTree(b))
}

// overlapShifted is Overlap for ta's mesh translated by s.
func overlapShifted(ta *Tree, s r3.Vec, tb *Tree) bool {
	if d2, _, _, _ := ta.gap(s, tb, 0); d2 == 0 {
		return true
	}
	a, b := ta.mesh, tb.mesh
	if len(a.Vertices) == 0 || len(b.Vertices) == 0 {
		return false
	}
	return Contains(b, r3.Add(a.Vertices[a.Triangles[0][0]], s)) ||
		Contains(a, r3.Sub(b.Vertices[b.Triangles[0][0]], s))
}

// OffsetForGap returns the displacement s (L0) along the unit vector
// û = dir/|dir| such that the smallest gap (Gap) between
// moving.Translate(s·û) and the meshes in others equals gap (L0, > 0).
//
// Of all such s it returns the largest: the body is brought in from far away
// along -û until it first comes within gap of one of the others, so near the
// solution the gap grows with s. The search starts where the projections of
// the bodies onto û are separated by gap (the gap there is at least gap),
// walks towards smaller s in steps of one to two times the current excess
// gap (the gap changes by at most |δs| for a displacement δs, so such steps
// pass over no approach but along features thinner than the excess), and
// bisects the bracket to a relative accuracy of 1e-12 in s. Overlapping
// bodies count as below any gap.
//
// The error names the meshes when dir is zero or not finite, gap is not
// positive, others is empty, or the moving body passes the others along the
// line without ever coming within gap of them.
func OffsetForGap(moving *Mesh, others []*Mesh, dir r3.Vec, gap float64) (float64, error) {
	var names []string
	for _, o := range others {
		names = append(names, o.Name)
	}
	what := fmt.Sprintf("placing %s at gap %g from %s", moving.Name, gap, strings.Join(names, ", "))
	l := r3.Norm(dir)
	switch {
	case !(l > 0) || math.IsInf(l, 0):
		return 0, fmt.Errorf("mesh: %s: direction %v must be non-zero and finite", what, dir)
	case !(gap > 0) || math.IsInf(gap, 0):
		return 0, fmt.Errorf("mesh: %s: the gap must be positive and finite", what)
	case len(others) == 0:
		return 0, fmt.Errorf("mesh: placing %s: no other bodies to measure the gap to", moving.Name)
	case len(moving.Triangles) == 0:
		return 0, fmt.Errorf("mesh: %s: %s has no triangles", what, moving.Name)
	}
	u := r3.Scale(1/l, dir)
	tm := NewTree(moving)
	trees := make([]*Tree, 0, len(others))
	for _, o := range others {
		if len(o.Triangles) == 0 {
			return 0, fmt.Errorf("mesh: %s: %s has no triangles", what, o.Name)
		}
		trees = append(trees, NewTree(o))
	}
	mlo, mhi := projection(moving, u)
	olo, ohi := math.Inf(1), math.Inf(-1)
	for _, o := range others {
		lo, hi := projection(o, u)
		olo, ohi = math.Min(olo, lo), math.Max(ohi, hi)
	}
	// At sHi the moving body lies beyond all others along û by gap: its
	// gap is at least gap. Below sLo it lies wholly before them: it has
	// passed them.
	sHi := ohi - mlo + gap
	sLo := olo - mhi - gap
	scale := math.Max(ohi-olo, mhi-mlo) + gap

	// excess returns (smallest gap at s) - gap, and -gap when the bodies
	// overlap.
	excess := func(s float64) float64 {
		shift := r3.Scale(s, u)
		best := math.Inf(1)
		for _, t := range trees {
			if overlapShifted(tm, shift, t) {
				return -gap
			}
			d2, _, _, _ := tm.gap(shift, t, 0)
			best = math.Min(best, math.Sqrt(d2))
		}
		return best - gap
	}

	s, v := sHi, excess(sHi)
	if v < 0 {
		// Rounding at the separating position; step out a little.
		s += 1e-9 * scale
		if v = excess(s); v < 0 {
			return 0, fmt.Errorf("mesh: %s: internal error: the gap at separated projections is %g", what, v+gap)
		}
	}
	// Walk down. The gap changes by at most |δs| when the body moves by δs,
	// so a step of v cannot pass the largest solution. When the gap shrinks
	// more slowly than s, a secant estimate lengthens the step up to 2v (only
	// a feature thinner than v along û could then be stepped over). Close to
	// the solution the step overshoots to 2v to bracket it.
	const maxSteps = 100000
	prevS, prevV := math.NaN(), math.NaN()
	var lo, hi float64
	found := false
	for step := 0; step < maxSteps; step++ {
		if v == 0 {
			return s, nil
		}
		if s < sLo {
			return 0, fmt.Errorf("mesh: %s: along %v the bodies never come within the gap (closest approach above it): choose another direction", what, u)
		}
		ds := v
		if !math.IsNaN(prevV) && prevV > v {
			if slope := (prevV - v) / (prevS - s); slope > 0 {
				ds = math.Min(2*v, math.Max(v, v/slope))
			}
		} else if !math.IsNaN(prevV) {
			// The gap is not shrinking: move on at the safe step, but at
			// least a small fraction of the scene size.
			ds = math.Max(v, 1e-3*scale)
		}
		if v < 1e-3*gap {
			ds = 2*v + 1e-12*scale
		}
		ns := s - ds
		nv := excess(ns)
		if nv < 0 {
			lo, hi = ns, s
			found = true
			break
		}
		prevS, prevV, s, v = s, v, ns, nv
	}
	if !found {
		return 0, fmt.Errorf("mesh: %s: no bracket found after %d steps", what, maxSteps)
	}
	// Bisect: excess(lo) < 0 ≤ excess(hi).
	tol := 1e-12 * math.Max(math.Max(math.Abs(lo), math.Abs(hi)), scale)
	for hi-lo > tol {
		mid := lo + (hi-lo)/2
		if mid <= lo || mid >= hi {
			break
		}
		if excess(mid) < 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	return hi, nil
}

// projection returns the range of x·u over the vertices used by m's
// triangles.
func projection(m *Mesh, u r3.Vec) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, t := range m.Triangles {
		for _, i := range t {
			x := r3.Dot(m.Vertices[i], u)
			lo, hi = math.Min(lo, x), math.Max(hi, x)
		}
	}
	return lo, hi
}
