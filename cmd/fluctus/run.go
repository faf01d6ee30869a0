package main

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sync"
	"time"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/cmd/internal/job"
	"github.com/fluctus/fluctus/cmd/internal/pfa"
	"github.com/fluctus/fluctus/cmd/internal/report"
	"github.com/fluctus/fluctus/cmd/internal/stick"
	"github.com/fluctus/fluctus/cmd/internal/sysmem"
	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/scatter/sticking"
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
	// pfaOnly skips the solver and reports the PFA estimates.
	pfaOnly bool
	// convergence runs the job at levels mesh levels (2 or 3).
	convergence bool
	levels      int
	// stickingRounds bounds the refinement rounds of the sticking analysis
	// (hidden flag, for tests and quick looks).
	stickingRounds int
	// plot also draws the figures and report.html (see fluctus plot).
	plot bool
	shardOptions
}

func (o *runOptions) addFlags(fs *pflag.FlagSet, outHelp string) {
	fs.StringVarP(&o.out, "out", "o", "", outHelp)
	fs.IntVar(&o.threads, "threads", 0, "goroutines for matrix assembly (0: all cores)")
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "hide the progress bar")
	fs.Int64Var(&o.memoryLimit, "memory-limit", 0, "bytes of memory the run may use (0: MemAvailable from /proc/meminfo)")
	fs.MarkHidden("memory-limit")
	fs.BoolVar(&o.plot, "plot", false, "also draw the figures and report.html into the output directory (see fluctus plot)")
	fs.BoolVar(&o.pfaOnly, "pfa-only", false, "skip the solver: print and write the proximity-force (PFA) estimates only")
	fs.BoolVar(&o.convergence, "convergence", false, "run the job at several mesh levels (sizes x1, x1/√2, x1/2) and extrapolate")
	fs.IntVar(&o.levels, "levels", 3, "mesh levels of --convergence: 2 or 3")
	fs.IntVar(&o.stickingRounds, "sticking-rounds", stickingRounds, "most rounds of extra points the sticking analysis may compute")
	fs.MarkHidden("sticking-rounds")
}

const outputHelp = `
Before starting, fluctus builds and checks every mesh, checks that no two bodies
overlap or touch (and none touches or crosses the substrate) at any sweep
point, prints the triangles of every body, the number of unknowns and the
memory of the dense matrices, and warns where triangles near the closest
approach are larger than half the gap; it refuses a run that would not fit in
the available memory (MemAvailable in /proc/meminfo).

Output: tables on stdout (gap, energy, its estimated error, the PFA energy and
E/PFA in joules; with forces the force along the approach direction, its
error, the PFA force, F/PFA and the stiffness -dF/ds, or for an angle sweep
the torque about the axis and the torsional stiffness), then the sticking
verdict when the job gives a spring, and, in the output directory,
result.json (every number, including the force and torque vectors and the
frequency integrand samples) and result.csv (one row of scalars per point).

With a spring the analysis may ask for extra sweep points (up to 3 rounds,
until it is accurate to 1e-3); they are computed with the same settings,
marked * in the tables and "added_for": "sticking" in result.json. If the
analysis itself fails (a repulsion, say), the computed points are still
written and fluctus exits with status 1.

--pfa-only skips the solver and reports the proximity-force estimates (energy
and force, from the moving body's panels, the others' and their mean) at once.
--convergence runs the job at mesh sizes x1, x1/√2 and x1/2 (--levels 2: the
first two), reports each level, the Richardson-extrapolated values and the
observed order of convergence, and writes them under "convergence" in
result.json; the tables show the finest level.

Result files: once the job has passed its checks and the computation starts,
result.json and result.csv left by an earlier run in the output directory are
removed; the new ones are written to temporary files and renamed into place
only when every point has been computed. A failed or interrupted computation
therefore leaves no result files; a job that fails its checks leaves the
directory untouched. Ctrl-C stops a run cleanly.

With real materials the PFA columns use the Lifshitz energy per area of the
two facing bodies' materials (the substrate is a perfect conductor) at the
job's temperature, and the output names each body's material and, at T > 0,
the n = 0 Matsubara treatment (Drude metals: no TE contribution; plasma
metals: kept).

Results are idealised (smooth homogeneous perfect conductors, or bodies of the
stated material models, in vacuum at the given temperature; no roughness,
patch charges or humidity): keep margin and defer to your own qualification
practice and the applicable standards.`

