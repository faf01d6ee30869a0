package scatter

import (
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
	"github.com/fluctus/fluctus/scatter/material"
)

// Body is an object placed in the scene. Its mesh is in scene coordinates
// (L0), closed and outward oriented. Material is its permittivity model at
// imaginary frequency; nil (or material.Perfect) is a perfect conductor.
type Body struct {
	Name     string
	Mesh     *mesh.Mesh
	Material material.Model
}

// Sweep moves one body rigidly through a list of placements; every other
// body stays where it is. At point p the moving body is first turned by
// Turns[p] (when Turns is not empty) and then displaced by Offsets[p].
type Sweep struct {
	Body      int      // index of the moving body
	Direction r3.Vec   // unit direction of motion (PFA estimate, stiffness)
	Offsets   []r3.Vec // displacement of the moving body at each point, L0
	Turns     []Turn   // optional rotation of the moving body at each point
	// Centre is the point, fixed to the moving body at its reference
	// placement, about which torques are taken (L0).
	Centre r3.Vec
}

// Turn is a rotation by Angle radians (right-hand rule) about Axis through
// Pivot.
type Turn struct {
	Axis  r3.Vec
	Angle float64
	Pivot r3.Vec
}

// apply returns p turned.
func (t Turn) apply(p r3.Vec) r3.Vec {
	if t.Angle == 0 || t.Axis == (r3.Vec{}) {
		return p
	}
	rot := r3.NewRotation(t.Angle, r3.Unit(t.Axis))
	return r3.Add(t.Pivot, rot.Rotate(r3.Sub(p, t.Pivot)))
}

// turn returns the turn at point p (the identity without turns).
func (s Sweep) turn(p int) Turn {
	if len(s.Turns) == 0 {
		return Turn{}
	}
	return s.Turns[p]
}

// place returns the mesh of the moving body at point p.
func (s Sweep) place(m *mesh.Mesh, p int) *mesh.Mesh {
	t := s.turn(p)
	if t.Angle != 0 && t.Axis != (r3.Vec{}) {
		m = m.Rotate(r3.Unit(t.Axis), t.Angle, t.Pivot)
	}
	if s.Offsets[p] != (r3.Vec{}) {
		m = m.Translate(s.Offsets[p])
	}
	return m
}

// placePoint returns a point fixed to the moving body at point p.
func (s Sweep) placePoint(c r3.Vec, p int) r3.Vec {
	return r3.Add(s.turn(p).apply(c), s.Offsets[p])
}

// Settings control the accuracy and resources of a computation.
type Settings struct {
	// Accuracy is the relative target for the frequency integral or
	// Matsubara sum of each point (default 1e-3).
	Accuracy float64
	// ThermalWavenumber is the Matsubara spacing 2π k_B T/(ħc) in 1/L0
	// (see Unit.ThermalWavenumber); zero means T = 0.
	ThermalWavenumber float64
	// Length is L0 in metres; needed only when a body has a real material.
	Length float64
	// Threads is the number of goroutines for assembly; 0 uses all cores.
	Threads int
	// Progress, if not nil, is called after each finished unit of work with
	// the number done and the (possibly growing) total.
	Progress func(done, total int)
	// Forces asks for the force and torque on the moving body; Stiffness
	// also for the force gradient along the sweep direction.
	Forces, Stiffness bool
	// Dense keeps every interaction block dense. By default a block between
	// separated bodies that is numerically low rank is compressed (adaptive
	// cross approximation to a tolerance tied to Accuracy, DESIGN §10) and
	// the two-body reduction works in the compressed form.
	Dense bool
	// Plates, if not nil, is the Lifshitz plate law of these bodies' materials
	// that the caller has already tabulated (NewPlateTable); Energies uses it
	// for the PFA baseline when it fits the run's unit, temperature and gaps,
	// and otherwise tabulates its own.
	Plates *PlateTable
	// Substrate, if not nil, is an infinite perfectly conducting plane under
	// the scene, treated exactly by images (DESIGN §6). Point.Gap is then the
	// distance of the moving body to the plane.
	Substrate *Plane
	// Points, if not nil, restricts the run to these sweep points (indices
	// into Sweep.Offsets); the others are returned without results. Each
	// point's frequency rule adapts to that point alone, so the results of
	// a point do not depend on which other points are computed with it.
	Points []int
	// Store, if not nil, supplies finished units of work and records new
	// ones (checkpoints; see Store).
	Store Store
}

// Sample is one evaluation of the integrand ln det[M M_∞^-1] at an imaginary
// wavenumber.
type Sample struct {
	Kappa float64 // 1/L0
	Value float64 // dimensionless, ≤ 0
	// Gradient of the integrand with Settings.Forces: derivatives with
	// respect to the moving body's displacement (1/L0, first three) and turns
	// about the x, y and z axes through the centre (per radian).
	Gradient [6]float64 `json:",omitempty"`
}

// Point is the result at one sweep point.
type Point struct {
	Offset      r3.Vec  // displacement of the moving body, L0
	Turn        Turn    // rotation of the moving body before the offset
	Gap         float64 // closest surface-to-surface distance of the moving body to the others, L0
	Energy      float64 // ħc/L0
	EnergyError float64 // estimated absolute error of Energy, ħc/L0
	PFA         PFA     // proximity-force estimate, ħc/L0
	Samples     []Sample

	// With Settings.Forces: the force (ħc/L0²) and the torque about the
	// placed Centre (ħc/L0) on the moving body, with error estimates (the
	// norms of the vector errors).
	Force, Torque           r3.Vec
	ForceError, TorqueError float64
	// With Settings.Stiffness: -d(F·ê)/ds for a displacement s along the
	// sweep direction ê, in ħc/L0³: the spring constant the interaction adds
	// along ê (negative when the attraction grows as the body advances).
	// For an angle sweep it is the torsional stiffness -d(τ·n)/dθ about the
	// turn's axis n, in ħc/L0 per radian.
	Stiffness, StiffnessError float64
	// Ranks tells, for each interaction block, the largest rank used where
	// it was compressed and how many evaluations were compressed or dense.
	Ranks []BlockRank `json:",omitempty"`
	// StaticModel tells, at T > 0 with real materials, the static limit each
	// real body's model takes in the n = 0 Matsubara term (dielectric,
	// drude: no TE part, or plasma), e.g. "ball: drude (drude(9 eV, 0.035 eV))".
	StaticModel string `json:",omitempty"`
}

// PFA is the proximity-force estimate of an energy (DESIGN §7) from the
// panels of the moving body, of the other bodies, and their mean, in ħc/L0.
type PFA struct {
	FromMoving float64
	FromFixed  float64
	Mean       float64
	// Force is -dE_PFA/ds of the mean estimate for a displacement s of the
	// moving body along the sweep direction (ħc/L0²), so that Force·ê is
	// comparable with the exact force's component along ê.
	Force float64
}

// Cost is the size of a computation, known before any work starts.
type Cost struct {
	Unknowns    int   // RWG functions over all bodies
	MatrixBytes int64 // peak bytes of dense matrices held at once
}

// Plane is an infinite perfectly conducting plane (a substrate) through Point
// with unit normal Normal, which points to the side where the bodies are.
type Plane struct {
	Point, Normal r3.Vec
}
