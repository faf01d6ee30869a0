// Package report turns the solver's results into what fluctus prints and
// writes: text tables for the terminal, result.json with every number of a
// run, and result.csv with one row of scalars per sweep point.
//
// Units: lengths (gaps, offsets) are in the job's length unit, angles in
// degrees, energies in joules, forces in newtons, torques in newton metres,
// stiffnesses in N/m or N m/rad, imaginary wavenumbers κ in 1/(job unit);
// the E/PFA and F/PFA ratios and the integrand ln det[M M_∞⁻¹] are
// dimensionless. The sticking section keeps the SI positions of package
// sticking (m, or rad from contact). Every report carries Notice.
package report
