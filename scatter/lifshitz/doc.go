// Package lifshitz computes the Casimir interaction of two parallel
// half-spaces of homogeneous non-magnetic materials across a vacuum gap, by the
// Lifshitz formula (E. M. Lifshitz, Sov. Phys. JETP 2, 73 (1956)) at imaginary
// frequency. At T = 0 the energy per unit area is
//
//	E/A = ħ/(4π²) ∫_0^∞ dξ ∫_0^∞ k dk Σ_{p=TE,TM} ln(1 - r_p^a r_p^b e^{-2qd}),
//
// q = sqrt(k² + ξ²/c²), with the Fresnel coefficients at imaginary frequency
// r_TE = (q - q_m)/(q + q_m), r_TM = (eps q - q_m)/(eps q + q_m),
// q_m = sqrt(k² + eps(iξ) ξ²/c²). At T > 0 the integral ∫_0^∞ dξ/(2π) becomes
// the Matsubara sum (k_B T/ħ) Σ'_n over ξ_n = 2π n k_B T/ħ (the n = 0 term
// halved), giving the free energy per unit area; its n = 0 term depends on the
// static kind of each material (see material.Kind).
//
// Plates keeps its state per call and is safe for concurrent use with
// models that are (all models of package material are). The pressure
// P = -∂(E/A)/∂d is computed from the differentiated integrand, not by
// differences. Negative energies and pressures mean attraction.
//
// Units: this package is an edge of the program and works in SI: gaps in
// metres, temperatures in kelvin, energies per area in J/m², pressures in Pa.
// Imaginary frequencies are in rad/s as in package material.
package lifshitz
