package validate

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
	"github.com/fluctus/fluctus/scatter"
)

// TestPFAClosedForms checks the proximity-force sum over meshes (DESIGN §7)
// against its closed forms: for a sphere over the plane and for two equal
// spheres it converges, as the icosphere is refined, to the sum over the
// exact sphere profile (SpherePlanePFAProfile, SphereSpherePFAProfile) with an
// error falling like h² (tolerance: the finest level within 3e-3, and the
// error at least halving per doubling of the subdivision), and that profile
// sum tends to the textbook closed forms -π³ R_eff/(720 d²) (Derjaguin 1934,
// Casimir 1948) as d/R → 0 (relative difference below 2 d/R, its O(d/R)
// correction).
func TestPFAClosedForms(t *testing.T) {
	const R, d = 1.0, 0.1
	plane := &scatter.Plane{Normal: r3.Vec{Z: 1}}
	prevP, prevS := math.Inf(1), math.Inf(1)
	for _, level := range []int{8, 16, 32, 64} {
		m, err := mesh.SphereLevel(R, level)
		if err != nil {
			t.Fatal(err)
		}
		over := []scatter.Body{{Name: "sphere", Mesh: m.Translate(r3.Vec{Z: R + d})}}
		ep := scatter.PFAEnergy(over, 0, r3.Vec{Z: -1}, plane).Mean
		pair := []scatter.Body{{Name: "a", Mesh: m}, {Name: "b", Mesh: m.Translate(r3.Vec{Z: 2*R + d})}}
		es := scatter.PFAEnergy(pair, 1, r3.Vec{Z: -1}, nil).Mean
		errP := math.Abs(ep/SpherePlanePFAProfile(R, d) - 1)
		errS := math.Abs(es/SphereSpherePFAProfile(R, d) - 1)
		t.Logf("level %d: sphere-plane %.6g (profile %.6g, rel %.2g), sphere-sphere %.6g (profile %.6g, rel %.2g)",
			level, ep, SpherePlanePFAProfile(R, d), errP, es, SphereSpherePFAProfile(R, d), errS)
		if errP > prevP/2 || errS > prevS/2 {
			t.Errorf("level %d: errors %.3g, %.3g did not halve from %.3g, %.3g", level, errP, errS, prevP, prevS)
		}
		prevP, prevS = errP, errS
	}
	if prevP > 3e-3 || prevS > 3e-3 {
		t.Errorf("finest mesh: PFA sums off their closed forms by %.3g and %.3g", prevP, prevS)
	}
	for _, x := range []float64{0.1, 0.01, 1e-3} {
		if r := math.Abs(SpherePlanePFAProfile(1, x)/SpherePlanePFA(1, x) - 1); r > 2*x {
			t.Errorf("d/R=%g: sphere-plane profile sum differs from the closed form by %.3g", x, r)
		}
		if r := math.Abs(SphereSpherePFAProfile(1, x)/SphereSpherePFA(1, 1, x) - 1); r > 2*x {
			t.Errorf("d/R=%g: sphere-sphere profile sum differs from the closed form by %.3g", x, r)
		}
	}
}
