package validate

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/validate/multipole"
)

// gradedSphereOverPlane returns a sphere of radius R with its lowest point at
// height d above the plane z = 0, meshed with triangles of size near at the
// bottom growing by half the height (capped at far).
func gradedSphereOverPlane(t testing.TB, R, d, near, far float64) *mesh.Mesh {
	t.Helper()
	zc := R + d
	g := mesh.Grading{Near: near, Far: far}
	size := func(p r3.Vec) float64 { return math.Min(far, near+0.5*(p.Z+zc-d)) }
	m, err := mesh.GradedSphere(R, g, size)
	if err != nil {
		t.Fatal(err)
	}
	return m.Translate(r3.Vec{Z: zc})
}

// TestSpherePlaneNear checks a sphere near the substrate at d/R = 0.2 and
// 0.1 with graded meshes (h = d/2 at the gap).
//
// Against the independent multipole solution the energy must agree within
// 2.5 %: the flat triangles sit inside the sphere by up to h²/(8R), which
// lengthens the effective gap and costs 1-2 % of the energy at these meshes
// (measured: 1.9 % and 1.1 %).
//
// Against the derivative expansion E/E_PFA = 1 + θ d/R, θ = 1/3 - 20/π²
// (Bimonte, Emig, Jaffe & Kardar 2012; DESIGN §8): at these d/R the
// higher-order and logarithmic terms are large (the multipole values lie
// 7 % and 21 % above the linear law), so the checks are that E/E_PFA lies
// between the linear law and 1, that the secant slope (E/E_PFA - 1)/(d/R)
// moves towards θ as d/R falls, and that a fit of 1 + θ x + c x^(3/2)
// through the two points gives θ within 0.35 of the published slope (the
// same fit on the multipole values gives about -1.5: two points cannot
// separate the x² ln x terms).
func TestSpherePlaneNear(t *testing.T) {
	const R = 1.0
	plane := &scatter.Plane{Normal: r3.Vec{Z: 1}}
	cases := []struct{ d, near, far float64 }{{0.2, 0.1, 0.4}, {0.1, 0.05, 0.3}}
	ratio := make([]float64, len(cases))
	refRatio := make([]float64, len(cases))
	for i, c := range cases {
		m := gradedSphereOverPlane(t, R, c.d, c.near, c.far)
		pts, err := scatter.Energies(context.Background(), []scatter.Body{{Name: "sphere", Mesh: m}},
			scatter.Sweep{Body: 0, Direction: r3.Vec{Z: -1}, Offsets: []r3.Vec{{}}}, scatter.Settings{Accuracy: 1e-3, Substrate: plane})
		if err != nil {
			t.Fatal(err)
		}
		ref, err := multipole.Energy(context.Background(), multipole.Config{Field: multipole.Electromagnetic, Geometry: multipole.SpherePlane, R1: R, L: R + c.d, Tol: 1e-5})
		if err != nil {
			t.Fatal(err)
		}
		e := pts[0].Energy
		ratio[i] = e / SpherePlanePFA(R, c.d)
		refRatio[i] = ref.Energy / SpherePlanePFA(R, c.d)
		t.Logf("d/R=%g (%d triangles): E/E_PFA = %.4f, multipole %.4f, linear law %.4f", c.d, len(m.Triangles), ratio[i], refRatio[i], 1+DerivativeExpansionSlope*c.d)
		if d := math.Abs(e/ref.Energy - 1); d > 0.025 {
			t.Errorf("d/R=%g: %.3g from the multipole energy", c.d, d)
		}
		if lin := 1 + DerivativeExpansionSlope*c.d; !(ratio[i] > lin && ratio[i] < 1) {
			t.Errorf("d/R=%g: E/E_PFA = %.4f not between the linear law %.4f and 1", c.d, ratio[i], lin)
		}
	}
	x1, x2 := cases[1].d, cases[0].d
	s1, s2 := (ratio[1]-1)/x1, (ratio[0]-1)/x2
	if !(s1 < s2) {
		t.Errorf("secant slope %.3f at d/R=%g is not below %.3f at d/R=%g", s1, x1, s2, x2)
	}
	fit := func(r1, r2 float64) float64 { // θ of 1 + θx + c x^1.5 through both points
		a1, a2 := math.Pow(x1, 1.5), math.Pow(x2, 1.5)
		c := ((r2-1)/x2 - (r1-1)/x1) / (a2/x2 - a1/x1)
		return (r1 - 1 - c*a1) / x1
	}
	th, thRef := fit(ratio[1], ratio[0]), fit(refRatio[1], refRatio[0])
	t.Logf("fitted slope %.3f (multipole values: %.3f), published %.3f", th, thRef, DerivativeExpansionSlope)
	if math.Abs(th-DerivativeExpansionSlope) > 0.35 {
		t.Errorf("fitted slope %.3f, published %.3f", th, DerivativeExpansionSlope)
	}
}
