package job

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/scatter/material"
)

// Scene is a job made concrete: the bodies' meshes placed in scene
// coordinates and the placements of the moving body. Lengths in L0.
type Scene struct {
	Job    *Job
	Bodies []scatter.Body
	Sweep  scatter.Sweep
	// Substrate is the job's conducting plane, nil when it has none.
	Substrate *scatter.Plane
	// MeshScale is the factor applied to every mesh size of the job (1 for
	// the job as written; smaller for the finer levels of a convergence
	// study).
	MeshScale float64
	// Plates is the Lifshitz energy per area of the bodies' materials for
	// the PFA baseline (see MakePlates); nil when every body is a perfect
	// conductor or it has not been made.
	Plates *scatter.PlateTable
}

// Build generates or loads the mesh of every body, checks it (Validate),
// rotates it about its own origin, moves it to its position and resolves the
// sweep:
//
//   - in a gap sweep the moving body approaches the others travelling along
//     the direction, and for each gap it is put at the offset along the
//     direction that leaves that closest distance to the other bodies on the
//     side the direction comes from (mesh.OffsetForGap along -direction);
//     with a substrate the gap is the height of the body's lowest point
//     above the plane;
//   - an angle sweep turns the body about the axis through the rotation
//     point (default: the body's volume centroid) and takes torques about
//     that point.
//
// Bodies with a graded mesh size are meshed at their far size first, the
// sweep is resolved, and they are then meshed again (generated shapes) or
// refined (files), fine where they come closest to the other bodies or the
// substrate at the sweep's closest placement; the sweep is then resolved
// again with the final meshes. Errors name the job file, the line and the
// body.
func (j *Job) Build() (*Scene, error) { return j.BuildScaled(1) }

// BuildScaled is Build with every mesh size of the job multiplied by scale
// (> 0): uniform sizes, and both ends of graded ranges. Files without a
// graded size are used as they are at every scale.
func (j *Job) BuildScaled(scale float64) (*Scene, error) {
	if !(scale > 0) || math.IsInf(scale, 0) {
		return nil, fmt.Errorf("mesh scale %g: must be a positive number", scale)
	}
	s := &Scene{Job: j, Substrate: j.Substrate.Plane(), MeshScale: scale}
	graded := false
	for i := range j.Bodies {
		b := &j.Bodies[i]
		if err := j.readMaterial(b); err != nil {
			return nil, err
		}
		m, err := b.mesh(scale, nil)
		if err != nil {
			return nil, j.bodyError(b, err)
		}
		s.Bodies = append(s.Bodies, scatter.Body{Name: b.Name, Mesh: m, Material: b.Material})
		graded = graded || b.Grading != nil
	}
	if err := s.checkFixedOverSubstrate(); err != nil {
		return nil, err
	}
	if err := s.resolve(); err != nil {
		return nil, err
	}
	if !graded {
		return s, nil
	}
	if err := s.grade(); err != nil {
		return nil, err
	}
	if err := s.resolve(); err != nil {
		return nil, err
	}
	return s, nil
}

// mesh generates or loads the body's mesh, checks it and places it in the
// scene. Sizes are multiplied by scale. size, if not nil, grades the mesh:
// it gives the triangle size at a point of the scene (the body's own frame
// is mapped there by the body's placement); with a nil size a graded body
// is meshed uniformly at its far size and a file is used as it is.
func (b *Body) mesh(scale float64, size func(r3.Vec) float64) (*mesh.Mesh, error) {
	m, err := b.ownMesh(scale, size)
	if err != nil {
		return nil, err
	}
	if err := m.Validate(); err != nil {
		return nil, fmt.Errorf("%w; repair the mesh (fluctus mesh info shows every problem)", err)
	}
	if r := b.Rotation; r != nil && r.Degrees != 0 {
		m = m.Rotate(r.Axis, r.Degrees*math.Pi/180, r3.Vec{})
	}
	if b.Position != (r3.Vec{}) {
		m = m.Translate(b.Position)
	}
	m.Name = b.Name
	return m, nil
}

