package job

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
	"github.com/fluctus/fluctus/scatter"
)

// Scene is a job made concrete: the bodies' meshes placed in scene
// coordinates and the displacements of the moving body. Lengths in L0.
type Scene struct {
	Job    *Job
	Bodies []scatter.Body
	Sweep  scatter.Sweep
}

// Build generates or loads the mesh of every body, checks it (Validate),
// rotates it about its own origin, moves it to its position and resolves the
// sweep: in a gap sweep the moving body approaches the others travelling
// along the direction, and for each gap it is put at the offset along the
// direction that leaves that closest distance to the other bodies on the
// side the direction comes from (mesh.OffsetForGap along -direction). Errors
// name the job file, the line and the body.
func (j *Job) Build() (*Scene, error) {
	s := &Scene{Job: j}
	for i := range j.Bodies {
		b := &j.Bodies[i]
		m, err := b.mesh()
		if err != nil {
			return nil, j.bodyError(b, err)
		}
		if err := m.Validate(); err != nil {
			return nil, j.bodyError(b, fmt.Errorf("%w; repair the mesh (fluctus mesh info shows every problem)", err))
		}
		if r := b.Rotation; r != nil && r.Degrees != 0 {
			m = m.Rotate(r.Axis, r.Degrees*math.Pi/180, r3.Vec{})
		}
		if b.Position != (r3.Vec{}) {
			m = m.Translate(b.Position)
		}
		m.Name = b.Name
		s.Bodies = append(s.Bodies, scatter.Body{Name: b.Name, Mesh: m})
	}

	sw := j.Sweep
	s.Sweep = scatter.Sweep{Body: sw.Body, Direction: sw.Direction}
	for _, off := range sw.Offsets {
		s.Sweep.Offsets = append(s.Sweep.Offsets, r3.Scale(off, sw.Direction))
	}
	if len(sw.Gaps) > 0 {
		// The body approaches the others travelling along the direction,
		// so it sits on the side the direction comes from: of the offsets
		// along -direction that leave the gap, OffsetForGap returns the
		// one farthest back.
		moving, others := s.split()
		back := r3.Scale(-1, sw.Direction)
		for i, g := range sw.Gaps {
			t, err := mesh.OffsetForGap(moving, others, back, g)
			if err != nil {
				return nil, &Error{File: j.Path, Line: sw.Lines[i], Key: fmt.Sprintf("sweep.gaps[%d]", i),
					Problem: fmt.Sprintf("cannot place body %q at gap %g: %v", j.Bodies[sw.Body].Name, g, err)}
			}
			s.Sweep.Offsets = append(s.Sweep.Offsets, r3.Scale(t, back))
		}
	}
	return s, nil
}

// mesh generates or loads the body's mesh in its own coordinates.
func (b *Body) mesh() (*mesh.Mesh, error) {
	if b.Shape == nil {
		m, err := mesh.Load(b.File)
		if err != nil {
			return nil, err
		}
		return m, nil
	}
	s, h := b.Shape, b.MeshSize
	switch s.Kind {
	case Sphere:
		return mesh.Sphere(s.Radius, h)
	case Box:
		return mesh.Box(s.Size, h)
	case Plate:
		return mesh.Plate(s.Width, s.Depth, s.Thickness, h)
	case Cylinder:
		return mesh.Cylinder(s.Radius, s.Height, h)
	}
	return nil, fmt.Errorf("unknown shape %q", s.Kind)
}

// bodyError places an error about a body's mesh at the body's entry. Mesh
// errors about files already name the file.
func (j *Job) bodyError(b *Body, err error) error {
	problem := err.Error()
	if b.Shape != nil {
		problem = b.Shape.String() + ": " + problem
	}
	return &Error{File: j.Path, Line: b.Line, Key: fmt.Sprintf("body %q", b.Name), Problem: problem}
}

// split returns the moving body's mesh at its start position and the
// meshes of the others.
func (s *Scene) split() (moving *mesh.Mesh, others []*mesh.Mesh) {
	for i, b := range s.Bodies {
		if i == s.Sweep.Body {
			moving = b.Mesh
		} else {
			others = append(others, b.Mesh)
		}
	}
	return moving, others
}

// touchFraction sets the touching threshold of Clearance: bodies closer than
// this fraction of the scene's size count as touching (rounding level of a
// gap computed from coordinates of that size, with a wide margin).
const touchFraction = 1e-9

