package validate

import (
	"context"
	"fmt"
	"math"

	"github.com/fluctus/fluctus/scatter/lifshitz"
	"github.com/fluctus/fluctus/scatter/material"
)

// Lifshitz plate–plate checks: the mesh-free reference of real materials
// against published limits.

// speedOfLight is c in m/s (exact in the SI).
const speedOfLight = 299792458.0

// lifshitzPerfectLimit compares the Lifshitz energy per area of two plasma
// plates with a plasma wavelength far below the gap (δ = c/ω_p = d/1e5)
// with Casimir's -π²ħc/(720 d³) (Casimir 1948): the plasma reduction factor
// 1 - 4δ/d leaves 4e-5, so the tolerance is 1e-4.
func lifshitzPerfectLimit(d float64) Case {
	return Case{
		Name:      fmt.Sprintf("Lifshitz plates, ε → ∞ limit, d = %g nm", d*1e9),
		Source:    "Casimir 1948: E/A = -π²ħc/(720 d³); Lifshitz 1956 formula with the plasma model",
		Tolerance: 1e-4,
		Run: func(ctx context.Context, threads int) (float64, float64, error) {
			delta := d / 1e5
			m := material.Plasma{PlasmaEV: material.ToEV(speedOfLight / delta)}
			r, err := lifshitz.Plates(ctx, m, m, d, 0, 1e-8)
			if err != nil {
				return 0, 0, err
			}
			return r.Energy, lifshitz.CasimirEnergy(d), nil
		},
	}
}

// lifshitzPlasmaFactor compares the reduction factor of two plasma plates at
// d = 200 δ with its leading expansion in δ/d: 1 - 4δ/d for the energy and
// 1 - (16/3)δ/d for the pressure (recalled from memory of the review
// literature: Bordag, Mohideen & Mostepanenko, Phys. Rep. 353, 1 (2001)).
// The next terms are of order (δ/d)² with coefficients of about 10-25:
// 25/200² = 6e-4 of the factor, so the tolerance is 1e-3.
func lifshitzPlasmaFactor(pressure bool) Case {
	what, coef := "energy", 4.0
	if pressure {
		what, coef = "pressure", 16.0/3
	}
	const d = 2e-6
	const delta = d / 200
	return Case{
		Name:      fmt.Sprintf("Lifshitz plates, plasma %s factor at d = 200 c/ω_p", what),
		Source:    fmt.Sprintf("η = 1 - %.4g δ/d (Bordag, Mohideen & Mostepanenko 2001, recalled from memory)", coef),
		Tolerance: 1e-3,
		Run: func(ctx context.Context, threads int) (float64, float64, error) {
			m := material.Plasma{PlasmaEV: material.ToEV(speedOfLight / delta)}
			r, err := lifshitz.Plates(ctx, m, m, d, 0, 1e-9)
			if err != nil {
				return 0, 0, err
			}
			got := r.EnergyRatio
			if pressure {
				got = r.PressureRatio
			}
			return got, 1 - coef*delta/d, nil
		},
	}
}

// lifshitzHighTemperature compares two perfect plates at large d T with the
// classical limit of the free energy per area, -ζ(3) k_B T/(8π d²), whose
// corrections are exponentially small in 4π d k_B T/(ħc) (common practice;
// at d = 10 µm and 300 K that argument is 16, so 1e-4 covers the
// Matsubara sum's own tolerance).
func lifshitzHighTemperature() Case {
	const d, T = 10e-6, 300.0
	const zeta3 = 1.2020569031595942
	const kB = 1.380649e-23
	return Case{
		Name:      "Lifshitz plates, perfect conductors at d = 10 µm, 300 K",
		Source:    "classical limit -ζ(3) k_B T/(8π d²) (common practice)",
		Tolerance: 1e-4,
		Run: func(ctx context.Context, threads int) (float64, float64, error) {
			r, err := lifshitz.Plates(ctx, material.Perfect{}, material.Perfect{}, d, T, 1e-8)
			if err != nil {
				return 0, 0, err
			}
			return r.Energy, -zeta3 * kB * T / (8 * math.Pi * d * d), nil
		},
	}
}
