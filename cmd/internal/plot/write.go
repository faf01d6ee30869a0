package plot

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"sync"

	"github.com/fluctus/fluctus/cmd/internal/job"
)

// ReportName is the HTML report Write puts beside the figures.
const ReportName = "report.html"

// figureNames are the stems of every figure Write may produce; files of
// these names that a new call does not write are removed, so the directory
// never mixes figures of two results.
var figureNames = []string{
	"energy", "force", "stiffness", "torque", "torsional_stiffness",
	"pfa_ratio", "integrand", "sticking", "scene",
}

// Options control Write.
type Options struct {
	// Formats of the figure files; empty means PNG and SVG. The report
	// always embeds PNGs.
	Formats []Format
	// Scene is the run's scene when the caller has it (right after a run);
	// it is drawn at the closest approach.
	Scene *job.Scene
	// Job is a job file to rebuild the scene from when Scene is nil. If it
	// is empty, the job file named in result.json is tried, as given and
	// next to the output directory, and the scene is left out with a note
	// when it cannot be found or built.
	Job string
}

// Output lists what Write did.
type Output struct {
	Files []string // the files written, in the order of the report
	Notes []string // what was left out and why, one sentence each
}

// Write reads dir/result.json and writes the figures and report.html into
// dir. Everything is rendered in memory first; each file is then written to
// a temporary file and renamed into place, so a failure leaves no
// half-written file. Figures an earlier call wrote that this result does not
// have are removed.
func Write(ctx context.Context, dir string, o Options) (*Output, error) {
	formats := o.Formats
	if len(formats) == 0 {
		formats = []Format{PNG, SVG}
	}
	r, err := Load(dir)
	if err != nil {
		return nil, err
	}
	sc, notes, err := sceneFor(r, dir, o)
	if err != nil {
		return nil, err
	}
	figs, figNotes, err := Figures(r, sc)
	if err != nil {
		return nil, err
	}
	notes = append(notes, figNotes...)

	pngs, svgs, err := render(ctx, figs, slices.Contains(formats, SVG))
	if err != nil {
		return nil, err
	}
	type file struct {
		name string
		data []byte
	}
	var files []file
	for i, f := range figs {
		if slices.Contains(formats, PNG) {
			files = append(files, file{f.Name + ".png", pngs[i]})
		}
		if svgs != nil {
			files = append(files, file{f.Name + ".svg", svgs[i]})
		}
	}
	html, err := HTML(r, figs, pngs, notes)
	if err != nil {
		return nil, err
	}
	files = append(files, file{ReportName, html})

	// Write every file to a temporary one first, then rename them all.
	tmps := make([]string, len(files))
	cleanup := func() {
		for _, t := range tmps {
			if t != "" {
				os.Remove(t)
			}
		}
	}
	for i, f := range files {
		t, err := writeTemp(dir, f.name, f.data)
		if err != nil {
			cleanup()
			return nil, err
		}
		tmps[i] = t
	}
	out := &Output{Notes: notes}
	for i, f := range files {
		path := filepath.Join(dir, f.name)
		if err := os.Rename(tmps[i], path); err != nil {
			cleanup()
			return nil, fmt.Errorf("writing %s: %w", path, err)
		}
		tmps[i] = ""
		out.Files = append(out.Files, path)
	}
	if err := removeStale(dir, out.Files); err != nil {
		return out, err
	}
	return out, nil
}

