package validate

import (
	"context"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/validate/multipole"
)

// BenchmarkSpherePlaneNear is the small-gap speed goal: a sphere over the
// substrate at d/R = 0.1, graded mesh (h = 0.4 d at the gap, 0.3 R far),
// accuracy 3e-3 on the frequency integral, to 1 % of the independent
// multipole energy. It reports the unknowns, the frequencies used and the
// relative deviation from the multipole value (whose own error is below
// 1e-5). Run with -bench SpherePlaneNear -benchtime 1x: one run takes minutes.
func BenchmarkSpherePlaneNear(b *testing.B) {
	const R, d = 1.0, 0.1
	m := gradedSphereOverPlane(b, R, d, 0.4*d, 0.3)
	ref, err := multipole.Energy(context.Background(), multipole.Config{Field: multipole.Electromagnetic, Geometry: multipole.SpherePlane, R1: R, L: R + d, Tol: 1e-6})
	if err != nil {
		b.Fatal(err)
	}
	bodies := []scatter.Body{{Name: "sphere", Mesh: m}}
	sweep := scatter.Sweep{Body: 0, Direction: r3.Vec{Z: -1}, Offsets: []r3.Vec{{}}}
	set := scatter.Settings{Accuracy: 3e-3, Substrate: &scatter.Plane{Normal: r3.Vec{Z: 1}}}
	b.ResetTimer()
	var pt scatter.Point
	for i := 0; i < b.N; i++ {
		pts, err := scatter.Energies(context.Background(), bodies, sweep, set)
		if err != nil {
			b.Fatal(err)
		}
		pt = pts[0]
	}
	b.ReportMetric(float64(scatter.Estimate(bodies).Unknowns), "unknowns")
	b.ReportMetric(float64(len(pt.Samples)), "frequencies")
	b.ReportMetric(pt.Energy/ref.Energy-1, "rel-deviation")
}
