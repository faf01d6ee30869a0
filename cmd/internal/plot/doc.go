// Package plot draws the figures of a finished run and the one-page HTML
// report that gathers them, from the run's result.json.
//
// Figures (each as PNG and SVG):
//
//   - energy: |E| against the gap on log–log axes with the estimated error
//     as error bars, beside the proximity-force estimate |E_PFA|;
//   - force: |F·ê|, the force on the moving body along the sweep direction ê,
//     with error bars and the PFA force; stiffness: |dF/ds| (log–log);
//   - for angle sweeps torque and torsional stiffness against the angle
//     (linear axes), and energy and force against the angle;
//   - pfa_ratio: E/E_PFA and F/F_PFA against the gap (log x);
//   - integrand: |ln det M M_∞⁻¹| against the imaginary wavenumber κ, one
//     line per sweep point (log–log);
//   - sticking: the attraction F(g) and the spring line k (g0 - g) with the
//     equilibria and the pull-in point, when the run has a sticking analysis;
//   - scene: the triangle edges of every body projected onto the plane of
//     the sweep direction and a perpendicular, at the point of closest
//     approach, with the gap marked.
//
// Units: lengths (gaps, the scene) are shown in the job's length unit,
// energies in J, forces in N, torques in N m, stiffnesses in N/m and
// N m/rad, κ in 1/(job unit), angles in degrees; ratios and the integrand
// are dimensionless.
//
// result.json is decoded into this package's own Result, which follows the
// file's field names; fields a run did not compute (forces, stiffness,
// torques, sticking) are optional and their figures are left out. Every file
// is rendered in memory first and then written atomically (temporary file and
// rename), so a failure leaves no half-written file.
package plot
