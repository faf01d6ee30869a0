package lifshitz

import (
	"context"
	"errors"
	"math"
	"testing"
)

// TestGaussKronrodExact checks the (10, 21) rule: the Kronrod part integrates
// x^k exactly on [-1, 1] for k ≤ 3·10 + 1 = 31 and the Gauss part for
// k ≤ 19 (Kronrod 1965; the degrees of Gauss–Kronrod rules, Davis &
// Rabinowitz, Methods of Numerical Integration, §2.7). ∫ x^k = 2/(k+1) for
// even k, 0 for odd k; the weights sum to 2 exactly, so the tolerance is
// rounding: 1e-15.
func TestGaussKronrodExact(t *testing.T) {
	for k := 0; k <= 31; k++ {
		want := 0.0
		if k%2 == 0 {
			want = 2 / float64(k+1)
		}
		var kron, gauss float64
		for i, x := range gkNodes {
			v := math.Pow(x, float64(k))
			if i == 10 {
				if k == 0 {
					kron += kronrodWeights[i]
				}
				continue
			}
			sym := v + math.Pow(-x, float64(k))
			kron += kronrodWeights[i] * sym
			if i%2 == 1 {
				gauss += gaussWeights[i/2] * sym
			}
		}
		if math.Abs(kron-want) > 1e-15 {
			t.Errorf("Kronrod rule, x^%d: %.17g, want %.17g", k, kron, want)
		}
		if k <= 19 && math.Abs(gauss-want) > 1e-15 {
			t.Errorf("Gauss rule, x^%d: %.17g, want %.17g", k, gauss, want)
		}
	}
}

// TestAdaptive integrates textbook integrals to relative tolerance 1e-12 and
// checks the result to 1e-12 (the error estimate is conservative):
// ∫_0^∞ x³/(e^x - 1) dx = π⁴/15 (Gradshteyn & Ryzhik 3.411.1),
// ∫_0^∞ x ln(1 - e^-x) dx = -ζ(3) (the same, after integrating by parts), and
// ∫_0^1 x ln x dx = -1/4 (elementary).
func TestAdaptive(t *testing.T) {
	const zeta3 = 1.2020569031595942 // Abramowitz & Stegun Table 23.3
	tests := []struct {
		name string
		f    func(float64) float64
		a    float64
		inf  bool
		b    float64
		want float64
	}{
		{"x³/(e^x-1)", func(x float64) float64 { return x * x * x / math.Expm1(x) }, 0, true, 0, math.Pow(math.Pi, 4) / 15},
		{"x ln(1-e^-x)", func(x float64) float64 { return x * math.Log(-math.Expm1(-x)) }, 0, true, 0, -zeta3},
		{"x ln x", func(x float64) float64 { return x * math.Log(x) }, 0, false, 1, -0.25},
	}
	for _, tc := range tests {
		f := func(x float64, dst []float64) error { dst[0] = tc.f(x); return nil }
		var g vectorFunc = f
		b := tc.b
		if tc.inf {
			g, b = semiInfinite(f, tc.a), 1
		}
		val, err, n, e := adaptive(context.Background(), g, 0, b, 1, 1, 1e-12, 1000)
		if e != nil {
			t.Fatalf("%s: %v", tc.name, e)
		}
		if math.Abs(val[0]-tc.want) > 1e-12*math.Abs(tc.want) {
			t.Errorf("%s: %.16g, want %.16g (error estimate %.2g, %d evaluations)", tc.name, val[0], tc.want, err[0], n)
		}
		if err[0] > 1e-12*math.Abs(val[0]) {
			t.Errorf("%s: error estimate %.2g above the tolerance", tc.name, err[0])
		}
	}
}

func TestAdaptiveLimits(t *testing.T) {
	// A jump at an irrational point cannot be integrated to 1e-12 in 5 intervals.
	f := func(x float64, dst []float64) error {
		dst[0] = 1
		if x > 1/math.Sqrt2 {
			dst[0] = 2
		}
		return nil
	}
	if _, _, _, err := adaptive(context.Background(), f, 0, 1, 1, 1, 1e-12, 5); !errors.Is(err, errNotConverged) {
		t.Errorf("error %v, want errNotConverged", err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, _, _, err := adaptive(ctx, f, 0, 1, 1, 1, 1e-12, 1000); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: error %v", err)
	}
}
