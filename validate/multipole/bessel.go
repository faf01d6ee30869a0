package multipole

import "math"

// Convention. Throughout this package
//
//	i_l(x) = sqrt(π/(2x)) I_{l+1/2}(x)     (modified spherical Bessel, first kind)
//	k_l(x) = sqrt(2/(πx)) K_{l+1/2}(x)     (modified spherical Bessel, second kind)
//
// so that i_0(x) = sinh(x)/x and k_0(x) = e^{-x}/x. This k_l is 2/π times the
// k_n of Abramowitz & Stegun §10.2 (whose k_0 is (π/2) e^{-x}/x). With it the
// imaginary-frequency Green function expands without stray factors,
//
//	e^{-κ|r-r'|}/(4π|r-r'|) = κ Σ_lm i_l(κr_<) k_l(κr_>) Y_lm(r̂) Y*_lm(r̂'),
//
// and the Wronskian reads i_l k_{l+1} + i_{l+1} k_l = 1/x².
//
// Nothing is computed from i_l or k_l directly: both are built from the order
// ratios
//
//	p_l = i_l(x) / (x i_{l-1}(x)),   q_l = x k_l(x) / k_{l-1}(x),   l ≥ 1,
//
// which stay finite and well conditioned for every x ≥ 0, including x = 0
// (p_l → 1/(2l+1), q_l → 2l-1). They obey
//
//	p_l = 1 / (2l+1 + x² p_{l+1})   (run downwards: i_l is the minimal solution)
//	q_1 = 1 + x,  q_{l+1} = 2l+1 + x²/q_l   (run upwards: k_l is dominant)
//
// both from the recurrence z_{l-1} - z_{l+1} = (2l+1) z_l / x (A&S 10.2.18 for
// i_l; with the sign of the k_l terms reversed for k_l). Logarithms of i_l, k_l
// and of the scale factors used by the translation matrices follow as sums of
// logarithms of the ratios, so that nothing overflows for l up to several
// hundred and x from 0 to well beyond 10³.

// besselRatios holds p_l and q_l for l = 1..n at one argument x ≥ 0.
type besselRatios struct {
	x    float64
	p, q []float64 // index l; element 0 unused
}

// newBesselRatios returns p_l, q_l for l = 1..n at x ≥ 0.
func newBesselRatios(n int, x float64) besselRatios {
	if n < 1 {
		n = 1
	}
	b := besselRatios{x: x, p: make([]float64, n+1), q: make([]float64, n+1)}
	x2 := x * x

	// Downward recurrence for p. An error δ in p_{l+1} enters p_l multiplied
	// by -(x p_l)² = -(i_l/i_{l-1})², which is below 0.18 for l ≥ x; starting
	// 60 orders above max(n, x) from p = 0 therefore converges to full precision.
	top := n + 60
	if xi := int(math.Ceil(x)) + 60; xi > top {
		top = xi
	}
	p := 0.0
	for l := top; l > n; l-- {
		p = 1 / (float64(2*l+1) + x2*p)
	}
	for l := n; l >= 1; l-- {
		p = 1 / (float64(2*l+1) + x2*p)
		b.p[l] = p
	}

	// Upward recurrence for q (stable: q_l ≥ x, so the error factor x²/q_l² ≤ 1).
	q := 1 + x
	b.q[1] = q
	for l := 1; l < n; l++ {
		q = float64(2*l+1) + x2/q
		b.q[l+1] = q
	}
	return b
}

// logI0 returns ln i_0(x) = ln(sinh x / x) for x ≥ 0.
func logI0(x float64) float64 {
	switch {
	case x < 1e-4:
		return x * x / 6
	case x < 20:
		return math.Log(math.Sinh(x) / x)
	default:
		return x - math.Log(2*x) + math.Log1p(-math.Exp(-2*x))
	}
}

// logSinhExp returns ln[(e^{2x} - 1)/(2x)] = ln[i_0(x)/(x k_0(x))], x ≥ 0.
func logSinhExp(x float64) float64 {
	switch {
	case x < 1e-5:
		return x + x*x/6 // the x³ term vanishes
	case x < 300:
		return math.Log(math.Expm1(2*x) / (2 * x))
	default:
		return 2*x - math.Log(2*x)
	}
}

// logI returns ln i_l(x) for x > 0.
func (b besselRatios) logI(l int) float64 {
	s := logI0(b.x)
	lx := math.Log(b.x)
	for k := 1; k <= l; k++ {
		s += lx + math.Log(b.p[k])
	}
	return s
}

// logK returns ln k_l(x) for x > 0.
func (b besselRatios) logK(l int) float64 {
	lx := math.Log(b.x)
	s := -b.x - lx
	for k := 1; k <= l; k++ {
		s += math.Log(b.q[k]) - lx
	}
	return s
}

