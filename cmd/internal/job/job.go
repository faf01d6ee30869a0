package job

import (
	"fmt"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/scatter"
)

// Defaults for optional keys.
const (
	DefaultAccuracy    = 1e-3 // relative target of the frequency integral
	DefaultTemperature = 0.0  // kelvin
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

	Bodies []Body
	Sweep  Sweep
}

// Body is one body of a job: a generated shape or a mesh file, placed in the
// scene by a rotation about its own origin followed by a translation.
type Body struct {
	Name string
	Line int // line of the body's entry in the job file

	// Exactly one of Shape and File is set. File is resolved against the
	// job file's directory.
	Shape    *Shape
	File     string
	MeshSize float64 // target triangle edge of a generated shape, L0

	Position r3.Vec    // L0
	Rotation *Rotation // nil: no rotation
}

// Source describes where the body's mesh comes from, e.g. "pad.stl" or
// "sphere radius 1 mesh_size 0.2".
func (b *Body) Source() string {
	if b.Shape == nil {
		return b.File
	}
	return b.Shape.String() + fmt.Sprintf(" mesh_size %g", b.MeshSize)
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

// Sweep moves one body along a direction, either to given gaps or by given
// offsets.
type Sweep struct {
	Body      int    // index into Job.Bodies of the moving body
	Direction r3.Vec // unit vector
	// Exactly one of Gaps and Offsets is set. Gaps are closest
	// surface-to-surface distances (> 0): the body approaches the others
	// travelling along Direction and is placed, for each gap, on the side
	// Direction comes from. Offsets are displacements along Direction from
	// the body's position. Both in L0.
	Gaps    []float64
	Offsets []float64
	// Lines holds the job-file line of each gap or offset.
	Lines []int
}

// Len returns the number of sweep points.
func (s *Sweep) Len() int { return len(s.Gaps) + len(s.Offsets) }
