package sticking

import "math"

// scanSteps is the number of scan cells per sample interval (uniform in the
// interpolation variable) in which sign changes are looked for. Within one
// interval the interpolant is a cubic in that variable, so its derivative
// changes sign at most twice there; 32 cells resolve such features with room
// to spare at negligible cost.
const scanSteps = 32

// grid returns the scan points of c in [lo, hi], including both ends.
func (c *Curve) grid(lo, hi float64) []float64 {
	g := []float64{lo}
	for i := range len(c.x) - 1 {
		h := c.u[i+1] - c.u[i]
		for j := range scanSteps {
			x := c.x[i]
			if j > 0 {
				u := c.u[i] + float64(j)*h/scanSteps
				x = u
				if c.logLog {
					x = math.Exp(u)
				}
			}
			if x > lo && x < hi {
				g = append(g, x)
			}
		}
	}
	return append(g, hi)
}

// zeros returns, in increasing order, the zeros of f located by sign changes
// between consecutive points of grid (refined by Brent's method) and grid
// points where f vanishes exactly.
func zeros(f func(float64) float64, grid []float64) []float64 {
	var z []float64
	xa, fa := grid[0], f(grid[0])
	if fa == 0 {
		z = append(z, xa)
	}
	for _, xb := range grid[1:] {
		fb := f(xb)
		switch {
		case fb == 0:
			z = append(z, xb)
		case fa != 0 && (fa < 0) != (fb < 0):
			z = append(z, brent(f, xa, xb, fa, fb))
		}
		xa, fa = xb, fb
	}
	return z
}

// brent returns a zero of f in [a, b], where fa = f(a) and fb = f(b) have
// opposite signs, to full double precision, by Brent's method (R. P. Brent,
// Algorithms for Minimization without Derivatives, Prentice-Hall 1973, ch. 4):
// inverse quadratic interpolation or secant steps safeguarded by bisection.
func brent(f func(float64) float64, a, b, fa, fb float64) float64 {
	const eps = 0x1p-52
	c, fc := b, fb
	var d, e float64
	for range 200 {
		if (fb > 0) == (fc > 0) {
			c, fc = a, fa
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) {
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		tol := 2 * eps * math.Abs(b)
		m := 0.5 * (c - b)
		if math.Abs(m) <= tol || fb == 0 {
			return b
		}
		if math.Abs(e) >= tol && math.Abs(fa) > math.Abs(fb) {
			s := fb / fa
			var p, q float64
			if a == c {
				p = 2 * m * s
				q = 1 - s
			} else {
				q = fa / fc
				r := fb / fc
				p = s * (2*m*q*(q-r) - (b-a)*(r-1))
				q = (q - 1) * (r - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			} else {
				p = -p
			}
			if 2*p < math.Min(3*m*q-math.Abs(tol*q), math.Abs(e*q)) {
				e = d
				d = p / q
			} else {
				d = m
				e = m
			}
		} else {
			d = m
			e = m
		}
		a, fa = b, fb
		switch {
		case math.Abs(d) > tol:
			b += d
		case m > 0:
			b += tol
		default:
			b -= tol
		}
		fb = f(b)
	}
	return b
}
