package plot

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/fluctus/fluctus/scatter/sticking"
)

// sticking draws the load the suspension must carry, L(x), and the spring's
// restoring force k (x0 - x) against the position x, with the equilibria
// (where they cross; stable filled, unstable open) and the pull-in point.
// For a translation x is the gap, shown in the job's unit; for a rotation it
// is the angle to contact, shown in degrees.
func (b *builder) sticking() (*Figure, error) {
	st := b.r.Sticking
	if st == nil {
		return nil, nil
	}
	rep := st.Report
	if !(rep.Stiffness > 0) {
		b.note("The sticking figure is left out: the sticking section has no spring stiffness.")
		return nil, nil
	}
	xLabel, yLabel, loadName, law := "gap ["+b.r.unitLabel()+"]", "force [N]", "attraction F(g)", "k (g0 - g)"
	scale := 1 / b.r.metresPerUnit()
	if rep.Torsional {
		xLabel, yLabel, loadName, law = "angle to contact [°]", "torque [N m]", "attraction torque τ(θ)", "k (θ0 - θ)"
		scale = 180 / math.Pi
	}
	show := func(x float64) float64 { return x * scale } // m or rad to the axis unit

	title := "Pull-in analysis"
	if rep.Verdict != "" {
		title += ": " + strings.ToUpper(string(rep.Verdict))
	}
	p := newPlot(title, xLabel, yLabel)

	samples := st.Samples
	if len(samples) == 0 && !rep.Torsional {
		samples = b.loadSamples()
	}
	lo, hi := rep.SampledRange[0], rep.SampledRange[1]
	if len(samples) > 0 {
		lo = min(lo, samples[0].X)
		hi = max(hi, samples[len(samples)-1].X)
	}
	if !(lo > 0) || !(hi > lo) {
		lo, hi = 0.5*rep.Rest, rep.Rest
	}
	hi = max(hi, rep.Rest)
	pullIn := rep.PullIn.Location == sticking.Sampled || rep.PullIn.Extrapolated
	if pullIn {
		lo = min(lo, rep.PullIn.X) // an extrapolated one may lie below the samples
	}

	ymax := rep.Stiffness * (rep.Rest - lo)
	var curve plotter.XYs
	if c, err := sticking.NewCurve(samples); err == nil {
		const n = 240
		clo, chi := c.Range()
		for i := range n + 1 {
			x := clo * math.Pow(chi/clo, float64(i)/n)
			curve = append(curve, plotter.XY{X: show(x), Y: c.Load(x)})
		}
	} else {
		for _, s := range samples {
			curve = append(curve, plotter.XY{X: show(s.X), Y: s.Load})
		}
	}
	if len(curve) > 0 {
		s := series{name: loadName + " (computed, interpolated)", xys: curve, color: blue}
		if _, err := s.add(p, false); err != nil {
			return nil, fmt.Errorf("sticking figure: %w", err)
		}
		var pts plotter.XYs
		for _, smp := range samples {
			pts = append(pts, plotter.XY{X: show(smp.X), Y: smp.Load})
		}
		s = series{name: "computed points", xys: pts, color: blue, glyph: draw.CircleGlyph{}, noLine: true}
		if _, err := s.add(p, false); err != nil {
			return nil, fmt.Errorf("sticking figure: %w", err)
		}
	} else {
		b.note("The sticking figure shows no load curve: the result carries no load samples for this rotation.")
	}

	spring := series{
		name:  fmt.Sprintf("spring %s, k = %.3g %s", law, rep.Stiffness, stiffUnit(rep.Torsional)),
		color: vermilion, dash: dashes[1],
	}
	for i := range 21 { // a straight line, sampled for placeLegend
		x := lo + float64(i)/20*(rep.Rest-lo)
		spring.xys = append(spring.xys, plotter.XY{X: show(x), Y: rep.Stiffness * (rep.Rest - x)})
	}
	if _, err := spring.add(p, false); err != nil {
		return nil, fmt.Errorf("sticking figure: %w", err)
	}

	var stable, unstable plotter.XYs
	for _, e := range rep.Equilibria {
		xy := plotter.XY{X: show(e.X), Y: e.Load}
		if e.Stable {
			stable = append(stable, xy)
		} else {
			unstable = append(unstable, xy)
		}
		ymax = max(ymax, e.Load)
	}
	marks := []series{
		{name: "stable equilibrium", xys: stable, color: green, glyph: draw.CircleGlyph{}, radius: vg.Points(4), noLine: true},
		{name: "unstable equilibrium", xys: unstable, color: green, glyph: draw.RingGlyph{}, radius: vg.Points(4), noLine: true},
	}
	if pi := rep.PullIn; pullIn {
		name := "pull-in point"
		if pi.Extrapolated {
			name += " (extrapolated)"
		}
		marks = append(marks, series{name: name, xys: plotter.XYs{{X: show(pi.X), Y: pi.Load}},
			color: black, glyph: draw.CrossGlyph{}, radius: vg.Points(5), noLine: true})
		ymax = max(ymax, pi.Load)
	}
	for _, m := range marks {
		if _, err := m.add(p, false); err != nil {
			return nil, fmt.Errorf("sticking figure: %w", err)
		}
	}
	// The load grows steeply towards contact: show the range where the
	// spring and the load meet rather than the load's peak.
	p.X.Min, p.X.Max = show(lo), show(hi)
	padLinear(&p.X)
	p.Y.Min, p.Y.Max = 0, 1.25*ymax
	legendAvoids := []plotter.XYs{curve, spring.xys}
	for _, m := range marks {
		legendAvoids = append(legendAvoids, m.xys)
	}
	placeLegend(p, legendAvoids)

	caption := "The Casimir attraction towards contact and the restoring force of the suspension, " + law + " from its rest gap g0. "
	if rep.Torsional {
		caption = "The Casimir torque towards contact and the restoring torque of the torsional suspension, " + law + " from its rest angle θ0 (angles measured from contact). "
	}
	caption += "They balance where the lines cross: filled circles are stable equilibria, open circles unstable ones. At the pull-in point the attraction stiffens as fast as the spring; closer in, no equilibrium survives."
	return &Figure{Name: "sticking", Title: "Sticking (pull-in) analysis", Caption: caption, Plot: p}, nil
}

