package plot

import (
	"bytes"
	"encoding/base64"
	"fmt"
	"html/template"
	"strconv"
	"strings"
)

// DefaultNotice is the idealisation notice of the report when result.json
// carries none.
const DefaultNotice = "Results are idealised: smooth, homogeneous, perfectly conducting bodies in vacuum " +
	"at the stated temperature, with no surface roughness, patch charges or humidity. " +
	"Keep margin in any design and defer to your own qualification practice and the applicable standards."

// HTML returns report.html: one self-contained page with the job summary,
// the table of results, the sticking verdict, every figure (pngs[i] is the
// PNG of figs[i], embedded as a data URI) and the idealisation notice. It
// loads nothing from elsewhere; all text is escaped.
func HTML(r *Result, figs []Figure, pngs [][]byte, notes []string) ([]byte, error) {
	if len(pngs) != len(figs) {
		return nil, fmt.Errorf("report: %d PNGs for %d figures", len(pngs), len(figs))
	}
	pg := page{R: r, Notes: notes, Notice: r.Notice, Unit: r.unitLabel()}
	if pg.Notice == "" {
		pg.Notice = DefaultNotice
	}
	pg.Title = "fluctus result"
	if r.Job != "" {
		pg.Title += ": " + r.Job
	}
	pg.Temperature = strconv.FormatFloat(r.TemperatureK, 'g', -1, 64) + " K"
	pg.Accuracy = strconv.FormatFloat(r.Accuracy, 'g', -1, 64)
	pg.Memory = bytesText(r.MatrixBytes)
	pg.Sweep = sweepText(r)
	pg.table(r)
	if st := r.Sticking; st != nil {
		pg.Sticking = &stickingView{
			Verdict:  strings.ToUpper(string(st.Verdict)),
			Class:    string(st.Verdict),
			Summary:  st.Text(),
			Notes:    st.Notes,
			Material: st.Material,
		}
		if st.ExtrapolatedVerdict != "" {
			pg.Sticking.Extrapolated = strings.ToUpper(string(st.ExtrapolatedVerdict))
		}
	}
	for i, f := range figs {
		pg.Figures = append(pg.Figures, figView{
			Title:   f.Title,
			Caption: f.Caption,
			Name:    f.Name,
			// A data URI built here from PNG bytes: safe to use as a src.
			Src: template.URL("data:image/png;base64," + base64.StdEncoding.EncodeToString(pngs[i])),
		})
	}
	var buf bytes.Buffer
	if err := reportTemplate.Execute(&buf, pg); err != nil {
		return nil, fmt.Errorf("writing %s: %w", ReportName, err)
	}
	return buf.Bytes(), nil
}

// page is the data of the report template.
type page struct {
	Title       string
	R           *Result
	Unit        string
	Temperature string
	Accuracy    string
	Memory      string
	Sweep       string
	Columns     []string
	Rows        [][]string
	Sticking    *stickingView
	Figures     []figView
	Notes       []string
	Notice      string
}

type stickingView struct {
	Verdict, Class, Extrapolated, Summary, Material string
	Notes                                           []string
}

type figView struct {
	Title, Caption, Name string
	Src                  template.URL
}

