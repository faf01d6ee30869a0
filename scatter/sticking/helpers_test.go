package sticking

import (
	"math"
	"testing"
)

// load is an analytic load with its derivative, for building samples and
// reference solutions.
type load func(x float64) (l, dl float64)

// powerLaw is L = C/x^n.
func powerLaw(c, n float64) load {
	return func(x float64) (float64, float64) {
		l := c * math.Pow(x, -n)
		return l, -n * l / x
	}
}

// twoRegime is L = C4/x^4 + C3/x^3: a 1/x^4 law at small x turning into a
// 1/x^3 law above the crossover x = C4/C3, the shape of the force between
// plates of finite size. The coefficients are invented for the test; the
// reference is a direct solve on this analytic function.
func twoRegime(c4, c3 float64) load {
	return func(x float64) (float64, float64) {
		return c4/math.Pow(x, 4) + c3/math.Pow(x, 3), -4*c4/math.Pow(x, 5) - 3*c3/math.Pow(x, 4)
	}
}

// sampled returns count samples of f at log-spaced x from lo to hi.
func sampled(f load, lo, hi float64, count int) []Sample {
	s := make([]Sample, count)
	for i := range s {
		x := lo * math.Pow(hi/lo, float64(i)/float64(count-1))
		if i == count-1 {
			x = hi
		}
		l, dl := f(x)
		s[i] = Sample{X: x, Load: l, Slope: dl}
	}
	return s
}

func mustCurve(t testing.TB, s []Sample) *Curve {
	t.Helper()
	c, err := NewCurve(s)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func mustAnalyse(t testing.TB, c *Curve, s Spring) Report {
	t.Helper()
	r, err := Analyse(c, s)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// bisect returns the zero of f in [a, b] (f(a), f(b) of opposite signs) by
// plain bisection to the last bit: an independent reference for the solver.
func bisect(t testing.TB, f func(float64) float64, a, b float64) float64 {
	t.Helper()
	fa := f(a)
	if (fa < 0) == (f(b) < 0) {
		t.Fatalf("bisect: no sign change on [%g, %g]", a, b)
	}
	for range 200 {
		m := 0.5 * (a + b)
		if m == a || m == b {
			break
		}
		if fm := f(m); (fm < 0) == (fa < 0) {
			a, fa = m, fm
		} else {
			b = m
		}
	}
	return 0.5 * (a + b)
}

func relDiff(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

func checkRel(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if d := relDiff(got, want); !(d <= tol) {
		t.Errorf("%s = %.12g, want %.12g (relative difference %.2g > %.0g)", what, got, want, d, tol)
	}
}
