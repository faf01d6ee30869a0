package bem

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestFastExp compares fastExp with the standard library's math.Exp (the
// reference; itself within one ulp) on random arguments over several ranges
// and at the edges of the reduced range. Tolerance: 4e-16 relative, about two
// units in the last place (table entry, polynomial and scaling each round
// once).
func TestFastExp(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, c := range []struct{ lo, hi float64 }{
		{-1e-3, 1e-3}, {-1, 1}, {-30, 0}, {-708, -600}, {0, 709}, {-708, 709},
	} {
		worst := 0.0
		for i := 0; i < 200000; i++ {
			x := c.lo + (c.hi-c.lo)*rng.Float64()
			want := math.Exp(x)
			if e := math.Abs(fastExp(x)-want) / want; e > worst {
				worst = e
			}
		}
		if worst > 4e-16 {
			t.Errorf("fastExp on [%g, %g]: worst relative error %.3g exceeds 4e-16", c.lo, c.hi, worst)
		}
	}
	for _, x := range []float64{0, -0.0, math.Ln2 / 256, -math.Ln2 / 256, math.Ln2, -math.Ln2, -708, 709, -745, -800, 710, math.Inf(-1), math.Inf(1)} {
		want := math.Exp(x)
		got := fastExp(x)
		if want == 0 || math.IsInf(want, 0) {
			if got != want {
				t.Errorf("fastExp(%g) = %g, want %g", x, got, want)
			}
			continue
		}
		if e := math.Abs(got-want) / want; e > 4e-16 {
			t.Errorf("fastExp(%g) = %.17g, want %.17g", x, got, want)
		}
	}
	if !math.IsNaN(fastExp(math.NaN())) {
		t.Errorf("fastExp(NaN) is not NaN")
	}
}

func BenchmarkFastExp(b *testing.B) {
	x := make([]float64, 1024)
	for i := range x {
		x[i] = -float64(i) / 100
	}
	s := 0.0
	b.Run("fast", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			for _, v := range x {
				s += fastExp(v)
			}
		}
		b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(b.N*len(x)), "ns/exp")
	})
	b.Run("math", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			for _, v := range x {
				s += math.Exp(v)
			}
		}
		b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(b.N*len(x)), "ns/exp")
	})
	_ = s
}
