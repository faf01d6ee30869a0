package scatter

import (
	"fmt"
	"math"
	"testing"
	"time"

	"gonum.org/v1/gonum/mat"
)

// kmsDelta fills d (n×n, row major) with Δ = I - s K for the
// Kac–Murdock–Szegő matrix K_ij = ρ^|i-j|, whose eigenvalues lie in
// [(1-ρ)/(1+ρ), (1+ρ)/(1-ρ)] (Kac, Murdock & Szegő 1953; recalled from
// memory), so that I - Δ = s K is positive definite for s > 0: a dense test
// matrix built in O(n²) with a known log-determinant,
// ln det K = (n-1) ln(1 - ρ²).
func kmsDelta(d []float64, n int, rho, s float64) {
	for i := 0; i < n; i++ {
		for j := 0; j <= i; j++ {
			v := -s * math.Pow(rho, float64(i-j))
			if i == j {
				v += 1
			}
			d[i*n+j] = v
			d[j*n+i] = v
		}
	}
}

// factorSizes are the orders of the factorisation benchmarks.
var factorSizes = []int{2000, 4000}

// BenchmarkFactor reports the GFLOP/s (n³/3 flops) of the two Cholesky
// factorisations of a frequency point with the BLAS of the build (pure-Go
// gonum by default, OpenBLAS with the openblas tag): the delta-form
// log-determinant of I - Δ (logDetIMinus) and the factor of a self block
// (newFactor, gonum's mat.Cholesky).
func BenchmarkFactor(b *testing.B) {
	for _, n := range factorSizes {
		src := make([]float64, n*n)
		kmsDelta(src, n, 0.5, 0.5)
		d := make([]float64, n*n)
		b.Run(fmt.Sprintf("logdet/N=%d", n), func(b *testing.B) {
			var el time.Duration
			for i := 0; i < b.N; i++ {
				copy(d, src)
				t0 := time.Now()
				ld, err := logDetIMinus(d, n, n, 0)
				el += time.Since(t0)
				if err != nil {
					b.Fatal(err)
				}
				// ln det(0.5 K) = n ln 0.5 + (n-1) ln(0.75); rounding of
				// order n·1e-16 relative.
				if want := float64(n)*math.Log(0.5) + float64(n-1)*math.Log(0.75); math.Abs(ld-want) > 1e-9*math.Abs(want) {
					b.Fatalf("log det %v, want %v", ld, want)
				}
			}
			b.ReportMetric(float64(n)*float64(n)*float64(n)/3/(el.Seconds()/float64(b.N))/1e9, "GFLOP/s")
		})
		b.Run(fmt.Sprintf("self/N=%d", n), func(b *testing.B) {
			m := mat.NewSymDense(n, nil)
			var el time.Duration
			for i := 0; i < b.N; i++ {
				for r := 0; r < n; r++ {
					for c := r; c < n; c++ {
						m.SetSym(r, c, -src[r*n+c]+b2f(r == c))
					}
				}
				t0 := time.Now()
				_, err := newFactor(m)
				el += time.Since(t0)
				if err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(n)*float64(n)*float64(n)/3/(el.Seconds()/float64(b.N))/1e9, "GFLOP/s")
		})
	}
}

func b2f(v bool) float64 {
	if v {
		return 1
	}
	return 0
}

// TestLogDetIMinusKMS checks the blocked delta-form factorisation against the
// closed form ln det(s K) = n ln s + (n-1) ln(1 - ρ²) of the
// Kac–Murdock–Szegő matrix (recalled from memory; K's Cholesky factor has
// the diagonal 1, √(1-ρ²), √(1-ρ²), …), at orders that end inside, at and
// past a block boundary. Tolerance 1e-12 relative: the pivots are exact to
// rounding and n ≤ 500 of them are summed.
func TestLogDetIMinusKMS(t *testing.T) {
	for _, n := range []int{1, 100, blockSize, 2*blockSize + 17, 500} {
		d := make([]float64, n*n)
		kmsDelta(d, n, 0.5, 0.5)
		got, err := logDetIMinus(d, n, n, 0)
		if err != nil {
			t.Fatalf("n=%d: %v", n, err)
		}
		want := float64(n)*math.Log(0.5) + float64(n-1)*math.Log(0.75)
		if math.Abs(got-want) > 1e-12*math.Abs(want) {
			t.Errorf("n=%d: ln det %.15g, closed form %.15g", n, got, want)
		}
		// The factor's diagonal: √s, then √(s(1-ρ²)).
		for j := 0; j < n; j++ {
			w := math.Sqrt(0.5 * 0.75)
			if j == 0 {
				w = math.Sqrt(0.5)
			}
			if math.Abs(d[j*n+j]-w) > 1e-12 {
				t.Fatalf("n=%d: L[%d][%d] = %.15g, want %.15g", n, j, j, d[j*n+j], w)
			}
		}
	}
}

// TestNewFactorMatchesGonum compares the blocked self-block factor with
// gonum's mat.Cholesky (the reference library) on a symmetric positive
// definite matrix of order 2·blockSize + 17 (K + 0.1 I with the KMS K and a
// random symmetric part of norm below 0.1, so the smallest eigenvalue stays
// above 1/3 + 0.1 - 0.1 > 0): entries agree to 1e-12 (rounding, summed in
// another order), and an indefinite matrix is refused.
func TestNewFactorMatchesGonum(t *testing.T) {
	n := 2*blockSize + 17
	d := make([]float64, n*n)
	kmsDelta(d, n, 0.5, 1) // I - K
	m := mat.NewSymDense(n, nil)
	seed := uint64(7)
	for i := 0; i < n; i++ {
		for j := i; j < n; j++ {
			seed = seed*6364136223846793005 + 1442695040888963407
			noise := (float64(seed>>11)/(1<<53) - 0.5) * 0.1 / float64(n)
			v := -d[i*n+j] + noise
			if i == j {
				v += 1 + 0.1
			}
			m.SetSym(i, j, v)
		}
	}
	f, err := newFactor(m)
	if err != nil {
		t.Fatal(err)
	}
	var ch mat.Cholesky
	if !ch.Factorize(m) {
		t.Fatal("gonum: not positive definite")
	}
	var l mat.TriDense
	ch.LTo(&l)
	worst := 0.0
	for i := 0; i < n; i++ {
		for j := 0; j <= i; j++ {
			worst = math.Max(worst, math.Abs(f.l.Data[i*f.l.Stride+j]-l.At(i, j)))
		}
	}
	if worst > 1e-12 {
		t.Errorf("factor differs from gonum's by %g", worst)
	}
	m.SetSym(n-1, n-1, -1)
	if _, err := newFactor(m); err == nil {
		t.Errorf("indefinite matrix accepted")
	}
}
