package multipole

import (
	"context"
	"testing"
	"time"
)

// BenchmarkSphereSphereSmallGap: two equal perfectly conducting spheres at
// d/R = 0.1, energy (and force) to 1e-6 relative. Reports the multipole order,
// the seconds per energy and the number of ln det evaluations (all orders).
func BenchmarkSphereSphereSmallGap(b *testing.B) {
	c := Config{Field: Electromagnetic, Geometry: SphereSphere, R1: 1, R2: 1, L: 2.1, Tol: 1e-6}
	var r Result
	start := time.Now()
	for i := 0; i < b.N; i++ {
		var err error
		if r, err = Energy(context.Background(), c); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(time.Since(start).Seconds()/float64(b.N), "s/energy")
	b.ReportMetric(float64(r.LMax), "lmax")
	b.ReportMetric(float64(r.Evaluations), "evaluations")
	b.ReportMetric(r.EnergyError/-r.Energy, "rel-error")
}
