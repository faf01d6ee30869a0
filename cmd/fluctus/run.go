package main

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"sync"
	"time"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"github.com/fluctus/fluctus/cmd/internal/job"
	"github.com/fluctus/fluctus/cmd/internal/report"
	"github.com/fluctus/fluctus/cmd/internal/sysmem"
	"github.com/fluctus/fluctus/scatter"
)

// runOptions are the flags shared by run and demo.
type runOptions struct {
	out     string
	threads int
	quiet   bool
	// memoryLimit replaces MemAvailable as the memory a run may use, in
	// bytes (hidden flag, for tests and for sharing a machine); 0 means
	// MemAvailable.
	memoryLimit int64
}

func (o *runOptions) addFlags(fs *pflag.FlagSet, outHelp string) {
	fs.StringVarP(&o.out, "out", "o", "", outHelp)
	fs.IntVar(&o.threads, "threads", 0, "goroutines for matrix assembly (0: all cores)")
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "hide the progress bar")
	fs.Int64Var(&o.memoryLimit, "memory-limit", 0, "bytes of memory the run may use (0: MemAvailable from /proc/meminfo)")
	fs.MarkHidden("memory-limit")
}

const outputHelp = `
Before starting, fluctus builds and checks every mesh, checks that no two bodies
overlap or touch at any sweep point, and prints the number of unknowns and the
memory of the dense matrices; it refuses a run that would not fit in the
available memory (MemAvailable in /proc/meminfo).

Output: a table on stdout (gap, energy, its estimated error, the PFA energy and
the ratio E/PFA, energies in joules) and, in the output directory,
result.json (every number, including the frequency integrand samples) and
result.csv (one row of scalars per sweep point).

Result files: once the job has passed its checks and the computation starts,
result.json and result.csv left by an earlier run in the output directory are
removed; the new ones are written to temporary files and renamed into place
only when every sweep point has been computed. A failed or interrupted
computation therefore leaves no result files; a job that fails its checks
leaves the directory untouched. Ctrl-C stops a run cleanly.

Results are idealised (smooth homogeneous perfect conductors in vacuum at the
given temperature; no roughness, patch charges or humidity): keep margin and
defer to your own qualification practice and the applicable standards.`

func (a *app) runCommand() *cobra.Command {
	var o runOptions
	cmd := &cobra.Command{
		Use:   "run JOB.yaml",
		Short: "Compute the Casimir energy at every point of a job's sweep",
		Long: `Run reads a job file (YAML) that names the length unit, the bodies (generated
shapes or STL files) and a sweep that moves one body along a direction, and
computes the Casimir energy at every sweep point.

  unit: um                 # nm | um | mm | m (required)
  temperature: 0           # kelvin (default 0)
  accuracy: 1e-3           # relative target of the frequency integral (default 1e-3)
  bodies:
    - name: ball
      shape: {sphere: {radius: 1}}   # or box {size: [x, y, z]},
                                     # plate {width, depth, thickness},
                                     # cylinder {radius, height}
      mesh_size: 0.2                 # target triangle edge (shapes only)
      position: [0, 0, 0]
    - name: pad
      file: pad.stl                  # relative to the job file
      position: [0, 0, -3]
      rotation: {axis: [0, 1, 0], degrees: 10}   # about the body's own origin,
                                                 # applied before position
  sweep:
    body: ball             # the body that moves
    direction: [0, 0, -1]  # in which it approaches the others
    gaps: [2, 1, 0.5]      # closest surface distances, or offsets: [...]
                           # (displacements along direction)

In a gap sweep the moving body is shifted along the direction until it is at
each gap from the nearest other body, staying on the side the direction comes
from (above the pad in this example).

The default output directory is JOB.out next to the job file (for
jobs/plate.yaml: jobs/plate.out).
` + outputHelp,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			j, err := job.Load(args[0])
			if err != nil {
				return err
			}
			if o.out == "" {
				o.out = filepath.Join(j.Dir, j.Name+".out")
			}
			return a.execute(cmd.Context(), j, o)
		},
	}
	o.addFlags(cmd.Flags(), "output directory (default: JOB.out next to the job file)")
	return cmd
}

