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

// BenchmarkFarFieldEnergy is a whole T = 0 energy of two 1280-triangle
// spheres (1920 unknowns each) at L/R = 16 to accuracy 1e-3: seconds and the
// number of frequency points.
func BenchmarkFarFieldEnergy(b *testing.B) {
	bodies := pairScene(b, 8, 16)
	sw := Sweep{Body: 1, Direction: r3.Vec{Z: 1}, Offsets: []r3.Vec{{}}}
	var n int
	for i := 0; i < b.N; i++ {
		pts, err := Energies(context.Background(), bodies, sw, Settings{Accuracy: 1e-3})
		if err != nil {
			b.Fatal(err)
		}
		n = len(pts[0].Samples)
	}
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "s/energy")
	b.ReportMetric(float64(n), "frequencies")
}

// BenchmarkForceOverhead compares an energy-only run with an energy, force
// and torque run of two 500-triangle spheres at gap R (the ratio of the two
// s/run figures is the cost of forces).
func BenchmarkForceOverhead(b *testing.B) {
	bodies := pairScene(b, 5, 3)
	sw := Sweep{Body: 1, Direction: r3.Vec{Z: 1}, Offsets: []r3.Vec{{}}, Centre: r3.Vec{Z: 3}}
	for _, forces := range []bool{false, true} {
		name := "energy"
		if forces {
			name = "forces"
		}
		b.Run(name, func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := Energies(context.Background(), bodies, sw, Settings{Accuracy: 1e-3, Forces: forces}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "s/run")
		})
	}
}
