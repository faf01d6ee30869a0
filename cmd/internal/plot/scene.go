package plot

import (
	"errors"
	"fmt"
	"image/color"
	"math"
	"strconv"

	"gonum.org/v1/gonum/spatial/r3"
	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/recorder"

	"github.com/fluctus/fluctus/cmd/internal/job"
	"github.com/fluctus/fluctus/mesh"
)

// Scene is what the scene figure draws: the bodies placed at one sweep
// point, in scene coordinates (the job's unit).
type Scene struct {
	Unit   string // unit label of the axes, e.g. "µm"
	Bodies []SceneBody
	// Substrate is the infinite plane under the scene, or nil.
	Substrate *Plane
	// Direction is the sweep direction ê; zero takes it from the closest
	// approach.
	Direction r3.Vec
	// Label says which placement is drawn, e.g. "sweep point 3 of 5".
	Label string
}

// SceneBody is one body of a Scene.
type SceneBody struct {
	Name   string
	Mesh   *mesh.Mesh
	Moving bool
}

// SceneAt returns the bodies of s placed at the sweep point of r with the
// smallest gap (the closest approach), with r's substrate. r must be the
// result of a run of s: its own points (those not added for an analysis)
// match the sweep points of s one to one, and the body names agree.
func SceneAt(s *job.Scene, r *Result) (*Scene, error) {
	var own []int // indices into r.Points of the job's sweep points
	for i, pt := range r.Points {
		if pt.AddedFor == "" {
			own = append(own, i)
		}
	}
	if len(s.Sweep.Offsets) != len(own) {
		return nil, fmt.Errorf("the job has %d sweep points but the result has %d: it is not the job of this run", len(s.Sweep.Offsets), len(own))
	}
	if len(s.Bodies) != len(r.Bodies) {
		return nil, fmt.Errorf("the job has %d bodies but the result has %d: it is not the job of this run", len(s.Bodies), len(r.Bodies))
	}
	for i, b := range s.Bodies {
		if b.Name != r.Bodies[i].Name {
			return nil, fmt.Errorf("body %d is %q in the job but %q in the result: it is not the job of this run", i+1, b.Name, r.Bodies[i].Name)
		}
	}
	p := 0 // the sweep point (index into own) of the smallest gap
	for k, i := range own {
		g, best := float64(r.Points[i].Gap), float64(r.Points[own[p]].Gap)
		if g < best || math.IsNaN(best) {
			p = k
		}
	}
	sc := &Scene{
		Unit:      r.unitLabel(),
		Substrate: r.Substrate,
		Direction: s.Sweep.Direction,
		Label:     fmt.Sprintf("sweep point %d of %d", p+1, len(own)),
	}
	for i, b := range s.Bodies {
		m := b.Mesh
		moving := i == s.Sweep.Body
		if moving {
			if len(s.Sweep.Turns) > 0 {
				if t := s.Sweep.Turns[p]; t.Angle != 0 && t.Axis != (r3.Vec{}) {
					m = m.Rotate(r3.Unit(t.Axis), t.Angle, t.Pivot)
				}
			}
			if off := s.Sweep.Offsets[p]; off != (r3.Vec{}) {
				m = m.Translate(off)
			}
		}
		sc.Bodies = append(sc.Bodies, SceneBody{Name: b.Name, Mesh: m, Moving: moving})
	}
	return sc, nil
}

// approach is the closest approach of the moving body to the others or to
// the substrate: the gap (unit) and the two closest points.
type approach struct {
	gap    float64
	pa, pb r3.Vec // on the moving body, on the other body or the plane
	ok     bool
}

func (s *Scene) approach() approach {
	var moving *mesh.Mesh
	for _, b := range s.Bodies {
		if b.Moving {
			moving = b.Mesh
		}
	}
	if moving == nil {
		return approach{}
	}
	best := approach{gap: math.Inf(1)}
	for _, b := range s.Bodies {
		if b.Moving {
			continue
		}
		if d, pa, pb := mesh.Gap(moving, b.Mesh); d < best.gap {
			best = approach{gap: d, pa: pa, pb: pb, ok: true}
		}
	}
	if pl := s.Substrate; pl != nil {
		q, n := vec(pl.Point), r3.Unit(vec(pl.Normal))
		// The distance of a polyhedron to a plane is reached at a vertex.
		for _, v := range moving.Vertices {
			if d := r3.Dot(r3.Sub(v, q), n); d < best.gap {
				best = approach{gap: d, pa: v, pb: r3.Sub(v, r3.Scale(d, n)), ok: true}
			}
		}
	}
	return best
}