func (a *app) runCommand() *cobra.Command {
	var o runOptions
	cmd := &cobra.Command{
		Use:   "run JOB.yaml",
		Short: "Compute Casimir energies, forces and torques along a job's sweep",
		Long: `Run reads a job file (YAML) that names the length unit, the bodies (generated
shapes or STL files) and a sweep that moves or turns one body, and computes
the Casimir energy, force, torque and stiffness at every sweep point.

  unit: um                 # nm | um | mm | m (required)
  temperature: 0           # kelvin (default 0)
  accuracy: 1e-3           # relative target of the frequency integral (default 1e-3)
  forces: true             # force, torque and stiffness too (default true)
  torque_about: [0, 0, 3]  # default: the moving body's volume centroid
  substrate: {point: [0, 0, -1], normal: [0, 0, 1]}   # optional conducting
                           # plane; normal towards the bodies
  bodies:
    - name: ball
      shape: {sphere: {radius: 1}}   # or box {size: [x, y, z]},
                                     # plate {width, depth, thickness},
                                     # cylinder {radius, height}
      mesh_size: 0.2                 # target triangle edge, or graded:
                                     # {near: 0.05, far: 0.3}
      position: [0, 0, 3]
    - name: pad
      file: pad.stl                  # relative to the job file; used as is,
                                     # or refined by mesh_size {near, far}
      rotation: {axis: [0, 1, 0], degrees: 10}   # about the body's own origin,
                                                 # applied before position
      material: gold-drude           # default perfect; a named model (fluctus
                                     # material show --list), an inline one
                                     # ({drude: {plasma_eV: 9, damping_eV:
                                     # 0.035}}, {plasma: ...}, {lorentz: [...]},
                                     # {permittivity: 11.7}) or {table: FILE}
  sweep:
    body: ball             # the body that moves
    direction: [0, 0, -1]  # in which it approaches the others
    gaps: [2, 1, 0.5]      # closest surface distances, or offsets: [...]
                           # (displacements along direction), or
                           # rotate: {axis: [0, 1, 0], point: [0, 0, 3],
                           #          degrees: [0, 1, 2]}
  spring: {stiffness: 2.5, unit: N/m, rest_gap: 1}   # optional: the sticking
                           # analysis; N m/rad and rest_angle (degrees) for
                           # an angle sweep

In a gap sweep the moving body is shifted along the direction until it is at
each gap from the nearest other body (with a substrate: its lowest point at
that height above the plane), staying on the side the direction comes from.
An angle sweep turns the body about the axis through the point (default: its
centroid) by each angle, which must bring it closer as it grows; torques are
then taken about that point.

The default output directory is JOB.out next to the job file (for
jobs/plate.yaml: jobs/plate.out).
` + outputHelp + "\n" + shardHelp,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			j, err := job.Load(args[0])
			if err != nil {
				return err
			}
			if o.out == "" {
				if o.out, err = o.defaultOut(j); err != nil {
					return err
				}
			}
			return a.execute(cmd.Context(), j, o)
		},
	}
	o.addFlags(cmd.Flags(), "output directory (default: JOB.out next to the job file)")
	o.addShardFlags(cmd.Flags())
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
	if o.pfaOnly && o.convergence {
		return fmt.Errorf("--pfa-only and --convergence: choose one (--pfa-only skips the solver whose mesh convergence --convergence studies)")
	}
	if o.stickingRounds < 0 {
		return fmt.Errorf("--sticking-rounds %d: give 0 or more", o.stickingRounds)
	}
	if o.levels != 2 && o.levels != 3 {
		return fmt.Errorf("--levels %d: a convergence study runs 2 or 3 mesh levels", o.levels)
	}
	if err := o.checkShardOptions(); err != nil {
		return err
	}
	scales := []float64{1}
	if o.convergence {
		if !refinable(j) {
			return fmt.Errorf("--convergence: every body is an STL file used as it is, so the mesh levels would not differ; give generated shapes or graded mesh sizes (mesh_size: {near: ..., far: ...})")
		}
		scales = []float64{1, 1 / math.Sqrt2, 0.5}[:o.levels]
	}

	// Build and check every level before anything is computed.
	levels := make([]*level, len(scales))
	for i, f := range scales {
		lv, err := a.prepare(ctx, j, f)
		if err != nil {
			if len(scales) > 1 {
				return fmt.Errorf("mesh level %d (mesh sizes x %.3g): %w", i+1, f, err)
			}
			return err
		}
		levels[i] = lv
	}
	finest := levels[len(levels)-1]
	a.describe(j, levels)
	for _, w := range levels[0].scene.Warnings(levels[0].gaps) {
		fmt.Fprintf(a.stderr, "warning: %s\n", w)
	}
	if o.pfaOnly {
		return a.pfaOnly(ctx, j, finest, o)
	}
	if o.merge == nil || j.Spring != nil { // a merge computes only sticking points
		if err := a.checkMemory(finest.cost, o.memoryLimit); err != nil {
			return err
		}
	}
	if err := os.MkdirAll(o.out, 0o755); err != nil {
		return fmt.Errorf("creating the output directory: %w", err)
	}
	if err := report.RemoveStale(o.out); err != nil {
		return err
	}

	start := time.Now()
	results := make([]*report.Result, len(levels))
	cks := make([]*checkpoint, len(levels))
	for i, lv := range levels {
		what := "computing the energies"
		if len(levels) > 1 {
			what = fmt.Sprintf("computing mesh level %d of %d", i+1, len(levels))
		}
		ck, err := a.openCheckpoint(j, lv, o, i, len(levels))
		if err != nil {
			return err
		}
		cks[i] = ck
		points, err := a.solveWith(ctx, lv.scene, lv.scene.Sweep, o, what, ck)
		if err != nil {
			return err
		}
		results[i] = report.New(lv.scene, lv.cost, points)
		lv.points = points
	}
	if ck := cks[0]; ck.spec != nil {
		return a.finishShard(j, ck)
	}
	res := results[len(results)-1]
	if len(levels) > 1 {
		var descs []report.Level
		for _, lv := range levels {
			descs = append(descs, lv.describe())
		}
		conv, err := report.NewConvergence(descs, results)
		if err != nil {
			return fmt.Errorf("convergence study: %w", err)
		}
		res.Convergence = conv
	}
	// A sticking analysis that fails (other than by an interrupt) keeps
	// the computed points: they are written, and the run then fails.
	var stickErr error
	if j.Spring != nil {
		if err := a.sticking(ctx, j, finest, res, o); err != nil {
			if ctx.Err() != nil {
				return err
			}
			stickErr = err
		}
	}
	if err := report.WriteTable(a.stdout, res); err != nil {
		return err
	}
	if err := report.WriteFiles(o.out, res); err != nil {
		return err
	}
	if err := a.finishCheckpoints(cks); err != nil {
		return err
	}
	fmt.Fprintf(a.stdout, "\nwrote %s and %s (%s)\n",
		filepath.Join(o.out, report.JSONName), filepath.Join(o.out, report.CSVName), time.Since(start).Round(time.Millisecond))
	if o.plot {
		if err := a.plotRun(ctx, o.out, finest.scene); err != nil {
			return err
		}
	}
	if stickErr != nil {
		return fmt.Errorf("the points are written, but without a sticking verdict: %w", stickErr)
	}
	return nil
}