// loadSamples returns the attraction towards smaller gaps at every point
// with a force, in SI (gap in m, force in N, slope dF/dg in N/m), in
// increasing gap. The slope is the point's stiffness -d(F·ê)/ds = d(F·ê)/dg
// (the gap shrinks as the body advances along ê); without it the slope is
// estimated from the neighbouring points.
func (b *builder) loadSamples() []sticking.Sample {
	m := b.r.metresPerUnit()
	var s []sticking.Sample
	for i := range b.r.Points {
		p := &b.r.Points[i]
		f, _ := b.r.forceAlong(p)
		g := float64(p.Gap) * m
		if !finite(f) || !(g > 0) {
			continue
		}
		s = append(s, sticking.Sample{X: g, Load: f, Slope: val(p.StiffnessNPerM)})
	}
	slices.SortFunc(s, func(a, b sticking.Sample) int { return cmp.Compare(a.X, b.X) })
	s = slices.CompactFunc(s, func(a, b sticking.Sample) bool { return a.X == b.X })
	for i := range s {
		if finite(s[i].Slope) || len(s) < 2 {
			continue
		}
		// One-sided or central difference of the neighbours.
		j, k := max(i-1, 0), min(i+1, len(s)-1)
		s[i].Slope = (s[k].Load - s[j].Load) / (s[k].X - s[j].X)
	}
	return s
}

func stiffUnit(torsional bool) string {
	if torsional {
		return "N m/rad"
	}
	return "N/m"
}
