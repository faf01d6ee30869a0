package job

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
	"github.com/fluctus/fluctus/scatter"
)

// SweepAt returns a sweep of the scene's moving body to other positions
// than the job's, for extra points of an analysis: gaps (L0) for a gap or
// offset sweep, reached along the sweep direction as in a gap sweep, or
// angles in degrees for an angle sweep. The direction and the torque point
// are the scene's.
func (s *Scene) SweepAt(xs []float64) (scatter.Sweep, error) {
	sw := scatter.Sweep{Body: s.Sweep.Body, Direction: s.Sweep.Direction, Centre: s.Sweep.Centre}
	if len(xs) == 0 {
		return sw, fmt.Errorf("no positions to place the body at")
	}
	if s.Job.Sweep.Kind() == ByAngles {
		pivot := s.Sweep.Centre
		for _, a := range xs {
			sw.Turns = append(sw.Turns, scatter.Turn{Axis: s.Job.Sweep.Rotate.Axis, Angle: a * math.Pi / 180, Pivot: pivot})
			sw.Offsets = append(sw.Offsets, r3.Vec{})
		}
		return sw, nil
	}
	for _, g := range xs {
		if !(g > 0) {
			return sw, fmt.Errorf("gap %g: must be greater than zero", g)
		}
	}
	offs, err := s.offsetsForGaps(xs, nil)
	if err != nil {
		return sw, err
	}
	sw.Offsets = offs
	return sw, nil
}

// ContactAngle returns the angle, in radians, at which the moving body of
// an angle sweep first touches its neighbour or the substrate when it turns
// on beyond the sweep's largest angle. It steps the angle by the current
// gap divided by the body's reach from the axis (a turn by δθ moves no
// point by more than reach·δθ, so such a step cannot pass contact); once the
// gap has fallen below 1e-2 of its start it steps past the contact that the
// closing rate predicts, to bracket it, and then bisects on whether the
// surfaces meet (mesh gap zero) to a relative 1e-12.
func (s *Scene) ContactAngle() (float64, error) {
	j := s.Job
	if j.Sweep.Kind() != ByAngles {
		return 0, fmt.Errorf("the contact angle needs an angle sweep")
	}
	name := j.Bodies[j.Sweep.Body].Name
	axis, pivot := j.Sweep.Rotate.Axis, s.Sweep.Centre
	ref := s.Bodies[s.Sweep.Body].Mesh
	reach := 0.0
	for _, v := range ref.Vertices {
		d := r3.Sub(v, pivot)
		reach = math.Max(reach, r3.Norm(r3.Sub(d, r3.Scale(r3.Dot(d, axis), axis))))
	}
	if reach == 0 {
		return 0, fmt.Errorf("body %q does not move when it turns about its axis", name)
	}
	others := make([]*mesh.Tree, 0, len(s.Bodies))
	for i, b := range s.Bodies {
		if i != s.Sweep.Body {
			others = append(others, mesh.NewTree(b.Mesh))
		}
	}
	tol := touchFraction * s.size()
	gap := func(theta float64) float64 {
		m := ref.Rotate(axis, theta, pivot)
		d := math.Inf(1)
		t := mesh.NewTree(m)
		for _, o := range others {
			g, _, _ := t.Gap(o)
			d = math.Min(d, g)
		}
		if s.Substrate != nil {
			d = math.Min(d, s.lowest(m))
		}
		return d
	}
	_, hiDeg := j.Sweep.Range()
	lo := hiDeg * math.Pi / 180
	d := gap(lo)
	if !(d > tol) {
		return 0, fmt.Errorf("body %q already touches at the largest angle %g degrees", name, hiDeg)
	}
	hi := math.NaN()
	const maxSteps = 10000
	d0, prevLo, prevD := d, math.NaN(), math.NaN()
	for step := 0; step < maxSteps && lo-hiDeg*math.Pi/180 < math.Pi; step++ {
		// A step of d/reach cannot reach contact. Once the gap is small,
		// step past the contact predicted from the rate at which the gap
		// has been closing, by half again (or by 2d/reach if that is
		// longer), to bracket it: this passes over at most a feature
		// thinner than about the remaining gap.
		next := lo + d/reach
		if d < 1e-2*d0 {
			ds := 2 * d / reach
			if rate := (prevD - d) / (lo - prevLo); rate > 0 {
				ds = math.Max(ds, 1.5*d/rate)
			}
			next = lo + ds
		}
		dn := gap(next)
		if dn <= tol {
			hi = next
			break
		}
		prevLo, prevD = lo, d
		lo, d = next, dn
	}
	if math.IsNaN(hi) {
		return 0, fmt.Errorf("body %q never touches its neighbour turning on beyond %g degrees about the axis (%g, %g, %g): the sticking analysis measures angles from contact, so the angles must turn the body towards its neighbour",
			name, hiDeg, axis.X, axis.Y, axis.Z)
	}
	for hi-lo > 1e-12*math.Max(1, math.Abs(hi)) {
		mid := lo + (hi-lo)/2
		if mid <= lo || mid >= hi {
			break
		}
		if gap(mid) <= 0 {
			hi = mid
		} else {
			lo = mid
		}
	}
	return lo + (hi-lo)/2, nil
}
