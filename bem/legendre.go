package bem

import (
	"math"

	"gonum.org/v1/gonum/integrate/quad"
)

// gaussLegendre fills x and w with the n-point Gauss–Legendre rule on
// [a, b]. It takes gonum's nodes, checks them (the weights must sum to b - a
// and the rule must integrate t^(2n-2) exactly) and, where they fail — gonum
// v0.17.0 returns a wrong 26-point rule — computes the rule itself by Newton
// iteration on the Legendre polynomial (Abramowitz & Stegun 25.4.29 for the weights).
func gaussLegendre(x, w []float64, a, b float64) {
	quad.Legendre{}.FixedLocations(x, w, -1, 1)
	if !legendreOK(x, w) {
		newtonLegendre(x, w)
	}
	for i := range x {
		x[i] = (a+b)/2 + (b-a)/2*x[i]
		w[i] *= (b - a) / 2
	}
}

// legendreOK checks a rule on [-1, 1].
func legendreOK(x, w []float64) bool {
	n := len(x)
	var s, m float64
	for i := range x {
		s += w[i]
		m += w[i] * math.Pow(x[i], float64(2*n-2))
	}
	return math.Abs(s-2) < 1e-13 && math.Abs(m-2/float64(2*n-1)) < 1e-12
}

// newtonLegendre computes the rule on [-1, 1]: roots of P_n from Newton's
// method started at the Chebyshev-like guess cos(π(i+3/4)/(n+1/2)), weights
// 2/((1-x²) P_n'(x)²).
func newtonLegendre(x, w []float64) {
	n := len(x)
	for i := 0; i < n; i++ {
		z := math.Cos(math.Pi * (float64(i) + 0.75) / (float64(n) + 0.5))
		var dp float64
		for iter := 0; iter < 100; iter++ {
			p0, p1 := 1.0, z
			for k := 2; k <= n; k++ {
				p0, p1 = p1, ((2*float64(k)-1)*z*p1-(float64(k)-1)*p0)/float64(k)
			}
			if n == 1 {
				p0, p1 = 1, z
			}
			dp = float64(n) * (z*p1 - p0) / (z*z - 1)
			dz := p1 / dp
			z -= dz
			if math.Abs(dz) < 1e-16 {
				break
			}
		}
		x[n-1-i] = z
		w[n-1-i] = 2 / ((1 - z*z) * dp * dp)
	}
}
