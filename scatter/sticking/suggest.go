package sticking

import (
	"fmt"
	"math"
	"slices"
)

// Suggest returns, in increasing order, extra positions x at which the caller
// should compute the load (value and slope) to make the analysis of spring s
// accurate to the relative tolerance tol, e.g. 1e-4:
//
//   - for every equilibrium, the pull-in point and the tangency inside the
//     samples whose interval has a relative error estimate (of the load or
//     its slope, see Curve.ErrorEstimate) above tol, the middle of that
//     interval (geometric middle for log–log), halving it;
//   - for a pull-in point or tangency outside the samples, 10 % beyond its
//     power-law estimate, so that the next analysis brackets it; without an
//     estimate, half the smallest sampled x for a point below the samples,
//     and nothing for one above (larger x may not be a valid position, e.g.
//     a tilt past the parallel position).
//
// An empty result means the answer is converged to tol. Typical use: compute
// the suggested samples, add them with Curve.With and analyse again, until
// Suggest returns nothing.
func Suggest(c *Curve, s Spring, tol float64) ([]float64, error) {
	if !(tol > 0) || math.IsInf(tol, 0) {
		return nil, fmt.Errorf("sticking: tolerance %g is not a positive number; give a relative tolerance such as 1e-4", tol)
	}
	r, err := Analyse(c, s)
	if err != nil {
		return nil, err
	}
	lo, _ := c.Range()
	var xs []float64
	for _, x := range restingPoints(r) {
		if c.relativeError(x) > tol {
			xs = append(xs, c.midpoint(x))
		}
	}
	outside := func(loc Location, at float64, extrapolated bool) {
		switch {
		case loc == BelowRange && extrapolated:
			xs = append(xs, 0.9*at)
		case loc == BelowRange:
			xs = append(xs, 0.5*lo)
		case loc == AboveRange && extrapolated:
			xs = append(xs, at/0.9)
		}
	}
	outside(r.PullIn.Location, r.PullIn.X, r.PullIn.Extrapolated)
	outside(r.MinStiffness.Location, r.MinStiffness.At, r.MinStiffness.Extrapolated)

	slices.Sort(xs)
	xs = slices.Compact(xs)
	// Drop positions already sampled (to rounding).
	return slices.DeleteFunc(xs, func(x float64) bool {
		i, _ := slices.BinarySearch(c.x, x)
		near := func(j int) bool { return j >= 0 && j < len(c.x) && math.Abs(c.x[j]-x) <= 1e-12*x }
		return near(i) || near(i-1)
	}), nil
}
