package scatter

import (
	"math"
	"testing"
)

// TestFejerRule checks Fejér's second rule: weights sum to 1 (the length of
// [0, 1]); it is exact for polynomials of degree n-2 (interpolatory rule on n-1
// nodes, degree n-1 by symmetry for odd powers about 1/2); and it converges
// geometrically for an analytic integrand, ∫_0^1 e^{-3t} dt = (1 - e^{-3})/3.
// Tolerances: 1e-14 for exact cases (rounding), 1e-12 at n = 32 for the
// exponential (its Chebyshev coefficients fall like (3/4)^k / k!).
func TestFejerRule(t *testing.T) {
	for _, n := range []int{4, 8, 16, 32} {
		r := newFejer(n)
		for deg := 0; deg <= n-1; deg++ {
			got := 0.0
			for k, tk := range r.t {
				got += r.w[k] * math.Pow(tk, float64(deg))
			}
			if want := 1 / float64(deg+1); math.Abs(got-want) > 1e-14 {
				t.Errorf("n=%d: ∫t^%d = %.16g, want %.16g", n, deg, got, want)
			}
		}
	}
	r := newFejer(32)
	got := 0.0
	for k, tk := range r.t {
		got += r.w[k] * math.Exp(-3*tk)
	}
	if want := (1 - math.Exp(-3)) / 3; math.Abs(got-want) > 1e-12 {
		t.Errorf("∫e^{-3t}: %.16g, want %.16g", got, want)
	}
	// Nesting: node k of the n-rule is node 2k+1 (0-based) of the 2n-rule.
	a, b := newFejer(8), newFejer(16)
	for k := range a.t {
		if j := nestedIndex(k, 8, 16); math.Abs(a.t[k]-b.t[j]) > 1e-15 {
			t.Errorf("node %d of n=8 (%g) is not node %d of n=16 (%g)", k, a.t[k], j, b.t[j])
		}
	}
}