// level is the job built at one mesh scale.
type level struct {
	scale  float64
	scene  *job.Scene
	gaps   []float64 // of Clearance
	cost   scatter.Cost
	points []scatter.Point
}

// describe returns the level as the convergence study records it.
func (lv *level) describe() report.Level {
	d := report.Level{MeshScale: lv.scale, Unknowns: lv.cost.Unknowns}
	var area float64
	var tris int
	for _, b := range lv.scene.Bodies {
		st := b.Mesh.Stats()
		area += st.Area
		tris += st.Triangles
		d.Triangles = append(d.Triangles, st.Triangles)
	}
	d.MeshH = report.Float(math.Sqrt(area / float64(tris)))
	return d
}

// refinable reports whether some body's mesh follows the mesh scale.
func refinable(j *job.Job) bool {
	for _, b := range j.Bodies {
		if b.Shape != nil || b.Grading != nil {
			return true
		}
	}
	return false
}

// prepare builds the job at a mesh scale and checks every sweep point;
// with real materials it also tabulates their plate law for the PFA.
func (a *app) prepare(ctx context.Context, j *job.Job, scale float64) (*level, error) {
	scene, err := j.BuildScaled(scale)
	if err != nil {
		return nil, err
	}
	gaps, err := scene.Clearance()
	if err != nil {
		return nil, err
	}
	if err := scene.CheckSweep(gaps); err != nil {
		return nil, err
	}
	if err := scene.MakePlates(ctx, gaps); err != nil {
		return nil, err
	}
	return &level{scale: scale, scene: scene, gaps: gaps, cost: a.estimate(scene.Bodies)}, nil
}

