// Package multipole is an independent reference solver for the Casimir
// interaction of perfectly conducting spheres in vacuum, and of a sphere over
// an infinite plane, evaluated in spherical multipoles to many digits. It
// exists to check the boundary-element solver and imports nothing else of the
// project.
//
// It evaluates the scattering (TGTG) formula at imaginary frequency
// (Emig, Graham, Jaffe & Kardar, PRL 99, 170403 (2007); Rahi, Emig, Graham,
// Jaffe & Kardar, PRD 80, 085021 (2009)):
//
//	E = (ħc/2π) ∫_0^∞ dκ ln det(I - N(κ)),   N = T1 U12 T2 U21,
//
// with the T-matrices of perfectly conducting (or Dirichlet, or Neumann)
// spheres and the translation matrices of spherical waves along the axis
// (Cruzan, Q. Appl. Math. 20, 33 (1962); Wittmann, IEEE Trans. Antennas
// Propag. 36, 1078 (1988)); the plane is the image of the sphere. At
// temperature T the integral becomes the Matsubara sum
// k_B T Σ'_{n≥0} ln det(I - N(κ_n)), κ_n = 2π n k_B T/(ħc), whose n = 0 term is
// the exact static limit.
//
// Units: lengths in an arbitrary unit L0, imaginary wavenumbers κ in 1/L0,
// energies in ħc/L0, forces in ħc/L0² (negative: attraction). No physical
// constant enters.
//
// Conventions: modified spherical Bessel functions i_l(x) = sqrt(π/2x) I_{l+½}(x)
// and k_l(x) = sqrt(2/(πx)) K_{l+½}(x), so k_0 = e^{-x}/x (2/π times the k_n of
// Abramowitz & Stegun §10.2); orthonormal spherical harmonics with the
// Condon–Shortley phase; vector waves M = ∇×(rψ)/sqrt(l(l+1)), N = ∇×M/κ.
// Sphere 1 sits at the origin, sphere 2 at L ẑ; the plane is z = 0 below a
// sphere whose centre is at height L.
//
// Numerics: each azimuthal number m is its own block (m and -m are equal). The
// amplitudes are rescaled by sqrt(i_l(κR)/k_l(κR)) so that every matrix element
// is O(e^{-κ·gap}) for all l and all κ ≥ 0, κ = 0 included; the translation
// matrices come from exact recurrences started by closed-form Gaunt
// coefficients. Each block is reduced to a symmetric positive definite I - CᵀC
// (two spheres) or I - Y (sphere and plane) and factorised by a Cholesky
// decomposition that keeps ln det accurate to relative precision even when it is
// 1e-20. The force uses the analytic derivative of the translation matrices,
// F = (ħc/2π) ∫ dκ Tr[(I-N)^{-1} dN/dL]. The κ integral is adaptive
// Gauss–Kronrod in κ = -κc ln(1-t), κc ∝ 1/gap; the multipole order is
// chosen adaptively and its truncation error measured. Blocks run in parallel
// on GOMAXPROCS goroutines.
//
// The API:
//
//	LogDet(cfg, κ)              ln det(I - N(κ)) and the multipole order used
//	Energy(ctx, cfg)            zero-temperature energy and force, with errors
//	FreeEnergy(ctx, cfg, κ_T)   Matsubara free energy and force, κ_T = 2π k_B T/(ħc)
//	BesselI(l, x), BesselK(l, x)  the modified spherical Bessel functions
//
// Typical costs on two cores: far field (L/R ≥ 10) milliseconds; d/R = 1 a
// fraction of a second; two spheres at d/R = 0.1 to 1e-6, lmax ≈ 105, several
// seconds (BenchmarkSphereSphereSmallGap); the sphere–plane d/R = 0.05 case
// needs lmax ≈ 205 and about a minute.
package multipole