// Clearance checks every sweep point and returns the closest
// surface-to-surface distance from the moving body to the others at each
// (L0). It fails, naming the point and the bodies, when at some point the
// moving body overlaps or touches another; the fixed bodies are checked
// against each other too.
func (s *Scene) Clearance() ([]float64, error) {
	moving, _ := s.split()
	tol := touchFraction * s.size()
	for i := range s.Bodies {
		for k := i + 1; k < len(s.Bodies); k++ {
			if i == s.Sweep.Body || k == s.Sweep.Body {
				continue
			}
			if _, err := s.clear(-1, s.Bodies[i].Mesh, s.Bodies[k].Mesh, i, k, tol); err != nil {
				return nil, err
			}
		}
	}
	gaps := make([]float64, len(s.Sweep.Offsets))
	for p, off := range s.Sweep.Offsets {
		moved := moving.Translate(off)
		gaps[p] = math.Inf(1)
		for i, b := range s.Bodies {
			if i == s.Sweep.Body {
				continue
			}
			d, err := s.clear(p, moved, b.Mesh, s.Sweep.Body, i, tol)
			if err != nil {
				return nil, err
			}
			gaps[p] = math.Min(gaps[p], d)
		}
	}
	return gaps, nil
}

// clear checks that bodies i and k (meshes a, b) neither overlap nor touch
// and returns their gap; p is the sweep point, or -1 for bodies that do not
// move.
func (s *Scene) clear(p int, a, b *mesh.Mesh, i, k int, tol float64) (float64, error) {
	j := s.Job
	where := "the fixed bodies"
	line, key := j.Bodies[k].Line, fmt.Sprintf("body %q", j.Bodies[k].Name)
	fix := "move them apart (position)"
	if p >= 0 {
		where = fmt.Sprintf("sweep point %d (%s)", p+1, s.pointLabel(p))
		line, key = j.Sweep.Lines[p], "sweep"
		fix = "choose larger gaps or offsets, or another direction"
	}
	d, pa, _ := mesh.Gap(a, b)
	if d <= tol {
		return 0, &Error{File: j.Path, Line: line, Key: key,
			Problem: fmt.Sprintf("at %s bodies %q and %q touch or overlap (their surfaces meet near (%.4g, %.4g, %.4g)); %s",
				where, j.Bodies[i].Name, j.Bodies[k].Name, pa.X, pa.Y, pa.Z, fix)}
	}
	if mesh.Overlap(a, b) {
		return 0, &Error{File: j.Path, Line: line, Key: key,
			Problem: fmt.Sprintf("at %s bodies %q and %q overlap (one lies inside the other); %s", where, j.Bodies[i].Name, j.Bodies[k].Name, fix)}
	}
	return d, nil
}

// pointLabel describes sweep point p as it was asked for.
func (s *Scene) pointLabel(p int) string {
	sw := s.Job.Sweep
	u := s.Job.Unit.Name()
	if len(sw.Gaps) > 0 {
		return fmt.Sprintf("gap %g %s", sw.Gaps[p], u)
	}
	return fmt.Sprintf("offset %g %s", sw.Offsets[p], u)
}

// size is the largest bounding-box diagonal of the bodies.
func (s *Scene) size() float64 {
	var l float64
	for _, b := range s.Bodies {
		st := b.Mesh.Stats()
		l = math.Max(l, r3.Norm(r3.Sub(st.Max, st.Min)))
	}
	return l
}

// Warnings returns advice on the scene's meshes for the given gaps at the
// sweep points: the triangles near the closest approach should be at most
// half the gap (rule of thumb, common practice).
func (s *Scene) Warnings(gaps []float64) []string {
	if len(gaps) == 0 {
		return nil
	}
	dmin := gaps[0]
	for _, g := range gaps[1:] {
		dmin = math.Min(dmin, g)
	}
	var out []string
	u := s.Job.Unit.Name()
	for _, b := range s.Bodies {
		st := b.Mesh.Stats()
		if st.MeanEdge > dmin/2 {
			out = append(out, fmt.Sprintf("body %q: mean triangle edge %.3g %s is more than half the smallest gap %.3g %s; refine the mesh (rule of thumb: edges at most half the gap near the closest approach) or expect a larger error there",
				b.Name, st.MeanEdge, u, dmin, u))
		}
	}
	return out
}