// describe prints the bodies' meshes and the size of the computation.
func (a *app) describe(j *job.Job, levels []*level) {
	for i, lv := range levels {
		prefix := ""
		if len(levels) > 1 {
			prefix = fmt.Sprintf("level %d (mesh sizes x %.3g): ", i+1, lv.scale)
		}
		for k, b := range lv.scene.Bodies {
			fmt.Fprintf(a.stdout, "%sbody %s: %d triangles (%s)%s\n", prefix, b.Name, len(b.Mesh.Triangles), j.Bodies[k].Source(), materialNote(&j.Bodies[k]))
		}
	}
	for i, lv := range levels {
		prefix := j.Path
		if len(levels) > 1 {
			prefix = fmt.Sprintf("%s, level %d", j.Path, i+1)
		}
		bodies := fmt.Sprintf("%d bodies", len(lv.scene.Bodies))
		if len(lv.scene.Bodies) == 1 {
			bodies = "1 body"
		}
		fmt.Fprintf(a.stdout, "%s: %s, %d sweep points, %d unknowns, dense matrices %s\n",
			prefix, bodies, len(lv.scene.Sweep.Offsets), lv.cost.Unknowns, sysmem.Format(lv.cost.MatrixBytes))
	}
	if j.Substrate != nil {
		p, n := j.Substrate.Point, j.Substrate.Normal
		fmt.Fprintf(a.stdout, "substrate: the conducting plane through (%g, %g, %g) with normal (%.4g, %.4g, %.4g); gaps are heights above it\n",
			p.X, p.Y, p.Z, n.X, n.Y, n.Z)
	}
}

// settings returns the solver settings of a job.
func (a *app) settings(j *job.Job, scene *job.Scene, o runOptions) scatter.Settings {
	return scatter.Settings{
		Accuracy:          j.Accuracy,
		ThermalWavenumber: j.Unit.ThermalWavenumber(j.Temperature),
		Length:            float64(j.Unit),
		Threads:           o.threads,
		Forces:            j.Forces,
		Stiffness:         j.Forces,
		Substrate:         scene.Substrate,
		Plates:            scene.Plates,
	}
}

// solve runs the solver on a sweep of the scene with the progress bar and
// turns its failures into the messages of the command line; what says what
// is computed, for messages.
func (a *app) solve(ctx context.Context, scene *job.Scene, sw scatter.Sweep, o runOptions, what string) ([]scatter.Point, error) {
	return a.solveWith(ctx, scene, sw, o, what, nil)
}

// solveWith is solve with the checkpoint of the job's own sweep (nil: none).
func (a *app) solveWith(ctx context.Context, scene *job.Scene, sw scatter.Sweep, o runOptions, what string, ck *checkpoint) ([]scatter.Point, error) {
	set := a.settings(scene.Job, scene, o)
	ck.apply(&set)
	progress, done := a.progress(o.quiet)
	set.Progress = progress
	points, err := a.energies(ctx, scene.Bodies, sw, set)
	done()
	if err != nil {
		if ctx.Err() != nil {
			hint := ck.resumeHint()
			if cause := context.Cause(ctx); cause != ctx.Err() {
				return nil, fmt.Errorf("interrupted (%v), no results written%s: %w", cause, hint, ctx.Err())
			}
			return nil, fmt.Errorf("interrupted, no results written%s: %w", hint, ctx.Err())
		}
		return nil, fmt.Errorf("%s: %w", what, err)
	}
	if len(points) != len(sw.Offsets) {
		return nil, fmt.Errorf("%s: the solver returned %d points for %d sweep points", what, len(points), len(sw.Offsets))
	}
	return points, nil
}

