package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/fluctus/fluctus/cmd/internal/job"
)

// plotFixtures holds the result.json fixtures of package plot.
var plotFixtures = filepath.Join("..", "..", "testdata", "plot")

// plotDir copies the result.json of a plot fixture into a new directory.
func plotDir(t *testing.T, fixture string) string {
	t.Helper()
	data, err := os.ReadFile(filepath.Join(plotFixtures, fixture, "result.json"))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "result.json"), data, 0o644); err != nil {
		t.Fatal(err)
	}
	return dir
}

// runPlot runs "fluctus plot" with args in-process.
func runPlot(a *app, args ...string) error {
	cmd := a.plotCommand()
	cmd.SetArgs(args)
	cmd.SetOut(a.stdout)
	cmd.SetErr(a.stderr)
	cmd.SilenceUsage, cmd.SilenceErrors = true, true
	return cmd.ExecuteContext(context.Background())
}

func TestPlotCommand(t *testing.T) {
	var stdout, stderr bytes.Buffer
	a := newApp(&stdout, &stderr, false)
	dir := plotDir(t, "forces")
	if err := runPlot(a, dir, "--format", "svg", "--job", filepath.Join(plotFixtures, "sphere_plate.yaml")); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"report.html", "energy.svg", "sticking.svg", "scene.svg"} {
		if _, err := os.Stat(filepath.Join(dir, name)); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "energy.png")); err == nil {
		t.Error("energy.png written with --format svg")
	}
	if !strings.Contains(stdout.String(), filepath.Join(dir, "report.html")) || stderr.Len() != 0 {
		t.Errorf("stdout %q, stderr %q", stdout.String(), stderr.String())
	}

	// Without the job file the scene is left out with a note.
	stdout.Reset()
	dir = plotDir(t, "energy")
	if err := runPlot(a, dir); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(stderr.String(), "note: The scene figure is left out") {
		t.Errorf("stderr %q", stderr.String())
	}

	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{dir, "--format", "pdf"}, `--format: unknown figure format "pdf"`},
		{[]string{filepath.Join(dir, "nowhere")}, "no such directory"},
		{[]string{t.TempDir()}, "result.json: not found"},
	} {
		if err := runPlot(a, c.args...); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("plot %q: %v, want %q", c.args, err, c.want)
		}
	}
}

// TestPlotRun draws a run's results with the scene the run built.
func TestPlotRun(t *testing.T) {
	j, err := job.Load(filepath.Join(plotFixtures, "sphere_plate.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	scene, err := j.Build()
	if err != nil {
		t.Fatal(err)
	}
	var stdout, stderr bytes.Buffer
	a := newApp(&stdout, &stderr, false)
	dir := plotDir(t, "forces")
	if err := a.plotRun(context.Background(), dir, scene); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(dir, "scene.png")); err != nil {
		t.Error(err)
	}
	// A result that does not belong to the scene fails, saying that the
	// results themselves are written.
	dir = plotDir(t, "angle")
	if err := a.plotRun(context.Background(), dir, scene); err == nil || !strings.Contains(err.Error(), "the results are written") {
		t.Errorf("mismatched scene: %v", err)
	}
}
