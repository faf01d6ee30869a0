package multipole

import (
	"context"
	"fmt"
	"math"
	"testing"
	"time"
)

func TestScratch(t *testing.T) {
	for _, g := range []Geometry{SpherePlane, SphereSphere} {
		for _, dR := range []float64{10, 1, 0.5, 0.2, 0.1} {
			c := Config{Field: Electromagnetic, Geometry: g, R1: 1, R2: 1, L: 1 + dR, Tol: 1e-6}
			reff := 1.0
			if g == SphereSphere {
				c.L = 2 + dR
				reff = 0.5
			}
			t0 := time.Now()
			r, err := Energy(context.Background(), c)
			pfa := -math.Pow(math.Pi, 3) * reff / (720 * dR * dR)
			fmt.Printf("%v d/R=%g lmax=%d ev=%d err=%v E=%.10g (%.1e) ratio=%.8f  F=%.10g (%.1e) %v\n", g, dR, r.LMax, r.Evaluations, err, r.Energy, r.EnergyError/math.Abs(r.Energy), r.Energy/pfa, r.Force, r.ForceError/math.Abs(r.Force), time.Since(t0))
		}
	}
}