// Sticking refinement: by default at most stickingRounds rounds of extra
// points, until the analysis is accurate to stickingTol (relative).
const (
	stickingRounds = 3
	stickingTol    = 1e-3
)

// sticking analyses the moving body on the job's spring against the load of
// the finest level, computing the extra points the analysis asks for, and
// records it in res.
func (a *app) sticking(ctx context.Context, j *job.Job, lv *level, res *report.Result, o runOptions) error {
	scene := lv.scene
	sp := j.Spring
	c := stick.Coordinate{Unit: j.Unit, Torsional: sp.Torsional, Direction: r3.Unit(scene.Sweep.Direction),
		Pivot: scene.Sweep.Centre, Centre: scene.Sweep.Centre}
	spring := sticking.Spring{Stiffness: sp.Stiffness, Torsional: sp.Torsional}
	contactDeg := math.NaN()
	if sp.Torsional {
		theta, err := scene.ContactAngle()
		if err != nil {
			return &job.Error{File: j.Path, Line: sp.Line, Key: "spring", Problem: fmt.Sprintf("the sticking analysis measures angles from contact: %v", err)}
		}
		c.Axis, c.Contact = j.Sweep.Rotate.Axis, theta
		contactDeg = theta * 180 / math.Pi
	}
	spring.Rest = c.Position(sp.Rest)
	compute := func(ctx context.Context, values []float64) ([]scatter.Point, error) {
		sw, err := scene.SweepAt(values)
		if err != nil {
			return nil, err
		}
		pts, err := a.solve(ctx, scene, sw, o, "computing the extra points of the sticking analysis")
		if err != nil {
			return nil, err
		}
		gaps := make([]float64, len(pts))
		for i, p := range pts {
			gaps[i] = p.Gap
		}
		for _, w := range scene.WarningsAt(sw, gaps, "the sticking analysis") {
			fmt.Fprintf(a.stderr, "warning: %s\n", w)
		}
		return pts, nil
	}
	out, err := stick.Analyse(ctx, c, spring, lv.points, compute, stick.Options{Rounds: o.stickingRounds, Tol: stickingTol})
	if err != nil {
		return err
	}
	res.Add(scene, out.Added, report.AddedForSticking)
	out.Report.Body = scene.Bodies[scene.Sweep.Body].Name
	if sum := j.MaterialSummary(); sum != "" {
		out.Report.Material = "bodies of the stated material models (" + sum + ")"
	}
	res.SetSticking(out.Report, out.Samples, out.Rounds, out.Converged, contactDeg)
	return nil
}

// pfaOnly prints and writes the PFA estimates of every point of the
// level, without the solver.
func (a *app) pfaOnly(ctx context.Context, j *job.Job, lv *level, o runOptions) error {
	scene := lv.scene
	est := pfa.Sweep(scene.Bodies, scene.Sweep, scene.Substrate, lv.gaps, scene.PFAOptions()...)
	res := report.NewPFA(scene, est, lv.gaps)
	if err := os.MkdirAll(o.out, 0o755); err != nil {
		return fmt.Errorf("creating the output directory: %w", err)
	}
	if err := report.RemoveStale(o.out); err != nil {
		return err
	}
	if err := report.WriteTable(a.stdout, res); err != nil {
		return err
	}
	if j.Spring != nil {
		fmt.Fprintf(a.stdout, "\nThe sticking analysis needs the exact forces and stiffness: run without --pfa-only.\n")
	}
	if err := report.WriteFiles(o.out, res); err != nil {
		return err
	}
	fmt.Fprintf(a.stdout, "\nwrote %s and %s\n", filepath.Join(o.out, report.JSONName), filepath.Join(o.out, report.CSVName))
	if o.plot {
		return a.plotRun(ctx, o.out, lv.scene)
	}
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
