//go:build long

package lifshitz

import (
	"math"
	"testing"

	"github.com/fluctus/fluctus/scatter/material"
)

// TestErrorEstimatesLong: the reported error estimates bound the actual
// error, taking a tol = 1e-12 run as the reference, for tol = 1e-3 ... 1e-9
// over materials, gaps and temperatures (an accuracy study; run with
// go test -tags long).
func TestErrorEstimatesLong(t *testing.T) {
	gold, si := named(t, "gold-drude"), named(t, "silicon")
	cases := []struct {
		a, b  material.Model
		d, tK float64
	}{
		{gold, gold, 10e-9, 0}, {gold, gold, 100e-9, 0}, {gold, gold, 1e-6, 0},
		{gold, gold, 100e-9, 300}, {gold, si, 300e-9, 300}, {si, si, 10e-6, 4},
		{named(t, "aluminium-plasma"), gold, 50e-9, 77},
	}
	for _, c := range cases {
		ref := mustPlates(t, c.a, c.b, c.d, c.tK, 1e-12)
		for _, tol := range []float64{1e-3, 1e-5, 1e-7, 1e-9} {
			r := mustPlates(t, c.a, c.b, c.d, c.tK, tol)
			errE, errP := math.Abs(r.Energy-ref.Energy), math.Abs(r.Pressure-ref.Pressure)
			t.Logf("%s–%s d = %g m T = %g K tol %g: relative errors %.2g (est. %.2g), %.2g (est. %.2g); %d evaluations",
				c.a.Name(), c.b.Name(), c.d, c.tK, tol, errE/math.Abs(ref.Energy), r.EnergyError/math.Abs(r.Energy),
				errP/math.Abs(ref.Pressure), r.PressureError/math.Abs(r.Pressure), r.Evaluations)
			if errE > r.EnergyError+ref.EnergyError || errP > r.PressureError+ref.PressureError {
				t.Errorf("%s–%s d = %g T = %g tol %g: actual errors %.3g, %.3g exceed estimates %.3g, %.3g",
					c.a.Name(), c.b.Name(), c.d, c.tK, tol, errE, errP, r.EnergyError, r.PressureError)
			}
			if errE > tol*math.Abs(ref.Energy) || errP > tol*math.Abs(ref.Pressure) {
				t.Errorf("%s–%s d = %g T = %g: tolerance %g not met (%.2g, %.2g)", c.a.Name(), c.b.Name(), c.d, c.tK, tol,
					errE/math.Abs(ref.Energy), errP/math.Abs(ref.Pressure))
			}
		}
	}
}

// TestPlasmaSkinDepthLong extends TestPlasmaSkinDepth to d/δ = 3000 and
// 10000, where the slopes must reach 4 and 16/3 within the second-order
// terms 14.4 δ/d and 24 δ/d to 1e-3 of the slope.
func TestPlasmaSkinDepthLong(t *testing.T) {
	m := material.Plasma{PlasmaEV: 9}
	delta := lightC / material.FromEV(9)
	for _, ratio := range []float64{3000, 10000} {
		r := mustPlates(t, m, m, ratio*delta, 0, 1e-12)
		x := 1 / ratio
		slopeE, slopeP := (1-r.EnergyRatio)/x, (1-r.PressureRatio)/x
		if math.Abs(slopeE-(4-72.0/5*x)) > 4e-3 || math.Abs(slopeP-(16.0/3-24*x)) > 5e-3 {
			t.Errorf("d/δ = %g: slopes %.6f, %.6f", ratio, slopeE, slopeP)
		}
	}
}
