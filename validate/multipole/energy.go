package multipole

import (
	"context"
	"fmt"
	"math"
	"slices"
)

// Energy returns the Casimir energy at zero temperature,
//
//	E = (ħc/2π) ∫_0^∞ dκ ln det(I - N(κ))   (ħc/L0),
//
// and the force F = -dE/dL = (ħc/2π) ∫ dκ Tr[(I-N)^{-1} dN/dL] (ħc/L0²,
// negative for attraction) from the analytic derivative of the translation
// matrices, each with an error estimate (quadrature plus multipole truncation).
//
// The κ integral is Gauss–Kronrod (15 points per panel) in κ = -κc ln(1-t);
// κc and the panels are chosen on a cheap low-order model of the integrand and
// the rule's error is measured there against a tighter reference (designRule).
// With cfg.LMax = 0 the multipole order is predicted from the convergence of
// the integrands at κ = 1/gap (chooseLMax) and then verified: the integral is
// redone on the Gauss points at a lower order (lowerLMax), and the order is
// raised (comparing whole integrals between successive orders) until energy and
// force change by less than cfg.Tol/2.
func Energy(ctx context.Context, cfg Config) (Result, error) {
	c, err := cfg.validated()
	if err != nil {
		return Result{}, err
	}
	var r Result
	lmax := c.LMax
	if lmax == 0 {
		var n int
		lmax, n, err = chooseLMax(ctx, &c, 1/c.gap(), c.Tol)
		r.Evaluations += n
		if err != nil {
			return Result{}, fmt.Errorf("multipole: energy: %w", err)
		}
	}
	design, quadErr, n, err := designRule(ctx, &c, min(lmax, max(6, lmax/4)), c.Tol)
	r.Evaluations += n
	if err != nil {
		return Result{}, fmt.Errorf("multipole: energy: %w", err)
	}
	// Safety factor 2 on the measured quadrature error (the rule was measured
	// at a lower order).
	quadErr *= 2
	km := design.m
	ps := slices.Clone(design.panels)
	n, err = evalPanels(ctx, &c, km, ps, lmax)
	r.Evaluations += n
	if err != nil {
		return Result{}, fmt.Errorf("multipole: energy at lmax = %d: %w", lmax, err)
	}
	s := 1 / (2 * math.Pi)
	e, _, f, _ := panelSums(ps)
	r.Energy, r.Force, r.LMax = s*e, s*f, lmax
	r.EnergyError, r.ForceError = quadErr*math.Abs(r.Energy), quadErr*math.Abs(r.Force)
	if c.LMax > 0 {
		return r, nil
	}
	// Truncation check: the same rule on its Gauss points at a lower order.
	de, df, n, err := gaussDifference(ctx, &c, km, ps, lowerLMax(lmax))
	r.Evaluations += n
	if err != nil {
		return Result{}, fmt.Errorf("multipole: energy at lmax = %d: %w", lowerLMax(lmax), err)
	}
	for {
		de, df = math.Abs(s*de), math.Abs(s*df)
		if de <= 0.5*c.Tol*math.Abs(r.Energy) && df <= 0.5*c.Tol*math.Abs(r.Force) {
			r.EnergyError += de
			r.ForceError += df
			return r, nil
		}
		next := nextLMax(lmax)
		if next > maxLMax {
			return r, fmt.Errorf("multipole: energy not converged by lmax = %d (change %g against tolerance %g)", lmax, de/math.Abs(r.Energy), c.Tol)
		}
		prev := ps
		ps = slices.Clone(design.panels)
		n, err = evalPanels(ctx, &c, km, ps, next)
		r.Evaluations += n
		if err != nil {
			return Result{}, fmt.Errorf("multipole: energy at lmax = %d: %w", next, err)
		}
		e, _, f, _ = panelSums(ps)
		r.Energy, r.Force, r.LMax = s*e, s*f, next
		r.EnergyError, r.ForceError = quadErr*math.Abs(r.Energy), quadErr*math.Abs(r.Force)
		de, df = 0, 0
		for i := range ps {
			pe, pf := ps[i].e-prev[i].e, ps[i].f-prev[i].f
			de, df = de+pe, df+pf
		}
		lmax = next
	}
}

