package converge

import (
	"errors"
	"fmt"
	"math"
)

// AssumedOrder is the order p taken when only two levels are given: the
// error of a boundary-element result on flat triangles falls as h² (DESIGN
// §8, "error ~ h^2").
const AssumedOrder = 2

// Estimate is the result of Richardson extrapolation.
type Estimate struct {
	// Value is the extrapolated limit h → 0; NaN when the levels do not
	// converge monotonically (no order can be observed).
	Value float64
	// Order is the order p used: observed from three levels, AssumedOrder
	// with two; NaN when it cannot be observed.
	Order float64
	// Assumed reports that Order was assumed, not observed.
	Assumed bool
	// Error is |Value - v_finest|, the estimated discretisation error of the
	// finest level; NaN with Value.
	Error float64
}

// Richardson extrapolates values v[i] computed at mesh sizes h[i] (strictly
// decreasing, positive), assuming v(h) = v* + C h^p.
//
// With two levels p = AssumedOrder and
//
//	v* = v2 - (v1 - v2) h2^p / (h1^p - h2^p).
//
// With three levels p solves
//
//	(v1 - v2) / (v2 - v3) = (h1^p - h2^p) / (h2^p - h3^p),
//
// which for a constant ratio r = h1/h2 = h2/h3 is p = ln[(v1 - v2)/(v2 - v3)]
// / ln r; otherwise it is found by bisection on p in (0, 20]. The
// differences must have the same sign (monotone convergence); if they do
// not, or p falls outside that range, Value, Order and Error are NaN.
func Richardson(h, v []float64) (Estimate, error) {
	if len(h) != len(v) {
		return Estimate{}, fmt.Errorf("converge: %d mesh sizes but %d values", len(h), len(v))
	}
	if len(h) < 2 || len(h) > 3 {
		return Estimate{}, fmt.Errorf("converge: %d levels; give two or three", len(h))
	}
	for i := range h {
		if !(h[i] > 0) || math.IsInf(h[i], 0) || math.IsNaN(v[i]) || math.IsInf(v[i], 0) {
			return Estimate{}, fmt.Errorf("converge: level %d: mesh size %g, value %g: want a positive size and a finite value", i+1, h[i], v[i])
		}
		if i > 0 && !(h[i] < h[i-1]) {
			return Estimate{}, errors.New("converge: the mesh sizes must decrease from level to level")
		}
	}
	nan := Estimate{Value: math.NaN(), Order: math.NaN(), Error: math.NaN()}
	last := v[len(v)-1]
	if len(h) == 2 {
		p := float64(AssumedOrder)
		a, b := math.Pow(h[0], p), math.Pow(h[1], p)
		val := v[1] - (v[0]-v[1])*b/(a-b)
		return Estimate{Value: val, Order: p, Assumed: true, Error: math.Abs(val - last)}, nil
	}
	d1, d2 := v[0]-v[1], v[1]-v[2]
	if d2 == 0 {
		if d1 == 0 {
			// Converged to the last digit at every level.
			return Estimate{Value: last, Order: math.NaN(), Error: 0}, nil
		}
		return nan, nil
	}
	q := d1 / d2
	if !(q > 0) {
		return nan, nil
	}
	ratio := func(p float64) float64 {
		a, b, c := math.Pow(h[0], p), math.Pow(h[1], p), math.Pow(h[2], p)
		return (a - b) / (b - c)
	}
	var p float64
	if r1, r2 := h[0]/h[1], h[1]/h[2]; math.Abs(r1-r2) <= 1e-12*r1 {
		p = math.Log(q) / math.Log(r1)
	} else {
		// ratio(p) grows with p: from ln(h1/h2)/ln(h2/h3) at p → 0.
		lo, hi := 1e-6, 20.0
		if q < ratio(lo) || q > ratio(hi) {
			return nan, nil
		}
		for range 200 {
			mid := (lo + hi) / 2
			if ratio(mid) < q {
				lo = mid
			} else {
				hi = mid
			}
		}
		p = (lo + hi) / 2
	}
	if !(p > 0) || p > 20 {
		return nan, nil
	}
	b, c := math.Pow(h[1], p), math.Pow(h[2], p)
	val := v[2] - d2*c/(b-c)
	return Estimate{Value: val, Order: p, Error: math.Abs(val - last)}, nil
}