func vec(a [3]float64) r3.Vec { return r3.Vec{X: a[0], Y: a[1], Z: a[2]} }

// view is the projection of the scene figure: horizontal coordinate p·u,
// vertical p·v with v = -ê, so that the moving body comes down onto the
// others.
type view struct{ u, v r3.Vec }

func newView(dir r3.Vec) view {
	e := r3.Unit(dir)
	// The world axis least aligned with ê, made perpendicular to it.
	axes := []r3.Vec{{X: 1}, {Y: 1}, {Z: 1}}
	a := axes[0]
	for _, c := range axes[1:] {
		if math.Abs(r3.Dot(c, e)) < math.Abs(r3.Dot(a, e)) {
			a = c
		}
	}
	u := r3.Unit(r3.Sub(a, r3.Scale(r3.Dot(a, e), e)))
	return view{u: u, v: r3.Scale(-1, e)}
}

func (w view) at(p r3.Vec) plotter.XY { return plotter.XY{X: r3.Dot(p, w.u), Y: r3.Dot(p, w.v)} }

// axisName names a unit vector: "x", "-z", or its components.
func axisName(a r3.Vec) string {
	names := []struct {
		v    r3.Vec
		name string
	}{{r3.Vec{X: 1}, "x"}, {r3.Vec{Y: 1}, "y"}, {r3.Vec{Z: 1}, "z"}}
	for _, n := range names {
		switch d := r3.Dot(a, n.v); {
		case d > 1-1e-12:
			return n.name
		case d < -1+1e-12:
			return "-" + n.name
		}
	}
	f := func(x float64) string { return strconv.FormatFloat(x, 'f', 3, 64) }
	return "(" + f(a.X) + ", " + f(a.Y) + ", " + f(a.Z) + ")·r"
}

