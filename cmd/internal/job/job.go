package job

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/scatter/material"
)

// Defaults for optional keys.
const (
	DefaultAccuracy    = 1e-3 // relative target of the frequency integral
	DefaultTemperature = 0.0  // kelvin
	DefaultForces      = true // compute force, torque and stiffness
)

// Job is a decoded job file. All lengths are in Unit.
type Job struct {
	// Path is the job file as given (used in messages); Dir is the directory
	// that relative mesh file paths are resolved against.
	Path, Dir string
	// Name is the file name of the job without directory and extension; it
	// names the default output directory.
	Name string

	Unit        scatter.Unit
	Temperature float64 // K, ≥ 0
	Accuracy    float64 // relative, in (0, 1)

	// Forces asks for the force and torque on the moving body and the
	// stiffness along the sweep at every point.
	Forces bool
	// TorqueAbout is the point about which torques are taken, fixed to the
	// moving body and given in scene coordinates at its placed position
	// (L0); nil means the moving body's volume centroid (for an angle
	// sweep, the rotation point).
	TorqueAbout *r3.Vec
	// Substrate is an infinite perfectly conducting plane under the scene;
	// nil means none.
	Substrate *Substrate

	Bodies []Body
	Sweep  Sweep
	// Spring is the suspension of the moving body for the sticking
	// analysis; nil means none.
	Spring *Spring
}

// Substrate is an infinite perfectly conducting plane through Point with
// unit normal Normal, which points to the side of the bodies (L0).
type Substrate struct {
	Point, Normal r3.Vec
	Line          int
}

// Plane returns the substrate as the solver takes it.
func (s *Substrate) Plane() *scatter.Plane {
	if s == nil {
		return nil
	}
	return &scatter.Plane{Point: s.Point, Normal: s.Normal}
}

// Height returns the signed distance of p above the plane, along Normal.
func (s *Substrate) Height(p r3.Vec) float64 { return r3.Dot(r3.Sub(p, s.Point), s.Normal) }

// Body is one body of a job: a generated shape or a mesh file, placed in the
// scene by a rotation about its own origin followed by a translation.
type Body struct {
	Name string
	Line int // line of the body's entry in the job file

	// Exactly one of Shape and File is set. File is resolved against the
	// job file's directory.
	Shape *Shape
	File  string
	// MeshSize is the target triangle edge of a generated shape with a
	// uniform mesh (L0); zero when Grading is set or for a file.
	MeshSize float64
	// Grading, if not nil, makes the mesh fine where the surface is close to
	// another body or the substrate and coarse elsewhere: for a generated
	// shape it replaces MeshSize, and a file is refined with it.
	Grading *Grading

	Position r3.Vec    // L0
	Rotation *Rotation // nil: no rotation

	// Material is the body's dielectric model at imaginary frequency; nil
	// is a perfect conductor (no material key, or material: perfect). A
	// {table: FILE} material is read by Build, which sets Material.
	Material material.Model
	// MaterialLine is the line of the material key (0: none given).
	MaterialLine int
	// materialSpec is a table material as decoded, read by Build from
	// materialDir.
	materialSpec any
	materialDir  string
}

// MaterialName names the body's material: "perfect" or the model's name.
func (b *Body) MaterialName() string {
	if b.Material == nil {
		if b.materialSpec != nil {
			if m, ok := b.materialSpec.(map[string]any); ok {
				return fmt.Sprintf("table %v", m["table"])
			}
		}
		return "perfect"
	}
	return b.Material.Name()
}

// RealMaterials reports whether some body of the job is not a perfect
// conductor.
func (j *Job) RealMaterials() bool {
	for i := range j.Bodies {
		if j.Bodies[i].Material != nil || j.Bodies[i].materialSpec != nil {
			return true
		}
	}
	return false
}

// Grading is a triangle size range (L0): Near at the closest approach of the
// sweep, growing with the distance from the other bodies up to Far.
type Grading struct {
	Near, Far float64
}

// Source describes where the body's mesh comes from, e.g. "pad.stl" or
// "sphere radius 1 mesh_size 0.2".
func (b *Body) Source() string {
	var s string
	switch {
	case b.Shape == nil:
		s = b.File
	case b.Grading == nil:
		return b.Shape.String() + fmt.Sprintf(" mesh_size %g", b.MeshSize)
	default:
		s = b.Shape.String()
	}
	if b.Grading != nil {
		s += fmt.Sprintf(" mesh_size {near %g, far %g}", b.Grading.Near, b.Grading.Far)
	}
	return s
}

