// Package report turns the solver's results into what fluctus prints and
// writes: a text table for the terminal, result.json with every number of a
// run, and result.csv with one row of scalars per sweep point.
//
// Units: lengths (gaps, offsets) are in the job's length unit, energies in
// joules, imaginary wavenumbers κ in 1/(job unit); the E/PFA ratio and the
// integrand ln det[M M_∞⁻¹] are dimensionless. Every report carries Notice.
package report
