package plot

import (
	"cmp"
	"image/color"
	"math"
	"slices"
	"strconv"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/recorder"
)

// Figure size and type sizes. PNGs are rendered at pngDPI, so a 6 in × 4 in
// figure is 864 × 576 pixels.
const (
	figWidth  = 6 * vg.Inch
	figHeight = 4 * vg.Inch
	pngDPI    = 144

	titleSize  = 13
	labelSize  = 11
	tickSize   = 9.5
	legendSize = 9
)

// sans is the typeface of every figure (Liberation Sans, bundled with the
// plotting library).
var sans = font.Font{Typeface: "Liberation", Variant: "Sans"}

// Colours: the Okabe–Ito palette, distinguishable with the common forms of
// colour blindness (common practice).
var (
	black     = color.RGBA{0, 0, 0, 255}
	orange    = color.RGBA{230, 159, 0, 255}
	skyBlue   = color.RGBA{86, 180, 233, 255}
	green     = color.RGBA{0, 158, 115, 255}
	blue      = color.RGBA{0, 114, 178, 255}
	vermilion = color.RGBA{213, 94, 0, 255}
	purple    = color.RGBA{204, 121, 167, 255}
	grey      = color.RGBA{120, 120, 120, 255}
)

// palette cycles through for one line per sweep point or per body.
var palette = []color.Color{blue, vermilion, green, orange, purple, skyBlue, black}

// dashes cycle with the palette, so that lines stay apart beyond its length.
var dashes = [][]vg.Length{nil, {vg.Points(6), vg.Points(3)}, {vg.Points(2), vg.Points(2)}, {vg.Points(8), vg.Points(3), vg.Points(2), vg.Points(3)}}

// newPlot returns an empty plot with the figures' fonts and labels.
func newPlot(title, xLabel, yLabel string) *gplot.Plot {
	p := gplot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font = font.From(sans, titleSize)
	p.Title.Padding = vg.Points(6)
	for _, a := range []*gplot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = font.From(sans, labelSize)
		a.Tick.Label.Font = font.From(sans, tickSize)
		a.Label.Padding = vg.Points(4)
	}
	p.X.Label.Text = xLabel
	p.Y.Label.Text = yLabel
	p.X.Tick.Marker, p.Y.Tick.Marker = linearTicks{}, linearTicks{}
	p.Legend.TextStyle.Font = font.From(sans, legendSize)
	p.Legend.Top = true
	p.Legend.Padding = vg.Points(2)
	p.Legend.ThumbnailWidth = vg.Points(22)
	grid := plotter.NewGrid()
	grid.Vertical.Color = color.Gray{Y: 225}
	grid.Horizontal.Color = color.Gray{Y: 225}
	p.Add(grid)
	return p
}

// setLog makes a an axis with a logarithmic scale and decade ticks.
func setLog(a *gplot.Axis) {
	a.Scale = gplot.LogScale{}
	a.Tick.Marker = logTicks{}
}

// padLog widens the range of a logarithmic axis a little beyond the data,
// and to a factor of four around a single value.
func padLog(a *gplot.Axis) {
	if !(a.Min > 0) || !(a.Max > 0) || math.IsInf(a.Max, 0) {
		return
	}
	if a.Min == a.Max {
		a.Min, a.Max = a.Min/2, a.Max*2
		return
	}
	f := math.Pow(a.Max/a.Min, 0.04)
	a.Min, a.Max = a.Min/f, a.Max*f
}

// padLinear widens the range of a linear axis by 4 % on each side, and
// around a single value by a tenth of it.
func padLinear(a *gplot.Axis) {
	if math.IsInf(a.Min, 0) || math.IsInf(a.Max, 0) {
		return
	}
	d := 0.04 * (a.Max - a.Min)
	if d == 0 {
		d = 0.1 * math.Abs(a.Max)
		if d == 0 {
			d = 1
		}
	}
	a.Min, a.Max = a.Min-d, a.Max+d
}

// logTicks labels a logarithmic axis at powers of ten, or at 1, 2 and 5
// times them when the range spans less than two decades, with unlabelled
// minor ticks at the other integer multiples. Over many decades only every
// second or third power is labelled, and there are no minor ticks; within
// less than half a decade the labels are those of a linear axis.
type logTicks struct{}

// Ticks returns the ticks for the positive range [lo, hi].
func (logTicks) Ticks(lo, hi float64) []gplot.Tick {
	if !(lo > 0) || !(hi > lo) {
		return nil
	}
	decades := math.Log10(hi / lo)
	if decades < 0.5 {
		// Less than half a decade: evenly spaced labels read best.
		return linearTicks{}.Ticks(lo, hi)
	}
	ticks := logTicksAt(lo, hi, []int{1})
	if decades < 2 {
		ticks = logTicksAt(lo, hi, []int{1, 2, 5})
		if labels(ticks) < 3 {
			ticks = logTicksAt(lo, hi, []int{1, 2, 3, 4, 5, 6, 7, 8, 9})
		}
	}
	if labels(ticks) < 2 {
		return linearTicks{}.Ticks(lo, hi)
	}
	return ticks
}

