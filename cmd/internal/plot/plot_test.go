package plot

import (
	"bytes"
	"context"
	"encoding/base64"
	"encoding/xml"
	"errors"
	"html"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
	gplot "gonum.org/v1/plot"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/recorder"

	"github.com/fluctus/fluctus/cmd/internal/job"
	"github.com/fluctus/fluctus/mesh"
	"github.com/fluctus/fluctus/scatter"
)

// keep, when set, is a directory the figures of TestWrite are copied to,
// for looking at them.
var keep = os.Getenv("FLUCTUS_PLOT_KEEP")

// copyFixture copies testdata/plot/NAME/result.json into a new temporary
// directory and returns it.
func copyFixture(t *testing.T, name string) string {
	t.Helper()
	data, err := os.ReadFile(filepath.Join(fixtureDir, name, ResultName))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, ResultName), data, 0o644); err != nil {
		t.Fatal(err)
	}
	return dir
}

// figureFiles lists the figure stems each fixture must produce.
var figureFiles = map[string][]string{
	"energy":    {"energy", "pfa_ratio", "integrand"},
	"forces":    {"energy", "force", "stiffness", "pfa_ratio", "integrand", "sticking", "scene"},
	"angle":     {"energy", "force", "torque", "torsional_stiffness", "pfa_ratio", "integrand", "sticking"},
	"substrate": {"energy", "pfa_ratio", "integrand"},
	"pfa_only":  {"energy"},
}

func TestWrite(t *testing.T) {
	for name, stems := range figureFiles {
		t.Run(name, func(t *testing.T) {
			t.Parallel()
			dir := copyFixture(t, name)
			o := Options{}
			if name == "forces" {
				o.Job = filepath.Join(fixtureDir, "sphere_plate.yaml")
			}
			out, err := Write(context.Background(), dir, o)
			if err != nil {
				t.Fatal(err)
			}
			var want []string
			for _, s := range stems {
				want = append(want, filepath.Join(dir, s+".png"), filepath.Join(dir, s+".svg"))
			}
			want = append(want, filepath.Join(dir, ReportName))
			if got := slices.Sorted(slices.Values(out.Files)); !slices.Equal(got, slices.Sorted(slices.Values(want))) {
				t.Errorf("wrote %q\nwant %q", got, want)
			}
			entries, err := os.ReadDir(dir)
			if err != nil {
				t.Fatal(err)
			}
			// Nothing else: no temporary file is left behind.
			if len(entries) != len(want)+1 {
				var names []string
				for _, e := range entries {
					names = append(names, e.Name())
				}
				t.Errorf("directory holds %q", names)
			}
			for _, s := range stems {
				checkPNG(t, filepath.Join(dir, s+".png"))
				checkSVG(t, filepath.Join(dir, s+".svg"))
			}
			checkHTML(t, filepath.Join(dir, ReportName), stems)
			if name == "pfa_only" {
				// No exact values: the figures that need them are left
				// out, each with a note.
				notes := strings.Join(out.Notes, " ")
				if !strings.Contains(notes, "pfa_ratio figure is left out") || !strings.Contains(notes, "integrand figure is left out") {
					t.Errorf("notes %q", out.Notes)
				}
			}
			if keep != "" {
				for _, f := range out.Files {
					data, _ := os.ReadFile(f)
					os.MkdirAll(filepath.Join(keep, name), 0o755)
					os.WriteFile(filepath.Join(keep, name, filepath.Base(f)), data, 0o644)
				}
			}
		})
	}
}

// checkPNG decodes a PNG and checks its size: 6 in × 4 in at 144 dpi.
func checkPNG(t *testing.T, path string) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Errorf("%s: %v", path, err)
		return
	}
	if b := img.Bounds(); b.Dx() != 864 || b.Dy() != 576 {
		t.Errorf("%s: %d × %d pixels, want 864 × 576", path, b.Dx(), b.Dy())
	}
}

