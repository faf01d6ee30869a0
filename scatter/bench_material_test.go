package scatter

import (
	"context"
	"testing"
	"time"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/scatter/material"
)

// BenchmarkMaterialPoint times one frequency point (self blocks assembled
// and factored, then the two-body integrand) of two real-material spheres
// (a Drude metal, gold's conventional ħω_p = 9 eV, ħγ = 35 meV, at
// L0 = 100 nm) against the same meshes as perfect conductors, at gap R and
// κ = 0.5. It reports the seconds of each, their ratio (the goal is at most
// about 12), and the unknowns per body of each formulation (2E for real
// bodies, E for perfect ones). The subdivision is small (720 triangles per
// sphere) so that one iteration stays short on a shared machine; set
// -benchtime=1x for a single measurement.
func BenchmarkMaterialPoint(b *testing.B) {
	bodies := pairScene(b, benchMaterialLevel, 3)
	real := withMaterial(bodies, material.Drude{PlasmaEV: 9, DampingEV: 0.035})
	perfectSys, err := newSystem(bodies, 1, 0, nil)
	if err != nil {
		b.Fatal(err)
	}
	realSys := realSystem(b, real, 1)
	point := func(sys *system) time.Duration {
		start := time.Now()
		sf, err := sys.factorSelf(context.Background(), 0.5)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := sys.evaluate(context.Background(), sf, placement{centre: r3.Vec{Z: 3}}, false); err != nil {
			b.Fatal(err)
		}
		return time.Since(start)
	}
	var tp, tr time.Duration
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		tp += point(perfectSys)
		tr += point(realSys)
	}
	n := float64(b.N)
	b.ReportMetric(tp.Seconds()/n, "s/perfect")
	b.ReportMetric(tr.Seconds()/n, "s/real")
	b.ReportMetric(tr.Seconds()/tp.Seconds(), "ratio")
	b.ReportMetric(float64(perfectSys.surf[0].Len()), "unknowns/perfect-body")
	b.ReportMetric(float64(2*realSys.surf[0].Len()), "unknowns/real-body")
}

// benchMaterialLevel is the sphere subdivision of BenchmarkMaterialPoint.
var benchMaterialLevel = 6
