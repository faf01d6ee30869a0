package sticking

import (
	"math"
	"strings"
	"testing"
)

func TestNewCurveBadInput(t *testing.T) {
	good := Sample{X: 1e-7, Load: 1e-9, Slope: -4e-2}
	at := func(x float64) Sample { s := good; s.X = x; return s }
	for _, tc := range []struct {
		name    string
		samples []Sample
		want    string
	}{
		{"none", nil, "need at least 2"},
		{"one", []Sample{good}, "need at least 2"},
		{"repeated x", []Sample{good, good}, "strictly increasing"},
		{"decreasing x", []Sample{at(2e-7), at(1e-7)}, "strictly increasing"},
		{"zero x", []Sample{at(0), at(1e-7)}, "not positive"},
		{"negative x", []Sample{at(-1e-7), at(1e-7)}, "not positive"},
		{"NaN x", []Sample{at(math.NaN()), at(1e-7)}, "non-finite"},
		{"NaN load", []Sample{good, {X: 2e-7, Load: math.NaN(), Slope: -1}}, "non-finite"},
		{"NaN slope", []Sample{good, {X: 2e-7, Load: 1e-9, Slope: math.NaN()}}, "non-finite"},
		{"infinite load", []Sample{good, {X: 2e-7, Load: math.Inf(1), Slope: -1}}, "non-finite"},
		{"negative load", []Sample{good, {X: 2e-7, Load: -1e-9, Slope: -1}}, "negative"},
	} {
		if _, err := NewCurve(tc.samples); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v; want one containing %q", tc.name, err, tc.want)
		}
	}
}

// TestCurveExactForPowerLaw: a power law is a straight line in log–log, which
// the Hermite cubic reproduces, so values and slopes between samples agree to
// rounding (1e-13 relative: exp and log of values near 1e-30 lose a few bits)
// and the error estimate vanishes to rounding.
func TestCurveExactForPowerLaw(t *testing.T) {
	f := powerLaw(1e-30, 4)
	c := mustCurve(t, sampled(f, 1e-7, 1e-6, 5))
	if !c.LogLog() {
		t.Fatal("positive loads: want log–log interpolation")
	}
	for _, x := range []float64{1e-7, 1.3e-7, 4.4e-7, 9.99e-7, 1e-6} {
		l, dl := f(x)
		checkRel(t, "load", c.Load(x), l, 1e-13)
		checkRel(t, "slope", c.Slope(x), dl, 1e-13)
		if el, es := c.ErrorEstimate(x); el > 1e-13*l || es > 1e-13*math.Abs(dl) {
			t.Errorf("x = %g: error estimate %g, %g for a power law", x, el, es)
		}
	}
	for _, x := range []float64{0.99e-7, 1.01e-6, math.NaN()} {
		if !math.IsNaN(c.Load(x)) || !math.IsNaN(c.Slope(x)) {
			t.Errorf("x = %g outside the range: want NaN, got %g, %g", x, c.Load(x), c.Slope(x))
		}
	}
	if lo, hi := c.Range(); lo != 1e-7 || hi != 1e-6 {
		t.Errorf("range [%g, %g], want [1e-7, 1e-6]", lo, hi)
	}
}

// TestErrorEstimate checks that the error estimate shrinks with denser
// samples at the rate of the cubic Hermite's error (h⁴ for values, h³ for
// slopes: a factor 16 and 8 per halving; accepted 11–22 and 5.5–11, the
// rates being asymptotic), and that it tracks the true error of the
// two-regime load within a factor 2 either way at every density (it estimates
// the leading error term, it is not a bound; measured: 1.0 to 1.15 times the
// error).
func TestErrorEstimate(t *testing.T) {
	f := twoRegime(0.5e-6*2e-27, 2e-27)
	var prevL, prevS float64
	for _, count := range []int{6, 11, 21, 41} {
		c := mustCurve(t, sampled(f, 0.3e-6, 1e-6, count))
		var estL, estS, errL, errS float64
		for j := range 2000 {
			x := 0.3e-6 * math.Pow(1/0.3, (float64(j)+0.5)/2000)
			l, dl := f(x)
			el, es := c.ErrorEstimate(x)
			estL, estS = math.Max(estL, el/l), math.Max(estS, es/math.Abs(dl))
			errL, errS = math.Max(errL, relDiff(c.Load(x), l)), math.Max(errS, relDiff(c.Slope(x), dl))
		}
		t.Logf("%2d samples: load error %.2e, estimate %.2e; slope error %.2e, estimate %.2e", count, errL, estL, errS, estS)
		if r := estL / errL; r < 0.5 || r > 2 {
			t.Errorf("%d samples: load error estimate %.2e vs error %.2e", count, estL, errL)
		}
		if r := estS / errS; r < 0.5 || r > 2 {
			t.Errorf("%d samples: slope error estimate %.2e vs error %.2e", count, estS, errS)
		}
		if prevL > 0 {
			if r := prevL / estL; r < 11 || r > 22 {
				t.Errorf("%d samples: load estimate fell by %.1f on halving the spacing; want about 16", count, r)
			}
			if r := prevS / estS; r < 5.5 || r > 11 {
				t.Errorf("%d samples: slope estimate fell by %.1f on halving the spacing; want about 8", count, r)
			}
		}
		prevL, prevS = estL, estS
	}
}

// TestCurveWith checks that merged samples give the curve of all samples.
func TestCurveWith(t *testing.T) {
	f := twoRegime(0.5e-6*2e-27, 2e-27)
	all := sampled(f, 0.3e-6, 1e-6, 9)
	var even, odd []Sample
	for i, s := range all {
		if i%2 == 0 {
			even = append(even, s)
		} else {
			odd = append(odd, s)
		}
	}
	c, err := mustCurve(t, even).With(odd...)
	if err != nil {
		t.Fatal(err)
	}
	want := mustCurve(t, all)
	for _, x := range []float64{0.3e-6, 0.41e-6, 0.77e-6, 1e-6} {
		if c.Load(x) != want.Load(x) || c.Slope(x) != want.Slope(x) {
			t.Errorf("x = %g: merged curve differs", x)
		}
	}
	if _, err := c.With(all[3]); err == nil || !strings.Contains(err.Error(), "adding 1 sample") {
		t.Errorf("repeated sample: error %v", err)
	}
}