// table fills the results table: one row per sweep point, with the
// columns the result has.
func (pg *page) table(r *Result) {
	u := pg.Unit
	type col struct {
		head string
		cell func(*Point) string
	}
	cols := []col{}
	if r.angleSweep() {
		cols = append(cols, col{"angle [°]", func(p *Point) string { return num(val(p.AngleDeg), 'g', 5) }})
	}
	cols = append(cols,
		col{"gap [" + u + "]", func(p *Point) string { return num(float64(p.Gap), 'g', 5) }},
		col{"energy [J]", func(p *Point) string { return num(float64(p.EnergyJ), 'e', 4) }},
		col{"error [J]", func(p *Point) string { return num(float64(p.EnergyErrorJ), 'e', 1) }},
		col{"PFA [J]", func(p *Point) string { return num(float64(p.PFAEnergyJ), 'e', 4) }},
		col{"E/PFA", func(p *Point) string {
			ratio := float64(p.RatioPFA)
			if !finite(ratio) && float64(p.PFAEnergyJ) != 0 {
				ratio = float64(p.EnergyJ) / float64(p.PFAEnergyJ)
			}
			return num(ratio, 'f', 4)
		}},
	)
	if r.hasForce() {
		head := "force along ê [N]"
		if r.forceModeOf(r.forceAlong) == norm {
			head = "|force| [N]"
		}
		cols = append(cols,
			col{head, func(p *Point) string { f, _ := r.forceAlong(p); return num(f, 'e', 4) }},
			col{"force error [N]", func(p *Point) string { return num(val(p.ForceErrorN), 'e', 1) }},
		)
	}
	if r.has(func(p *Point) bool { return p.PFAForceN != nil }) {
		cols = append(cols, col{"PFA force [N]", func(p *Point) string { return num(val(p.PFAForceN), 'e', 4) }})
	}
	if r.hasStiffness() {
		cols = append(cols, col{"stiffness [N/m]", func(p *Point) string { return num(val(p.StiffnessNPerM), 'e', 4) }})
	}
	if r.hasTorque() {
		head := "torque about the axis [N m]"
		if r.forceModeOf(r.torqueAlong) == norm {
			head = "|torque| [N m]"
		}
		cols = append(cols, col{head, func(p *Point) string { t, _ := r.torqueAlong(p); return num(t, 'e', 4) }})
	}
	if r.hasTorsionalStiffness() {
		cols = append(cols, col{"torsional stiffness [N m/rad]", func(p *Point) string { return num(val(p.TorsionalStiffness), 'e', 4) }})
	}
	for _, c := range cols {
		pg.Columns = append(pg.Columns, c.head)
	}
	for i := range r.Points {
		row := make([]string, len(cols))
		for k, c := range cols {
			row[k] = c.cell(&r.Points[i])
		}
		pg.Rows = append(pg.Rows, row)
	}
}

// num formats a table entry; undefined values print as "–".
func num(x float64, format byte, prec int) string {
	switch {
	case !finite(x):
		return "–"
	case x == 0:
		return "0"
	}
	return strconv.FormatFloat(x, format, prec, 64)
}

// sweepText describes the sweep in words.
func sweepText(r *Result) string {
	s := r.Sweep
	d := s.Direction
	text := fmt.Sprintf("body %q moved along (%g, %g, %g)", s.Body, d[0], d[1], d[2])
	if s.By != "" {
		text += " by " + s.By
	}
	if s.Axis != nil {
		a := *s.Axis
		text += fmt.Sprintf(", turned about (%g, %g, %g)", a[0], a[1], a[2])
	}
	return fmt.Sprintf("%s, %d points", text, len(r.Points))
}

// bytesText formats a byte count with a binary prefix.
func bytesText(n int64) string {
	const units = "KMGTPE"
	if n < 1024 {
		return fmt.Sprintf("%d B", n)
	}
	x, i := float64(n)/1024, 0
	for x >= 1024 && i < len(units)-1 {
		x /= 1024
		i++
	}
	return fmt.Sprintf("%.3g %ciB", x, units[i])
}

var reportTemplate = template.Must(template.New(ReportName).Parse(reportHTML))