// ShapeKind names a generated shape.
type ShapeKind string

// The shapes a job file can generate.
const (
	Sphere   ShapeKind = "sphere"
	Box      ShapeKind = "box"
	Plate    ShapeKind = "plate"
	Cylinder ShapeKind = "cylinder"
)

// Shape is a generated shape centred at its own origin. Only the dimensions
// of its Kind are set: Radius (sphere); Size (box); Width, Depth, Thickness
// (plate, along x, y, z); Radius, Height (cylinder, axis along z).
type Shape struct {
	Kind                    ShapeKind
	Radius                  float64
	Size                    r3.Vec
	Width, Depth, Thickness float64
	Height                  float64
}

// String describes the shape with its dimensions.
func (s *Shape) String() string {
	switch s.Kind {
	case Sphere:
		return fmt.Sprintf("sphere radius %g", s.Radius)
	case Box:
		return fmt.Sprintf("box size %g x %g x %g", s.Size.X, s.Size.Y, s.Size.Z)
	case Plate:
		return fmt.Sprintf("plate %g x %g x %g", s.Width, s.Depth, s.Thickness)
	case Cylinder:
		return fmt.Sprintf("cylinder radius %g height %g", s.Radius, s.Height)
	}
	return string(s.Kind)
}

// Rotation turns a body about an axis through its own origin.
type Rotation struct {
	Axis    r3.Vec  // non-zero, not necessarily unit
	Degrees float64 // right-hand rule about Axis
}

// SweepKind tells how a sweep moves its body.
type SweepKind string

// The kinds of sweep.
const (
	ByGaps    SweepKind = "gaps"    // translation to given gaps
	ByOffsets SweepKind = "offsets" // translation by given displacements
	ByAngles  SweepKind = "angles"  // rotation by given angles
)

// Sweep moves one body along a direction, to given gaps or by given
// offsets, or turns it about an axis by given angles.
type Sweep struct {
	Body int // index into Job.Bodies of the moving body
	// Direction is the unit vector along which the body approaches the
	// others. An angle sweep may leave it zero: Build then takes the
	// direction from the body's closest point to its neighbour.
	Direction r3.Vec
	// Exactly one of Gaps, Offsets and Rotate is set. Gaps are closest
	// surface-to-surface distances (> 0), to the substrate when there is
	// one: the body approaches the others travelling along Direction and is
	// placed, for each gap, on the side Direction comes from. Offsets are
	// displacements along Direction from the body's position. Both in L0.
	Gaps    []float64
	Offsets []float64
	Rotate  *Turning
	// Lines holds the job-file line of each gap, offset or angle.
	Lines []int
}

// Turning turns the moving body about an axis through a point by each of a
// list of angles, which must bring it closer to its neighbour as they grow.
type Turning struct {
	Axis r3.Vec // unit vector; right-hand rule
	// Point is the pivot in scene coordinates (L0); nil means the moving
	// body's volume centroid at its placed position.
	Point   *r3.Vec
	Degrees []float64
}

// Kind returns how the sweep moves its body.
func (s *Sweep) Kind() SweepKind {
	switch {
	case s.Rotate != nil:
		return ByAngles
	case len(s.Offsets) > 0:
		return ByOffsets
	}
	return ByGaps
}

// Len returns the number of sweep points.
func (s *Sweep) Len() int {
	n := len(s.Gaps) + len(s.Offsets)
	if s.Rotate != nil {
		n += len(s.Rotate.Degrees)
	}
	return n
}

// Range returns the smallest and largest sweep value (gap, offset or angle
// in degrees).
func (s *Sweep) Range() (lo, hi float64) {
	xs := s.Gaps
	switch s.Kind() {
	case ByOffsets:
		xs = s.Offsets
	case ByAngles:
		xs = s.Rotate.Degrees
	}
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, x := range xs {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	return lo, hi
}

// SpringUnit is the unit of a spring's stiffness.
type SpringUnit string

// The stiffness units a job file accepts.
const (
	NewtonsPerMetre       SpringUnit = "N/m"     // translation
	NewtonMetresPerRadian SpringUnit = "N m/rad" // rotation
)

// Spring is the linear or torsional suspension of the moving body.
type Spring struct {
	Line      int     // line of the spring entry
	Stiffness float64 // > 0, in Unit
	Unit      SpringUnit
	// Torsional: the spring resists the turn of an angle sweep, Rest is an
	// angle in degrees; otherwise Rest is a gap in L0.
	Torsional bool
	Rest      float64
	RestLine  int // line of rest_gap or rest_angle
}