// render draws every figure as PNG and, with svg, as SVG, one figure per
// goroutine on up to GOMAXPROCS goroutines. It stops early when ctx is
// cancelled.
func render(ctx context.Context, figs []Figure, svg bool) (pngs, svgs [][]byte, err error) {
	pngs = make([][]byte, len(figs))
	if svg {
		svgs = make([][]byte, len(figs))
	}
	errs := make([]error, len(figs))
	sem := make(chan struct{}, runtime.GOMAXPROCS(0))
	var wg sync.WaitGroup
	for i := range figs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			sem <- struct{}{}
			defer func() { <-sem }()
			if errs[i] = ctx.Err(); errs[i] != nil {
				return
			}
			// One figure's plot is drawn by one goroutine only.
			if pngs[i], errs[i] = figs[i].Render(PNG); errs[i] != nil || !svg {
				return
			}
			svgs[i], errs[i] = figs[i].Render(SVG)
		}()
	}
	wg.Wait()
	if err := errors.Join(errs...); err != nil {
		if ctx.Err() != nil {
			return nil, nil, fmt.Errorf("drawing the figures: %w", ctx.Err())
		}
		return nil, nil, err
	}
	return pngs, svgs, nil
}

// sceneFor returns the scene to draw, or nil with a note saying why there
// is none. Only a failure of an explicitly given job file is an error.
func sceneFor(r *Result, dir string, o Options) (*Scene, []string, error) {
	if o.Scene != nil {
		sc, err := SceneAt(o.Scene, r)
		if err != nil {
			return nil, nil, fmt.Errorf("drawing the scene: %w", err)
		}
		return sc, nil, nil
	}
	if o.Job != "" {
		sc, err := sceneFromJob(o.Job, r)
		if err != nil {
			return nil, nil, fmt.Errorf("--job %s: %w", o.Job, err)
		}
		return sc, nil, nil
	}
	const how = "give the job file with --job JOB.yaml to draw it"
	path := findJob(r.Job, dir)
	if path == "" {
		if r.Job == "" {
			return nil, []string{"The scene figure is left out: result.json names no job file; " + how + "."}, nil
		}
		return nil, []string{fmt.Sprintf("The scene figure is left out: the job file %s of this run was not found; %s.", r.Job, how)}, nil
	}
	sc, err := sceneFromJob(path, r)
	if err != nil {
		return nil, []string{fmt.Sprintf("The scene figure is left out: %s: %v; %s.", path, err, how)}, nil
	}
	return sc, nil, nil
}

// findJob returns the run's job file as given, or the file of that name
// next to the output directory (where a run puts JOB.out by default), or ""
// if neither exists.
func findJob(name, dir string) string {
	if name == "" {
		return ""
	}
	for _, p := range []string{name, filepath.Join(filepath.Dir(filepath.Clean(dir)), filepath.Base(name))} {
		if fi, err := os.Stat(p); err == nil && fi.Mode().IsRegular() {
			return p
		}
	}
	return ""
}

// sceneFromJob loads and builds the job file and places its bodies at the
// closest approach of r.
func sceneFromJob(path string, r *Result) (*Scene, error) {
	j, err := job.Load(path)
	if err != nil {
		return nil, err
	}
	s, err := j.Build()
	if err != nil {
		return nil, err
	}
	return SceneAt(s, r)
}

// writeTemp writes data to a new temporary file in dir named after name
// and returns its path.
func writeTemp(dir, name string, data []byte) (string, error) {
	path := filepath.Join(dir, name)
	f, err := os.CreateTemp(dir, "."+name+".*.tmp")
	if err != nil {
		return "", fmt.Errorf("writing %s: %w", path, err)
	}
	tmp := f.Name()
	_, err = f.Write(data)
	if err == nil {
		err = f.Chmod(0o644)
	}
	if err == nil {
		err = f.Sync()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		os.Remove(tmp)
		return "", fmt.Errorf("writing %s: %w", path, err)
	}
	return tmp, nil
}

// removeStale deletes figure files of known names in dir that are not in
// written.
func removeStale(dir string, written []string) error {
	keep := make(map[string]bool, len(written))
	for _, w := range written {
		keep[w] = true
	}
	for _, n := range figureNames {
		for _, ext := range []Format{PNG, SVG} {
			p := filepath.Join(dir, n+"."+string(ext))
			if keep[p] {
				continue
			}
			if err := os.Remove(p); err != nil && !errors.Is(err, fs.ErrNotExist) {
				return fmt.Errorf("removing %s of an earlier result: %w", p, err)
			}
		}
	}
	return nil
}