const reportHTML = `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{{.Title}}</title>
<style>
body { font-family: "Liberation Sans", Arial, Helvetica, sans-serif; color: #222; max-width: 62rem; margin: 2rem auto; padding: 0 1rem; line-height: 1.45; }
h1 { font-size: 1.5rem; margin-bottom: 0.2rem; }
h2 { font-size: 1.2rem; margin-top: 2rem; border-bottom: 1px solid #ccc; padding-bottom: 0.2rem; }
table { border-collapse: collapse; margin: 0.5rem 0; font-size: 0.9rem; }
th, td { border: 1px solid #ccc; padding: 0.25rem 0.6rem; }
th { background: #f2f2f2; text-align: left; }
table.results td { text-align: right; font-variant-numeric: tabular-nums; }
table.summary th { width: 11rem; }
.notice { border-left: 4px solid #e69f00; background: #fff8e6; padding: 0.6rem 1rem; margin: 1rem 0; }
.verdict { font-weight: bold; padding: 0.1rem 0.5rem; border-radius: 3px; }
.verdict.free { background: #d8f0e6; color: #005c43; }
.verdict.sticks { background: #f8dccc; color: #8a3600; }
.verdict.undetermined { background: #eee; color: #444; }
figure { margin: 1.5rem 0; }
figure img { max-width: 100%; height: auto; border: 1px solid #ddd; }
figcaption { font-size: 0.9rem; color: #444; margin-top: 0.3rem; }
.notes li { color: #555; }
</style>
</head>
<body>
<h1>{{.Title}}</h1>
<p class="notice"><strong>Notice.</strong> {{.Notice}}</p>

<h2>Job</h2>
<table class="summary">
<tr><th>job file</th><td>{{with .R.Job}}{{.}}{{else}}–{{end}}</td></tr>
{{- with .R.Mode}}
<tr><th>mode</th><td>{{.}}</td></tr>
{{- end}}
<tr><th>length unit</th><td>{{.Unit}}</td></tr>
<tr><th>temperature</th><td>{{.Temperature}}</td></tr>
<tr><th>accuracy (relative)</th><td>{{.Accuracy}}</td></tr>
<tr><th>unknowns</th><td>{{.R.Unknowns}}</td></tr>
<tr><th>dense matrices</th><td>{{.Memory}}</td></tr>
<tr><th>sweep</th><td>{{.Sweep}}</td></tr>
{{- with .R.Substrate}}
<tr><th>substrate</th><td>infinite perfectly conducting plane through ({{index .Point 0}}, {{index .Point 1}}, {{index .Point 2}}) with normal ({{index .Normal 0}}, {{index .Normal 1}}, {{index .Normal 2}})</td></tr>
{{- end}}
{{- with .R.Materials}}
<tr><th>materials</th><td>{{.}}</td></tr>
{{- end}}
{{- with .R.ZeroFrequency}}
<tr><th>n = 0 Matsubara term</th><td>{{.}}</td></tr>
{{- end}}
{{- with .R.PFALaw}}
<tr><th>PFA plate law</th><td>{{.}}</td></tr>
{{- end}}
</table>

<h3>Bodies</h3>
<table>
<tr><th>name</th><th>mesh</th><th>triangles</th><th>unknowns</th>{{if .R.Materials}}<th>material</th>{{end}}</tr>
{{- $materials := .R.Materials}}
{{- range .R.Bodies}}
<tr><td>{{.Name}}</td><td>{{.Source}}</td><td>{{.Triangles}}</td><td>{{.Unknowns}}</td>{{if $materials}}<td>{{.Material}} ({{.MaterialKind}})</td>{{end}}</tr>
{{- end}}
</table>

<h2>Results</h2>
<table class="results">
<tr>{{range .Columns}}<th>{{.}}</th>{{end}}</tr>
{{- range .Rows}}
<tr>{{range .}}<td>{{.}}</td>{{end}}</tr>
{{- end}}
</table>
<p>Energies are negative for an attraction. The error is the estimated error of the frequency integral; PFA is the proximity-force approximation.</p>

{{- with .Sticking}}
<h2>Sticking</h2>
<p>Verdict: <span class="verdict {{.Class}}">{{.Verdict}}</span>{{with .Extrapolated}} (a power-law continuation below the samples says {{.}}){{end}}</p>
<p>{{.Summary}}</p>
{{- if .Notes}}
<ul class="notes">{{range .Notes}}<li>{{.}}</li>{{end}}</ul>
{{- end}}
{{- end}}

<h2>Figures</h2>
{{- range .Figures}}
<figure id="{{.Name}}">
<img src="{{.Src}}" alt="{{.Title}}">
<figcaption><strong>{{.Title}}.</strong> {{.Caption}}</figcaption>
</figure>
{{- end}}
{{- if .Notes}}
<ul class="notes">{{range .Notes}}<li>{{.}}</li>{{end}}</ul>
{{- end}}

<p class="notice"><strong>Notice.</strong> {{.Notice}}</p>
</body>
</html>
`
