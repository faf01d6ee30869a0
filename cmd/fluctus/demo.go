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
		Short: "Run a built-in example: a sphere above a square contact pad",
		Long: `Demo runs a built-in job: a conducting sphere of radius 1 um (a contact bump)
moved towards a square contact pad of 3 um x 3 um x 0.5 um, to gaps of 2, 1.5
and 1.2 um. The meshes are coarse (320 and 384 triangles), so the demo
finishes in about a minute;
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