// logTicksAt returns ticks at the integer multiples of the powers of ten in
// [lo, hi], labelling the multiples in labelled.
func logTicksAt(lo, hi float64, labelled []int) []gplot.Tick {
	first, last := int(math.Floor(math.Log10(lo))), int(math.Ceil(math.Log10(hi)))
	step := max(1, (last-first+5)/7)
	minor := last-first <= 8 // beyond, minor ticks crowd into a comb
	var ticks []gplot.Tick
	for e := first; e <= last; e++ {
		base := math.Pow(10, float64(e))
		for m := 1; m <= 9; m++ {
			if m > 1 && !minor && !slices.Contains(labelled, m) {
				continue
			}
			v := float64(m) * base
			if v < lo*(1-1e-9) || v > hi*(1+1e-9) { // rounding of 10^e
				continue
			}
			t := gplot.Tick{Value: v}
			if slices.Contains(labelled, m) && (m != 1 || (e-first)%step == 0) {
				t.Label = strconv.FormatFloat(v, 'g', 3, 64)
			}
			ticks = append(ticks, t)
		}
	}
	return ticks
}

// labels counts the labelled ticks.
func labels(ticks []gplot.Tick) int {
	n := 0
	for _, t := range ticks {
		if t.Label != "" {
			n++
		}
	}
	return n
}

// placeLegend puts the legend of p in the corner of the data area where it
// covers the least of the lines drawn (polylines in data coordinates),
// preferring the top right, then the top left; p's axis ranges must be
// final.
func placeLegend(p *gplot.Plot, lines []plotter.XYs) {
	da := dataArea(p, draw.NewCanvas(new(recorder.Canvas), figWidth, figHeight))
	trX, trY := p.Transforms(&da)
	ok := func(q plotter.XY) bool {
		return finite(q.X) && finite(q.Y) && (!isLogAxis(p.X) || q.X > 0) && (!isLogAxis(p.Y) || q.Y > 0)
	}
	// Points every 2 pt along every line, in canvas coordinates, so that
	// each line counts by its length.
	var pts []vg.Point
	for _, l := range lines {
		for i, q := range l {
			if !ok(q) {
				continue
			}
			a := vg.Point{X: trX(q.X), Y: trY(q.Y)}
			pts = append(pts, a)
			if i+1 < len(l) && ok(l[i+1]) {
				b := vg.Point{X: trX(l[i+1].X), Y: trY(l[i+1].Y)}
				n := int(math.Hypot(float64(b.X-a.X), float64(b.Y-a.Y)) / 2)
				for k := 1; k < min(n, 1000); k++ {
					t := vg.Length(k) / vg.Length(n)
					pts = append(pts, vg.Point{X: a.X + t*(b.X-a.X), Y: a.Y + t*(b.Y-a.Y)})
				}
			}
		}
	}
	size := p.Legend.Rectangle(da).Size()
	margin := vg.Points(4)
	type corner struct{ top, left bool }
	best, fewest := corner{true, false}, -1
	for _, c := range []corner{{true, false}, {true, true}, {false, true}, {false, false}} {
		r := vg.Rectangle{Min: vg.Point{X: da.Max.X - size.X, Y: da.Min.Y}, Max: vg.Point{X: da.Max.X, Y: da.Min.Y + size.Y}}
		if c.left {
			r.Min.X, r.Max.X = da.Min.X, da.Min.X+size.X
		}
		if c.top {
			r.Min.Y, r.Max.Y = da.Max.Y-size.Y, da.Max.Y
		}
		n := 0
		for _, q := range pts {
			if q.X >= r.Min.X-margin && q.X <= r.Max.X+margin && q.Y >= r.Min.Y-margin && q.Y <= r.Max.Y+margin {
				n++
			}
		}
		if fewest < 0 || n < fewest {
			best, fewest = c, n
		}
	}
	p.Legend.Top, p.Legend.Left = best.top, best.left
	p.Legend.XOffs, p.Legend.YOffs = 0, 0
}

// acrossX returns points at height y spread over the x range of p, for
// placeLegend to keep a horizontal line clear.
func acrossX(p *gplot.Plot, y float64) plotter.XYs {
	var xys plotter.XYs
	for t := 0.05; t < 1; t += 0.1 {
		x := p.X.Min + t*(p.X.Max-p.X.Min)
		if isLogAxis(p.X) {
			x = p.X.Min * math.Pow(p.X.Max/p.X.Min, t)
		}
		xys = append(xys, plotter.XY{X: x, Y: y})
	}
	return xys
}

func isLogAxis(a gplot.Axis) bool {
	_, ok := a.Scale.(gplot.LogScale)
	return ok
}

// linearTicks labels a linear axis at the multiples of the smallest step
// of 1, 2 or 5 times a power of ten that gives at most seven intervals,
// with unlabelled minor ticks between them.
type linearTicks struct{}

