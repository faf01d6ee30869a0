package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"github.com/fluctus/fluctus/cmd/internal/job"
	"github.com/fluctus/fluctus/cmd/internal/shard"
)

func (a *app) mergeCommand() *cobra.Command {
	var o runOptions
	var jobPath string
	cmd := &cobra.Command{
		Use:   "merge SHARD_DIR...",
		Short: "Combine the shards of a run (run --shard i/n) into its result files",
		Long: `Merge reads the checkpoints of the shards of one job (the output directories
of "fluctus run JOB --shard i/n", or their --checkpoint directories), checks
that they come from the same job, meshes, settings and fluctus version (one
fingerprint) and that every sweep point was finished by exactly one shard,
and then writes the tables, result.json and result.csv exactly as an
unsharded run would (the same numbers, bit for bit). It refuses shards of
different jobs and an incomplete set, listing the missing sweep points and
the shard that should have produced them.

The job file is read again from where the shards ran it (recorded in their
checkpoints) unless --job names it; it must still give the same fingerprint.
With a spring, the sticking analysis runs here and computes its extra points
on this machine. The default output directory is JOB.out next to the job
file. The result files are written atomically: a failed merge leaves none.

Results are idealised (smooth homogeneous perfect conductors in vacuum at the
given temperature): keep margin and defer to your own qualification practice
and the applicable standards.`,
		Args: cobra.MinimumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			var cps []*shard.Checkpoint
			for _, d := range args {
				c, err := shard.Read(d)
				if err != nil {
					return err
				}
				cps = append(cps, c)
			}
			units, err := shard.Combine(cps)
			if err != nil {
				return err
			}
			path := jobPath
			if path == "" {
				path = cps[0].Manifest.Job
				for _, c := range cps[1:] {
					if c.Manifest.Job != path {
						return fmt.Errorf("the shards ran the job files %s and %s (same fingerprint): give the one to use with --job", path, c.Manifest.Job)
					}
				}
			}
			j, err := job.Load(relative(path))
			if err != nil {
				return fmt.Errorf("reading the shards' job: %w", err)
			}
			if o.out == "" {
				o.out = filepath.Join(j.Dir, j.Name+".out")
			}
			o.merge = &mergeSource{units: units, hash: cps[0].Manifest.Hash}
			return a.execute(cmd.Context(), j, o)
		},
	}
	fs := cmd.Flags()
	fs.StringVarP(&o.out, "out", "o", "", "output directory (default: JOB.out next to the job file)")
	fs.StringVar(&jobPath, "job", "", "the job file the shards ran (default: the path recorded in their checkpoints)")
	fs.IntVar(&o.threads, "threads", 0, "goroutines for matrix assembly of the sticking analysis's extra points (0: all cores)")
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "hide the progress bar")
	fs.BoolVar(&o.plot, "plot", false, "also draw the figures and report.html into the output directory (see fluctus plot)")
	fs.Int64Var(&o.memoryLimit, "memory-limit", 0, "bytes of memory the run may use (0: MemAvailable from /proc/meminfo)")
	fs.MarkHidden("memory-limit")
	o.levels = 3
	o.stickingRounds = stickingRounds
	return cmd
}

// relative returns path relative to the working directory when it lies
// below it (so that messages and result.json name the job as a run started
// here would), else path.
func relative(path string) string {
	wd, err := os.Getwd()
	if err != nil || !filepath.IsAbs(path) {
		return path
	}
	rel, err := filepath.Rel(wd, path)
	if err != nil || rel == ".." || strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
		return path
	}
	return rel
}
