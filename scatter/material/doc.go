// Package material models the dielectric response of homogeneous, non-magnetic
// media at imaginary frequency, eps(iξ), as needed by Casimir computations with
// real materials: perfect conductors, constant permittivities, plasma and Drude
// metals, Lorentz oscillator sums, their combinations, and tabulated optical
// data turned into eps(iξ) by the Kramers–Kronig relation.
//
// Units. This package is an edge of the program and works in SI: the imaginary
// angular frequency ξ is in rad/s. Model parameters are photon energies in eV
// (fields named ...EV), converted with ω = E e/ħ (FromEV, ToEV). eps is
// dimensionless; for every model eps(iξ) ≥ 1 and is non-increasing in ξ.
//
// The static limit ξ → 0 decides the n = 0 term of a Matsubara sum, and it is
// where plasma and Drude metals differ: Static reports the Kind of a model, its
// eps(0) and, for plasma-type metals, the plasma frequency ω_p with
// ξ² eps(iξ) → ω_p² as ξ → 0.
//
// Job files name a material by a library name (Named) or an inline
// specification decoded from YAML (Parse).
package material
