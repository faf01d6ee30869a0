//go:build openblas

package scatter

import (
	"fmt"
	"math"
	"testing"
	"time"
)

// BenchmarkFactorOpenBLAS measures in one run, alternating, the delta-form
// factorisation of the log-determinant (logDetIMinus, on OpenBLAS's BLAS)
// and a plain OpenBLAS dpotrf of the same n×n matrix I - Δ: GFLOP/s of both
// (n³/3 flops) and their ratio. Both factors are compared entry by entry
// (tolerance 1e-10 relative to the largest: the same Cholesky factor, summed
// in another order).
func BenchmarkFactorOpenBLAS(b *testing.B) {
	for _, n := range factorSizes {
		b.Run(fmt.Sprintf("N=%d", n), func(b *testing.B) {
			src := make([]float64, n*n)
			kmsDelta(src, n, 0.5, 0.5)
			d := make([]float64, n*n)
			a := make([]float64, n*n)
			var ours, ref time.Duration
			for i := 0; i < b.N; i++ {
				copy(d, src)
				t0 := time.Now()
				if _, err := logDetIMinus(d, n, n, 0); err != nil {
					b.Fatal(err)
				}
				ours += time.Since(t0)
				for k, v := range src {
					a[k] = -v
				}
				for k := 0; k < n; k++ {
					a[k*n+k] += 1
				}
				t0 = time.Now()
				if err := potrfLower(n, a, n); err != nil {
					b.Fatal(err)
				}
				ref += time.Since(t0)
			}
			worst := 0.0
			for r := 0; r < n; r++ {
				for c := 0; c <= r; c++ {
					worst = math.Max(worst, math.Abs(d[r*n+c]-a[r*n+c]))
				}
			}
			if worst > 1e-10 {
				b.Fatalf("factors differ by %g", worst)
			}
			flops := float64(n) * float64(n) * float64(n) / 3 * float64(b.N) / 1e9
			b.ReportMetric(flops/ours.Seconds(), "GFLOP/s-ours")
			b.ReportMetric(flops/ref.Seconds(), "GFLOP/s-dpotrf")
			b.ReportMetric(ref.Seconds()/ours.Seconds(), "ratio")
		})
	}
}
