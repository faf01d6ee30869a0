package lifshitz

import (
	"context"
	"errors"
	"fmt"
	"math"
)

// Gauss–Kronrod (10, 21) rule on [-1, 1] (A. S. Kronrod, Nodes and Weights of
// Quadrature Formulas, 1965; tabulated e.g. in R. Piessens et al., QUADPACK,
// Springer 1983): the 21 Kronrod nodes are ±gkNodes[i] (gkNodes[10] = 0); the
// Gauss nodes are those with odd i, their Gauss weights gaussWeights[i/2].
// The values were computed from the Legendre and Stieltjes polynomials in
// 256-bit arithmetic; TestGaussKronrodExact checks their exactness.
// Read-only.
var (
	gkNodes = [11]float64{
		0.99565716302580809, 0.97390652851717174, 0.93015749135570824,
		0.86506336668898454, 0.78081772658641690, 0.67940956829902444,
		0.56275713466860466, 0.43339539412924721, 0.29439286270146020,
		0.14887433898163122, 0,
	}
	kronrodWeights = [11]float64{
		0.011694638867371874, 0.032558162307964725, 0.054755896574351995,
		0.075039674810919957, 0.093125454583697601, 0.10938715880229764,
		0.12349197626206584, 0.13470921731147334, 0.14277593857706009,
		0.14773910490133849, 0.1494455540029169,
	}
	gaussWeights = [5]float64{
		0.066671344308688138, 0.14945134915058059, 0.21908636251598204,
		0.26926671930999635, 0.29552422471475287,
	}
)

// vectorFunc fills dst with the integrand's components at x.
type vectorFunc func(x float64, dst []float64) error

// errNotConverged is returned when the adaptive quadrature cannot reach its
// tolerance.
var errNotConverged = errors.New("adaptive quadrature did not reach the tolerance")

// gk21 applies the Gauss–Kronrod (10, 21) rule to f on [a, b]: val gets the
// Kronrod estimate and err |Kronrod - Gauss| per component (a conservative
// estimate of the error of val). scratch needs 2·len(val) elements.
func gk21(f vectorFunc, a, b float64, val, err, scratch []float64) error {
	dim := len(val)
	gauss, fx := scratch[:dim], scratch[dim:2*dim]
	half, mid := (b-a)/2, (a+b)/2
	for c := range val {
		val[c], gauss[c] = 0, 0
	}
	for i, xi := range gkNodes {
		for _, sign := range [2]float64{-1, 1} {
			if i == 10 && sign > 0 {
				break // the centre once
			}
			if e := f(mid+sign*half*xi, fx); e != nil {
				return e
			}
			for c, v := range fx {
				val[c] += kronrodWeights[i] * v
				if i%2 == 1 {
					gauss[c] += gaussWeights[i/2] * v
				}
			}
		}
	}
	for c := range val {
		val[c] *= half
		err[c] = math.Abs(val[c] - half*gauss[c])
	}
	return nil
}

// segment is one interval of an adaptive quadrature.
type segment struct {
	a, b     float64
	val, err []float64
	final    bool // too short to split further
}

// adaptive integrates the dim-component f over [a, b] by global adaptive
// bisection with the Gauss–Kronrod (10, 21) rule until, for each of the first
// nCrit components, the summed error estimate is at most relTol times the
// magnitude of the summed value (components beyond nCrit are integrated but
// do not steer the refinement). It returns the values, the error estimates
// and the number of evaluations of f.
func adaptive(ctx context.Context, f vectorFunc, a, b float64, dim, nCrit int, relTol float64, maxSegments int) (val, err []float64, evals int, e error) {
	scratch := make([]float64, 2*dim)
	newSegment := func(a, b float64) (*segment, error) {
		s := &segment{a: a, b: b, val: make([]float64, dim), err: make([]float64, dim)}
		if e := gk21(f, a, b, s.val, s.err, scratch); e != nil {
			return nil, e
		}
		evals += 21
		return s, nil
	}
	first, e := newSegment(a, b)
	if e != nil {
		return nil, nil, evals, e
	}
	segs := []*segment{first}
	val, err = make([]float64, dim), make([]float64, dim)
	for {
		for c := range val {
			val[c], err[c] = 0, 0
		}
		for _, s := range segs {
			for c := range val {
				val[c] += s.val[c]
				err[c] += s.err[c]
			}
		}
		converged := true
		for c := 0; c < nCrit; c++ {
			if err[c] > relTol*math.Abs(val[c]) {
				converged = false
			}
		}
		if converged {
			return val, err, evals, nil
		}
		if len(segs) >= maxSegments {
			return val, err, evals, fmt.Errorf("%w after %d intervals (relative error estimate %.2g, wanted %.2g)", errNotConverged, len(segs), worstRelative(val, err, nCrit), relTol)
		}
		if e := ctx.Err(); e != nil {
			return val, err, evals, e
		}
		// Split the interval with the largest error relative to the totals.
		worst, worstBad := -1, -1.0
		for i, s := range segs {
			if s.final {
				continue
			}
			var bad float64
			for c := 0; c < nCrit; c++ {
				if s.err[c] > 0 {
					bad = math.Max(bad, s.err[c]/(math.Abs(val[c])+math.SmallestNonzeroFloat64))
				}
			}
			if bad > worstBad {
				worst, worstBad = i, bad
			}
		}
		if worst < 0 || worstBad == 0 {
			return val, err, evals, fmt.Errorf("%w: intervals cannot be split further (relative error estimate %.2g, wanted %.2g)", errNotConverged, worstRelative(val, err, nCrit), relTol)
		}
		s := segs[worst]
		m := 0.5 * (s.a + s.b)
		if !(m > s.a && m < s.b) || s.b-s.a < 1e-15*math.Max(math.Abs(s.a), math.Abs(s.b)) {
			s.final = true
			continue
		}
		left, e := newSegment(s.a, m)
		if e != nil {
			return val, err, evals, e
		}
		right, e := newSegment(m, s.b)
		if e != nil {
			return val, err, evals, e
		}
		segs[worst] = left
		segs = append(segs, right)
	}
}

// worstRelative returns the largest err/|val| of the first n components.
func worstRelative(val, err []float64, n int) float64 {
	var w float64
	for c := 0; c < n; c++ {
		if err[c] > 0 {
			w = math.Max(w, err[c]/math.Abs(val[c]))
		}
	}
	return w
}

// semiInfinite maps f on [a, ∞) to [0, 1) by x = a + s/(1 - s),
// dx = ds/(1 - s)².
func semiInfinite(f vectorFunc, a float64) vectorFunc {
	return func(s float64, dst []float64) error {
		u := 1 - s
		if e := f(a+s/u, dst); e != nil {
			return e
		}
		jac := 1 / (u * u)
		for c := range dst {
			dst[c] *= jac
		}
		return nil
	}
}
