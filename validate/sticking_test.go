package validate

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/scatter/sticking"
)

// TestStickingOnComputedForce runs the sticking analysis (DESIGN §12) on a
// force curve computed by the solver — a sphere over the substrate at six
// gaps — and checks its pull-in point against the solver itself: a fresh
// computation at the predicted pull-in gap x* must have -dF/dg equal to the
// spring's stiffness and the predicted critical rest gap must equal
// x* + F(x*)/k. Tolerance 1e-3 relative: the interpolation between the
// samples (error falling as the fourth power of their spacing, here about
// 1e-4) plus the integration accuracy 1e-5 of both computations.
func TestStickingOnComputedForce(t *testing.T) {
	m, err := mesh.SphereLevel(1, 2)
	if err != nil {
		t.Fatal(err)
	}
	plane := &scatter.Plane{Normal: r3.Vec{Z: 1}}
	set := scatter.Settings{Accuracy: 1e-5, Stiffness: true, Substrate: plane}
	// Gaps to the plane, measured from the mesh's lowest vertex.
	zmin := m.Stats().Min.Z
	at := func(gaps []float64) []scatter.Point {
		sw := scatter.Sweep{Body: 0, Direction: r3.Vec{Z: -1}}
		for _, g := range gaps {
			sw.Offsets = append(sw.Offsets, r3.Vec{Z: g - zmin})
		}
		pts, err := scatter.Energies(context.Background(), []scatter.Body{{Name: "sphere", Mesh: m}}, sw, set)
		if err != nil {
			t.Fatal(err)
		}
		return pts
	}
	gaps := []float64{0.6, 0.7, 0.8, 0.95, 1.1, 1.3}
	var samples []sticking.Sample
	for _, p := range at(gaps) {
		// Attraction towards the plane (along the approach direction -z)
		// and its slope along increasing gap (scatter's Stiffness).
		samples = append(samples, sticking.Sample{X: p.Gap, Load: -p.Force.Z, Slope: p.Stiffness})
	}
	curve, err := sticking.NewCurve(samples)
	if err != nil {
		t.Fatal(err)
	}
	// A spring whose pull-in lies inside the sampled range: k equal to the
	// load's stiffness at g = 0.85.
	k := -curve.Slope(0.85)
	rep, err := sticking.Analyse(curve, sticking.Spring{Stiffness: k, Rest: 1.2})
	if err != nil {
		t.Fatal(err)
	}
	xs := rep.PullIn.X
	if rep.PullIn.Location != sticking.Sampled || !(xs > 0.6 && xs < 1.3) {
		t.Fatalf("pull-in %+v not inside the sampled range", rep.PullIn)
	}
	fresh := at([]float64{xs})[0]
	load, slope := -fresh.Force.Z, fresh.Stiffness
	t.Logf("k = %.6g: pull-in at g* = %.6g; solver there: -dF/dg = %.6g, F = %.6g; x0_crit %.6g vs %.6g",
		k, xs, -slope, load, rep.MinRest.Value, xs+load/k)
	if math.Abs(-slope/k-1) > 1e-3 {
		t.Errorf("at the predicted pull-in gap the solver's -dF/dg is %.6g, the spring's k %.6g", -slope, k)
	}
	if want := xs + load/k; math.Abs(rep.MinRest.Value/want-1) > 1e-3 {
		t.Errorf("critical rest gap %.6g, solver gives %.6g", rep.MinRest.Value, want)
	}
}
