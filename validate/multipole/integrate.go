package multipole

import (
	"context"
	"fmt"
	"math"
	"slices"
)

// The κ integral runs in the mapped variable t ∈ [0, tMax],
//
//	κ = -κc ln(1 - t),   dκ = κc/(1 - t) dt,
//
// under which an integrand decaying like e^{-aκ} becomes κc (1-t)^{aκc - 1}
// times a slowly varying factor: for aκc ≳ 1 that is close to a polynomial in
// t, and a single 15-point Gauss–Kronrod panel is often enough for 1e-7. The
// integrand decays like e^{-2κ gap}, and κc is chosen among 1/gap, 2/gap and
// 4/gap by designRule. tMax corresponds to κ = 40/gap, beyond which the
// integrand is below e^{-80} of its value at κ = 0.

// panel is one interval of the rule with the integrand at its 15
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

func newKappaMap(gap, kcGaps float64) kappaMap {
	kc := kcGaps / gap
	return kappaMap{kc: kc, tMax: -math.Expm1(-kappaMaxGaps / gap / kc)}
}

func (m kappaMap) at(t float64) (kappa, jac float64) {
	return -m.kc * math.Log1p(-t), m.kc / (1 - t)
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

// rule is a quadrature rule for the κ integral: a map and its panels.
type rule struct {
	m      kappaMap
	panels []panel
}

func (r rule) nodes() int { return 15 * len(r.panels) }

func newRule(m kappaMap, splits ...float64) rule {
	r := rule{m: m}
	for i := 0; i+1 < len(splits); i++ {
		r.panels = append(r.panels, panel{a: splits[i] * m.tMax, b: splits[i+1] * m.tMax})
	}
	return r
}

// designRule chooses the quadrature rule for the κ integral on a cheap model,
// the integrand at order lmax (low). It computes a reference by adaptive
// bisection (κc = 1/gap) to a QUADPACK error estimate of tol/20 (an estimate
// that in practice exceeds the true error by orders of magnitude), then tries
// candidate rules in order of cost (one panel, two, three; κc = 1, 2, 4 per
// gap) and returns the cheapest whose energy and force integrals agree with the
// reference to tol/4, with its measured relative error (at least the
// reference's own estimate). Failing those it returns the reference rule. The
// integrand's shape in κ depends little on lmax, so the rule carries over to the
// order of the final result.
func designRule(ctx context.Context, c *Config, lmax int, tol float64) (best rule, quadErr float64, evals int, err error) {
	gap := c.gap()
	ref := newRule(newKappaMap(gap, 1), 0, 0.5, 1)
	n, err := evalPanels(ctx, c, ref.m, ref.panels, lmax)
	evals += n
	if err != nil {
		return rule{}, 0, evals, err
	}
	refTol := tol / 20
	var e, eErr, f, fErr float64
	for iter := 0; ; iter++ {
		e, eErr, f, fErr = panelSums(ref.panels)
		if eErr <= refTol*math.Abs(e) && fErr <= refTol*math.Abs(f) {
			break
		}
		if iter > 60 || len(ref.panels) > 400 {
			return rule{}, 0, evals, fmt.Errorf("κ quadrature did not reach %g after %d panels (energy error %g of %g)", refTol, len(ref.panels), eErr, e)
		}
		// Bisect the panel with the largest share of the (normalised) error.
		worst, wErr := 0, -1.0
		for i, p := range ref.panels {
			if v := p.eErr/(math.Abs(e)+1e-300) + p.fErr/(math.Abs(f)+1e-300); v > wErr {
				worst, wErr = i, v
			}
		}
		p := ref.panels[worst]
		mid := 0.5 * (p.a + p.b)
		halves := []panel{{a: p.a, b: mid}, {a: mid, b: p.b}}
		n, err := evalPanels(ctx, c, ref.m, halves, lmax)
		evals += n
		if err != nil {
			return rule{}, 0, evals, err
		}
		ref.panels = append(slices.Delete(ref.panels, worst, worst+1), halves...)
		slices.SortFunc(ref.panels, func(x, y panel) int { return cmpFloat(x.a, y.a) })
	}
	refErr := math.Max(eErr/math.Abs(e), fErr/math.Abs(f))

	splits := [][]float64{{0, 1}, {0, 0.5, 1}, {0, 0.8, 1}, {0, 0.5, 0.85, 1}}
	for _, sp := range splits {
		var found bool
		for _, kcGaps := range []float64{1, 2, 4} {
			cand := newRule(newKappaMap(gap, kcGaps), sp...)
			if cand.nodes() >= ref.nodes() {
				continue
			}
			n, err := evalPanels(ctx, c, cand.m, cand.panels, lmax)
			evals += n
			if err != nil {
				return rule{}, 0, evals, err
			}
			ce, _, cf, _ := panelSums(cand.panels)
			meas := math.Max(math.Abs(ce-e)/math.Abs(e), math.Abs(cf-f)/math.Abs(f))
			if meas <= tol/4 && (!found || meas < quadErr) {
				best, quadErr, found = cand, meas, true
			}
		}
		if found {
			return best, math.Max(quadErr, refErr), evals, nil
		}
	}
	return ref, refErr, evals, nil
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
