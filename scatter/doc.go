// Package scatter computes Casimir energies between perfectly conducting bodies
// from the boundary-element matrix of package bem, by the scattering (trace)
// formula at imaginary frequency:
//
//	E = (ħc/2π) ∫_0^∞ dκ ln det[M(κ) M_∞(κ)^-1]
//
// with M_∞ the block diagonal of M (each body alone). At temperature T the
// integral becomes the Matsubara sum k_B T Σ'_n over κ_n = 2π n k_B T/(ħc).
//
// Units: lengths in the scene unit L0, imaginary wavenumbers κ in 1/L0,
// energies in ħc/L0. Unit converts results to SI at the edge.
//
// The per-κ integrand is evaluated in normalised form: with Cholesky factors
// M_ii = L_i L_i^T, the blocks K_ij = L_i^-1 M_ij L_j^-T and, for two bodies,
// ln det(I - K^T K) accumulated pivot by pivot with log1p so that the far field
// keeps its digits. Self blocks are factored once per κ and shared by every
// point of a sweep that uses that κ. Between two separated bodies the
// interaction block is compressed by adaptive cross approximation when it is
// numerically low rank, and the reduction is done in the compressed form
// (O(N² r) instead of O(N³); Settings.Dense turns this off, Point.Ranks
// reports the ranks).
//
// Bodies with a real material (Body.Material, permittivity ε(iξ) at
// ξ = cκ/L0, Settings.Length = L0 in metres) carry electric and magnetic
// surface currents (PMCHWT, DESIGN §13; dielectric.go); a scene with any such
// body is factored by LU and its integrand is ln |det(M M_∞^-1)|, for two
// bodies ln det(I - M11^-1 M12 M22^-1 M21) in delta form. Over a substrate
// the images of (J, M) enter every block.
//
// Every (sweep point, κ) is a unit of work: Settings.Store checkpoints the
// finished units (so an interrupted run resumes with bit-identical results)
// and Settings.Points restricts a run to some points (shards of a sweep).
package scatter