// place maps a point of the body's own frame into the scene.
func (b *Body) place(p r3.Vec) r3.Vec {
	if r := b.Rotation; r != nil && r.Degrees != 0 {
		p = r3.NewRotation(r.Degrees*math.Pi/180, r.Axis).Rotate(p)
	}
	return r3.Add(p, b.Position)
}

// ownMesh generates or loads the body's mesh in its own coordinates.
func (b *Body) ownMesh(scale float64, size func(r3.Vec) float64) (*mesh.Mesh, error) {
	var own func(r3.Vec) float64
	if size != nil {
		own = func(p r3.Vec) float64 { return size(b.place(p)) }
	}
	if b.Shape == nil {
		m, err := mesh.Load(b.File)
		if err != nil {
			return nil, err
		}
		if own == nil || b.Grading == nil {
			return m, nil
		}
		if err := m.Validate(); err != nil {
			return nil, fmt.Errorf("%w; repair the mesh (fluctus mesh info shows every problem)", err)
		}
		g := b.grading(scale)
		clamped := func(p r3.Vec) float64 { return math.Max(g.Near, math.Min(g.Far, own(p))) }
		r, err := mesh.Refine(m, clamped, nil)
		if err != nil {
			return nil, fmt.Errorf("%s: refining to mesh_size {near: %g, far: %g}: %w", b.File, g.Near, g.Far, err)
		}
		return r, nil
	}
	sh := b.Shape
	if b.Grading == nil {
		h := b.MeshSize * scale
		switch sh.Kind {
		case Sphere:
			return mesh.Sphere(sh.Radius, h)
		case Box:
			return mesh.Box(sh.Size, h)
		case Plate:
			return mesh.Plate(sh.Width, sh.Depth, sh.Thickness, h)
		case Cylinder:
			return mesh.Cylinder(sh.Radius, sh.Height, h)
		}
		return nil, fmt.Errorf("unknown shape %q", sh.Kind)
	}
	g := b.grading(scale)
	switch sh.Kind {
	case Sphere:
		return mesh.GradedSphere(sh.Radius, g, own)
	case Box:
		return mesh.GradedBox(sh.Size, g, own)
	case Plate:
		return mesh.GradedPlate(sh.Width, sh.Depth, sh.Thickness, g, own)
	case Cylinder:
		return mesh.GradedCylinder(sh.Radius, sh.Height, g, own)
	}
	return nil, fmt.Errorf("unknown shape %q", sh.Kind)
}

// grading returns the body's graded size range scaled by scale.
func (b *Body) grading(scale float64) mesh.Grading {
	return mesh.Grading{Near: b.Grading.Near * scale, Far: b.Grading.Far * scale}
}

