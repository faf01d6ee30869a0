package main

import (
	"context"
	"io"

	"github.com/spf13/cobra"

	"github.com/fluctus/fluctus/cmd/internal/sysmem"
	"github.com/fluctus/fluctus/scatter"
)

// version is the release of this build.
const version = "0.1.0-dev"

// app holds what the commands write to and the services they call, so that
// tests can run the commands in-process with stand-ins.
type app struct {
	stdout, stderr io.Writer
	// showProgress enables the progress bar (stderr is a terminal).
	showProgress bool

	energies     func(context.Context, []scatter.Body, scatter.Sweep, scatter.Settings) ([]scatter.Point, error)
	estimate     func([]scatter.Body) scatter.Cost
	memAvailable func() (int64, error)
}

// newApp returns an app that uses the real solver and the machine's memory.
func newApp(stdout, stderr io.Writer, showProgress bool) *app {
	return &app{
		stdout:       stdout,
		stderr:       stderr,
		showProgress: showProgress,
		energies:     scatter.Energies,
		estimate:     scatter.Estimate,
		memAvailable: sysmem.Available,
	}
}

// rootCommand builds the command tree.
func (a *app) rootCommand() *cobra.Command {
	root := &cobra.Command{
		Use:   "fluctus",
		Short: "Casimir energies between conducting bodies from their triangle meshes",
		Long: `fluctus computes the Casimir (vacuum-fluctuation) energy between perfectly
conducting bodies of any shape from their triangle meshes, by the
boundary-element method at imaginary frequency, with an error estimate and the
proximity-force approximation (PFA) beside every result.

Bodies may also be given real materials (a job file's material key; "fluctus
material show --list" lists the named ones), and "fluctus lifshitz" gives the
plate-plate interaction of two materials without any mesh.

Start with "fluctus demo", then describe your own scene in a job file and use
"fluctus run JOB.yaml". Lengths are always in the unit the job file names.`,
		Version:       version,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.CompletionOptions.HiddenDefaultCmd = true
	root.SetOut(a.stdout)
	root.SetErr(a.stderr)
	root.AddCommand(a.runCommand(), a.mergeCommand(), a.demoCommand(), a.meshCommand(), a.plotCommand(), a.verifyCommand(),
		a.materialCommand(), a.lifshitzCommand())
	return root
}