// sceneFigure draws the triangle edges of every body projected on the view
// plane at equal scales, the substrate as a line with its side shaded, and
// the closest approach with its gap.
func sceneFigure(s *Scene) (*Figure, error) {
	if len(s.Bodies) == 0 {
		return nil, errors.New("scene figure: the scene has no bodies")
	}
	ap := s.approach()
	dir := s.Direction
	if dir == (r3.Vec{}) && ap.ok && ap.gap > 0 {
		dir = r3.Sub(ap.pb, ap.pa)
	}
	if dir == (r3.Vec{}) {
		dir = r3.Vec{Z: -1}
	}
	w := newView(dir)
	title := "Scene at the closest approach"
	p := newPlot(title, axisName(w.u)+" ["+s.Unit+"]", axisName(w.v)+" ["+s.Unit+"] (against the sweep direction)")

	var drawnLines []plotter.XYs // for placing the legend
	for i, b := range s.Bodies {
		c := palette[i%len(palette)]
		e := &edges{style: draw.LineStyle{Color: fade(c), Width: vg.Points(0.6)}}
		seen := make(map[[2]int]bool)
		for _, t := range b.Mesh.Triangles {
			for k := range 3 {
				i0, i1 := t[k], t[(k+1)%3]
				key := [2]int{min(i0, i1), max(i0, i1)}
				if seen[key] {
					continue
				}
				seen[key] = true
				e.segs = append(e.segs, [2]plotter.XY{w.at(b.Mesh.Vertices[i0]), w.at(b.Mesh.Vertices[i1])})
			}
		}
		p.Add(e)
		for _, sg := range e.segs {
			drawnLines = append(drawnLines, plotter.XYs{sg[0], sg[1]})
		}
		name := b.Name
		if b.Moving {
			name += " (moving)"
		}
		p.Legend.Add(name, e)
	}

	var sub *substrate
	if pl := s.Substrate; pl != nil {
		sub = &substrate{view: w, point: vec(pl.Point), normal: r3.Unit(vec(pl.Normal)),
			style: draw.LineStyle{Color: grey, Width: vg.Points(2)}}
		if ap.ok {
			sub.depth = ap.pa
		}
		p.Add(sub)
		p.Legend.Add("substrate", sub)
		// Show a band of the substrate below its surface, a tenth of the
		// scene deep.
		foot := sub.point
		if ap.ok {
			foot = ap.pb
		}
		depth := 0.1 * max(p.X.Max-p.X.Min, p.Y.Max-p.Y.Min)
		for _, q := range []plotter.XY{w.at(foot), w.at(r3.Sub(foot, r3.Scale(depth, sub.normal)))} {
			p.X.Min, p.X.Max = min(p.X.Min, q.X), max(p.X.Max, q.X)
			p.Y.Min, p.Y.Max = min(p.Y.Min, q.Y), max(p.Y.Max, q.Y)
		}
	}

	if ap.ok {
		a, b := w.at(ap.pa), w.at(ap.pb)
		link, err := plotter.NewLine(plotter.XYs{a, b})
		if err != nil {
			return nil, fmt.Errorf("scene figure: %w", err)
		}
		link.Color, link.Width = black, vg.Points(1.2)
		dots, err := plotter.NewScatter(plotter.XYs{a, b})
		if err != nil {
			return nil, fmt.Errorf("scene figure: %w", err)
		}
		dots.Color, dots.Radius, dots.Shape = black, vg.Points(2.5), draw.CircleGlyph{}
		label, err := plotter.NewLabels(plotter.XYLabels{
			XYs:    plotter.XYs{{X: (a.X + b.X) / 2, Y: (a.Y + b.Y) / 2}},
			Labels: []string{" gap " + strconv.FormatFloat(ap.gap, 'g', 4, 64) + " " + s.Unit},
		})
		if err != nil {
			return nil, fmt.Errorf("scene figure: %w", err)
		}
		for i := range label.TextStyle {
			label.TextStyle[i].Font = font.From(sans, labelSize)
			label.TextStyle[i].YAlign = draw.YCenter
		}
		p.Add(link, dots, label)
		p.Legend.Add("closest approach", link, dots)
	}
	if err := equalScales(p, figWidth, figHeight); err != nil {
		return nil, fmt.Errorf("scene figure: %w", err)
	}
	if sub != nil {
		if _, trace := sub.clip(p.X.Min, p.X.Max, p.Y.Min, p.Y.Max); trace != nil {
			drawnLines = append(drawnLines, trace)
		}
	}
	placeLegend(p, drawnLines)
	caption := fmt.Sprintf("The triangle edges of every body (%s), projected onto the plane of the sweep direction ê, which points down the page, and a perpendicular, at equal scales.", s.Label)
	if ap.ok {
		caption += fmt.Sprintf(" The segment joins the closest points of the moving body and its nearest neighbour, %s %s apart.", strconv.FormatFloat(ap.gap, 'g', 4, 64), s.Unit)
	}
	return &Figure{Name: "scene", Title: "Scene", Caption: caption, Plot: p, Width: figWidth, Height: figHeight}, nil
}

// fade lightens a colour for dense wireframes.
func fade(c color.Color) color.Color {
	r, g, b, _ := c.RGBA()
	return color.NRGBA{R: uint8(r >> 8), G: uint8(g >> 8), B: uint8(b >> 8), A: 170}
}

// equalScales sets the axis ranges of p so that one unit has the same length
// on both axes when p is drawn at w × h, keeping the data centred.
func equalScales(p *gplot.Plot, w, h vg.Length) error {
	xmin, xmax, ymin, ymax := p.X.Min, p.X.Max, p.Y.Min, p.Y.Max
	if !finite(xmin) || !finite(xmax) || !finite(ymin) || !finite(ymax) {
		return errors.New("the scene has no finite extent")
	}
	cx, cy := (xmin+xmax)/2, (ymin+ymax)/2
	sx, sy := (xmax-xmin)*1.15, (ymax-ymin)*1.15
	if sx == 0 && sy == 0 {
		sx, sy = 1, 1
	}
	// The data area depends on the tick labels, which depend on the ranges:
	// iterate until it no longer changes (two or three rounds in practice).
	var dw, dh float64
	for range 8 {
		da := dataArea(p, draw.NewCanvas(new(recorder.Canvas), w, h))
		w1, h1 := float64(da.Max.X-da.Min.X), float64(da.Max.Y-da.Min.Y)
		if w1 <= 0 || h1 <= 0 {
			return errors.New("the figure is too small for its labels")
		}
		if w1 == dw && h1 == dh {
			break
		}
		dw, dh = w1, h1
		scale := max(sx/dw, sy/dh) // data units per point
		p.X.Min, p.X.Max = cx-scale*dw/2, cx+scale*dw/2
		p.Y.Min, p.Y.Max = cy-scale*dh/2, cy+scale*dh/2
	}
	return nil
}