// execute checks, runs and reports a job.
func (a *app) execute(ctx context.Context, j *job.Job, o runOptions) error {
	if o.threads < 0 {
		return fmt.Errorf("--threads %d: give a positive number of goroutines, or 0 for all cores", o.threads)
	}
	if o.memoryLimit < 0 {
		return fmt.Errorf("--memory-limit %d: give a positive number of bytes, or 0 for the available memory", o.memoryLimit)
	}
	scene, err := j.Build()
	if err != nil {
		return err
	}
	gaps, err := scene.Clearance()
	if err != nil {
		return err
	}
	for _, w := range scene.Warnings(gaps) {
		fmt.Fprintf(a.stderr, "warning: %s\n", w)
	}

	cost := a.estimate(scene.Bodies)
	fmt.Fprintf(a.stdout, "%s: %d bodies, %d sweep points, %d unknowns, dense matrices %s\n",
		j.Path, len(scene.Bodies), len(scene.Sweep.Offsets), cost.Unknowns, sysmem.Format(cost.MatrixBytes))
	if err := a.checkMemory(cost, o.memoryLimit); err != nil {
		return err
	}

	if err := os.MkdirAll(o.out, 0o755); err != nil {
		return fmt.Errorf("creating the output directory: %w", err)
	}
	if err := report.RemoveStale(o.out); err != nil {
		return err
	}

	progress, done := a.progress(o.quiet)
	start := time.Now()
	points, err := a.energies(ctx, scene.Bodies, scene.Sweep, scatter.Settings{
		Accuracy:          j.Accuracy,
		ThermalWavenumber: j.Unit.ThermalWavenumber(j.Temperature),
		Threads:           o.threads,
		Progress:          progress,
	})
	done()
	if err != nil {
		if ctx.Err() != nil {
			if cause := context.Cause(ctx); cause != ctx.Err() {
				return fmt.Errorf("interrupted (%v), no results written: %w", cause, ctx.Err())
			}
			return fmt.Errorf("interrupted, no results written: %w", ctx.Err())
		}
		return fmt.Errorf("computing the energies: %w", err)
	}
	if len(points) != len(scene.Sweep.Offsets) {
		return fmt.Errorf("computing the energies: the solver returned %d points for %d sweep points", len(points), len(scene.Sweep.Offsets))
	}

	res := report.New(scene, cost, points)
	if err := report.WriteTable(a.stdout, res); err != nil {
		return err
	}
	if err := report.WriteFiles(o.out, res); err != nil {
		return err
	}
	fmt.Fprintf(a.stdout, "\nwrote %s and %s (%s)\n",
		filepath.Join(o.out, report.JSONName), filepath.Join(o.out, report.CSVName), time.Since(start).Round(time.Millisecond))
	return nil
}

// checkMemory refuses a run whose dense matrices exceed limit bytes, or the
// available memory when limit is 0.
func (a *app) checkMemory(cost scatter.Cost, limit int64) error {
	source := "--memory-limit"
	if limit == 0 {
		avail, err := a.memAvailable()
		if err != nil {
			fmt.Fprintf(a.stderr, "warning: cannot check the memory (%v); going ahead\n", err)
			return nil
		}
		limit, source = avail, "MemAvailable in /proc/meminfo"
	}
	if cost.MatrixBytes > limit {
		return fmt.Errorf("refusing to start: the dense matrices of %d unknowns need %s but only %s is available (%s); use a coarser mesh (larger mesh_size) or a machine with more memory",
			cost.Unknowns, sysmem.Format(cost.MatrixBytes), sysmem.Format(limit), source)
	}
	return nil
}

// progress returns the solver's progress callback and a function that
// removes the bar; both do nothing when the bar is hidden. Until the solver
// first reports, a spinner shows that the run is preparing (assembling the
// first matrices).
func (a *app) progress(quiet bool) (func(done, total int), func()) {
	if quiet || !a.showProgress {
		return nil, func() {}
	}
	bar := progressbar.NewOptions(-1,
		progressbar.OptionSetWriter(a.stderr),
		progressbar.OptionSetDescription("preparing"),
		progressbar.OptionShowCount(),
		progressbar.OptionSetElapsedTime(true),
		progressbar.OptionSetPredictTime(true),
		progressbar.OptionThrottle(100*time.Millisecond),
		progressbar.OptionClearOnFinish(),
	)
	var mu sync.Mutex
	max := -1
	update := func(done, total int) {
		mu.Lock()
		defer mu.Unlock()
		if max < 0 {
			bar.Describe("computing")
		}
		if total != max {
			max = total
			bar.ChangeMax(total)
		}
		bar.Set(done)
	}
	finish := func() {
		mu.Lock()
		defer mu.Unlock()
		bar.Finish() // stops the spinner and clears the line
	}
	return update, finish
}
