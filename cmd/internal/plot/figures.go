package plot

import (
	"fmt"
	"math"
	"strconv"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Figure is one figure of a run, ready to render.
type Figure struct {
	Name    string // file name without extension, e.g. "energy"
	Title   string // heading in the report
	Caption string // what the figure shows
	Plot    *gplot.Plot
	Width   vg.Length
	Height  vg.Length
}

// Figures returns every figure r supports, in the order of the report, and
// notes on what was left out and why. sc is the scene to draw; nil leaves
// the scene figure out.
func Figures(r *Result, sc *Scene) ([]Figure, []string, error) {
	b := &builder{r: r}
	steps := []func() (*Figure, error){
		b.energy, b.force, b.stiffness, b.torque, b.torsionalStiffness,
		b.pfaRatio, b.integrand, b.sticking,
	}
	if sc != nil {
		steps = append(steps, func() (*Figure, error) { return sceneFigure(sc) })
	}
	var figs []Figure
	for _, step := range steps {
		f, err := step()
		if err != nil {
			return nil, nil, err
		}
		if f != nil {
			if f.Width == 0 {
				f.Width, f.Height = figWidth, figHeight
			}
			figs = append(figs, *f)
		}
	}
	return figs, b.notes, nil
}

// builder makes the figures of one result and collects the notes.
type builder struct {
	r     *Result
	notes []string
}

func (b *builder) note(format string, args ...any) {
	b.notes = append(b.notes, fmt.Sprintf(format, args...))
}

// sweepVar is the quantity the sweep varies, on the horizontal axis of the
// result figures: the gap (logarithmic) or, for an angle sweep, the angle.
type sweepVar struct {
	label string
	log   bool
	of    func(*Point) float64
	// legend formats the value of one point for a legend.
	legend func(*Point) string
}

func (b *builder) sweepVar() sweepVar {
	if b.r.angleSweep() {
		return sweepVar{
			label:  "angle [°]",
			of:     func(p *Point) float64 { return val(p.AngleDeg) },
			legend: func(p *Point) string { return "θ = " + strconv.FormatFloat(val(p.AngleDeg), 'g', 4, 64) + "°" },
		}
	}
	u := b.r.unitLabel()
	return sweepVar{
		label:  "gap [" + u + "]",
		log:    true,
		of:     func(p *Point) float64 { return float64(p.Gap) },
		legend: func(p *Point) string { return "gap " + strconv.FormatFloat(float64(p.Gap), 'g', 4, 64) + " " + u },
	}
}

// curve plots |value| (or the value, when signed) of every point against
// the sweep variable as a series.
func (b *builder) curve(x sweepVar, name string, abs bool, value, err func(*Point) float64) series {
	s := series{name: name}
	for i := range b.r.Points {
		p := &b.r.Points[i]
		y := value(p)
		if abs {
			y = math.Abs(y)
		}
		s.xys = append(s.xys, plotter.XY{X: x.of(p), Y: y})
		if err != nil {
			s.err = append(s.err, err(p))
		}
	}
	return s
}

// magnitudeFigure draws a computed magnitude with error bars and, if
// given, its PFA estimate, on a logarithmic y axis.
func (b *builder) magnitudeFigure(name, title, yLabel, caption string, comp series, pfa *series) (*Figure, error) {
	x := b.sweepVar()
	p := newPlot(title, x.label, yLabel)
	if x.log {
		setLog(&p.X)
	}
	setLog(&p.Y)
	comp.color, comp.glyph = blue, draw.CircleGlyph{}
	drawn, err := comp.add(p, true)
	if err != nil {
		return nil, fmt.Errorf("%s figure: %w", name, err)
	}
	exact := len(drawn)
	lines := []plotter.XYs{drawn}
	if pfa != nil {
		pfa.color, pfa.dash = vermilion, dashes[1]
		if exact == 0 {
			pfa.glyph = draw.CircleGlyph{} // alone, as in a PFA-only run
		}
		more, err := pfa.add(p, true)
		if err != nil {
			return nil, fmt.Errorf("%s figure: %w", name, err)
		}
		drawn = append(drawn, more...)
		lines = append(lines, more)
	}
	if len(drawn) == 0 {
		b.note("The %s figure is left out: no point has a non-zero value to show on logarithmic axes.", name)
		return nil, nil
	}
	if exact == 0 {
		caption += " This result has no exact values (a PFA-only run): only the proximity-force estimate is shown."
	}
	if x.log {
		padLog(&p.X)
	} else {
		padLinear(&p.X)
	}
	padLog(&p.Y)
	placeLegend(p, lines)
	return &Figure{Name: name, Title: title, Caption: caption, Plot: p}, nil
}

func (b *builder) energy() (*Figure, error) {
	x := b.sweepVar()
	comp := b.curve(x, "|E| computed (bars: estimated error)", true,
		func(p *Point) float64 { return float64(p.EnergyJ) },
		func(p *Point) float64 { return float64(p.EnergyErrorJ) })
	pfa := b.curve(x, "|E_PFA| proximity-force estimate", true,
		func(p *Point) float64 { return float64(p.PFAEnergyJ) }, nil)
	return b.magnitudeFigure("energy", "Casimir energy", "|energy| [J]",
		"Magnitude of the Casimir interaction energy (negative: attraction) at each sweep point, with the estimated error of the frequency integral as error bars, beside the proximity-force approximation (mean of the estimates from both bodies).",
		comp, &pfa)
}

// forceLabel names the force component the figures show.
func forceLabel(m forceMode) string {
	if m == norm {
		return "|force| (norm of the force vector)"
	}
	return "|force along the sweep direction|"
}

func (b *builder) force() (*Figure, error) {
	hasPFA := b.r.has(func(p *Point) bool { return p.PFAForceN != nil })
	if !b.r.hasForce() && !hasPFA {
		return nil, nil
	}
	x := b.sweepVar()
	mode := b.r.forceModeOf(b.r.forceAlong)
	comp := b.curve(x, "|F| computed (bars: estimated error)", true,
		func(p *Point) float64 { f, _ := b.r.forceAlong(p); return f },
		func(p *Point) float64 { return val(p.ForceErrorN) })
	var pfa *series
	if hasPFA {
		s := b.curve(x, "|F_PFA| proximity-force estimate", true,
			func(p *Point) float64 { return val(p.PFAForceN) }, nil)
		pfa = &s
	}
	caption := "Magnitude of the Casimir force on the moving body along the sweep direction, with its estimated error, beside the proximity-force approximation."
	if mode == norm {
		caption = "Magnitude of the Casimir force vector on the moving body (the result gives no sweep direction to project it on), with its estimated error, beside the proximity-force approximation."
	}
	return b.magnitudeFigure("force", "Casimir force", forceLabel(mode)+" [N]", caption, comp, pfa)
}

func (b *builder) stiffness() (*Figure, error) {
	if !b.r.hasStiffness() {
		return nil, nil
	}
	x := b.sweepVar()
	comp := b.curve(x, "|k| computed", true,
		func(p *Point) float64 { return val(p.StiffnessNPerM) },
		func(p *Point) float64 { return val(p.StiffnessErrorNPerM) })
	return b.magnitudeFigure("stiffness", "Force gradient (stiffness)", "|stiffness -d(F·ê)/ds| [N/m]",
		"Magnitude of the spring constant the interaction adds along the sweep direction, k = -d(F·ê)/ds for a displacement s along ê (negative: it softens a suspension).",
		comp, nil)
}

// signedFigure draws signed values against the angle on linear axes.
func (b *builder) signedFigure(name, title, yLabel, caption string, comp series) (*Figure, error) {
	x := b.sweepVar()
	p := newPlot(title, x.label, yLabel)
	if x.log {
		setLog(&p.X)
	}
	comp.color, comp.glyph = blue, draw.CircleGlyph{}
	drawn, err := comp.add(p, false)
	if err != nil {
		return nil, fmt.Errorf("%s figure: %w", name, err)
	}
	if len(drawn) == 0 {
		b.note("The %s figure is left out: no point has a finite value.", name)
		return nil, nil
	}
	p.Add(hline{Y: 0, Style: draw.LineStyle{Color: grey, Width: vg.Points(0.8)}})
	if x.log {
		padLog(&p.X)
	} else {
		padLinear(&p.X)
	}
	padLinear(&p.Y)
	placeLegend(p, []plotter.XYs{drawn, acrossX(p, 0)})
	return &Figure{Name: name, Title: title, Caption: caption, Plot: p}, nil
}

func (b *builder) torque() (*Figure, error) {
	if !b.r.angleSweep() || !b.r.hasTorque() {
		return nil, nil
	}
	mode := b.r.forceModeOf(b.r.torqueAlong)
	label, caption := "torque about the sweep axis [N m]",
		"Casimir torque on the moving body about the axis it turns about, with its estimated error."
	if mode == norm {
		label, caption = "|torque| (norm of the torque vector) [N m]",
			"Magnitude of the Casimir torque vector on the moving body (the result gives no axis to project it on), with its estimated error."
	}
	comp := b.curve(b.sweepVar(), "τ computed (bars: estimated error)", false,
		func(p *Point) float64 { t, _ := b.r.torqueAlong(p); return t },
		func(p *Point) float64 { return val(p.TorqueErrorNm) })
	return b.signedFigure("torque", "Casimir torque", label, caption, comp)
}

func (b *builder) torsionalStiffness() (*Figure, error) {
	if !b.r.angleSweep() || !b.r.hasTorsionalStiffness() {
		return nil, nil
	}
	comp := b.curve(b.sweepVar(), "κ_θ computed", false,
		func(p *Point) float64 { return val(p.TorsionalStiffness) },
		func(p *Point) float64 { return val(p.TorsionalStiffnessErr) })
	comp.name = "torsional stiffness computed"
	return b.signedFigure("torsional_stiffness", "Torsional stiffness", "torsional stiffness -dτ/dθ [N m/rad]",
		"Torsional spring constant the interaction adds about the turn axis, -dτ/dθ (negative: it softens a torsional suspension).", comp)
}

func (b *builder) pfaRatio() (*Figure, error) {
	x := b.sweepVar()
	p := newPlot("Comparison with the proximity-force approximation", x.label, "ratio to PFA (dimensionless)")
	if x.log {
		setLog(&p.X)
	}
	e := b.curve(x, "E / E_PFA", false, func(p *Point) float64 {
		if r := float64(p.RatioPFA); finite(r) {
			return r
		}
		return float64(p.EnergyJ) / float64(p.PFAEnergyJ)
	}, nil)
	e.color, e.glyph = blue, draw.CircleGlyph{}
	drawn, err := e.add(p, false)
	if err != nil {
		return nil, fmt.Errorf("pfa_ratio figure: %w", err)
	}
	lines := []plotter.XYs{drawn}
	if b.r.hasForce() {
		mode := b.r.forceModeOf(b.r.forceAlong)
		f := b.curve(x, "F / F_PFA", false, func(p *Point) float64 {
			if r := val(p.RatioForce); finite(r) {
				return r
			}
			fa, _ := b.r.forceAlong(p)
			pf := val(p.PFAForceN)
			if mode == norm {
				fa, pf = math.Abs(fa), math.Abs(pf)
			}
			return fa / pf
		}, nil)
		f.color, f.glyph, f.dash = green, draw.BoxGlyph{}, dashes[1]
		more, err := f.add(p, false)
		if err != nil {
			return nil, fmt.Errorf("pfa_ratio figure: %w", err)
		}
		lines = append(lines, more)
		drawn = append(drawn, more...)
	}
	if len(drawn) == 0 {
		b.note("The pfa_ratio figure is left out: no point has both an exact value and a PFA estimate.")
		return nil, nil
	}
	one := hline{Y: 1, Style: draw.LineStyle{Color: grey, Width: vg.Points(1), Dashes: dashes[2]}}
	p.Add(one)
	p.Legend.Add("PFA (ratio 1)", one)
	if x.log {
		padLog(&p.X)
	} else {
		padLinear(&p.X)
	}
	padLinear(&p.Y)
	placeLegend(p, append(lines, acrossX(p, 1)))
	return &Figure{Name: "pfa_ratio", Title: "Ratio to the proximity-force approximation", Plot: p,
		Caption: "Computed energy (and force) divided by the proximity-force approximation. The ratio tends to 1 as the gap closes for smooth surfaces and falls below it at larger gaps."}, nil
}

func (b *builder) integrand() (*Figure, error) {
	x := b.sweepVar()
	u := b.r.unitLabel()
	p := newPlot("Frequency integrand", "imaginary wavenumber κ [1/"+u+"]", "|ln det(M M∞^-1)| (dimensionless)")
	setLog(&p.X)
	setLog(&p.Y)
	zero := 0
	var lines []plotter.XYs
	for i := range b.r.Points {
		pt := &b.r.Points[i]
		s := series{name: x.legend(pt), color: palette[i%len(palette)], dash: dashes[(i/len(palette))%len(dashes)]}
		if len(pt.Samples) <= 40 {
			s.glyph = draw.CircleGlyph{}
		}
		for _, smp := range pt.Samples {
			if float64(smp.KappaPerUnit) == 0 {
				zero++
				continue
			}
			s.xys = append(s.xys, plotter.XY{X: float64(smp.KappaPerUnit), Y: math.Abs(float64(smp.Integrand))})
		}
		more, err := s.add(p, true)
		if err != nil {
			return nil, fmt.Errorf("integrand figure: %w", err)
		}
		if len(more) > 0 {
			lines = append(lines, more)
		}
	}
	if len(lines) == 0 {
		b.note("The integrand figure is left out: the result has no integrand samples with κ > 0 and a non-zero value.")
		return nil, nil
	}
	padLog(&p.X)
	padLog(&p.Y)
	placeLegend(p, lines)
	caption := "Magnitude of the log-determinant integrand at each imaginary wavenumber the frequency integration evaluated, one line per sweep point; it decays about as exp(-2κd) for the gap d."
	if zero > 0 {
		caption += " The κ = 0 (static) term of the finite-temperature sum cannot be shown on a logarithmic axis and is left out."
	}
	return &Figure{Name: "integrand", Title: "Frequency integrand", Caption: caption, Plot: p}, nil
}