// edges draws line segments given in data coordinates.
type edges struct {
	segs  [][2]plotter.XY
	style draw.LineStyle
}

// Plot draws the segments, clipped to the data area.
func (e *edges) Plot(c draw.Canvas, p *gplot.Plot) {
	trX, trY := p.Transforms(&c)
	for _, s := range e.segs {
		line := []vg.Point{{X: trX(s[0].X), Y: trY(s[0].Y)}, {X: trX(s[1].X), Y: trY(s[1].Y)}}
		c.StrokeLines(e.style, c.ClipLinesXY(line)...)
	}
}

// DataRange returns the extent of the segments.
func (e *edges) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, ymin = math.Inf(1), math.Inf(1)
	xmax, ymax = math.Inf(-1), math.Inf(-1)
	for _, s := range e.segs {
		for _, q := range s {
			xmin, xmax = min(xmin, q.X), max(xmax, q.X)
			ymin, ymax = min(ymin, q.Y), max(ymax, q.Y)
		}
	}
	return xmin, xmax, ymin, ymax
}

// Thumbnail draws the legend sample.
func (e *edges) Thumbnail(c *draw.Canvas) {
	sty := e.style
	sty.Width = vg.Points(2)
	y := c.Center().Y
	c.StrokeLine2(sty, c.Min.X, y, c.Max.X, y)
}

// substrate draws the trace of an infinite plane in the view plane through
// depth as a line, and shades the side away from the bodies.
type substrate struct {
	view          view
	point, normal r3.Vec
	depth         r3.Vec // a point whose depth along u × v the trace is taken at
	style         draw.LineStyle
}

// line returns the trace a·x + b·y = c of the plane in view coordinates.
func (s *substrate) line() (a, b, c float64) {
	wn := r3.Cross(s.view.u, s.view.v)
	off := r3.Scale(r3.Dot(s.depth, wn), wn)
	return r3.Dot(s.view.u, s.normal), r3.Dot(s.view.v, s.normal), r3.Dot(r3.Sub(s.point, off), s.normal)
}

// clip returns the part of the rectangle [xmin, xmax] × [ymin, ymax] behind
// the plane (a polygon) and the plane's trace across it (two points, or
// none when it misses the rectangle or lies in the view plane).
func (s *substrate) clip(xmin, xmax, ymin, ymax float64) (behind, trace []plotter.XY) {
	a, b, k := s.line()
	if math.Hypot(a, b) < 1e-9 {
		return nil, nil // the plane is parallel to the view: no trace
	}
	// Sutherland–Hodgman against the half-plane a x + b y ≤ k.
	rect := []plotter.XY{{X: xmin, Y: ymin}, {X: xmax, Y: ymin}, {X: xmax, Y: ymax}, {X: xmin, Y: ymax}}
	inside := func(q plotter.XY) float64 { return k - (a*q.X + b*q.Y) }
	for i, q := range rect {
		r := rect[(i+1)%len(rect)]
		fq, fr := inside(q), inside(r)
		if fq >= 0 {
			behind = append(behind, q)
		}
		if (fq >= 0) != (fr >= 0) {
			t := fq / (fq - fr)
			x := plotter.XY{X: q.X + t*(r.X-q.X), Y: q.Y + t*(r.Y-q.Y)}
			behind = append(behind, x)
			trace = append(trace, x)
		}
	}
	if len(trace) != 2 {
		trace = nil
	}
	return behind, trace
}

// Plot shades the part of the data area on the far side of the plane and
// draws its trace.
func (s *substrate) Plot(c draw.Canvas, p *gplot.Plot) {
	poly, trace := s.clip(p.X.Min, p.X.Max, p.Y.Min, p.Y.Max)
	trX, trY := p.Transforms(&c)
	pts := func(xs []plotter.XY) []vg.Point {
		out := make([]vg.Point, len(xs))
		for i, q := range xs {
			out[i] = vg.Point{X: trX(q.X), Y: trY(q.Y)}
		}
		return out
	}
	if len(poly) >= 3 {
		c.FillPolygon(color.NRGBA{R: 120, G: 120, B: 120, A: 50}, pts(poly))
	}
	if trace != nil {
		c.StrokeLines(s.style, pts(trace))
	}
}

// Thumbnail draws the legend sample.
func (s *substrate) Thumbnail(c *draw.Canvas) {
	y := c.Center().Y
	c.StrokeLine2(s.style, c.Min.X, y, c.Max.X, y)
}
