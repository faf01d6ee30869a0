package sticking

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"
)

// Sample is the load computed at one position of a sweep, in SI units.
type Sample struct {
	X     float64 // position: gap in m, or angle from contact in rad; > 0
	Load  float64 // attraction towards smaller X: force in N, or torque in N m; ≥ 0
	Slope float64 // dLoad/dX: N/m, or N m/rad; usually < 0
}

// Curve is a smooth interpolant of the load L(x) through samples of its value
// and slope. It is immutable and safe for concurrent use.
type Curve struct {
	x, load, slope []float64

	// Interpolation space: u = ln x, v = ln L, m = dv/du = x L'/L when logLog;
	// u = x, v = L, m = L' otherwise.
	logLog  bool
	u, v, m []float64

	// Per interval i = [x_i, x_i+1], the estimated maximum error of v and of
	// dv/du (see ErrorEstimate).
	errV, errM []float64
}

// NewCurve returns the interpolant through samples, which must have strictly
// increasing, positive X, non-negative Load and finite values throughout; at
// least two are needed. The samples are copied.
//
// The interpolant is a cubic Hermite in log–log space (ln L against ln x, with
// slopes x L'/L), exact for a power law L = C/x^n; if any Load is zero it is a
// cubic Hermite of L against x instead.
func NewCurve(samples []Sample) (*Curve, error) {
	if len(samples) < 2 {
		return nil, fmt.Errorf("sticking: %d load sample(s); need at least 2 positions, and more (10 to 20) for an accurate pull-in point", len(samples))
	}
	n := len(samples)
	c := &Curve{
		x:     make([]float64, n),
		load:  make([]float64, n),
		slope: make([]float64, n),
	}
	logLog := true
	for i, s := range samples {
		switch {
		case !finite(s.X) || !finite(s.Load) || !finite(s.Slope):
			return nil, fmt.Errorf("sticking: sample %d (x = %g): non-finite value (load %g, slope %g); recompute that point", i, s.X, s.Load, s.Slope)
		case s.X <= 0:
			return nil, fmt.Errorf("sticking: sample %d: x = %g is not positive; x must be the distance (gap or angle) from contact", i, s.X)
		case i > 0 && s.X <= samples[i-1].X:
			return nil, fmt.Errorf("sticking: sample %d: x = %g does not exceed x = %g of sample %d; give samples in strictly increasing x without repeats", i, s.X, samples[i-1].X, i-1)
		case s.Load < 0:
			return nil, fmt.Errorf("sticking: sample %d (x = %g): load %g is negative; pass the attraction towards smaller x (a repulsion cannot cause pull-in)", i, s.X, s.Load)
		}
		if s.Load == 0 {
			logLog = false
		}
		c.x[i], c.load[i], c.slope[i] = s.X, s.Load, s.Slope
	}
	c.logLog = logLog
	c.u = make([]float64, n)
	c.v = make([]float64, n)
	c.m = make([]float64, n)
	for i := range n {
		if logLog {
			c.u[i] = math.Log(c.x[i])
			c.v[i] = math.Log(c.load[i])
			c.m[i] = c.x[i] * c.slope[i] / c.load[i]
		} else {
			c.u[i], c.v[i], c.m[i] = c.x[i], c.load[i], c.slope[i]
		}
	}
	for i := 1; i < n; i++ {
		if !(c.u[i] > c.u[i-1]) {
			return nil, fmt.Errorf("sticking: samples %d and %d (x = %g, %g) are too close to tell apart; drop one", i-1, i, c.x[i-1], c.x[i])
		}
	}
	c.errV = make([]float64, n-1)
	c.errM = make([]float64, n-1)
	for i := range n - 1 {
		c.errV[i], c.errM[i] = c.intervalError(i)
	}
	return c, nil
}