// readMaterial reads the optical-data table of a {table: FILE} material
// into b.Material (once).
func (j *Job) readMaterial(b *Body) error {
	if b.materialSpec == nil || b.Material != nil {
		return nil
	}
	m, err := material.Parse(b.materialSpec, b.materialDir)
	if err != nil {
		return &Error{File: j.Path, Line: b.MaterialLine, Key: fmt.Sprintf("body %q: material", b.Name), Problem: materialProblem(b.materialSpec, err)}
	}
	b.Material = m
	return nil
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

// resolve computes the placements of the moving body at every sweep point
// and the point torques are taken about, from the current meshes.
func (s *Scene) resolve() error {
	j := s.Job
	sw := j.Sweep
	moving := s.Bodies[sw.Body].Mesh
	centroid := moving.Stats().Centroid
	s.Sweep = scatter.Sweep{Body: sw.Body, Direction: sw.Direction, Centre: centroid}
	if j.TorqueAbout != nil {
		s.Sweep.Centre = *j.TorqueAbout
	}
	switch sw.Kind() {
	case ByOffsets:
		for _, off := range sw.Offsets {
			s.Sweep.Offsets = append(s.Sweep.Offsets, r3.Scale(off, sw.Direction))
		}
	case ByGaps:
		offs, err := s.offsetsForGaps(sw.Gaps, sw.Lines)
		if err != nil {
			return err
		}
		s.Sweep.Offsets = offs
	case ByAngles:
		pivot := centroid
		if sw.Rotate.Point != nil {
			pivot = *sw.Rotate.Point
		}
		s.Sweep.Centre = pivot
		for _, a := range sw.Rotate.Degrees {
			s.Sweep.Turns = append(s.Sweep.Turns, scatter.Turn{Axis: sw.Rotate.Axis, Angle: a * math.Pi / 180, Pivot: pivot})
			s.Sweep.Offsets = append(s.Sweep.Offsets, r3.Vec{})
		}
		if s.Sweep.Direction == (r3.Vec{}) {
			s.Sweep.Direction = s.approach()
		}
	}
	return nil
}

// offsetsForGaps returns the offsets of the moving body that put it at the
// given gaps (L0); lines, if not nil, holds the job-file line of each gap
// for messages.
func (s *Scene) offsetsForGaps(gaps []float64, lines []int) ([]r3.Vec, error) {
	j := s.Job
	sw := j.Sweep
	name := j.Bodies[sw.Body].Name
	fail := func(i int, format string, args ...any) error {
		e := &Error{File: j.Path, Key: fmt.Sprintf("sweep.gaps[%d]", i), Problem: fmt.Sprintf(format, args...)}
		if lines != nil {
			e.Line = lines[i]
		} else {
			e.Key = "sweep"
		}
		return e
	}
	moving, others := s.split()
	offs := make([]r3.Vec, len(gaps))
	if s.Substrate != nil {
		// The plane-distance version of mesh.OffsetForGap: a translation by
		// t along ê raises every point by t (ê·n), so the lowest vertex
		// stays the lowest and reaches the height g at t = (g - h0)/(ê·n).
		n := s.Substrate.Normal
		en := r3.Dot(sw.Direction, n)
		if !(en < -1e-9) {
			return nil, fail(0, "with a substrate the gaps are measured to the plane, so sweep.direction must point towards it (its component along the substrate normal (%g, %g, %g) is %.3g): give a direction with a negative component along the normal, or use offsets",
				n.X, n.Y, n.Z, en)
		}
		h0 := s.lowest(moving)
		for i, g := range gaps {
			offs[i] = r3.Scale((g-h0)/en, sw.Direction)
		}
		return offs, nil
	}
	// The body approaches the others travelling along the direction, so it
	// sits on the side the direction comes from: of the offsets along
	// -direction that leave the gap, OffsetForGap returns the one farthest
	// back.
	back := r3.Scale(-1, sw.Direction)
	for i, g := range gaps {
		t, err := mesh.OffsetForGap(moving, others, back, g)
		if err != nil {
			return nil, fail(i, "cannot place body %q at gap %g: %v", name, g, err)
		}
		offs[i] = r3.Scale(t, back)
	}
	return offs, nil
}

// lowest returns the smallest height of a vertex of m above the substrate.
// neighbours returns the surfaces around body i — the other bodies' trees
// and the substrate patch, if any — and the smallest gap from body i to
// them, with the bodies placed as in placed.
func (s *Scene) neighbours(i int, trees []*mesh.Tree, plane *mesh.Tree, placed []*mesh.Mesh) ([]*mesh.Tree, float64) {
	var others []*mesh.Tree
	d := math.Inf(1)
	for k, t := range trees {
		if k != i {
			others = append(others, t)
			g, _, _ := trees[i].Gap(t)
			d = math.Min(d, g)
		}
	}
	if plane != nil {
		others = append(others, plane)
		d = math.Min(d, s.lowest(placed[i]))
	}
	return others, d
}

func (s *Scene) lowest(m *mesh.Mesh) float64 {
	h := math.Inf(1)
	for _, t := range m.Triangles {
		for _, v := range t {
			h = math.Min(h, s.height(m.Vertices[v]))
		}
	}
	return h
}

// height is the signed distance of p above the substrate.
func (s *Scene) height(p r3.Vec) float64 {
	return r3.Dot(r3.Sub(p, s.Substrate.Point), s.Substrate.Normal)
}

// approach returns the unit vector from the moving body's closest point to
// its nearest neighbour's (or straight down onto the substrate) at the
// sweep's closest placement: the default direction of the PFA estimate of an
// angle sweep.
func (s *Scene) approach() r3.Vec {
	p := s.closest()
	moved := s.Placed(p)
	if s.Substrate != nil && len(s.Bodies) == 1 {
		return r3.Scale(-1, s.Substrate.Normal)
	}
	best, dir := math.Inf(1), r3.Vec{}
	for i, b := range s.Bodies {
		if i == s.Sweep.Body {
			continue
		}
		d, pa, pb := mesh.Gap(moved, b.Mesh)
		if d < best && d > 0 {
			best, dir = d, r3.Unit(r3.Sub(pb, pa))
		}
	}
	if s.Substrate != nil && (s.lowest(moved) < best || dir == (r3.Vec{})) {
		return r3.Scale(-1, s.Substrate.Normal)
	}
	if dir == (r3.Vec{}) {
		// The bodies touch; Clearance reports it.
		return r3.Vec{Z: -1}
	}
	return dir
}

// Placed returns the mesh of the moving body at sweep point p: turned, then
// displaced.
func (s *Scene) Placed(p int) *mesh.Mesh {
	return PlaceMesh(s.Bodies[s.Sweep.Body].Mesh, s.Sweep, p)
}

// PlaceMesh returns m turned by sw.Turns[p] (when the sweep has turns) and
// then moved by sw.Offsets[p], as the solver places the moving body.
func PlaceMesh(m *mesh.Mesh, sw scatter.Sweep, p int) *mesh.Mesh {
	if len(sw.Turns) > 0 {
		if t := sw.Turns[p]; t.Angle != 0 && t.Axis != (r3.Vec{}) {
			m = m.Rotate(t.Axis, t.Angle, t.Pivot)
		}
	}
	if sw.Offsets[p] != (r3.Vec{}) {
		m = m.Translate(sw.Offsets[p])
	}
	return m
}

// placePoint maps a point fixed to the moving body at its reference
// placement to sweep point p.
func placePoint(q r3.Vec, sw scatter.Sweep, p int) r3.Vec {
	if len(sw.Turns) > 0 {
		if t := sw.Turns[p]; t.Angle != 0 && t.Axis != (r3.Vec{}) {
			q = r3.Add(t.Pivot, r3.NewRotation(t.Angle, t.Axis).Rotate(r3.Sub(q, t.Pivot)))
		}
	}
	return r3.Add(q, sw.Offsets[p])
}

// split returns the moving body's mesh at its start position and the
// meshes of the others.
func (s *Scene) split() (moving *mesh.Mesh, others []*mesh.Mesh) {
	for i, b := range s.Bodies {
		if i == s.Job.Sweep.Body {
			moving = b.Mesh
		} else {
			others = append(others, b.Mesh)
		}
	}
	return moving, others
}

// distance returns the gap of the moving body at sweep point p as the
// sweep measures it (to the substrate when there is one, else to the nearest
// other body), without checking for overlaps.
func (s *Scene) distance(p int) float64 {
	moved := s.Placed(p)
	if s.Substrate != nil {
		return s.lowest(moved)
	}
	d := math.Inf(1)
	for i, b := range s.Bodies {
		if i != s.Sweep.Body {
			g, _, _ := mesh.Gap(moved, b.Mesh)
			d = math.Min(d, g)
		}
	}
	return d
}

// closest returns the sweep point at which the moving body comes closest.
func (s *Scene) closest() int {
	best, at := math.Inf(1), 0
	for p := range s.Sweep.Offsets {
		if d := s.distance(p); d < best {
			best, at = d, p
		}
	}
	return at
}

// grade meshes every body with a graded size again, fine where it is close
// to the other bodies or the substrate at the sweep's closest placement.
func (s *Scene) grade() error {
	j := s.Job
	// A placement that touches or crosses is reported as Clearance would
	// report it with the final meshes.
	if _, err := s.Clearance(); err != nil {
		return err
	}
	p := s.closest()
	placed := make([]*mesh.Mesh, len(s.Bodies))
	for i, b := range s.Bodies {
		placed[i] = b.Mesh
	}
	placed[s.Sweep.Body] = s.Placed(p)
	trees := make([]*mesh.Tree, len(placed))
	for i, m := range placed {
		trees[i] = mesh.NewTree(m)
	}
	var plane *mesh.Tree
	if s.Substrate != nil {
		plane = mesh.NewTree(planePatch(s.Substrate, placed))
	}
	for i := range j.Bodies {
		b := &j.Bodies[i]
		if b.Grading == nil {
			continue
		}
		others, dmin := s.neighbours(i, trees, plane, placed)
		if !(dmin > 0) {
			return j.bodyError(b, fmt.Errorf("it touches or overlaps another body or the substrate at sweep point %d (%s), so its mesh cannot be graded: choose larger gaps", p+1, s.pointLabel(p)))
		}
		size := b.grading(s.MeshScale).SizeFunc(others, dmin)
		if i == s.Sweep.Body {
			// The size function is known at the closest placement; the
			// mesh is built at the body's reference placement.
			at := size
			sw := s.Sweep
			size = func(q r3.Vec) float64 { return at(placePoint(q, sw, p)) }
		}
		m, err := b.mesh(s.MeshScale, size)
		if err != nil {
			return j.bodyError(b, err)
		}
		s.Bodies[i].Mesh = m
	}
	return nil
}

// planePatch returns a square of the substrate plane (two triangles) that
// holds the nearest plane point of every vertex of the meshes, with room to
// spare, so that distances to it are distances to the plane there.
func planePatch(pl *scatter.Plane, around []*mesh.Mesh) *mesh.Mesh {
	n := pl.Normal
	u := r3.Cross(n, r3.Vec{X: 1})
	if r3.Norm(u) < 0.5 {
		u = r3.Cross(n, r3.Vec{Y: 1})
	}
	u = r3.Unit(u)
	v := r3.Cross(n, u)
	foot := func(p r3.Vec) r3.Vec { return r3.Sub(p, r3.Scale(r3.Dot(r3.Sub(p, pl.Point), n), n)) }
	var c r3.Vec
	count := 0
	for _, m := range around {
		for _, p := range m.Vertices {
			c = r3.Add(c, foot(p))
			count++
		}
	}
	if count > 0 {
		c = r3.Scale(1/float64(count), c)
	} else {
		c = pl.Point
	}
	reach := 1.0
	for _, m := range around {
		for _, p := range m.Vertices {
			reach = math.Max(reach, r3.Norm(r3.Sub(p, c)))
		}
	}
	half := 4 * reach
	corner := func(a, b float64) r3.Vec { return r3.Add(c, r3.Add(r3.Scale(a*half, u), r3.Scale(b*half, v))) }
	return &mesh.Mesh{
		Name:      "substrate",
		Vertices:  []r3.Vec{corner(-1, -1), corner(1, -1), corner(1, 1), corner(-1, 1)},
		Triangles: [][3]int{{0, 1, 2}, {0, 2, 3}},
	}
}

// touchFraction sets the touching threshold of Clearance: bodies closer than
// this fraction of the scene's size count as touching (rounding level of a
// gap computed from coordinates of that size, with a wide margin).
const touchFraction = 1e-9

// Clearance checks every sweep point and returns the gap of the moving body
// at each (L0): the closest surface-to-surface distance to the other bodies,
// or with a substrate the height of its lowest point above the plane. It
// fails, naming the point and the bodies, when at some point the moving body
// overlaps or touches another or touches or crosses the substrate; the fixed
// bodies are checked against each other and the substrate too.
func (s *Scene) Clearance() ([]float64, error) {
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
	if err := s.checkFixedOverSubstrate(); err != nil {
		return nil, err
	}
	gaps := make([]float64, len(s.Sweep.Offsets))
	for p := range s.Sweep.Offsets {
		moved := s.Placed(p)
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
		if s.Substrate != nil {
			h, err := s.overSubstrate(p, moved, s.Sweep.Body, tol)
			if err != nil {
				return nil, err
			}
			gaps[p] = h
		}
	}
	return gaps, nil
}

// checkFixedOverSubstrate checks that no fixed body touches or crosses the
// substrate.
func (s *Scene) checkFixedOverSubstrate() error {
	if s.Substrate == nil {
		return nil
	}
	tol := touchFraction * s.size()
	for i, b := range s.Bodies {
		if i == s.Job.Sweep.Body {
			continue
		}
		if _, err := s.overSubstrate(-1, b.Mesh, i, tol); err != nil {
			return err
		}
	}
	return nil
}

// overSubstrate returns the height of the lowest point of mesh m (of body
// i) above the substrate, or an error when it touches or crosses the plane
// at sweep point p (-1 for a fixed body).
func (s *Scene) overSubstrate(p int, m *mesh.Mesh, i int, tol float64) (float64, error) {
	j := s.Job
	h, at := math.Inf(1), r3.Vec{}
	for _, t := range m.Triangles {
		for _, v := range t {
			if y := s.height(m.Vertices[v]); y < h {
				h, at = y, m.Vertices[v]
			}
		}
	}
	if h > tol {
		return h, nil
	}
	what := "touches"
	if h < -tol {
		what = "crosses"
	}
	line, key, where, fix := j.Bodies[i].Line, fmt.Sprintf("body %q", j.Bodies[i].Name), "", "raise it (position) above the substrate"
	if p >= 0 {
		line, key = j.Sweep.Lines[p], "sweep"
		where = fmt.Sprintf(" at sweep point %d (%s)", p+1, s.pointLabel(p))
		fix = "choose larger gaps or smaller angles, or another direction"
	}
	return 0, &Error{File: j.Path, Line: line, Key: key,
		Problem: fmt.Sprintf("body %q %s the substrate%s: its lowest point (%.4g, %.4g, %.4g) is %.3g %s from the plane; %s",
			j.Bodies[i].Name, what, where, at.X, at.Y, at.Z, h, j.Unit.Name(), fix)}
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
		if j.Sweep.Kind() == ByAngles {
			fix = "choose smaller angles, or another axis or rotation point"
		}
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
	switch sw.Kind() {
	case ByAngles:
		return fmt.Sprintf("angle %g degrees", sw.Rotate.Degrees[p])
	case ByOffsets:
		return fmt.Sprintf("offset %g %s", sw.Offsets[p], u)
	}
	return fmt.Sprintf("gap %g %s", sw.Gaps[p], u)
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

// CheckSweep checks what can only be checked once the scene is built and
// its gaps are known (from Clearance): that an angle sweep brings the body
// closer as the angle grows, and that the rest gap of a spring on an offset
// sweep lies within the sweep's gaps.
func (s *Scene) CheckSweep(gaps []float64) error {
	j := s.Job
	sw := j.Sweep
	if sw.Kind() == ByAngles {
		order := make([]int, len(gaps))
		for i := range order {
			order[i] = i
		}
		slices.SortStableFunc(order, func(a, b int) int {
			return cmpFloat(sw.Rotate.Degrees[a], sw.Rotate.Degrees[b])
		})
		for k := 1; k < len(order); k++ {
			a, b := order[k-1], order[k]
			if sw.Rotate.Degrees[a] == sw.Rotate.Degrees[b] {
				return &Error{File: j.Path, Line: sw.Lines[b], Key: "sweep.rotate.degrees",
					Problem: fmt.Sprintf("the angle %g is given twice: give every angle once", sw.Rotate.Degrees[b])}
			}
			if !(gaps[b] < gaps[a]) {
				return &Error{File: j.Path, Line: sw.Lines[b], Key: "sweep.rotate",
					Problem: fmt.Sprintf("the gap does not shrink as the angle grows: %.4g %s at %g degrees, %.4g %s at %g degrees; the angles must turn the body towards its neighbour, so flip the axis (or the sign of the angles), or keep the angles on one side of the parallel position",
						gaps[a], j.Unit.Name(), sw.Rotate.Degrees[a], gaps[b], j.Unit.Name(), sw.Rotate.Degrees[b])}
			}
		}
	}
	if sp := j.Spring; sp != nil && sw.Kind() == ByOffsets {
		lo, hi := slices.Min(gaps), slices.Max(gaps)
		if sp.Rest < lo || sp.Rest > hi {
			u := j.Unit.Name()
			return &Error{File: j.Path, Line: sp.RestLine, Key: "spring.rest_gap",
				Problem: fmt.Sprintf("rest gap %g %s lies outside the gaps of the sweep's offsets, %.4g to %.4g %s: the analysis needs the load at the rest position, so extend the offsets to include it", sp.Rest, u, lo, hi, u)}
		}
	}
	return nil
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// Warnings returns advice on the scene's meshes: for every body, the
// triangles near its closest approach at the sweep point where the moving
// body comes closest that are larger than half the local gap (rule of
// thumb, common practice; mesh.CoarseNear), with where they are and the
// graded mesh size that would fix them. gaps are the gaps of Clearance.
func (s *Scene) Warnings(gaps []float64) []string {
	return s.warnings(s.Sweep, gaps, func(p int) string { return fmt.Sprintf("sweep point %d (%s)", p+1, s.pointLabel(p)) })
}

// WarningsAt is Warnings for another sweep of the moving body (SweepAt),
// whose points are labelled by what: e.g. "the sticking analysis".
func (s *Scene) WarningsAt(sw scatter.Sweep, gaps []float64, what string) []string {
	return s.warnings(sw, gaps, func(p int) string {
		return fmt.Sprintf("the point added for %s at gap %.4g %s", what, gaps[p], s.Job.Unit.Name())
	})
}

func (s *Scene) warnings(sw scatter.Sweep, gaps []float64, label func(p int) string) []string {
	if len(gaps) == 0 {
		return nil
	}
	p := 0
	for i, g := range gaps {
		if g < gaps[p] {
			p = i
		}
	}
	placed := make([]*mesh.Mesh, len(s.Bodies))
	for i, b := range s.Bodies {
		placed[i] = b.Mesh
	}
	placed[sw.Body] = PlaceMesh(s.Bodies[sw.Body].Mesh, sw, p)
	trees := make([]*mesh.Tree, len(placed))
	for i, m := range placed {
		trees[i] = mesh.NewTree(m)
	}
	var plane *mesh.Tree
	if s.Substrate != nil {
		plane = mesh.NewTree(planePatch(s.Substrate, placed))
	}
	var out []string
	u := s.Job.Unit.Name()
	for i, b := range s.Bodies {
		others, d := s.neighbours(i, trees, plane, placed)
		if summary := mesh.CoarseSummary(mesh.CoarseNear(placed[i], others, d), d); summary != "" {
			out = append(out, fmt.Sprintf("body %q at %s: %s (lengths in %s; expect a larger error there)", b.Name, label(p), summary, u))
		}
	}
	return out
}
