package multipole

import (
	"context"
	"fmt"
	"math"
)

// lowerLMax is the order whose result is compared with order l to estimate
// the truncation error of l. For geometric convergence, e(l) ∝ e^{-ρl}, the
// change between l-Δ and l is e(l)(e^{ρΔ} - 1); the order needed for a
// tolerance τ is l ≈ ln(1/τ)/ρ, so Δ = l/12 gives ρΔ ≈ ln(1/τ)/12 ≥ 0.77 for
// τ ≤ 1e-4, and the change bounds e(l) (e^{0.77} - 1 > 1) whatever the rate.
func lowerLMax(l int) int { return max(1, l-max(2, l/12)) }

// chooseLMax predicts the multipole order at which ln det(I - N(κ)) and
// Tr[(I-N)^{-1} dN/dL] at the representative κ (1/gap: there the relative
// truncation errors of both integrands are close to those of the energy and
// the force) are converged well enough that the check of Energy (the change
// from lowerLMax(l) to l) stays below tol/3 relative. It raises the order,
// measuring the geometric rate of the last two changes of each quantity;
// once a rate is known it jumps to the order predicted to pass (at most one
// nextLMax step ahead), and it returns the smallest order predicted to pass as
// soon as that order has been reached, with the number of evaluations. The
// prediction is only a starting point: Energy and FreeEnergy verify the
// truncation error of their own results.
func chooseLMax(ctx context.Context, c *Config, kappa, tol float64) (int, int, error) {
	evals := 0
	var ls []int
	var fs, gs []float64
	add := func(l int) error {
		v, t, err := evaluate(ctx, c, []float64{kappa}, l, true)
		evals++
		if err != nil {
			return err
		}
		ls, fs, gs = append(ls, l), append(fs, v[0]), append(gs, t[0])
		return nil
	}
	l := startLMax(c)
	if err := add(l); err != nil {
		return 0, evals, err
	}
	next := nextLMax(l)
	for {
		if next > maxLMax {
			return 0, evals, fmt.Errorf("κ = %g: ln det not converged to %g by lmax = %d", kappa, tol, l)
		}
		if err := add(next); err != nil {
			return 0, evals, err
		}
		l = next
		okF, bestF := predictLMax(ls, fs, tol/3)
		okG, bestG := predictLMax(ls, gs, tol/3)
		if okF && okG {
			return max(bestF, bestG), evals, nil
		}
		next = nextLMax(l)
		if bestF > 0 && bestG > 0 {
			// Both rates are known: go straight to the predicted order.
			next = min(next, max(l+2, bestF, bestG))
		}
	}
}

// predictLMax fits e(l) = A e^{-ρl} to the last two changes of vals (at
// orders ls). It reports whether the last order already passes the check
// |v(lowerLMax(l)) - v(l)| ≤ tol |v| and the smallest order predicted to pass
// (0 when no rate can be measured yet).
func predictLMax(ls []int, vals []float64, tol float64) (bool, int) {
	k := len(vals) - 1
	if k < 2 {
		return false, 0
	}
	c1 := math.Abs(vals[k-1] - vals[k-2])
	c2 := math.Abs(vals[k] - vals[k-1])
	target := tol * math.Abs(vals[k])
	if c2 == 0 {
		return true, ls[k]
	}
	if c1 <= c2 {
		return false, 0 // not yet in the geometric regime
	}
	// c = A e^{-ρ l_a}(1 - e^{-ρ(l_b-l_a)}) between orders l_a < l_b.
	rho := math.Log(c1/c2) / (0.5*float64(ls[k]+ls[k-1]) - 0.5*float64(ls[k-1]+ls[k-2]))
	ek := c2 / math.Expm1(rho*float64(ls[k]-ls[k-1])) // predicted error at l_k
	pass := func(l int) bool {
		e := ek * math.Exp(-rho*float64(l-ls[k]))
		return e*math.Expm1(rho*float64(l-lowerLMax(l))) <= target
	}
	best := ls[k]
	if !pass(best) {
		for best < maxLMax && !pass(best) {
			best++
		}
		return false, best
	}
	for m := ls[k] - 1; m >= ls[0] && pass(m); m-- {
		best = m
	}
	return true, best
}