// With returns a new curve through the samples of c and extra, merged in
// increasing x. A position present in both is an error.
func (c *Curve) With(extra ...Sample) (*Curve, error) {
	all := append(c.Samples(), extra...)
	slices.SortStableFunc(all, func(p, q Sample) int { return cmp.Compare(p.X, q.X) })
	nc, err := NewCurve(all)
	if err != nil {
		return nil, fmt.Errorf("adding %d sample(s): %w", len(extra), err)
	}
	return nc, nil
}

// Samples returns a copy of the samples of c in increasing x.
func (c *Curve) Samples() []Sample {
	s := make([]Sample, len(c.x))
	for i := range s {
		s[i] = Sample{X: c.x[i], Load: c.load[i], Slope: c.slope[i]}
	}
	return s
}

// Range returns the sampled interval [lo, hi] of x.
func (c *Curve) Range() (lo, hi float64) { return c.x[0], c.x[len(c.x)-1] }

// LogLog reports whether c interpolates ln L against ln x (true) or L
// against x (false, used when a sampled load is zero).
func (c *Curve) LogLog() bool { return c.logLog }

// Load returns the interpolated load L(x). It is NaN outside Range.
func (c *Curve) Load(x float64) float64 {
	l, _ := c.eval(x)
	return l
}

// Slope returns the interpolated dL/dx at x. It is NaN outside Range.
func (c *Curve) Slope(x float64) float64 {
	_, s := c.eval(x)
	return s
}

// ErrorEstimate returns estimates of the absolute errors of Load(x) and
// Slope(x): the largest difference, over the interval of samples that holds
// x, between the Hermite cubic and a higher-order interpolant that also uses
// a neighbouring sample (see the package documentation), converted from the
// interpolation space to L and dL/dx. It estimates the leading error term
// rather than bounding it: it shrinks as h⁴ (h³ for the slope) with the
// spacing h, as the error does, and is zero where the samples follow a power
// law (log–log). Both are NaN outside Range.
func (c *Curve) ErrorEstimate(x float64) (load, slope float64) {
	if !c.inRange(x) {
		return math.NaN(), math.NaN()
	}
	i := c.interval(x)
	if !c.logLog {
		return c.errV[i], c.errM[i]
	}
	l, s := c.eval(x)
	// L = exp(v): δL = L δv; L' = L v'/x: δL' = |L'| δv + (L/x) δv'.
	return l * c.errV[i], math.Abs(s)*c.errV[i] + l/x*c.errM[i]
}

// relativeError is the larger of the relative error estimates of the load and
// of its slope at x (the slope's is skipped where the slope vanishes).
func (c *Curve) relativeError(x float64) float64 {
	el, es := c.ErrorEstimate(x)
	l, s := c.eval(x)
	r := 0.0
	if l != 0 {
		r = el / math.Abs(l)
	}
	if s != 0 {
		r = math.Max(r, es/math.Abs(s))
	}
	return r
}

// midpoint returns the middle, in the interpolation variable, of the sample
// interval that holds x.
func (c *Curve) midpoint(x float64) float64 {
	i := c.interval(x)
	if c.logLog {
		return math.Sqrt(c.x[i] * c.x[i+1])
	}
	return 0.5 * (c.x[i] + c.x[i+1])
}

func (c *Curve) inRange(x float64) bool { return x >= c.x[0] && x <= c.x[len(c.x)-1] }

// interval returns i with x_i ≤ x ≤ x_i+1 for x in Range.
func (c *Curve) interval(x float64) int {
	i, _ := slices.BinarySearch(c.x, x) // first index with x_i ≥ x
	return min(max(i-1, 0), len(c.x)-2)
}

// eval returns L(x) and dL/dx from the Hermite cubic of the interval holding x.
func (c *Curve) eval(x float64) (load, slope float64) {
	if !c.inRange(x) {
		return math.NaN(), math.NaN()
	}
	i := c.interval(x)
	u := x
	if c.logLog {
		u = math.Log(x)
	}
	v, dv := c.hermite(i, u)
	if !c.logLog {
		return v, dv
	}
	load = math.Exp(v)
	return load, load * dv / x
}

