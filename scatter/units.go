package scatter

import (
	"fmt"
	"math"
	"strings"
)

// Physical constants, CODATA 2018 (exact in the revised SI except where noted).
const (
	Hbar      = 1.054571817e-34 // reduced Planck constant, J s
	LightC    = 299792458.0     // speed of light, m/s
	Boltzmann = 1.380649e-23    // Boltzmann constant, J/K
	HbarC     = Hbar * LightC   // J m (3.161526773e-26)
)

// Unit is the scene's length unit L0 expressed in metres. Inside mesh, bem and
// scatter every length is in L0; energies are in ħc/L0, forces in ħc/L0²,
// torques in ħc/L0 and force gradients in ħc/L0³. Unit converts them to SI.
type Unit float64

// ParseUnit reads a length unit name: nm, um, mm or m.
func ParseUnit(s string) (Unit, error) {
	switch strings.TrimSpace(s) {
	case "nm":
		return 1e-9, nil
	case "um", "µm", "μm":
		return 1e-6, nil
	case "mm":
		return 1e-3, nil
	case "m":
		return 1, nil
	case "":
		return 0, fmt.Errorf("no length unit given: say nm, um, mm or m")
	}
	return 0, fmt.Errorf("unknown length unit %q: say nm, um, mm or m", s)
}

// Name returns the short name of u (nm, um, mm, m) or its value in metres.
func (u Unit) Name() string {
	switch u {
	case 1e-9:
		return "nm"
	case 1e-6:
		return "um"
	case 1e-3:
		return "mm"
	case 1:
		return "m"
	}
	return fmt.Sprintf("%g m", float64(u))
}

// Metres converts a length in L0 to metres.
func (u Unit) Metres(x float64) float64 { return x * float64(u) }

// Joules converts an energy in ħc/L0 to joules.
func (u Unit) Joules(e float64) float64 { return e * HbarC / float64(u) }

// Newtons converts a force in ħc/L0² to newtons.
func (u Unit) Newtons(f float64) float64 { return f * HbarC / (float64(u) * float64(u)) }

// NewtonMetres converts a torque in ħc/L0 to newton metres.
func (u Unit) NewtonMetres(t float64) float64 { return t * HbarC / float64(u) }

// NewtonsPerMetre converts a force gradient in ħc/L0³ to N/m.
func (u Unit) NewtonsPerMetre(k float64) float64 {
	return k * HbarC / (float64(u) * float64(u) * float64(u))
}

// ThermalWavenumber returns the Matsubara spacing 2π k_B T/(ħc) in 1/L0 for a
// temperature in kelvin (zero for T = 0).
func (u Unit) ThermalWavenumber(kelvin float64) float64 {
	return 2 * math.Pi * Boltzmann * kelvin * float64(u) / HbarC
}