// checkSVG parses an SVG as XML and checks that its root is <svg> and that
// it has text (axis labels) in it.
func checkSVG(t *testing.T, path string) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	dec := xml.NewDecoder(bytes.NewReader(data))
	root, texts := "", 0
	for {
		tok, err := dec.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Errorf("%s: not well-formed XML: %v", path, err)
			return
		}
		if se, ok := tok.(xml.StartElement); ok {
			if root == "" {
				root = se.Name.Local
			}
			if se.Name.Local == "text" {
				texts++
			}
		}
	}
	if root != "svg" || texts < 4 {
		t.Errorf("%s: root <%s> with %d text elements, want <svg> with axis labels", path, root, texts)
	}
}

// tags returns the tags of an HTML document in order, as "name" or
// "/name", and the values of their src and href attributes.
func tags(s string) (names, refs []string) {
	for {
		i := strings.IndexByte(s, '<')
		if i < 0 {
			return names, refs
		}
		s = s[i+1:]
		j := strings.IndexByte(s, '>')
		if j < 0 {
			return names, refs
		}
		tag := s[:j]
		s = s[j+1:]
		if strings.HasPrefix(tag, "!") {
			continue // <!DOCTYPE html>
		}
		name, attrs, _ := strings.Cut(tag, " ")
		names = append(names, strings.ToLower(name))
		for _, a := range []string{`src="`, `href="`} {
			if _, v, ok := strings.Cut(attrs, a); ok {
				v, _, _ = strings.Cut(v, `"`)
				refs = append(refs, v)
			}
		}
	}
}

// checkHTML checks report.html by structure (no HTML parser is at hand):
// balanced tags, the PNG of every figure embedded, the notice, no external
// reference and no unescaped markup from the data.
func checkHTML(t *testing.T, path string, stems []string) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	s := string(data)
	if !strings.HasPrefix(s, "<!DOCTYPE html>") || !strings.HasSuffix(strings.TrimSpace(s), "</html>") {
		t.Errorf("%s: not a complete HTML document", path)
	}
	names, refs := tags(s)
	void := map[string]bool{"meta": true, "img": true, "br": true, "link": true}
	var stack []string
	for _, n := range names {
		name, closing := strings.CutPrefix(n, "/")
		switch {
		case void[name]:
		case !closing:
			stack = append(stack, name)
		case len(stack) == 0 || stack[len(stack)-1] != name:
			t.Fatalf("%s: </%s> closes <%v>", path, name, stack)
		default:
			stack = stack[:len(stack)-1]
		}
	}
	if len(stack) != 0 {
		t.Errorf("%s: unclosed %v", path, stack)
	}
	if strings.Contains(s, "http://") || strings.Contains(s, "https://") {
		t.Errorf("%s: mentions a network address", path)
	}
	if len(refs) != len(stems) {
		t.Errorf("%s: %d references (src, href), want the %d figures", path, len(refs), len(stems))
	}
	for i, ref := range refs {
		// Attribute values may hold character references (html/template
		// writes + as &#43;).
		b64, ok := strings.CutPrefix(html.UnescapeString(ref), "data:image/png;base64,")
		if !ok {
			t.Errorf("%s: reference %.40q is not an embedded PNG", path, ref)
			continue
		}
		got, err := base64.StdEncoding.DecodeString(b64)
		if err != nil {
			t.Errorf("%s: embedded PNG: %v", path, err)
			continue
		}
		// The same bytes as the PNG file, which checkPNG decodes.
		if i < len(stems) {
			want, err := os.ReadFile(filepath.Join(filepath.Dir(path), stems[i]+".png"))
			if err != nil || !bytes.Equal(got, want) {
				t.Errorf("%s: image %d is not %s.png (%v)", path, i+1, stems[i], err)
			}
		}
	}
	if !strings.Contains(s, "Results are idealised") || !strings.Contains(s, "qualification practice") {
		t.Errorf("%s: no idealisation notice", path)
	}
	if slices.Contains(names, "script") {
		t.Errorf("%s: a <script> tag got through", path)
	}
}

