package main

import (
	_ "embed"

	"github.com/spf13/cobra"

	"github.com/fluctus/fluctus/cmd/internal/job"
)

// demoJob is the job file of the demo scene.
//
//go:embed demo.yaml
var demoJob []byte

// demoName names the embedded job in messages.
const demoName = "demo.yaml"

func (a *app) demoCommand() *cobra.Command {
	var o runOptions
	cmd := &cobra.Command{
		Use:   "demo",
		Short: "Run a built-in example: a nanobead on a soft spring above a contact pad",
		Long: `Demo runs a built-in job, an invented nanomechanical contact: a conducting
sphere of radius 10 nm (a metal nanobead at the tip of a nanotube cantilever of
5e-4 N/m, relaxed 20 nm above the pad) moved towards a square contact pad of
30 nm x 30 nm x 5 nm, to gaps of 20, 15 and 12 nm. It computes the energy, the
force and the stiffness at each gap and decides whether the bead sticks to the
pad, adding the gaps the sticking analysis asks for. The meshes are graded and
coarse (under 250 triangles per body), so the demo finishes in under a minute;
use "fluctus run" with finer meshes for numbers you rely on. Its job file is
printed by "fluctus demo --print-job".

The default output directory is fluctus-demo in the current directory.
` + outputHelp,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			if printJob, _ := cmd.Flags().GetBool("print-job"); printJob {
				_, err := a.stdout.Write(demoJob)
				return err
			}
			j, err := job.Decode(demoName, demoJob)
			if err != nil {
				return err
			}
			if o.out == "" {
				o.out = "fluctus-demo"
			}
			return a.execute(cmd.Context(), j, o)
		},
	}
	o.addFlags(cmd.Flags(), "output directory (default: fluctus-demo in the current directory)")
	cmd.Flags().Bool("print-job", false, "print the demo's job file and exit")
	return cmd
}
