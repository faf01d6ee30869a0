package multipole

import (
	"math"
	"math/cmplx"
	"testing"
)

// Independent evaluations of the special functions and wave fields used by the
// tests. They share nothing with the package code except BesselI/BesselK
// (tested on their own against closed forms and series).

// legendreY returns P̄_lm(cos θ) for m ≥ 0, the θ part of the orthonormal
// spherical harmonic Y_lm = P̄_lm(cos θ) e^{imφ} with the Condon–Shortley
// phase, by the standard three-term recurrence in l (e.g. Press et al.,
// Numerical Recipes, §6.7).
func legendreY(l, m int, x float64) float64 {
	if m < 0 || l < m {
		return 0
	}
	s := math.Sqrt((1 - x) * (1 + x))
	p := math.Sqrt(1 / (4 * math.Pi))
	for k := 1; k <= m; k++ {
		p *= -s * math.Sqrt(float64(2*k+1)/float64(2*k))
	}
	if l == m {
		return p
	}
	p1 := x * math.Sqrt(float64(2*m+3)) * p
	for ll := m + 2; ll <= l; ll++ {
		fl, fm := float64(ll), float64(m)
		a := math.Sqrt((4*fl*fl - 1) / (fl*fl - fm*fm))
		b := math.Sqrt(((fl-1)*(fl-1) - fm*fm) / (4*(fl-1)*(fl-1) - 1))
		p, p1 = p1, a*(x*p1-b*p)
	}
	return p1
}

// dLegendreY returns ∂_θ P̄_lm(cos θ) by a central difference (error ~1e-10).
func dLegendreY(l, m int, theta float64) float64 {
	const h = 1e-5
	return (legendreY(l, m, math.Cos(theta+h)) - legendreY(l, m, math.Cos(theta-h))) / (2 * h)
}

// radial returns z_l(x) and (x z_l(x))'/x for z = i (regular) or k (outgoing),
// using the derivative recurrences x i_l' = x i_{l-1} - (l+1) i_l and
// x k_l' = -x k_{l-1} - (l+1) k_l (A&S §10.2, with k_l = (2/π) k_n^{A&S}).
func radial(l int, x float64, outgoing bool) (z, dz float64) {
	if outgoing {
		z = BesselK(l, x)
		var xdz float64
		if l == 0 {
			xdz = -x * BesselK(1, x)
		} else {
			xdz = -x*BesselK(l-1, x) - float64(l+1)*z
		}
		return z, (z + xdz) / x
	}
	z = BesselI(l, x)
	var xdz float64
	if l == 0 {
		xdz = x * BesselI(1, x)
	} else {
		xdz = x*BesselI(l-1, x) - float64(l+1)*z
	}
	return z, (z + xdz) / x
}

// point is a position given by cylindrical (ρ, z) relative to a centre on the
// z axis (the azimuth drops out: every field carries the same e^{imφ}).
type point struct{ rho, z float64 }

func (p point) spherical() (r, theta float64) {
	return math.Hypot(p.rho, p.z), math.Atan2(p.rho, p.z)
}

// scalarWave returns z_l(κr) P̄_lm(cos θ) at p.
func scalarWaveAt(l, m int, kappa float64, p point, outgoing bool) float64 {
	r, th := p.spherical()
	z, _ := radial(l, kappa*r, outgoing)
	return z * legendreY(l, m, math.Cos(th))
}

// vec3 holds complex (ρ, φ, z) components.
type vec3 [3]complex128

func (a vec3) add(b vec3, s complex128) vec3 {
	return vec3{a[0] + s*b[0], a[1] + s*b[1], a[2] + s*b[2]}
}

func (a vec3) norm() float64 {
	return math.Sqrt(sq(cmplx.Abs(a[0])) + sq(cmplx.Abs(a[1])) + sq(cmplx.Abs(a[2])))
}

func sq(x float64) float64 { return x * x }

// vectorWaves returns M_lm and N_lm = ∇×M/κ at p, M = ∇×(r z_l Y_lm)/sqrt(l(l+1)):
//
//	M = c z [(im/sinθ) Y θ̂ - ∂_θY φ̂],
//	N = c [l(l+1) (z/x) Y r̂ + ((x z)'/x) (∂_θY θ̂ + (im/sinθ) Y φ̂)],  c = 1/sqrt(l(l+1)),
//
// in (ρ, φ, z) components with r̂ = sinθ ρ̂ + cosθ ẑ, θ̂ = cosθ ρ̂ - sinθ ẑ.
func vectorWaves(l, m int, kappa float64, p point, outgoing bool) (M, N vec3) {
	r, th := p.spherical()
	x := kappa * r
	z, dz := radial(l, x, outgoing)
	y := legendreY(l, m, math.Cos(th))
	dy := dLegendreY(l, m, th)
	c := 1 / math.Sqrt(float64(l*(l+1)))
	st, ct := math.Sin(th), math.Cos(th)
	im := complex(0, float64(m)/st) * complex(y, 0)
	// M: θ̂ component c z im, φ̂ component -c z dy.
	mt := complex(c*z, 0) * im
	M = vec3{mt * complex(ct, 0), complex(-c*z*dy, 0), -mt * complex(st, 0)}
	nr := c * float64(l*(l+1)) * z / x * y
	nt := c * dz * dy
	N = vec3{complex(nr*st+nt*ct, 0), complex(c*dz, 0) * im, complex(nr*ct-nt*st, 0)}
	return M, N
}

// scales returns s_l = sqrt(i_l(κR)/k_l(κR)) for l = 0..n from the package's
// sphereScales, s_l = (κR)^{l+½} σ_l.
func scales(s *sphereScales, n int) []float64 {
	out := make([]float64, n+1)
	lx := math.Log(s.kappa * s.R)
	for l := 0; l <= n; l++ {
		out[l] = math.Exp(s.lnSigma[l] + (float64(l)+0.5)*lx)
	}
	return out
}

// relErr returns |got/want - 1|, or |got| when want is 0.
func relErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got/want - 1)
}

func checkRel(t *testing.T, name string, got, want, tol float64) {
	t.Helper()
	if e := relErr(got, want); !(e <= tol) {
		t.Errorf("%s = %.16g, want %.16g (relative error %.2e > %.0e)", name, got, want, e, tol)
	}
}
