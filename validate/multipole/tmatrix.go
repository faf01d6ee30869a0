package multipole

// T-matrices of a sphere of radius R at imaginary frequency κ, x = κR
// (Rahi, Emig, Graham, Jaffe & Kardar, PRD 80, 085021 (2009), §V).
//
// With an incident regular wave a φ_lm and the scattered outgoing wave b ψ_lm,
// b = T_l a, and the boundary condition on r = R gives
//
//	Dirichlet (φ = 0):               T_l = -i_l(x) / k_l(x)
//	Neumann (∂_r φ = 0):             T_l = -i_l'(x) / k_l'(x)
//	perfect conductor, TE (M waves): T_l = -i_l(x) / k_l(x)            (tangential E ∝ z_l)
//	perfect conductor, TM (N waves): T_l = -[x i_l(x)]' / [x k_l(x)]'  (tangential E ∝ (x z_l)'/x)
//
// Scaled by s_l² = i_l/k_l (see sphereScales), with the logarithmic derivatives
// x i_l'/i_l = l + x² p_{l+1} and x k_l'/k_l = l - q_{l+1}:
//
//	T̂_D = T̂_TE = -1,
//	T̂_N  = -(l + x² p_{l+1}) / (l - q_{l+1}),
//	T̂_TM = -(l + 1 + x² p_{l+1}) / (l + 1 - q_{l+1}).
//
// These are finite at κ = 0, where T̂_N = l/(l+1) (0 for l = 0) and
// T̂_TM = (l+1)/l: the static limits of the magnetic and electric multipole
// polarisabilities of a perfectly conducting sphere.

// polarisation selects the TE (M) or TM (N) block of an electromagnetic T-matrix.
type polarisation int

const (
	scalarWave polarisation = iota
	transverseElectric
	transverseMagnetic
)

// scaledT returns T̂_l = T_l / s_l² for the field (and, for Electromagnetic,
// the polarisation) on the sphere whose scales are s.
func scaledT(f Field, pol polarisation, s *sphereScales, l int) float64 {
	fl := float64(l)
	switch {
	case f == Dirichlet, f == Electromagnetic && pol == transverseElectric:
		return -1
	case f == Neumann:
		return -(fl + s.x2p[l+1]) / (fl - s.q[l+1])
	default: // Electromagnetic, TM
		return -(fl + 1 + s.x2p[l+1]) / (fl + 1 - s.q[l+1])
	}
}
