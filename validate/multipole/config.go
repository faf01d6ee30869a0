package multipole

import (
	"fmt"
	"math"
)

// Geometry selects the pair of bodies.
type Geometry int

const (
	// SphereSphere is two spheres of radii R1 and R2 with centres L apart
	// (sphere 1 at the origin, sphere 2 at L ẑ).
	SphereSphere Geometry = iota
	// SpherePlane is a sphere of radius R1 whose centre is at height L above an
	// infinite plane of the same boundary condition.
	SpherePlane
)

func (g Geometry) String() string {
	switch g {
	case SphereSphere:
		return "sphere-sphere"
	case SpherePlane:
		return "sphere-plane"
	}
	return fmt.Sprintf("Geometry(%d)", int(g))
}

// Field selects the fluctuating field and the boundary condition.
type Field int

const (
	// Electromagnetic field, perfectly conducting bodies.
	Electromagnetic Field = iota
	// Dirichlet scalar field (φ = 0 on the bodies).
	Dirichlet
	// Neumann scalar field (∂_n φ = 0 on the bodies).
	Neumann
)

func (f Field) String() string {
	switch f {
	case Electromagnetic:
		return "electromagnetic"
	case Dirichlet:
		return "Dirichlet"
	case Neumann:
		return "Neumann"
	}
	return fmt.Sprintf("Field(%d)", int(f))
}

// DefaultTol is the relative tolerance used when Config.Tol is zero.
const DefaultTol = 1e-6

// Config describes one configuration. Lengths are in the unit L0.
type Config struct {
	Field    Field
	Geometry Geometry
	R1, R2   float64 // sphere radii; R2 is unused for SpherePlane
	// L is the centre-to-centre distance (SphereSphere) or the height of the
	// sphere's centre above the plane (SpherePlane).
	L float64
	// Tol is the relative accuracy target (DefaultTol when zero).
	Tol float64
	// LMax is the largest multipole order; 0 chooses it adaptively.
	LMax int
}

// Result is an energy or free energy with its force.
type Result struct {
	// Energy in ħc/L0 (free energy for FreeEnergy) and its estimated absolute error.
	Energy, EnergyError float64
	// Force = -dE/dL in ħc/L0² (negative: attraction) and its estimated absolute error.
	Force, ForceError float64
	// LMax is the multipole order of the reported values.
	LMax int
	// Evaluations counts evaluations of ln det(I - N(κ)) (all m, one κ, one lmax).
	Evaluations int
}

// gap returns the surface-to-surface distance.
func (c *Config) gap() float64 {
	if c.Geometry == SpherePlane {
		return c.L - c.R1
	}
	return c.L - c.R1 - c.R2
}

// validated returns c with defaults filled in, or an error naming the bad field.
func (c Config) validated() (Config, error) {
	bad := func(format string, a ...any) (Config, error) {
		return Config{}, fmt.Errorf("multipole: invalid config: "+format, a...)
	}
	switch c.Field {
	case Electromagnetic, Dirichlet, Neumann:
	default:
		return bad("unknown Field %d (use Electromagnetic, Dirichlet or Neumann)", int(c.Field))
	}
	finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
	if !finite(c.R1) || c.R1 <= 0 {
		return bad("R1 = %g: the sphere radius must be positive and finite", c.R1)
	}
	if !finite(c.L) {
		return bad("L = %g is not finite", c.L)
	}
	switch c.Geometry {
	case SphereSphere:
		if !finite(c.R2) || c.R2 <= 0 {
			return bad("R2 = %g: the second radius must be positive and finite", c.R2)
		}
		if c.L <= c.R1+c.R2 {
			return bad("L = %g ≤ R1 + R2 = %g: the spheres touch or overlap; the centre distance must exceed the sum of the radii", c.L, c.R1+c.R2)
		}
	case SpherePlane:
		if c.L <= c.R1 {
			return bad("L = %g ≤ R1 = %g: the sphere touches or cuts the plane; the centre height must exceed the radius", c.L, c.R1)
		}
	default:
		return bad("unknown Geometry %d (use SphereSphere or SpherePlane)", int(c.Geometry))
	}
	if c.Tol == 0 {
		c.Tol = DefaultTol
	}
	if !finite(c.Tol) || c.Tol < 0 || c.Tol >= 1 {
		return bad("Tol = %g: the relative tolerance must lie in (0, 1)", c.Tol)
	}
	if c.LMax < 0 {
		return bad("LMax = %d is negative (0 chooses it adaptively)", c.LMax)
	}
	return c, nil
}
