package scatter

import (
	"context"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// benchPoint reports one frequency point of two spheres with 1920 unknowns
// each at gap R (DESIGN §10 cost model): seconds, GFLOP/s of the dense
// algebra counted as 4N³ (two triangular solves, the rank update and the
// factorisation of the reduced matrix) plus N³/3 for one self factor (the
// bodies are translates, so they share it).
func benchPoint(b *testing.B, grad bool) {
	bodies := pairScene(b, 8, 3)
	sys, err := newSystem(bodies, 1, 0, nil)
	if err != nil {
		b.Fatal(err)
	}
	n := float64(sys.surf[0].Len())
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		sf, err := sys.factorSelf(context.Background(), 0.5)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := sys.evaluate(context.Background(), sf, placement{centre: r3.Vec{Z: 3}}, grad); err != nil {
			b.Fatal(err)
		}
	}
	sec := b.Elapsed().Seconds() / float64(b.N)
	flops := (4 + 1.0/3) * n * n * n
	if grad {
		flops += 4 * n * n * n
	}
	b.ReportMetric(sec, "s/point")
	b.ReportMetric(flops/sec/1e9, "GFLOP/s")
	b.ReportMetric(n, "unknowns/body")
}

func BenchmarkFrequencyPoint(b *testing.B)       { benchPoint(b, false) }
func BenchmarkFrequencyPointForces(b *testing.B) { benchPoint(b, true) }
