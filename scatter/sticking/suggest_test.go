package sticking

import (
	"math"
	"testing"
)

// refine runs the loop Suggest is made for: compute the suggested samples of
// f, add them, until nothing is suggested. It returns the final curve and the
// number of rounds.
func refine(t *testing.T, c *Curve, f load, s Spring, tol float64) (*Curve, int) {
	t.Helper()
	for round := 1; round <= 30; round++ {
		xs, err := Suggest(c, s, tol)
		if err != nil {
			t.Fatal(err)
		}
		if len(xs) == 0 {
			return c, round
		}
		extra := make([]Sample, len(xs))
		for i, x := range xs {
			l, dl := f(x)
			extra[i] = Sample{X: x, Load: l, Slope: dl}
		}
		if c, err = c.With(extra...); err != nil {
			t.Fatal(err)
		}
	}
	t.Fatal("Suggest did not converge in 30 rounds")
	return nil, 0
}

// TestSuggestRefines starts the two-regime load from 4 samples, refines to a
// relative error estimate of 1e-7 and compares with the direct bisection
// solve on the analytic function. The estimate tracks the true error (see
// TestErrorEstimate), so the positions, which depend on the load and slope
// with a factor of order one, must agree to about 1e-7; 1e-6 is asked.
func TestSuggestRefines(t *testing.T) {
	const g0 = 1e-6
	f := twoRegime(0.5e-6*2e-27, 2e-27)
	lo := 0.3 * g0
	kMin, xt := tangency(t, f, lo, g0)
	k := 1.5 * kMin
	s := Spring{Stiffness: k, Rest: g0}
	xs := bisect(t, func(x float64) float64 { _, dl := f(x); return k + dl }, lo, g0)
	outer := bisect(t, func(x float64) float64 { l, _ := f(x); return k*(g0-x) - l }, xs, g0)

	c, rounds := refine(t, mustCurve(t, sampled(f, lo, g0, 4)), f, s, 1e-7)
	r := mustAnalyse(t, c, s)
	t.Logf("%d rounds, %d samples; error estimate %.1e", rounds, len(c.Samples()), r.InterpolationError)
	if r.InterpolationError > 1e-7 {
		t.Errorf("interpolation error estimate %.2g after refinement, want ≤ 1e-7", r.InterpolationError)
	}
	checkRel(t, "k_min", r.MinStiffness.Value, kMin, 1e-6)
	checkRel(t, "tangency", r.MinStiffness.At, xt, 1e-6)
	checkRel(t, "pull-in", r.PullIn.X, xs, 1e-6)
	checkRel(t, "stable equilibrium", r.Settled, outer, 1e-6)
}

// TestSuggestExtends starts from samples that end above the tangency
// (undetermined verdict) and checks that the suggested samples extend the
// range until the verdict is decided, and that it agrees with the closed form
// for the power law (DESIGN §12): k = 1.01 k_min holds, 0.99 k_min does not.
func TestSuggestExtends(t *testing.T) {
	const g0 = 1e-6
	f := powerLaw(1e-30, 4)
	kMin := math.Pow(5, 5) / math.Pow(4, 4) * 1e-30 / math.Pow(g0, 5)
	for _, tc := range []struct {
		factor float64
		want   Verdict
	}{{1.01, Free}, {0.99, Sticks}} {
		s := Spring{Stiffness: tc.factor * kMin, Rest: g0}
		c := mustCurve(t, sampled(f, 0.85*g0, g0, 8))
		c, rounds := refine(t, c, f, s, 1e-6)
		r := mustAnalyse(t, c, s)
		lo, _ := c.Range()
		if r.Verdict != tc.want || r.MinStiffness.Location != Sampled || r.PullIn.Location != Sampled {
			t.Errorf("k = %g k_min, after %d rounds (range from %g): verdict %s, tangency %s, pull-in %s; want %s, sampled, sampled",
				tc.factor, rounds, lo, r.Verdict, r.MinStiffness.Location, r.PullIn.Location, tc.want)
		}
		checkRel(t, "k_min", r.MinStiffness.Value, kMin, 1e-9) // exact interpolant: rounding only
	}
}
