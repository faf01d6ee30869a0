package main

import (
	"fmt"
	"runtime"
	"text/tabwriter"
	"time"

	"github.com/spf13/cobra"

	"github.com/fluctus/fluctus/validate"
)

// verifyCommand runs the verification cases of package validate — the same
// cases its tests run — and prints how this build reproduces published and
// independent reference values.
func (a *app) verifyCommand() *cobra.Command {
	var long bool
	var threads int
	cmd := &cobra.Command{
		Use:   "verify [--long] [--threads N]",
		Short: "Check this build against published results and an independent reference",
		Long: `verify runs a short suite of verification cases (about two minutes on two
cores; --long runs every case, the long accuracy studies included, which takes
hours) and prints, for each, the reference value and its
source, the value fluctus computes, their relative difference and whether it
is within the case's stated tolerance. It exits non-zero if any case fails.
The cases are those of the validate package's tests (the short suite is a
subset of them), so the table and the tests cannot drift apart. Values are in units of ħc/L0 (energies) and ħc/L0²
(forces) with L0 the length unit of the case (the sphere radius).`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if threads < 0 {
				return fmt.Errorf("--threads must be positive (or 0 for all %d cores)", runtime.NumCPU())
			}
			cases := validate.QuickCases()
			if long {
				cases = validate.Cases(true)
			}
			fmt.Fprintf(a.stdout, "fluctus %s verification: %d cases\n\n", version, len(cases))
			tw := tabwriter.NewWriter(a.stdout, 2, 4, 2, ' ', 0)
			fmt.Fprintln(tw, "case\treference\tfluctus\tdifference\ttolerance\tresult\ttime")
			failed := 0
			start := time.Now()
			validate.Run(cmd.Context(), cases, threads, func(r validate.Result) {
				status := "pass"
				if !r.Passed() {
					status = "FAIL"
					failed++
				}
				if r.Err != nil {
					fmt.Fprintf(tw, "%s\t-\t-\t-\t%.2g\tFAIL: %v\t\n", r.Name, r.Tolerance, r.Err)
				} else {
					fmt.Fprintf(tw, "%s\t%.6g\t%.6g\t%.2e\t%.2g\t%s\t%s\n", r.Name, r.Want, r.Got, r.Difference(), r.Tolerance, status, r.Elapsed.Round(time.Second))
				}
				tw.Flush()
			})
			fmt.Fprintln(a.stdout, "\nReferences:")
			seen := map[string]bool{}
			for _, c := range cases {
				if !seen[c.Source] {
					fmt.Fprintf(a.stdout, "  - %s\n", c.Source)
					seen[c.Source] = true
				}
			}
			fmt.Fprintf(a.stdout, "\n%d passed, %d failed (%s)\n", len(cases)-failed, failed, time.Since(start).Round(time.Second))
			if failed > 0 {
				return fmt.Errorf("verify: %d of %d cases failed", failed, len(cases))
			}
			return nil
		},
	}
	cmd.Flags().BoolVar(&long, "long", false, "run the full suite (finer meshes; much longer)")
	cmd.Flags().IntVar(&threads, "threads", 0, "goroutines for assembly (0: all cores)")
	return cmd
}
