package main

import (
	"fmt"
	"runtime"
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
			width := len("case")
			for _, c := range cases {
				width = max(width, len([]rune(c.Name)))
			}
			row := func(name, ref, got, diff, tol, res, dt string) {
				fmt.Fprintf(a.stdout, "%-*s  %13s  %13s  %10s  %9s  %-6s %s\n", width, name, ref, got, diff, tol, res, dt)
			}
			row("case", "reference", "fluctus", "difference", "tolerance", "result", "time")
			failed := 0
			start := time.Now()
			validate.Run(cmd.Context(), cases, threads, func(r validate.Result) {
				status := "pass"
				if !r.Passed() {
					status = "FAIL"
					failed++
				}
				if r.Err != nil {
					row(r.Name, "-", "-", "-", fmt.Sprintf("%.2g", r.Tolerance), "FAIL", r.Err.Error())
				} else {
					row(r.Name, fmt.Sprintf("%.6g", r.Want), fmt.Sprintf("%.6g", r.Got), fmt.Sprintf("%.2e", r.Difference()),
						fmt.Sprintf("%.2g", r.Tolerance), status, r.Elapsed.Round(time.Second).String())
				}
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
