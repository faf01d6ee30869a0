package scatter

import (
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
)

// Body is a perfectly conducting object placed in the scene. Its mesh is in
// scene coordinates (L0), closed and outward oriented.
type Body struct {
	Name string
	Mesh *mesh.Mesh
}

// Sweep moves one body rigidly through a list of displacements; every other
// body stays where it is.
type Sweep struct {
	Body      int      // index of the moving body
	Direction r3.Vec   // unit direction of motion (used for the PFA estimate)
	Offsets   []r3.Vec // displacement of the moving body at each point, L0
}

// Settings control the accuracy and resources of a computation.
type Settings struct {
	// Accuracy is the relative target for the frequency integral or
	// Matsubara sum of each point (default 1e-3).
	Accuracy float64
	// ThermalWavenumber is the Matsubara spacing 2π k_B T/(ħc) in 1/L0
	// (see Unit.ThermalWavenumber); zero means T = 0.
	ThermalWavenumber float64
	// Threads is the number of goroutines for assembly; 0 uses all cores.
	Threads int
	// Progress, if not nil, is called after each finished unit of work with
	// the number done and the (possibly growing) total.
	Progress func(done, total int)
}

// Sample is one evaluation of the integrand ln det[M M_∞^-1] at an imaginary
// wavenumber.
type Sample struct {
	Kappa float64 // 1/L0
	Value float64 // dimensionless, ≤ 0
}

// Point is the result at one sweep point.
type Point struct {
	Offset      r3.Vec  // displacement of the moving body, L0
	Gap         float64 // closest surface-to-surface distance of the moving body to the others, L0
	Energy      float64 // ħc/L0
	EnergyError float64 // estimated absolute error of Energy, ħc/L0
	PFA         PFA     // proximity-force estimate, ħc/L0
	Samples     []Sample
}

// PFA is the proximity-force estimate of an energy (DESIGN §7) from the
// panels of the moving body, of the other bodies, and their mean, in ħc/L0.
type PFA struct {
	FromMoving float64
	FromFixed  float64
	Mean       float64
}

// Cost is the size of a computation, known before any work starts.
type Cost struct {
	Unknowns    int   // RWG functions over all bodies
	MatrixBytes int64 // peak bytes of dense matrices held at once
}
