package pfa

import (
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
	"github.com/fluctus/fluctus/scatter"
)

// forceStep is the central-difference step of the force, in units of the
// gap: the PFA energy is a smooth sum of d⁻³ terms, so the truncation error
// (step)² ≈ 1e-8 is far below its own approximation error.
const forceStep = 1e-4

// Sweep returns the PFA estimate at every point of sw: FromMoving,
// FromFixed and Mean as scatter.PFAEnergy gives them with the moving body
// placed (turned by sw.Turns[p], then moved by sw.Offsets[p]) and the
// substrate plane (nil: none), and Force = -dMean/ds for a
// displacement s of the moving body along sw.Direction, by central
// differences with a step of 1e-4 of the point's gap gaps[p] (L0). The
// options are those of scatter.PFAEnergy (e.g. the plate law of the bodies'
// materials).
func Sweep(bodies []scatter.Body, sw scatter.Sweep, plane *scatter.Plane, gaps []float64, opts ...scatter.PFAOption) []scatter.PFA {
	out := make([]scatter.PFA, len(sw.Offsets))
	dir := sw.Direction
	if l := r3.Norm(dir); l > 0 {
		dir = r3.Scale(1/l, dir)
	}
	for p := range sw.Offsets {
		moved := place(bodies[sw.Body].Mesh, sw, p)
		at := func(s float64) scatter.PFA {
			placed := append([]scatter.Body(nil), bodies...)
			placed[sw.Body].Mesh = moved
			if s != 0 {
				placed[sw.Body].Mesh = moved.Translate(r3.Scale(s, dir))
			}
			return scatter.PFAEnergy(placed, sw.Body, dir, plane, opts...)
		}
		e := at(0)
		if h := forceStep * gaps[p]; h > 0 && r3.Norm(dir) > 0 {
			e.Force = -(at(h).Mean - at(-h).Mean) / (2 * h)
		}
		out[p] = e
	}
	return out
}

// place returns m turned by sw.Turns[p] (if any) and moved by sw.Offsets[p].
func place(m *mesh.Mesh, sw scatter.Sweep, p int) *mesh.Mesh {
	if len(sw.Turns) > 0 {
		if t := sw.Turns[p]; t.Angle != 0 && t.Axis != (r3.Vec{}) {
			m = m.Rotate(t.Axis, t.Angle, t.Pivot)
		}
	}
	if sw.Offsets[p] != (r3.Vec{}) {
		m = m.Translate(sw.Offsets[p])
	}
	return m
}
