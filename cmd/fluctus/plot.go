package main

import (
	"context"
	"fmt"
	"path/filepath"

	"github.com/spf13/cobra"

	"github.com/fluctus/fluctus/cmd/internal/job"
	"github.com/fluctus/fluctus/cmd/internal/plot"
)

func (a *app) plotCommand() *cobra.Command {
	var (
		formats []string
		jobFile string
	)
	cmd := &cobra.Command{
		Use:   "plot DIR",
		Short: "Draw the figures and the HTML report of a finished run",
		Long: `Plot reads DIR/result.json, the output of "fluctus run", and writes into DIR:

  energy        |energy| against the gap (log-log) with error bars and the PFA
  force         |force along the sweep direction| and the PFA force (with forces)
  stiffness     |force gradient| against the gap (with stiffness)
  torque, torsional_stiffness   against the angle (angle sweeps)
  pfa_ratio     E/E_PFA (and F/F_PFA) against the gap
  integrand     the frequency integrand of every sweep point
  sticking      the attraction, the spring line, the equilibria and the
                pull-in point (with a sticking analysis)
  scene         the meshes projected on the plane of the sweep direction at
                the closest approach, with the gap marked
  report.html   one self-contained page: the job, the table of results, the
                sticking verdict, every figure and the notice below

Figures are written as PNG and SVG (--format png,svg); report.html embeds the
PNGs and loads nothing from the network. The scene needs the job's meshes: it
is rebuilt from the job file named in result.json (as given, or next to DIR),
or from --job JOB.yaml; without one it is left out with a note. Every file is
written to a temporary file and renamed into place; figures of an earlier
result that this one does not have are removed.

Results are idealised (smooth homogeneous perfect conductors in vacuum at the
given temperature; no roughness, patch charges or humidity): keep margin and
defer to your own qualification practice and the applicable standards.`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			fs, err := plot.ParseFormats(formats)
			if err != nil {
				return fmt.Errorf("--format: %w", err)
			}
			return a.plot(cmd.Context(), args[0], plot.Options{Formats: fs, Job: jobFile})
		},
	}
	cmd.Flags().StringSliceVar(&formats, "format", []string{"png", "svg"}, "figure file formats: png, svg or png,svg")
	cmd.Flags().StringVar(&jobFile, "job", "", "job file to draw the scene from (default: the one named in result.json)")
	return cmd
}

// plotRun draws the figures and report of a run that has just written its
// results into dir, with the run's scene (run --plot).
func (a *app) plotRun(ctx context.Context, dir string, scene *job.Scene) error {
	if err := a.plot(ctx, dir, plot.Options{Scene: scene}); err != nil {
		return fmt.Errorf("the results are written, but drawing them failed: %w", err)
	}
	return nil
}

// plot writes the figures and report.html of the run in dir, prints what
// was left out as notes on stderr and the report's path on stdout.
func (a *app) plot(ctx context.Context, dir string, o plot.Options) error {
	out, err := plot.Write(ctx, dir, o)
	if err != nil {
		return err
	}
	for _, n := range out.Notes {
		fmt.Fprintf(a.stderr, "note: %s\n", n)
	}
	fmt.Fprintf(a.stdout, "wrote %d files; open %s\n", len(out.Files), filepath.Join(dir, plot.ReportName))
	return nil
}
