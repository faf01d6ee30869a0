package bem

import (
	"math"
	"testing"
)

// factorial of small integers.
func factorial(n int) float64 {
	f := 1.0
	for i := 2; i <= n; i++ {
		f *= float64(i)
	}
	return f
}

// TestRuleExactness checks each rule against the exact monomial integrals over
// the reference triangle, ∫_T λ1^a λ2^b dA / Area = 2 a! b! / (a+b+2)!
// (a standard identity of barycentric calculus). Tolerance 1e-13: the rules
// are exact up to their degree, so only rounding remains.
func TestRuleExactness(t *testing.T) {
	rules := []*Rule{Centroid(), Strang3(), Radon7(), mustCollapsed(2), mustCollapsed(4), mustCollapsed(8),
		mustEdgeGraded(5), must(VertexGraded(5, 0)), must(VertexGraded(6, 2)), must(SideGraded(6, 1)), must(SideGraded(8, 0))}
	for _, r := range rules {
		sum := 0.0
		for _, w := range r.Weight {
			sum += w
		}
		if math.Abs(sum-1) > 1e-14 {
			t.Errorf("%s: weights sum to %v, want 1", r.Name, sum)
		}
		for deg := 0; deg <= r.Degree; deg++ {
			for a := 0; a <= deg; a++ {
				b := deg - a
				got := 0.0
				for i, p := range r.Bary {
					got += r.Weight[i] * math.Pow(p[0], float64(a)) * math.Pow(p[1], float64(b))
				}
				want := 2 * factorial(a) * factorial(b) / factorial(a+b+2)
				if math.Abs(got-want) > 1e-13 {
					t.Errorf("%s: degree %d monomial λ1^%d λ2^%d: got %.16g want %.16g", r.Name, deg, a, b, got, want)
				}
			}
		}
	}
}

func TestRuleRange(t *testing.T) {
	if _, err := Collapsed(0); err == nil {
		t.Error("Collapsed(0) gave no error")
	}
	if _, err := EdgeGraded(0); err == nil {
		t.Error("EdgeGraded(0) gave no error")
	}
	if _, err := VertexGraded(5, 3); err == nil {
		t.Error("VertexGraded at corner 3 gave no error")
	}
	if _, err := SideGraded(1, 0); err == nil {
		t.Error("SideGraded(1) gave no error")
	}
}

// TestGaussLegendre checks the guarded Gauss–Legendre rules for every order
// up to 64 (weights sum to the interval length; t^(2n-2) integrated exactly;
// tolerance 1e-12, rounding): gonum v0.17.0's 26-point rule fails this, and
// gaussLegendre must replace it.
func TestGaussLegendre(t *testing.T) {
	for n := 1; n <= 64; n++ {
		x := make([]float64, n)
		w := make([]float64, n)
		gaussLegendre(x, w, -1, 1)
		if !legendreOK(x, w) {
			t.Errorf("n=%d: rule fails its exactness check", n)
		}
	}
	x, w := make([]float64, 26), make([]float64, 26)
	newtonLegendre(x, w)
	if !legendreOK(x, w) {
		t.Error("Newton rule for n=26 fails")
	}
}
