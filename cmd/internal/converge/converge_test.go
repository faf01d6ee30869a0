package converge

import (
	"math"
	"testing"
)

// The model v(h) = v* + C h^p holds exactly for the values below, so
// Richardson extrapolation must return v* and p to rounding; tolerances
// 1e-9 (the values differ by 1e-3 relative, which loses a few digits in
// the differences).
func TestRichardson(t *testing.T) {
	model := func(h []float64, vstar, c, p float64) []float64 {
		v := make([]float64, len(h))
		for i, x := range h {
			v[i] = vstar + c*math.Pow(x, p)
		}
		return v
	}
	cases := []struct {
		name           string
		h              []float64
		vstar, c, p    float64
		wantP          float64
		assumed, exact bool
	}{
		{"three levels √2 apart, p = 2", []float64{0.4, 0.4 / math.Sqrt2, 0.2}, -1.5, 0.3, 2, 2, false, true},
		{"three levels √2 apart, p = 1.5", []float64{0.4, 0.4 / math.Sqrt2, 0.2}, -1.5, -0.2, 1.5, 1.5, false, true},
		{"uneven levels, p = 2.5", []float64{0.5, 0.31, 0.2}, 3e-20, 1e-21, 2.5, 2.5, false, true},
		{"two levels, p = 2", []float64{0.4, 0.2}, -1.5, 0.3, 2, 2, true, true},
		{"two levels, p = 1 (assumed 2)", []float64{0.4, 0.2}, -1.5, 0.3, 1, 2, true, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			v := model(c.h, c.vstar, c.c, c.p)
			est, err := Richardson(c.h, v)
			if err != nil {
				t.Fatal(err)
			}
			if est.Assumed != c.assumed || math.Abs(est.Order-c.wantP) > 1e-9 {
				t.Errorf("order %g (assumed %v), want %g (%v)", est.Order, est.Assumed, c.wantP, c.assumed)
			}
			scale := math.Abs(c.vstar)
			if c.exact && math.Abs(est.Value-c.vstar) > 1e-9*scale {
				t.Errorf("value %.15g, want %.15g", est.Value, c.vstar)
			}
			if c.exact && math.Abs(est.Error-math.Abs(v[len(v)-1]-c.vstar)) > 1e-9*scale {
				t.Errorf("error %g, want %g", est.Error, math.Abs(v[len(v)-1]-c.vstar))
			}
			if !c.exact && !(math.Abs(est.Value-c.vstar) < math.Abs(v[len(v)-1]-c.vstar)) {
				// With the wrong order the limit is still nearer than the
				// finest value when the error falls monotonically.
				t.Errorf("value %g no better than the finest level %g", est.Value, v[len(v)-1])
			}
		})
	}
}

func TestRichardsonNoOrder(t *testing.T) {
	// Oscillating values: no monotone convergence, no order.
	est, err := Richardson([]float64{0.4, 0.3, 0.2}, []float64{1, 1.1, 1.05})
	if err != nil {
		t.Fatal(err)
	}
	if !math.IsNaN(est.Value) || !math.IsNaN(est.Order) || !math.IsNaN(est.Error) {
		t.Errorf("estimate %+v, want NaN", est)
	}
	// Identical values: converged, error zero.
	if est, err := Richardson([]float64{0.4, 0.3, 0.2}, []float64{2, 2, 2}); err != nil || est.Value != 2 || est.Error != 0 {
		t.Errorf("constant values: %+v, %v", est, err)
	}
	for _, bad := range []struct{ h, v []float64 }{
		{[]float64{0.2, 0.4}, []float64{1, 2}},
		{[]float64{0.4}, []float64{1}},
		{[]float64{0.4, 0.2}, []float64{1}},
		{[]float64{0.4, 0.2}, []float64{1, math.NaN()}},
		{[]float64{0.4, 0.3, 0.2, 0.1}, []float64{1, 2, 3, 4}},
	} {
		if _, err := Richardson(bad.h, bad.v); err == nil {
			t.Errorf("no error for h %v, v %v", bad.h, bad.v)
		}
	}
}