// BesselI returns the modified spherical Bessel function of the first kind
// i_l(x) = sqrt(π/(2x)) I_{l+1/2}(x) for l ≥ 0, x ≥ 0 (i_0 = sinh x / x).
// It returns +Inf where the value overflows float64 and 0 where it underflows;
// l < 0 or x < 0 gives NaN.
func BesselI(l int, x float64) float64 {
	switch {
	case l < 0 || x < 0 || math.IsNaN(x):
		return math.NaN()
	case x == 0:
		if l == 0 {
			return 1
		}
		return 0
	case math.IsInf(x, 1):
		return math.Inf(1)
	}
	b := newBesselRatios(l+1, x)
	var p scaledProduct
	if x < 20 {
		p.mul(math.Sinh(x) / x)
	} else {
		p.mulExp(x - math.Log(2*x) + math.Log1p(-math.Exp(-2*x)))
	}
	for k := 1; k <= l; k++ {
		p.mul(x * b.p[k])
	}
	return p.value()
}

// BesselK returns the modified spherical Bessel function of the second kind in
// the normalisation k_l(x) = sqrt(2/(πx)) K_{l+1/2}(x), so k_0(x) = e^{-x}/x
// (2/π times the k_n of Abramowitz & Stegun §10.2), for l ≥ 0, x > 0.
// It returns +Inf where the value overflows float64 (and at x = 0) and 0 where
// it underflows; l < 0 or x < 0 gives NaN.
func BesselK(l int, x float64) float64 {
	switch {
	case l < 0 || x < 0 || math.IsNaN(x):
		return math.NaN()
	case x == 0:
		return math.Inf(1)
	case math.IsInf(x, 1):
		return 0
	}
	b := newBesselRatios(l+1, x)
	var p scaledProduct
	p.mulExp(-x)
	p.mul(1 / x)
	for k := 1; k <= l; k++ {
		p.mul(b.q[k] / x)
	}
	return p.value()
}

// scaledProduct accumulates a product of positive factors as mantissa ×
// 2^exponent, so that intermediate values neither overflow nor underflow and
// the rounding error grows only linearly with the number of factors.
type scaledProduct struct {
	m   float64
	exp int
	set bool
}

func (p *scaledProduct) mul(f float64) {
	if !p.set {
		p.m, p.set = 1, true
	}
	fm, fe := math.Frexp(f)
	p.m *= fm
	p.exp += fe
	m, e := math.Frexp(p.m)
	p.m, p.exp = m, p.exp+e
}

// mulExp multiplies by e^y.
func (p *scaledProduct) mulExp(y float64) {
	n := math.Floor(y / math.Ln2)
	p.mul(math.Exp(y - n*math.Ln2))
	p.exp += int(n)
}

func (p *scaledProduct) value() float64 {
	if !p.set {
		return 1
	}
	return math.Ldexp(p.m, p.exp)
}

// sphereScales holds, for one sphere of radius R at one κ ≥ 0, the quantities
// through which the T-matrix and the translation matrices are scaled.
//
// The multipole amplitudes of sphere S are rescaled by s_l = sqrt(i_l(κR)/k_l(κR)),
// which turns T_l into the O(1) number T_l/s_l² and the translation coefficient
// between spheres a and b into s^a_j U_jl s^b_l, bounded by e^{-κ·gap}. Writing
// s_l = (κR)^{l+1/2} σ_l(κR) separates the powers of κ that cancel between
// the two factors exactly, so that κ = 0 is an ordinary point:
//
//	ln σ_l(x) = ½ ln[(e^{2x}-1)/(2x)] + ½ Σ_{k=1}^{l} ln(p_k/q_k).
type sphereScales struct {
	R, kappa float64
	lnSigma  []float64 // ln σ_l, l = 0..n
	// up_l = s_{l+1}/(κ s_l) = R σ_{l+1}/σ_l = R sqrt(p_{l+1}/q_{l+1}), l = 0..n-1.
	up []float64
	// x²p_l and q_l for l = 1..n (for the T-matrices).
	x2p, q []float64
}

// newSphereScales returns the scales of a sphere of radius R at κ for orders
// 0..n.
func newSphereScales(R, kappa float64, n int) sphereScales {
	x := kappa * R
	b := newBesselRatios(n+1, x)
	s := sphereScales{
		R: R, kappa: kappa,
		lnSigma: make([]float64, n+1),
		up:      make([]float64, n+1),
		x2p:     make([]float64, n+2),
		q:       make([]float64, n+2),
	}
	acc := 0.5 * logSinhExp(x)
	s.lnSigma[0] = acc
	for l := 1; l <= n; l++ {
		acc += 0.5 * math.Log(b.p[l]/b.q[l])
		s.lnSigma[l] = acc
	}
	for l := 0; l <= n; l++ {
		s.up[l] = R * math.Sqrt(b.p[l+1]/b.q[l+1])
	}
	for l := 1; l <= n+1; l++ {
		s.x2p[l] = x * x * b.p[l]
		s.q[l] = b.q[l]
	}
	return s
}

// distanceLogEta returns ln η_λ(κd) = ln[(κd)^{λ+1} k_λ(κd)] = -κd + Σ_{k≤λ} ln q_k(κd)
// for λ = 0..n: the translation coefficients' radial factor with its pole at
// κ = 0 removed (η_λ(0) = (2λ-1)!!).
func distanceLogEta(d, kappa float64, n int) []float64 {
	y := kappa * d
	b := newBesselRatios(n, y)
	eta := make([]float64, n+1)
	acc := -y
	eta[0] = acc
	for l := 1; l <= n; l++ {
		acc += math.Log(b.q[l])
		eta[l] = acc
	}
	return eta
}