// Ticks returns the ticks for the range [lo, hi].
func (linearTicks) Ticks(lo, hi float64) []gplot.Tick {
	if !finite(lo) || !finite(hi) || !(hi > lo) {
		return nil
	}
	raw := (hi - lo) / 7
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	step, parts := 10*mag, 5
	for _, c := range []struct {
		m     float64
		parts int
	}{{1, 5}, {2, 4}, {5, 5}} {
		if c.m*mag >= raw*(1-1e-9) {
			step, parts = c.m*mag, c.parts
			break
		}
	}
	minor := step / float64(parts)
	var ticks []gplot.Tick
	for k := math.Ceil(lo / minor * (1 - 1e-12)); k*minor <= hi*(1+1e-12)+minor*1e-9; k++ {
		v := k * minor
		t := gplot.Tick{Value: v}
		if math.Mod(k, float64(parts)) == 0 {
			t.Label = strconv.FormatFloat(v, 'g', 4, 64)
			if k == 0 {
				t.Label = "0"
			}
		}
		ticks = append(ticks, t)
	}
	return ticks
}

// series is one data set of a figure: points with optional errors.
type series struct {
	name   string
	xys    plotter.XYs
	err    []float64 // absolute error of each y, or nil
	color  color.Color
	dash   []vg.Length
	glyph  draw.GlyphDrawer // nil: a line without markers
	radius vg.Length        // of the markers; 0 means 3 pt
	noLine bool
}

// add draws s on p: a line, markers, error bars, and a legend entry; it
// returns the points drawn. With
// logY, points with y ≤ 0 are left out and error bars are cut at a tenth of
// the value below it (a log axis has no zero).
func (s series) add(p *gplot.Plot, logY bool) (plotter.XYs, error) {
	pts := make(plotter.XYs, 0, len(s.xys))
	var errs plotter.YErrors
	for i, xy := range s.xys {
		if !finite(xy.X) || !finite(xy.Y) || (logY && xy.Y <= 0) {
			continue
		}
		if _, isLog := p.X.Scale.(gplot.LogScale); isLog && xy.X <= 0 {
			continue
		}
		pts = append(pts, xy)
		if s.err != nil {
			e := math.Abs(s.err[i])
			if !finite(e) {
				e = 0
			}
			low := e
			if logY {
				low = min(e, 0.9*xy.Y)
			}
			errs = append(errs, struct{ Low, High float64 }{low, e})
		}
	}
	if len(pts) == 0 {
		return nil, nil
	}
	// Sort by x, keeping each error with its point.
	order := make([]int, len(pts))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int { return cmp.Compare(pts[a].X, pts[b].X) })
	sorted := make(plotter.XYs, len(pts))
	var sortedErr plotter.YErrors
	for i, k := range order {
		sorted[i] = pts[k]
		if errs != nil {
			sortedErr = append(sortedErr, errs[k])
		}
	}

	var thumbs []gplot.Thumbnailer
	if !s.noLine && len(sorted) > 1 {
		l, err := plotter.NewLine(sorted)
		if err != nil {
			return nil, err
		}
		l.Color = s.color
		l.Width = vg.Points(1.4)
		l.Dashes = s.dash
		p.Add(l)
		thumbs = append(thumbs, l)
	}
	if sortedErr != nil {
		eb, err := plotter.NewYErrorBars(errorXYs{sorted, sortedErr})
		if err != nil {
			return nil, err
		}
		eb.Color = s.color
		eb.Width = vg.Points(1)
		eb.CapWidth = vg.Points(5)
		p.Add(eb)
	}
	if s.glyph != nil || len(sorted) == 1 || s.noLine {
		sc, err := plotter.NewScatter(sorted)
		if err != nil {
			return nil, err
		}
		sc.Color = s.color
		sc.Radius = vg.Points(3)
		if s.radius > 0 {
			sc.Radius = s.radius
		}
		sc.Shape = s.glyph
		if sc.Shape == nil {
			sc.Shape = draw.CircleGlyph{}
		}
		p.Add(sc)
		thumbs = append(thumbs, sc)
	}
	if s.name != "" {
		p.Legend.Add(s.name, thumbs...)
	}
	return sorted, nil
}

// errorXYs joins points and their errors for plotter.NewYErrorBars.
type errorXYs struct {
	plotter.XYs
	plotter.YErrors
}

// hline is a horizontal reference line at Y across the whole plot.
type hline struct {
	Y     float64
	Style draw.LineStyle
}

// Plot draws the line.
func (h hline) Plot(c draw.Canvas, p *gplot.Plot) {
	_, trY := p.Transforms(&c)
	y := trY(h.Y)
	c.StrokeLine2(h.Style, c.Min.X, y, c.Max.X, y)
}

// DataRange includes Y in the vertical range and leaves the horizontal one
// to the data.
func (h hline) DataRange() (xmin, xmax, ymin, ymax float64) {
	return math.Inf(1), math.Inf(-1), h.Y, h.Y
}

// Thumbnail draws the legend sample of the line.
func (h hline) Thumbnail(c *draw.Canvas) {
	y := c.Center().Y
	c.StrokeLine2(h.Style, c.Min.X, y, c.Max.X, y)
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
