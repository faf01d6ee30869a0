// Command fluctus computes Casimir (vacuum-fluctuation) energies between
// perfectly conducting bodies given as triangle meshes.
//
//	fluctus run JOB.yaml        compute the energy along a job's sweep
//	fluctus merge DIR...        combine the shards of run --shard i/n
//	fluctus demo                run the built-in example scene
//	fluctus mesh info FILE.stl  statistics and defects of a mesh
//	fluctus mesh make SHAPE     write a generated shape as STL
//	fluctus material show NAME  a material's permittivity at imaginary frequency
//	fluctus lifshitz            plate-plate energy and pressure of two materials
//
// See README.md for the job file and the output files.
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"
)

func main() {
	// The first Ctrl-C (or SIGTERM) cancels the run cleanly; once it has,
	// the default handling returns, so a second Ctrl-C ends the program at
	// once.
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	go func() {
		<-ctx.Done()
		stop()
	}()
	a := newApp(os.Stdout, os.Stderr, isTerminal(os.Stderr))
	err := a.rootCommand().ExecuteContext(ctx)
	stop()
	os.Exit(exit(os.Stderr, err))
}

// exit prints err as one line and returns the process exit status: 0 on
// success, 130 after an interrupt (the shell convention for SIGINT), 1 for
// any other failure.
func exit(w io.Writer, err error) int {
	if err == nil {
		return 0
	}
	fmt.Fprintf(w, "fluctus: %v\n", err)
	if errors.Is(err, context.Canceled) {
		return 130
	}
	return 1
}

// isTerminal reports whether f is a character device such as a terminal.
func isTerminal(f *os.File) bool {
	fi, err := f.Stat()
	return err == nil && fi.Mode()&os.ModeCharDevice != 0
}
