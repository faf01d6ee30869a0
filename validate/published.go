package validate

import "math"

// SphereSphereFar returns the large-distance series of the Casimir energy of
// two perfectly conducting spheres of radius R with centre distance L, in
// ħc/L0 (DESIGN §8):
//
//	E = -(1/π) (R⁶/L⁷) [143/16 + (7947/160)(R/L)² + (2065/32)(R/L)³]
//
// The leading term is Feinberg & Sucher, Phys. Rev. A 2, 2395 (1970), with the
// static polarisabilities α_E = R³, α_M = -R³/2 of a perfect conductor; the
// next two terms are recalled from memory of the multipole literature (Emig,
// Graham, Jaffe & Kardar, PRL 99, 170403 (2007)).
func SphereSphereFar(R, L float64) float64 {
	x := R / L
	return -math.Pow(R, 6) / math.Pow(L, 7) / math.Pi * (143.0/16 + 7947.0/160*x*x + 2065.0/32*x*x*x)
}

// SphereSphereFarLeading is the leading (Feinberg–Sucher) term alone.
func SphereSphereFarLeading(R, L float64) float64 {
	return -143.0 / 16 * math.Pow(R, 6) / math.Pow(L, 7) / math.Pi
}

// SphereSphereFarForce is -dE/dL of SphereSphereFar, in ħc/L0² (negative:
// attraction, the force on the second sphere along the line of centres).
func SphereSphereFarForce(R, L float64) float64 {
	// E = -(R⁶/π) [a L⁻⁷ + b R² L⁻⁹ + c R³ L⁻¹⁰]
	a, b, c := 143.0/16, 7947.0/160, 2065.0/32
	dE := -(math.Pow(R, 6) / math.Pi) * (-7*a/math.Pow(L, 8) - 9*b*R*R/math.Pow(L, 10) - 10*c*R*R*R/math.Pow(L, 11))
	return -dE
}

// SpherePlaneFar returns the large-distance series of the Casimir energy of a
// perfectly conducting sphere of radius R whose centre is at height L above a
// perfectly conducting plane, in ħc/L0 (DESIGN §8):
//
//	E = -(1/π) (R³/L⁴) [9/16 + (25/32)(R/L)²]
//
// The leading term is Casimir & Polder, Phys. Rev. 73, 360 (1948), with the
// same polarisabilities; the next term is recalled from memory.
func SpherePlaneFar(R, L float64) float64 {
	x := R / L
	return -math.Pow(R, 3) / math.Pow(L, 4) / math.Pi * (9.0/16 + 25.0/32*x*x)
}

// PlateEnergyPerArea is Casimir's energy per area of parallel perfect
// conductors at distance d, -π²/(720 d³) (Casimir 1948), in ħc/L0³.
func PlateEnergyPerArea(d float64) float64 { return -math.Pi * math.Pi / (720 * d * d * d) }

// PlatePressure is -d/dd of PlateEnergyPerArea, -π²/(240 d⁴) (Casimir 1948).
func PlatePressure(d float64) float64 { return -math.Pi * math.Pi / (240 * d * d * d * d) }

// SpherePlanePFA is the proximity-force energy of a sphere of radius R at
// gap d from a plane, -π³ R/(720 d²) (Derjaguin 1934 with Casimir 1948, to
// leading order in d/R).
func SpherePlanePFA(R, d float64) float64 { return -math.Pow(math.Pi, 3) * R / (720 * d * d) }

// SphereSpherePFA is the proximity-force energy of two spheres, the
// sphere–plane form with R_eff = R1 R2/(R1 + R2).
func SphereSpherePFA(R1, R2, d float64) float64 { return SpherePlanePFA(R1*R2/(R1+R2), d) }

// DerivativeExpansionSlope is the coefficient θ of E/E_PFA = 1 + θ d/R for a
// perfectly conducting sphere near a plane, θ = 1/3 - 20/π² (Bimonte, Emig,
// Jaffe & Kardar, EPL 97, 50001 (2012); recalled from memory).
const DerivativeExpansionSlope = 1.0/3 - 20/(math.Pi*math.Pi)

// SpherePlanePFAProfile is the proximity-force sum of DESIGN §7 taken over
// the exact profile of the sphere's facing hemisphere rather than its
// parabolic approximation, in ħc/L0:
//
//	E = -(π³/360) ∫_0^R ρ dρ / h(ρ)³,  h = d + R - √(R² - ρ²),
//	  = -(π³/360) [(R+d)/(2d²) - 1/d + 1/(2(R+d))],
//
// (elementary integral with u = R - √(R² - ρ²)). Its leading term is
// SpherePlanePFA; it is what a proximity sum over a fine sphere mesh tends to.
func SpherePlanePFAProfile(R, d float64) float64 {
	return -math.Pow(math.Pi, 3) / 360 * ((R+d)/(2*d*d) - 1/d + 1/(2*(R+d)))
}

// SphereSpherePFAProfile is the same for two equal spheres of radius R at gap
// d, h = d + 2(R - √(R² - ρ²)):
//
//	E = -(π³/1440) [(2R+d)(1/(2d²) - 1/(2(d+2R)²)) - 1/d + 1/(d+2R)],
//
// whose leading term is SphereSpherePFA(R, R, d).
func SphereSpherePFAProfile(R, d float64) float64 {
	return -math.Pow(math.Pi, 3) / 1440 * ((2*R+d)*(1/(2*d*d)-1/(2*(d+2*R)*(d+2*R))) - 1/d + 1/(d+2*R))
}