func TestReportEscapes(t *testing.T) {
	dir := copyFixture(t, "energy")
	if _, err := Write(context.Background(), dir, Options{Formats: []Format{PNG}}); err != nil {
		t.Fatal(err)
	}
	data, err := os.ReadFile(filepath.Join(dir, ReportName))
	if err != nil {
		t.Fatal(err)
	}
	s := string(data)
	for _, want := range []string{"&lt;script&gt;alert(1)&lt;/script&gt;", "pad &amp; co"} {
		if !strings.Contains(s, want) {
			t.Errorf("report.html lacks the escaped body name %q", want)
		}
	}
	// The job file of this fixture does not exist: the scene is left out
	// and the report says how to get it.
	if !strings.Contains(s, "--job JOB.yaml") {
		t.Errorf("report.html does not say how to draw the scene")
	}
	// Only PNGs were asked for.
	if _, err := os.Stat(filepath.Join(dir, "energy.svg")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("energy.svg: %v, want no file", err)
	}
}

// figure returns the named figure of a fixture.
func figure(t *testing.T, fixture, name string, sc *Scene) Figure {
	t.Helper()
	r, err := Load(filepath.Join(fixtureDir, fixture))
	if err != nil {
		t.Fatal(err)
	}
	figs, _, err := Figures(r, sc)
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range figs {
		if f.Name == name {
			return f
		}
	}
	t.Fatalf("%s has no %s figure", fixture, name)
	return Figure{}
}

func isLog(a gplot.Axis) bool {
	_, ok := a.Scale.(gplot.LogScale)
	return ok
}

func TestAxes(t *testing.T) {
	for _, c := range []struct {
		fixture, figure string
		logX, logY      bool
	}{
		{"forces", "energy", true, true},
		{"forces", "force", true, true},
		{"forces", "stiffness", true, true},
		{"forces", "pfa_ratio", true, false},
		{"forces", "integrand", true, true},
		{"forces", "sticking", false, false},
		{"angle", "energy", false, true}, // against the angle
		{"angle", "torque", false, false},
		{"angle", "torsional_stiffness", false, false},
	} {
		f := figure(t, c.fixture, c.figure, nil)
		if isLog(f.Plot.X) != c.logX || isLog(f.Plot.Y) != c.logY {
			t.Errorf("%s/%s: log x %v, log y %v; want %v, %v", c.fixture, c.figure, isLog(f.Plot.X), isLog(f.Plot.Y), c.logX, c.logY)
		}
		if f.Plot.X.Label.Text == "" || f.Plot.Y.Label.Text == "" || !strings.Contains(f.Plot.X.Label.Text+f.Plot.Y.Label.Text, "[") {
			t.Errorf("%s/%s: axis labels %q, %q lack units", c.fixture, c.figure, f.Plot.X.Label.Text, f.Plot.Y.Label.Text)
		}
	}
	// The fixtures carry force vectors only: the force axis says it shows
	// their component along the sweep direction.
	if l := figure(t, "forces", "force", nil).Plot.Y.Label.Text; !strings.Contains(l, "along the sweep direction") {
		t.Errorf("force axis %q", l)
	}
	// The angle fixture has no sweep direction: the force figure shows the
	// norm and says so.
	if l := figure(t, "angle", "force", nil).Plot.Y.Label.Text; !strings.Contains(l, "norm") {
		t.Errorf("angle force axis %q", l)
	}
}

// TestForceAlong checks the projection on the sweep direction.
func TestForceAlong(t *testing.T) {
	r := &Result{Sweep: Sweep{Direction: [3]float64{0, 0, -1}}}
	f, m := r.forceAlong(&Point{ForceN: &[3]Num{1, 2, -3}})
	if f != 3 || m != projected {
		t.Errorf("F·ê = %g (mode %d), want 3 projected", f, m)
	}
	given := Num(5)
	if f, m := r.forceAlong(&Point{ForceN: &[3]Num{1, 2, -3}, ForceAlongN: &given}); f != 5 || m != alongGiven {
		t.Errorf("F·ê = %g (mode %d), want the given 5", f, m)
	}
	r.Sweep.Direction = [3]float64{}
	if f, m := r.forceAlong(&Point{ForceN: &[3]Num{3, 0, -4}}); f != 5 || m != norm {
		t.Errorf("|F| = %g (mode %d), want 5 as the norm", f, m)
	}
}

