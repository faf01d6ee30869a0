package plot

import (
	"fmt"
	"path/filepath"
	"strings"

	"github.com/fluctus/fluctus/cmd/internal/atomicfile"
	"gonum.org/v1/plot/plotter"
)

// Curve is one line of a CurveFigure.
type Curve struct {
	Name string
	X, Y []float64 // same length
}

// CurveFigure returns a figure of lines on log–log axes in the style of the
// run figures (fonts, Okabe–Ito colours with dashes, decade ticks). Points
// whose x or y is not a finite positive number are left out; it is an error
// when no curve has a point left.
func CurveFigure(name, title, xLabel, yLabel, caption string, curves []Curve) (*Figure, error) {
	p := newPlot(title, xLabel, yLabel)
	setLog(&p.X)
	setLog(&p.Y)
	var lines []plotter.XYs
	for i, c := range curves {
		if len(c.X) != len(c.Y) {
			return nil, fmt.Errorf("%s figure: curve %q has %d x and %d y values", name, c.Name, len(c.X), len(c.Y))
		}
		xys := make(plotter.XYs, len(c.X))
		for k := range c.X {
			xys[k].X, xys[k].Y = c.X[k], c.Y[k]
		}
		s := series{name: c.Name, xys: xys, color: palette[i%len(palette)], dash: dashes[i%len(dashes)]}
		drawn, err := s.add(p, true)
		if err != nil {
			return nil, fmt.Errorf("%s figure: %w", name, err)
		}
		if len(drawn) > 0 {
			lines = append(lines, drawn)
		}
	}
	if len(lines) == 0 {
		return nil, fmt.Errorf("%s figure: no finite positive values to draw on logarithmic axes", name)
	}
	padLog(&p.X)
	padLog(&p.Y)
	placeLegend(p, lines)
	return &Figure{Name: name, Title: title, Caption: caption, Plot: p, Width: figWidth, Height: figHeight}, nil
}

// WriteFigure renders f in the format named by the extension of path
// (.png or .svg) and writes it there atomically (temporary file and rename).
func WriteFigure(f *Figure, path string) error {
	format := Format(strings.TrimPrefix(strings.ToLower(filepath.Ext(path)), "."))
	if format != PNG && format != SVG {
		return fmt.Errorf("%s: the figure's file name must end in .png or .svg", path)
	}
	data, err := f.Render(format)
	if err != nil {
		return err
	}
	return atomicfile.WriteBytes(path, data)
}