// FreeEnergy returns the free energy at temperature T as the Matsubara sum
//
//	F = k_B T Σ'_{n≥0} ln det(I - N(κ_n)),   κ_n = n κ_T,   k_B T = ħc κ_T/(2π),
//
// where thermalWavenumber κ_T = 2π k_B T/(ħc) is in 1/L0. The prime halves the
// n = 0 term, which is the exact static limit (the scaled T-matrices and
// translation matrices evaluated at κ = 0, where they are finite). Energies in
// ħc/L0, force -dF/dL in ħc/L0². The sum stops when two successive terms fall
// below cfg.Tol/10 of the total (or at κ_n = 40/gap). With cfg.LMax = 0 the
// order is chosen and verified as in Energy, the check summing every term at
// the lower order.
func FreeEnergy(ctx context.Context, cfg Config, thermalWavenumber float64) (Result, error) {
	c, err := cfg.validated()
	if err != nil {
		return Result{}, err
	}
	if !(thermalWavenumber > 0) || math.IsInf(thermalWavenumber, 0) {
		return Result{}, fmt.Errorf("multipole: thermal wavenumber %g: must be positive and finite (2π k_B T/ħc in 1/L0)", thermalWavenumber)
	}
	var r Result
	lmax := c.LMax
	if lmax == 0 {
		var n int
		lmax, n, err = chooseLMax(ctx, &c, math.Min(1/c.gap(), thermalWavenumber), c.Tol)
		r.Evaluations += n
		if err != nil {
			return Result{}, fmt.Errorf("multipole: free energy: %w", err)
		}
	}
	terms, err := matsubaraTerms(ctx, &c, thermalWavenumber, lmax)
	r.Evaluations += len(terms.kappa)
	if err != nil {
		return Result{}, err
	}
	s := thermalWavenumber / (2 * math.Pi)
	r.Energy, r.Force = s*terms.e, s*terms.f
	r.EnergyError, r.ForceError = s*terms.eTail, s*terms.fTail
	r.LMax = lmax
	if c.LMax > 0 {
		return r, nil
	}
	lower := lowerLMax(lmax)
	for {
		e2, f2, err := matsubaraSum(ctx, &c, terms.kappa, lower)
		r.Evaluations += len(terms.kappa)
		if err != nil {
			return Result{}, err
		}
		de, df := math.Abs(s*(terms.e-e2)), math.Abs(s*(terms.f-f2))
		if de <= 0.5*c.Tol*math.Abs(r.Energy) && df <= 0.5*c.Tol*math.Abs(r.Force) {
			r.EnergyError += de
			r.ForceError += df
			return r, nil
		}
		next := nextLMax(lmax)
		if next > maxLMax {
			return r, fmt.Errorf("multipole: free energy not converged by lmax = %d", lmax)
		}
		e3, f3, err := matsubaraSum(ctx, &c, terms.kappa, next)
		r.Evaluations += len(terms.kappa)
		if err != nil {
			return Result{}, err
		}
		terms.e, terms.f = e3, f3
		r.Energy, r.Force, r.LMax = s*e3, s*f3, next
		r.EnergyError, r.ForceError = s*terms.eTail, s*terms.fTail
		lower, lmax = lmax, next
	}
}

// matsubara holds a summed Matsubara series.
type matsubara struct {
	kappa        []float64 // the κ_n summed
	e, f         float64   // Σ' ln det and Σ' Tr[(I-N)^-1 dN/dL]
	eTail, fTail float64   // bound on the omitted terms
}

// matsubaraTerms sums the series at order lmax, deciding where to stop.
func matsubaraTerms(ctx context.Context, c *Config, dk float64, lmax int) (matsubara, error) {
	kMax := kappaMaxGaps / c.gap()
	const batch = 8
	var m matsubara
	small := 0
	for n0 := 0; ; n0 += batch {
		kappas := make([]float64, batch)
		for i := range kappas {
			kappas[i] = float64(n0+i) * dk
		}
		ld, tr, err := evaluate(ctx, c, kappas, lmax, true)
		if err != nil {
			return m, fmt.Errorf("multipole: free energy at lmax = %d: %w", lmax, err)
		}
		for i, k := range kappas {
			w := 1.0
			if n0+i == 0 {
				w = 0.5
			}
			m.kappa = append(m.kappa, k)
			m.e += w * ld[i]
			m.f += w * tr[i]
			// The terms fall at least geometrically (like e^{-2 κ_n gap}); four
			// times the last term bounds the rest once they are this small.
			m.eTail, m.fTail = 4*math.Abs(ld[i]), 4*math.Abs(tr[i])
			if math.Abs(ld[i]) <= 0.1*c.Tol*math.Abs(m.e) && math.Abs(tr[i]) <= 0.1*c.Tol*math.Abs(m.f) {
				small++
			} else {
				small = 0
			}
			if small >= 2 || k > kMax {
				return m, nil
			}
		}
	}
}

// matsubaraSum re-sums the series over the given κ_n (κ_0 = 0 first) at lmax.
func matsubaraSum(ctx context.Context, c *Config, kappas []float64, lmax int) (e, f float64, err error) {
	ld, tr, err := evaluate(ctx, c, kappas, lmax, true)
	if err != nil {
		return 0, 0, fmt.Errorf("multipole: free energy at lmax = %d: %w", lmax, err)
	}
	for i := range kappas {
		w := 1.0
		if i == 0 {
			w = 0.5
		}
		e += w * ld[i]
		f += w * tr[i]
	}
	return e, f, nil
}
