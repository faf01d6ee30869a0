package stick

import (
	"context"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/scatter/sticking"
)

// Coordinate maps the solver's sweep points to the position x of the
// sticking analysis and back.
//
// For a translation (Torsional false) x is the gap in metres and the load is
// the force along the approach direction ê, L = F·ê, with dL/dx equal to the
// solver's stiffness -d(F·ê)/ds (s advances along ê and closes the gap).
//
// For a rotation x = θc - θ is the angle in radians still to turn before
// contact, the load is the torque about the rotation axis n through the
// pivot, L = τ·n (which turns the body towards contact when the sweep's
// angles grow towards it), and dL/dx = -d(τ·n)/dθ, the solver's torsional
// stiffness.
type Coordinate struct {
	Unit      scatter.Unit
	Torsional bool
	Direction r3.Vec // unit approach direction ê (translation)
	Axis      r3.Vec // unit rotation axis n (rotation)
	// Pivot is the point on the axis (L0); Centre the point the solver
	// took torques about at the reference placement (L0). When they differ
	// the torque is moved to the pivot.
	Pivot, Centre r3.Vec
	Contact       float64 // θc, radians (rotation)
}

// Sample returns the load sample of point p.
func (c Coordinate) Sample(p scatter.Point) sticking.Sample {
	if !c.Torsional {
		return sticking.Sample{
			X:     c.Unit.Metres(p.Gap),
			Load:  c.Unit.Newtons(r3.Dot(p.Force, c.Direction)),
			Slope: c.Unit.NewtonsPerMetre(p.Stiffness),
		}
	}
	// τ about the pivot = τ about the placed centre + (centre - pivot) × F.
	tau := p.Torque
	if c.Centre != c.Pivot {
		centre := c.Centre
		if p.Turn.Angle != 0 && p.Turn.Axis != (r3.Vec{}) {
			centre = r3.Add(p.Turn.Pivot, r3.NewRotation(p.Turn.Angle, p.Turn.Axis).Rotate(r3.Sub(centre, p.Turn.Pivot)))
		}
		centre = r3.Add(centre, p.Offset)
		tau = r3.Add(tau, r3.Cross(r3.Sub(centre, c.Pivot), p.Force))
	}
	return sticking.Sample{
		X:     c.Contact - p.Turn.Angle,
		Load:  c.Unit.NewtonMetres(r3.Dot(tau, c.Axis)),
		Slope: c.Unit.NewtonMetres(p.Stiffness),
	}
}

// SweepValue returns the sweep position of x, as the job file gives it: a
// gap in L0, or an angle in degrees.
func (c Coordinate) SweepValue(x float64) float64 {
	if c.Torsional {
		return (c.Contact - x) * 180 / math.Pi
	}
	return x / float64(c.Unit)
}

// Label describes the sweep position of x, e.g. "gap 1.2 um" or "angle 3
// degrees".
func (c Coordinate) Label(x float64) string {
	if c.Torsional {
		return fmt.Sprintf("angle %.4g degrees", c.SweepValue(x))
	}
	return fmt.Sprintf("gap %.4g %s", c.SweepValue(x), c.Unit.Name())
}

// Position returns x of a sweep value (gap in L0 or angle in degrees).
func (c Coordinate) Position(v float64) float64 {
	if c.Torsional {
		return c.Contact - v*math.Pi/180
	}
	return c.Unit.Metres(v)
}

// Compute computes the points at the given sweep values (gaps in L0 or
// angles in degrees), with their gaps (Point.Gap, L0).
type Compute func(ctx context.Context, values []float64) ([]scatter.Point, error)

// Options control the refinement loop of Analyse.
type Options struct {
	// Rounds is the largest number of refinement rounds (each one a call
	// of Compute); zero means no refinement.
	Rounds int
	// Tol is the relative tolerance handed to sticking.Suggest.
	Tol float64
}

// Result is the outcome of Analyse.
type Result struct {
	Report  sticking.Report
	Samples []sticking.Sample // every sample the final analysis used, in increasing x
	// Added are the points computed for the analysis, in the order
	// computed.
	Added     []scatter.Point
	Rounds    int  // refinement rounds run
	Converged bool // Suggest asked for nothing more
}

// Analyse builds the load curve from the sweep's points, analyses spring s
// against it and, up to opt.Rounds times, computes the positions
// sticking.Suggest asks for and analyses again. The spring's rest position
// is in x (m, or rad from contact).
func Analyse(ctx context.Context, c Coordinate, s sticking.Spring, points []scatter.Point, compute Compute, opt Options) (Result, error) {
	samples := make([]sticking.Sample, len(points))
	for i, p := range points {
		samples[i] = c.Sample(p)
	}
	curve, err := curveOf(samples, c)
	if err != nil {
		return Result{}, err
	}
	var res Result
	for res.Rounds < opt.Rounds {
		xs, err := sticking.Suggest(curve, s, opt.Tol)
		if err != nil {
			return Result{}, fmt.Errorf("sticking analysis: %w", err)
		}
		if len(xs) == 0 {
			res.Converged = true
			break
		}
		values := make([]float64, len(xs))
		for i, x := range xs {
			values[i] = c.SweepValue(x)
		}
		pts, err := compute(ctx, values)
		if err != nil {
			return Result{}, fmt.Errorf("sticking analysis: computing %d extra point(s): %w", len(xs), err)
		}
		if len(pts) != len(xs) {
			return Result{}, fmt.Errorf("sticking analysis: asked for %d extra point(s), got %d", len(xs), len(pts))
		}
		extra := make([]sticking.Sample, len(pts))
		for i, p := range pts {
			extra[i] = c.Sample(p)
		}
		if curve, err = curve.With(extra...); err != nil {
			return Result{}, fmt.Errorf("sticking analysis: %w", err)
		}
		res.Added = append(res.Added, pts...)
		res.Rounds++
	}
	if !res.Converged && res.Rounds == opt.Rounds {
		xs, err := sticking.Suggest(curve, s, opt.Tol)
		res.Converged = err == nil && len(xs) == 0
	}
	if res.Report, err = sticking.Analyse(curve, s); err != nil {
		return Result{}, fmt.Errorf("sticking analysis: %w", err)
	}
	res.Samples = curve.Samples()
	return res, nil
}

// curveOf sorts the samples by x and builds the load curve, with errors
// that say what is wrong in terms of the sweep.
func curveOf(samples []sticking.Sample, c Coordinate) (*sticking.Curve, error) {
	sorted := slices.Clone(samples)
	slices.SortStableFunc(sorted, func(a, b sticking.Sample) int {
		switch {
		case a.X < b.X:
			return -1
		case a.X > b.X:
			return 1
		}
		return 0
	})
	what, unit := "force along the sweep direction", "N"
	if c.Torsional {
		what, unit = "torque about the rotation axis", "N m"
	}
	for _, smp := range sorted {
		if smp.Load < 0 {
			return nil, fmt.Errorf("sticking analysis: at %s the %s is %.3g %s, a repulsion: the analysis needs the attraction towards contact; check that the sweep direction (or axis) points towards the neighbour", c.Label(smp.X), what, smp.Load, unit)
		}
	}
	curve, err := sticking.NewCurve(sorted)
	if err != nil {
		return nil, fmt.Errorf("sticking analysis: %w", err)
	}
	return curve, nil
}
