package scatter

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// plateTail returns the share of the κ integral beyond κL = x for two
// parallel perfect-conductor plates at separation L (Lifshitz's formula at
// perfect reflection), for the m-th derivative in L (m = 0 energy, 1
// force, 2 stiffness). With f_m(κ) = ∫_κ^∞ q (2q)^m S_m(q) dq, S_m(q) =
// Σ_n n^{m-1} e^{-2nq} (L = 1), swapping the order of integration gives the
// tail ∫_x^∞ (q - x) q (2q)^m S_m(q) dq and the whole (m+2)! ζ(4)/8, with
// ζ(4) = π⁴/90 (Euler).
func plateTail(x float64, m int) (tail, whole float64) {
	f := func(q float64) float64 { return (q - x) * q * math.Pow(2*q, float64(m)) * plateSeries(q, m, 200) }
	tail = quad.Fixed(f, x, x+40, 400, quad.Legendre{}, 0) // e^{-80} beyond
	whole = float64(factorial(m+2)) * math.Pow(math.Pi, 4) / 90 / 8
	return tail, whole
}

// plateSeries is S_m(q) = Σ_n n^{m-1} e^{-2nq}, summed over at most terms
// terms and stopped once a term falls below 1e-18 of the sum.
func plateSeries(q float64, m, terms int) float64 {
	var sum float64
	for n := 1; n <= terms; n++ {
		t := math.Pow(float64(n), float64(m-1)) * math.Exp(-2*float64(n)*q)
		sum += t
		if t < 1e-18*sum {
			break
		}
	}
	return sum
}

func factorial(n int) int {
	if n <= 1 {
		return 1
	}
	return n * factorial(n-1)
}

// TestCutoffTail checks cutoffFor against the parallel-plate integrand
// itself: at the cutoff of each accuracy the tail of the energy, force and
// stiffness integrals takes at most tailShare times the accuracy (no
// margin: the plates are the bound's worst case), and the closed-form
// bound e^{-2x}(1+x)³ lies above the plates' share at every x from 2 to 30.
func TestCutoffTail(t *testing.T) {
	// The numerical whole against the closed form: checks plateTail's
	// integrand (tolerance 1e-9 relative: 400 Gauss nodes on a smooth
	// integrand; the m = 0 log singularity at q = 0 is weighted by q²).
	for m := 0; m <= 2; m++ {
		num := quad.Fixed(func(q float64) float64 { return q * q * math.Pow(2*q, float64(m)) * plateSeries(q, m, 4000) }, 0, 40, 400, quad.Legendre{}, 0)
		if _, whole := plateTail(0, m); math.Abs(num-whole) > 1e-6*whole {
			t.Errorf("m = %d: whole integral %.10g numerically, %.10g closed form", m, num, whole)
		}
	}
	for _, acc := range []float64{1e-2, 1e-3, 1e-4, 1e-6, 1e-8} {
		x := cutoffFor(acc)
		if x < 1 || x > kappaCutoff {
			t.Errorf("accuracy %g: cutoff %g outside [1, %d]", acc, x, kappaCutoff)
		}
		for m := 0; m <= 2; m++ {
			tail, whole := plateTail(x, m)
			if share := tail / whole; share > tailShare*acc {
				t.Errorf("accuracy %g, derivative %d: tail beyond κL = %.3g takes %.3g of the integral, more than %.3g", acc, m, x, share, tailShare*acc)
			}
		}
	}
	for x := 2.0; x <= 30; x += 0.5 {
		for m := 0; m <= 2; m++ {
			tail, whole := plateTail(x, m)
			if b := math.Exp(-2*x) * math.Pow(1+x, 3); tail/whole > b {
				t.Errorf("x = %g, derivative %d: plate share %.3g above the bound %.3g", x, m, tail/whole, b)
			}
		}
	}
	if got := cutoffFor(1e-3); math.Abs(got-9.25) > 0.01 {
		t.Errorf("cutoff at 1e-3 = %g, documented as about 9.25", got)
	}
}
