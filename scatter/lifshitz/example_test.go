package lifshitz_test

import (
	"context"
	"fmt"

	"github.com/fluctus/fluctus/scatter/lifshitz"
	"github.com/fluctus/fluctus/scatter/material"
)

func ExamplePlates() {
	gold, err := material.Named("gold-drude")
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := lifshitz.Plates(context.Background(), gold, gold, 100e-9, 300, 1e-6)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("F/A = %.4g J/m², P = %.4g Pa (%.3f and %.3f of perfect mirrors)\n",
		r.Energy, r.Pressure, r.EnergyRatio, r.PressureRatio)
	// Output: F/A = -2.207e-07 J/m², P = -5.632 Pa (0.509 and 0.433 of perfect mirrors)
}