// hermite returns the cubic Hermite polynomial of interval i and its
// u-derivative at u (outside the interval too, as a polynomial).
func (c *Curve) hermite(i int, u float64) (v, dv float64) {
	h := c.u[i+1] - c.u[i]
	t := (u - c.u[i]) / h
	t2, t3 := t*t, t*t*t
	// Cubic Hermite basis on [0, 1] and its t-derivative.
	h00, h10, h01, h11 := 2*t3-3*t2+1, t3-2*t2+t, -2*t3+3*t2, t3-t2
	d00, d10, d01, d11 := 6*t2-6*t, 3*t2-4*t+1, -6*t2+6*t, 3*t2-2*t
	v0, v1, m0, m1 := c.v[i], c.v[i+1], c.m[i], c.m[i+1]
	v = h00*v0 + h10*h*m0 + h01*v1 + h11*h*m1
	dv = (d00*v0+d01*v1)/h + d10*m0 + d11*m1
	return v, dv
}

// errorSteps is the number of steps per interval over which the error
// estimate is maximised.
const errorSteps = 32

// intervalError estimates the largest error of the Hermite cubic H of
// interval i and of its derivative, in the interpolation space, as the
// largest difference from a more accurate interpolant of the same data plus
// one neighbouring sample e: the quintic P matching value and slope at u_i,
// u_i+1 and u_e, for e = i-1 and e = i+2 (the larger of the two). With
// s = u - u_i and h = u_i+1 - u_i,
//
//	P - H = s² (s-h)² (α + β s),
//
// α and β fixed by the misfit of H (continued as a polynomial) at u_e. This is
// the cubic's leading error term, v⁗ s²(s-h)²/24 + O(h⁵), so the estimate
// shrinks as h⁴ (h³ for the derivative), like the error. With only two
// samples there is no neighbour; the estimate is then the difference from
// the quadratic through the same values and mean slope, which shrinks only
// as h³.
func (c *Curve) intervalError(i int) (ev, em float64) {
	h := c.u[i+1] - c.u[i]
	if len(c.u) == 2 {
		// H(t) = v_i + Δ t + t(1-t) [a(1-t) + b t] with t = s/h,
		// a = h m_i - Δ, b = Δ - h m_i+1, Δ = v_i+1 - v_i; the quadratic puts
		// (a+b)/2 for the bracket. They differ by (b-a) t(1-t)(t-1/2): at most
		// |b-a|/(12√3), with a u-derivative of at most |b-a|/(2h).
		d := c.v[i+1] - c.v[i]
		ba := math.Abs(2*d - h*(c.m[i]+c.m[i+1]))
		return ba / (12 * math.Sqrt(3)), ba / (2 * h)
	}
	for _, e := range []int{i - 1, i + 2} {
		if e < 0 || e >= len(c.u) {
			continue
		}
		se := c.u[e] - c.u[i]
		he, dhe := c.hermite(i, c.u[e])
		r0, r1 := c.v[e]-he, c.m[e]-dhe
		// w(s) = q(s)(α + βs), q = s²(s-h)², q' = 2s(s-h)(2s-h):
		// w(se) = r0 and w'(se) = r1, a 2×2 system with determinant q².
		q := se * se * (se - h) * (se - h)
		dq := 2 * se * (se - h) * (2*se - h)
		alpha := (r0*(dq*se+q) - q*se*r1) / (q * q)
		beta := (q*r1 - dq*r0) / (q * q)
		for j := range errorSteps + 1 {
			s := h * float64(j) / errorSteps
			qs := s * s * (s - h) * (s - h)
			dqs := 2 * s * (s - h) * (2*s - h)
			ev = math.Max(ev, math.Abs(qs*(alpha+beta*s)))
			em = math.Max(em, math.Abs(dqs*(alpha+beta*s)+qs*beta))
		}
	}
	return ev, em
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

var errNilCurve = errors.New("sticking: nil curve; build one with NewCurve")