func TestSticking(t *testing.T) {
	f := figure(t, "forces", "sticking", nil)
	if !strings.Contains(f.Plot.Title.Text, "FREE") {
		t.Errorf("title %q lacks the verdict", f.Plot.Title.Text)
	}
	// The axes show the sampled gaps (0.2 to 1.5 µm) in µm, from zero force.
	if f.Plot.X.Min > 0.2 || f.Plot.X.Max < 1.5 || f.Plot.X.Max > 2 || f.Plot.Y.Min != 0 {
		t.Errorf("ranges x [%g, %g], y from %g", f.Plot.X.Min, f.Plot.X.Max, f.Plot.Y.Min)
	}
}

// cubeOverPlane builds a cube of side 2 centred at height 1.5 over the
// plane z = 0: its bottom face is at z = 0.5.
func cubeOverPlane(t *testing.T) *Scene {
	t.Helper()
	m, err := mesh.Box(r3.Vec{X: 2, Y: 2, Z: 2}, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	return &Scene{
		Unit:      "µm",
		Bodies:    []SceneBody{{Name: "cube", Mesh: m.Translate(r3.Vec{Z: 1.5}), Moving: true}},
		Substrate: &Plane{Normal: [3]float64{0, 0, 1}},
		Direction: r3.Vec{Z: -1},
		Label:     "sweep point 1 of 1",
	}
}

func TestScene(t *testing.T) {
	sc := cubeOverPlane(t)
	ap := sc.approach()
	// The bottom face is at z = 1.5 - 1 = 0.5, exact in binary.
	if !ap.ok || math.Abs(ap.gap-0.5) > 1e-12 || math.Abs(ap.pb.Z) > 1e-12 {
		t.Errorf("approach %+v, want gap 0.5 to the plane z = 0", ap)
	}
	f, err := sceneFigure(sc)
	if err != nil {
		t.Fatal(err)
	}
	p := f.Plot
	if p.X.Label.Text != "x [µm]" || !strings.HasPrefix(p.Y.Label.Text, "z [µm]") {
		t.Errorf("labels %q, %q", p.X.Label.Text, p.Y.Label.Text)
	}
	if _, err := f.Render(PNG); err != nil {
		t.Fatal(err)
	}
	// Equal scales: one µm spans as many points across as up the data area
	// the figure is drawn with. Tolerance 1e-9 relative: the ranges are set
	// from this very measurement, so only rounding separates them.
	da := dataArea(p, draw.NewCanvas(new(recorder.Canvas), figWidth, figHeight))
	perX := (p.X.Max - p.X.Min) / float64(da.Max.X-da.Min.X)
	perY := (p.Y.Max - p.Y.Min) / float64(da.Max.Y-da.Min.Y)
	if math.Abs(perX/perY-1) > 1e-9 {
		t.Errorf("µm per point: %g across, %g up", perX, perY)
	}
	// The whole cube and the plane's trace (z = 0) are in view.
	if p.X.Min > -1 || p.X.Max < 1 || p.Y.Min > 0 || p.Y.Max < 2.5 {
		t.Errorf("view x [%g, %g] z [%g, %g] does not hold the scene", p.X.Min, p.X.Max, p.Y.Min, p.Y.Max)
	}
}

func TestSceneAt(t *testing.T) {
	j, err := job.Load(filepath.Join(fixtureDir, "sphere_plate.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	s, err := j.Build()
	if err != nil {
		t.Fatal(err)
	}
	r, err := Load(filepath.Join(fixtureDir, "forces"))
	if err != nil {
		t.Fatal(err)
	}
	sc, err := SceneAt(s, r)
	if err != nil {
		t.Fatal(err)
	}
	// The closest approach is the first point, gap 0.2 µm; the job placed
	// the ball there with mesh.OffsetForGap, so the drawn gap is 0.2 to
	// that routine's tolerance (1e-9 relative is ample).
	if ap := sc.approach(); math.Abs(ap.gap-0.2) > 1e-9 || sc.Label != "sweep point 1 of 6" {
		t.Errorf("gap %g at %s, want 0.2 at point 1", ap.gap, sc.Label)
	}
	// A result of another job is refused.
	other := *r
	other.Points = r.Points[:2]
	if _, err := SceneAt(s, &other); err == nil || !strings.Contains(err.Error(), "not the job of this run") {
		t.Errorf("mismatched job: %v", err)
	}
	bad := &job.Scene{Bodies: []scatter.Body{{Name: "x"}}, Sweep: s.Sweep}
	if _, err := SceneAt(bad, r); err == nil {
		t.Error("a scene with other bodies was accepted")
	}
}

// TestImplicitJob finds the job file next to the output directory, where
// a run puts JOB.out by default.
func TestImplicitJob(t *testing.T) {
	root := t.TempDir()
	yaml, err := os.ReadFile(filepath.Join(fixtureDir, "sphere_plate.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(root, "sphere_plate.yaml"), yaml, 0o644); err != nil {
		t.Fatal(err)
	}
	res, err := os.ReadFile(filepath.Join(fixtureDir, "forces", ResultName))
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(root, "sphere_plate.out")
	if err := os.Mkdir(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, ResultName), res, 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := Write(context.Background(), dir, Options{Formats: []Format{SVG}})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Contains(out.Files, filepath.Join(dir, "scene.svg")) {
		t.Errorf("no scene figure: wrote %q, notes %q", out.Files, out.Notes)
	}
}

func TestStale(t *testing.T) {
	dir := copyFixture(t, "forces")
	if _, err := Write(context.Background(), dir, Options{Job: filepath.Join(fixtureDir, "sphere_plate.yaml")}); err != nil {
		t.Fatal(err)
	}
	// The same directory with an energy-only result: the force figures of
	// the first result go.
	data, err := os.ReadFile(filepath.Join(fixtureDir, "energy", ResultName))
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, ResultName), data, 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Write(context.Background(), dir, Options{}); err != nil {
		t.Fatal(err)
	}
	for _, n := range []string{"force.png", "sticking.svg", "scene.png"} {
		if _, err := os.Stat(filepath.Join(dir, n)); !errors.Is(err, os.ErrNotExist) {
			t.Errorf("%s of the earlier result: %v", n, err)
		}
	}
}

func TestBadInput(t *testing.T) {
	missing := filepath.Join(t.TempDir(), "nowhere")
	empty := t.TempDir()
	corrupt := t.TempDir()
	os.WriteFile(filepath.Join(corrupt, ResultName), []byte("{\n  \"unit\": \"um\",\n  \"points\": [1,\n"), 0o644)
	wrongType := t.TempDir()
	os.WriteFile(filepath.Join(wrongType, ResultName), []byte("{\"unit\": \"um\",\n\"points\": [{\"gap\": \"far\"}]}"), 0o644)
	noPoints := t.TempDir()
	os.WriteFile(filepath.Join(noPoints, ResultName), []byte(`{"unit": "um", "points": []}`), 0o644)
	badUnit := t.TempDir()
	os.WriteFile(filepath.Join(badUnit, ResultName), []byte(`{"unit": "furlong", "points": [{"gap": 1}]}`), 0o644)
	file := filepath.Join(t.TempDir(), "plain")
	os.WriteFile(file, nil, 0o644)

	for _, c := range []struct {
		name, dir string
		opts      Options
		want      []string // substrings of the error
	}{
		{"missing directory", missing, Options{}, []string{missing, "no such directory"}},
		{"not a directory", file, Options{}, []string{file, "not a directory"}},
		{"no result", empty, Options{}, []string{filepath.Join(empty, ResultName), "not found"}},
		{"corrupt", corrupt, Options{}, []string{filepath.Join(corrupt, ResultName) + ":4:", "damaged"}},
		{"wrong type", wrongType, Options{}, []string{filepath.Join(wrongType, ResultName), "points.gap", "damaged"}},
		{"no points", noPoints, Options{}, []string{filepath.Join(noPoints, ResultName), "no sweep points"}},
		{"unit", badUnit, Options{}, []string{filepath.Join(badUnit, ResultName), "furlong"}},
		{"missing job", copyFixture(t, "forces"), Options{Job: "nowhere.yaml"}, []string{"--job nowhere.yaml"}},
		{"other job", copyFixture(t, "energy"), Options{Job: filepath.Join(fixtureDir, "sphere_plate.yaml")}, []string{"not the job of this run"}},
	} {
		_, err := Write(context.Background(), c.dir, c.opts)
		if err == nil {
			t.Errorf("%s: no error", c.name)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: %q lacks %q", c.name, err, w)
			}
		}
		if strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: error spans lines: %q", c.name, err)
		}
		// A failure writes nothing.
		if fi, statErr := os.Stat(c.dir); statErr == nil && fi.IsDir() {
			if _, err := os.Stat(filepath.Join(c.dir, ReportName)); !errors.Is(err, os.ErrNotExist) {
				t.Errorf("%s: report.html written", c.name)
			}
		}
	}
}

func TestParseFormats(t *testing.T) {
	for _, c := range []struct {
		in   []string
		want []Format
		ok   bool
	}{
		{nil, []Format{PNG, SVG}, true},
		{[]string{"svg"}, []Format{SVG}, true},
		{[]string{"png", "png"}, []Format{PNG}, true},
		{[]string{"pdf"}, nil, false},
	} {
		got, err := ParseFormats(c.in)
		if (err == nil) != c.ok || !slices.Equal(got, c.want) {
			t.Errorf("ParseFormats(%q) = %v, %v", c.in, got, err)
		}
	}
}

func TestLogTicks(t *testing.T) {
	for _, c := range []struct {
		lo, hi float64
		want   []string // labels
	}{
		{1e-21, 1e-15, []string{"1e-21", "1e-20", "1e-19", "1e-18", "1e-17", "1e-16", "1e-15"}},
		{0.15, 2, []string{"0.2", "0.5", "1", "2"}},
		{0.4, 1.6, []string{"0.4", "0.5", "0.6", "0.7", "0.8", "0.9", "1"}},
		{5.3e-21, 1.5e-20, []string{"6e-21", "8e-21", "1e-20", "1.2e-20", "1.4e-20"}},
	} {
		var got []string
		for _, tk := range (logTicks{}).Ticks(c.lo, c.hi) {
			if tk.Label != "" {
				got = append(got, tk.Label)
			}
		}
		if !slices.Equal(got, c.want) {
			t.Errorf("ticks of [%g, %g]: %q, want %q", c.lo, c.hi, got, c.want)
		}
	}
}

func TestCancel(t *testing.T) {
	dir := copyFixture(t, "energy")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Write(ctx, dir, Options{}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
	if _, err := os.Stat(filepath.Join(dir, "energy.png")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("cancelled run wrote energy.png")
	}
}

func TestLinearTicks(t *testing.T) {
	for _, c := range []struct {
		lo, hi float64
		want   []string // labels
	}{
		{0, 10, []string{"0", "2", "4", "6", "8", "10"}},
		{-3.9e-21, 1.4e-22, []string{"-3e-21", "-2e-21", "-1e-21", "0"}},
		{0.15, 1.55, []string{"0.2", "0.4", "0.6", "0.8", "1", "1.2", "1.4"}},
		{-0.5, 10.5, []string{"0", "2", "4", "6", "8", "10"}},
	} {
		var got []string
		for _, tk := range (linearTicks{}).Ticks(c.lo, c.hi) {
			if tk.Label != "" {
				got = append(got, tk.Label)
			}
		}
		if !slices.Equal(got, c.want) {
			t.Errorf("ticks of [%g, %g]: %q, want %q", c.lo, c.hi, got, c.want)
		}
	}
}
