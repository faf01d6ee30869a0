package multipole

import (
	"context"
	"fmt"
	"math"
	"slices"
)

// The κ integral runs in the mapped variable t ∈ [0, tMax],
//
//	κ = κc t/(1-t),   dκ = κc/(1-t)² dt,   κc = 1/(2 gap),
//
// which puts half of t on κ < κc, where the integrand (falling like
// e^{-2κ gap}) has most of its weight, and sends t → 1 to κ → ∞; tMax is
// κ = 40/gap, beyond which the integrand is below e^{-80} of its peak.

// panel is one interval of the adaptive rule with the integrand at its 15
// Gauss–Kronrod points (Jacobian included) and the resulting integrals.
type panel struct {
	a, b   float64
	fe, ff [15]float64 // ln det and Tr[(I-N)^-1 dN/dL], times dκ/dt
	e, f   float64     // Kronrod integrals over the panel
	eErr   float64     // QUADPACK error estimates
	fErr   float64
}

// kappaMap is the substitution κ(t).
type kappaMap struct{ kc, tMax float64 }

func newKappaMap(gap float64) kappaMap {
	kc := 0.5 / gap
	kMax := kappaMaxGaps / gap
	return kappaMap{kc: kc, tMax: kMax / (kMax + kc)}
}

func (m kappaMap) at(t float64) (kappa, jac float64) {
	return m.kc * t / (1 - t), m.kc / ((1 - t) * (1 - t))
}

// gaussIndex lists the Kronrod points that are also the 7 Gauss points.
var gaussIndex = [7]int{2, 3, 6, 7, 10, 11, 14}

// evalPanels evaluates the integrand at all 15 points of every panel at order
// lmax and fills the panel integrals. It returns the number of κ evaluations.
func evalPanels(ctx context.Context, c *Config, m kappaMap, ps []panel, lmax int) (int, error) {
	kappas := make([]float64, 0, 15*len(ps))
	jac := make([]float64, 0, 15*len(ps))
	for _, p := range ps {
		for _, t := range gkPoints(p.a, p.b) {
			k, dk := m.at(t)
			kappas = append(kappas, k)
			jac = append(jac, dk)
		}
	}
	ld, tr, err := evaluate(ctx, c, kappas, lmax, true)
	if err != nil {
		return 0, err
	}
	for i := range ps {
		p := &ps[i]
		for k := 0; k < 15; k++ {
			p.fe[k] = ld[15*i+k] * jac[15*i+k]
			p.ff[k] = tr[15*i+k] * jac[15*i+k]
		}
		p.e, p.eErr = gkApply(p.a, p.b, &p.fe)
		p.f, p.fErr = gkApply(p.a, p.b, &p.ff)
	}
	return len(kappas), nil
}

// gaussDifference evaluates the integrand at order lmax on the 7 Gauss points
// of every panel and returns the Gauss-rule integrals of (panel values) minus
// (values at lmax), for energy and force, and the number of evaluations.
func gaussDifference(ctx context.Context, c *Config, m kappaMap, ps []panel, lmax int) (de, df float64, n int, err error) {
	kappas := make([]float64, 0, 7*len(ps))
	jac := make([]float64, 0, 7*len(ps))
	for _, p := range ps {
		x := gkPoints(p.a, p.b)
		for _, i := range gaussIndex {
			k, dk := m.at(x[i])
			kappas = append(kappas, k)
			jac = append(jac, dk)
		}
	}
	ld, tr, err := evaluate(ctx, c, kappas, lmax, true)
	if err != nil {
		return 0, 0, 0, err
	}
	for pi, p := range ps {
		h := 0.5 * (p.b - p.a)
		for gi, i := range gaussIndex {
			w := gaussWeights[3]
			if i != 14 {
				w = gaussWeights[(i/2)/2]
			}
			k := 7*pi + gi
			de += h * w * (p.fe[i] - ld[k]*jac[k])
			df += h * w * (p.ff[i] - tr[k]*jac[k])
		}
	}
	return de, df, len(kappas), nil
}

// panelSums returns the integrals and error estimates summed over panels.
func panelSums(ps []panel) (e, eErr, f, fErr float64) {
	for _, p := range ps {
		e += p.e
		eErr += p.eErr
		f += p.f
		fErr += p.fErr
	}
	return e, eErr, f, fErr
}

// designRule chooses the panels for the κ integral. It refines adaptively at
// order lmax (cheap) down to a reference accuracy of tol/50, then returns the
// coarsest panel set met along the way whose energy and force integrals agree
// with that reference to tol/4, together with that measured relative error (at
// least the reference's own estimate). The integrand's shape in κ hardly
// depends on lmax, so the rule carries over to the order of the final result.
func designRule(ctx context.Context, c *Config, m kappaMap, lmax int, tol float64) (rule []panel, quadErr float64, evals int, err error) {
	ps := []panel{{a: 0, b: 0.5 * m.tMax}, {a: 0.5 * m.tMax, b: m.tMax}}
	n, err := evalPanels(ctx, c, m, ps, lmax)
	evals += n
	if err != nil {
		return nil, 0, evals, err
	}
	type stage struct {
		ps   []panel
		e, f float64
	}
	var history []stage
	refTol := tol / 50
	for iter := 0; ; iter++ {
		e, eErr, f, fErr := panelSums(ps)
		history = append(history, stage{slices.Clone(ps), e, f})
		if eErr <= refTol*math.Abs(e) && fErr <= refTol*math.Abs(f) {
			refErr := math.Max(eErr/math.Abs(e), fErr/math.Abs(f))
			for _, s := range history {
				meas := math.Max(math.Abs(s.e-e)/math.Abs(e), math.Abs(s.f-f)/math.Abs(f))
				if meas <= tol/4 {
					return s.ps, math.Max(meas, refErr), evals, nil
				}
			}
			return ps, refErr, evals, nil
		}
		if iter > 60 || len(ps) > 400 {
			return nil, 0, evals, fmt.Errorf("multipole: κ quadrature did not reach %g after %d panels (energy error %g of %g)", refTol, len(ps), eErr, e)
		}
		// Bisect the panel with the largest share of the (normalised) error.
		worst, wErr := 0, -1.0
		for i, p := range ps {
			if v := p.eErr/(math.Abs(e)+1e-300) + p.fErr/(math.Abs(f)+1e-300); v > wErr {
				worst, wErr = i, v
			}
		}
		p := ps[worst]
		mid := 0.5 * (p.a + p.b)
		halves := []panel{{a: p.a, b: mid}, {a: mid, b: p.b}}
		n, err := evalPanels(ctx, c, m, halves, lmax)
		evals += n
		if err != nil {
			return nil, 0, evals, err
		}
		ps = append(slices.Delete(slices.Clone(ps), worst, worst+1), halves...)
		slices.SortFunc(ps, func(x, y panel) int { return cmpFloat(x.a, y.a) })
	}
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}
