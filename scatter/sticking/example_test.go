package sticking_test

import (
	"fmt"
	"math"

	"github.com/fluctus/fluctus/scatter/sticking"
)

// A square paddle of side 100 µm, 100 nm above a substrate, on a spring of
// 25 N/m. The load here is the Casimir force between perfectly conducting
// plates, F = π² ħc A/(240 g⁴) (Casimir 1948), standing in for the forces a
// sweep computes; the spring is invented for the example. The closed forms
// of a 1/g⁴ law check the output: x* = (4C/k)^(1/5) = 73.05 nm,
// x0_crit = 5x*/4 = 91.31 nm, k_min = 5⁵/4⁴ · C/g0⁵ = 15.87 N/m.
func Example() {
	const (
		hbarC = 3.161526773e-26 // J m
		area  = 100e-6 * 100e-6 // m²
	)
	force := func(g float64) (f, df float64) {
		f = math.Pi * math.Pi * hbarC * area / (240 * math.Pow(g, 4))
		return f, -4 * f / g
	}
	var samples []sticking.Sample
	for i := range 11 {
		g := 50e-9 + 5e-9*float64(i) // 50 … 100 nm
		f, df := force(g)
		samples = append(samples, sticking.Sample{X: g, Load: f, Slope: df})
	}
	curve, err := sticking.NewCurve(samples)
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := sticking.Analyse(curve, sticking.Spring{Stiffness: 25, Rest: 100e-9})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: settles at %.4g nm, pull-in at %.4g nm\n", r.Verdict, r.Settled*1e9, r.PullIn.X*1e9)
	fmt.Printf("k_min = %.4g N/m (k/k_min = %.3g), x0_crit = %.4g nm\n", r.MinStiffness.Value, r.Margin.StiffnessRatio, r.MinRest.Value*1e9)
	// Output:
	// free: settles at 93.07 nm, pull-in at 73.05 nm
	// k_min = 15.87 N/m (k/k_min = 1.58), x0_crit = 91.31 nm
}
