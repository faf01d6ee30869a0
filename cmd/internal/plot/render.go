package plot

import (
	"bytes"
	"fmt"
	"image/png"
	"math"

	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"slices"

	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Format is a file format of the figures.
type Format string

// The formats Write can produce.
const (
	PNG Format = "png"
	SVG Format = "svg"
)

// ParseFormats reads format names ("png", "svg"); none means both.
func ParseFormats(names []string) ([]Format, error) {
	if len(names) == 0 {
		return []Format{PNG, SVG}, nil
	}
	var fs []Format
	for _, n := range names {
		f := Format(n)
		if f != PNG && f != SVG {
			return nil, fmt.Errorf("unknown figure format %q: say png, svg or png,svg", n)
		}
		if !slices.Contains(fs, f) {
			fs = append(fs, f)
		}
	}
	return fs, nil
}

// Render returns the figure encoded in format f: a PNG at 144 dots per inch
// or an SVG document. It draws f.Plot, which must not be drawn by another
// goroutine at the same time.
func (f *Figure) Render(format Format) ([]byte, error) {
	var buf bytes.Buffer
	switch format {
	case PNG:
		c := vgimg.NewWith(vgimg.UseWH(f.Width, f.Height), vgimg.UseDPI(pngDPI))
		if err := f.draw(draw.New(c)); err != nil {
			return nil, err
		}
		// The fastest compression: figures are mostly flat colour, so it
		// costs little in size and halves the time of the whole report.
		enc := png.Encoder{CompressionLevel: png.BestSpeed}
		if err := enc.Encode(&buf, c.Image()); err != nil {
			return nil, fmt.Errorf("encoding %s.png: %w", f.Name, err)
		}
	case SVG:
		c := vgsvg.New(f.Width, f.Height)
		if err := f.draw(draw.New(c)); err != nil {
			return nil, err
		}
		if _, err := c.WriteTo(&buf); err != nil {
			return nil, fmt.Errorf("encoding %s.svg: %w", f.Name, err)
		}
	default:
		return nil, fmt.Errorf("unknown figure format %q", format)
	}
	return buf.Bytes(), nil
}

// draw draws the plot on c. The plotting library panics on data it cannot
// show (a non-positive value on a logarithmic axis); the figures never pass
// such data, but a panic here would lose a finished run's report, so it is
// turned into an error.
func (f *Figure) draw(c draw.Canvas) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("drawing the %s figure: %v", f.Name, r)
		}
	}()
	drawWithLabels(f.Plot, c)
	return nil
}

// drawWithLabels draws p on c with the axis labels centred on the data
// area. The plotting library reserves room for an axis label around the
// position of the arithmetic mean of the axis range, which on a logarithmic
// axis lies near its end and leaves a wide empty margin there; so the plot
// is drawn without its labels inside a margin and the labels are drawn here,
// as the library would draw them.
func drawWithLabels(p *gplot.Plot, c draw.Canvas) {
	xl, yl := p.X.Label.Text, p.Y.Label.Text
	inner := withoutLabels(p, c)
	defer func() { p.X.Label.Text, p.Y.Label.Text = xl, yl }()
	p.Draw(inner)
	da := p.DataCanvas(inner)
	if yl != "" {
		sty := p.Y.Label.TextStyle
		sty.Rotation += math.Pi / 2
		x := c.Min.X + sty.Height(yl) - sty.FontExtents().Descent
		c.FillText(sty, vg.Point{X: x, Y: da.Center().Y}, yl)
	}
	if xl != "" {
		sty := p.X.Label.TextStyle
		c.FillText(sty, vg.Point{X: da.Center().X, Y: c.Min.Y + sty.FontExtents().Descent}, xl)
	}
}

// withoutLabels clears the axis labels of p (the caller restores them) and
// returns the part of c left for the plot once room for them is taken.
func withoutLabels(p *gplot.Plot, c draw.Canvas) draw.Canvas {
	var left, bottom vg.Length
	if t := p.Y.Label.Text; t != "" {
		left = p.Y.Label.TextStyle.Height(t) + p.Y.Label.Padding
	}
	if t := p.X.Label.Text; t != "" {
		bottom = p.X.Label.TextStyle.Height(t) + p.X.Label.Padding
	}
	p.X.Label.Text, p.Y.Label.Text = "", ""
	return draw.Crop(c, left, 0, bottom, 0)
}

// dataArea returns the data area of p drawn on c by drawWithLabels.
func dataArea(p *gplot.Plot, c draw.Canvas) draw.Canvas {
	xl, yl := p.X.Label.Text, p.Y.Label.Text
	inner := withoutLabels(p, c)
	defer func() { p.X.Label.Text, p.Y.Label.Text = xl, yl }()
	return p.DataCanvas(inner)
}
