package stick

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/scatter/sticking"
)

// unit is the length unit of the synthetic points below: 1 µm.
const unit = scatter.Unit(1e-6)

// down is the approach direction of the translation tests.
var down = r3.Vec{Z: -1}

// plates returns a solver point at gap g (L0) of the attraction between
// parallel perfect conductors of area a (L0²), F = π² a/(240 g⁴) in ħc/L0²
// (Casimir 1948), pulling the moving body along down, with the solver's
// stiffness -dF/ds = dF/dg = -4F/g.
func plates(g, a float64) scatter.Point {
	f := math.Pi * math.Pi * a / (240 * math.Pow(g, 4))
	return scatter.Point{Gap: g, Offset: r3.Scale(-g, down), Force: r3.Scale(f, down), Stiffness: -4 * f / g}
}

// platesC is the constant C of F = C/x⁴ in SI (N m⁴) for area a (L0²).
func platesC(a float64) float64 {
	return math.Pi * math.Pi * scatter.HbarC * a * math.Pow(float64(unit), 2) / 240
}

func TestSampleTranslation(t *testing.T) {
	c := Coordinate{Unit: unit, Direction: down}
	s := c.Sample(plates(0.5, 100))
	// x in m, load in N, slope in N/m: the conversions of scatter.Unit
	// (ħc/L0² → N, ħc/L0³ → N/m) and the closed form above; the slope of a
	// 1/x⁴ law is -4L/x. Tolerance 1e-12: rounding.
	cc := platesC(100)
	if math.Abs(s.X-0.5e-6) > 1e-18 || math.Abs(s.Load/(cc/math.Pow(0.5e-6, 4))-1) > 1e-12 || math.Abs(s.Slope/(-4*s.Load/s.X)-1) > 1e-12 {
		t.Errorf("sample %+v, want x 5e-7, load %g", s, cc/math.Pow(0.5e-6, 4))
	}
	if v := c.SweepValue(s.X); math.Abs(v-0.5) > 1e-15 {
		t.Errorf("sweep value %g, want 0.5", v)
	}
	if x := c.Position(0.5); x != s.X {
		t.Errorf("position %g", x)
	}
	if l := c.Label(s.X); l != "gap 0.5 um" {
		t.Errorf("label %q", l)
	}
}

func TestSampleRotation(t *testing.T) {
	// A body turning about y through the pivot (0, 0, 1), 0.3 rad short of
	// contact at θc = 0.5, with the torque taken about another point: the
	// torque about the pivot is τ_c + (c - pivot) × F, with c the placed
	// centre (the reference centre (1, 0, 1) turned by 0.2 rad about y).
	pivot, centre := r3.Vec{Z: 1}, r3.Vec{X: 1, Z: 1}
	turn := scatter.Turn{Axis: r3.Vec{Y: 1}, Angle: 0.2, Pivot: pivot}
	p := scatter.Point{Turn: turn, Force: r3.Vec{Z: -2}, Torque: r3.Vec{Y: 0.5}, Stiffness: -3}
	c := Coordinate{Unit: unit, Torsional: true, Axis: r3.Vec{Y: 1}, Pivot: pivot, Centre: centre, Contact: 0.5}
	s := c.Sample(p)
	// Turned centre: (cos 0.2, 0, 1 - sin 0.2); (c - pivot) × F has y
	// component (c-p)_z F_x - (c-p)_x F_z = 2 cos 0.2.
	want := unit.NewtonMetres(0.5 + 2*math.Cos(0.2))
	if math.Abs(s.X-0.3) > 1e-15 || math.Abs(s.Load/want-1) > 1e-12 || s.Slope != unit.NewtonMetres(-3) {
		t.Errorf("sample %+v, want x 0.3, load %g, slope %g", s, want, unit.NewtonMetres(-3))
	}
	if v := c.SweepValue(0.3); math.Abs(v-0.2*180/math.Pi) > 1e-12 {
		t.Errorf("sweep value %g degrees", v)
	}
	if x := c.Position(0.2 * 180 / math.Pi); math.Abs(x-0.3) > 1e-15 {
		t.Errorf("position %g", x)
	}
}

// TestAnalyseTranslation checks the loop against the closed forms of a
// 1/g⁴ attraction (DESIGN §12; the parallel-plate law of Casimir 1948 as
// the computed force): pull-in at x* = (4C/k)^(1/5), the smallest rest gap
// x0_crit = 5x*/4 and k_min = 5⁵/4⁴ · C/g0⁵. A power law is exact for the
// log–log interpolation, so the analysis converges at once and adds no
// points; tolerance 1e-6 relative (root finding).
func TestAnalyseTranslation(t *testing.T) {
	const area = 1e4 // a 100 µm square
	var pts []scatter.Point
	for _, g := range []float64{0.06, 0.08, 0.1, 0.12} {
		pts = append(pts, plates(g, area))
	}
	cc := platesC(area)
	k, g0 := 25.0, 0.1e-6
	c := Coordinate{Unit: unit, Direction: down}
	calls := 0
	compute := func(ctx context.Context, values []float64) ([]scatter.Point, error) {
		calls++
		var out []scatter.Point
		for _, v := range values {
			out = append(out, plates(v, area))
		}
		return out, nil
	}
	res, err := Analyse(context.Background(), c, sticking.Spring{Stiffness: k, Rest: g0}, pts, compute, Options{Rounds: 3, Tol: 1e-3})
	if err != nil {
		t.Fatal(err)
	}
	r := res.Report
	xs := math.Pow(4*cc/k, 0.2)
	kmin := math.Pow(5, 5) / math.Pow(4, 4) * cc / math.Pow(g0, 5)
	if r.Verdict != sticking.Free || math.Abs(r.PullIn.X/xs-1) > 1e-6 || math.Abs(r.MinRest.Value/(1.25*xs)-1) > 1e-6 || math.Abs(r.MinStiffness.Value/kmin-1) > 1e-6 {
		t.Errorf("verdict %s, pull-in %g (want %g), min rest %g (want %g), k_min %g (want %g)",
			r.Verdict, r.PullIn.X, xs, r.MinRest.Value, 1.25*xs, r.MinStiffness.Value, kmin)
	}
	if !res.Converged || res.Rounds != 0 || calls != 0 || len(res.Samples) != 4 {
		t.Errorf("converged %v after %d rounds, %d calls, %d samples", res.Converged, res.Rounds, calls, len(res.Samples))
	}
}

// TestAnalyseRefines checks that a load that is not a power law makes the
// loop compute the positions sticking.Suggest asks for. The load is the
// plate law times 1 + g/(0.05 µm), invented for the test.
func TestAnalyseRefines(t *testing.T) {
	const area = 1e4
	bent := func(g float64) scatter.Point {
		p := plates(g, area)
		f, df := r3.Dot(p.Force, down), -p.Stiffness
		w := 1 + g/0.05
		p.Force = r3.Scale(f*w, down)
		p.Stiffness = -(df*w + f/0.05)
		return p
	}
	pts := []scatter.Point{bent(0.05), bent(0.1), bent(0.2)}
	var asked []float64
	compute := func(ctx context.Context, values []float64) ([]scatter.Point, error) {
		var out []scatter.Point
		for _, v := range values {
			if !(v > 0.04 && v < 0.21) {
				t.Errorf("asked for gap %g outside the samples", v)
			}
			asked = append(asked, v)
			out = append(out, bent(v))
		}
		return out, nil
	}
	c := Coordinate{Unit: unit, Direction: down}
	res, err := Analyse(context.Background(), c, sticking.Spring{Stiffness: 40, Rest: 0.15e-6}, pts, compute, Options{Rounds: 3, Tol: 1e-3})
	if err != nil {
		t.Fatal(err)
	}
	if res.Rounds == 0 || len(res.Added) != len(asked) || len(res.Samples) != 3+len(asked) {
		t.Errorf("%d rounds, %d added, %d asked, %d samples", res.Rounds, len(res.Added), len(asked), len(res.Samples))
	}
	// No refinement allowed: the same analysis, with nothing added.
	res0, err := Analyse(context.Background(), c, sticking.Spring{Stiffness: 40, Rest: 0.15e-6}, pts, compute, Options{})
	if err != nil || res0.Rounds != 0 || len(res0.Added) != 0 || res0.Converged {
		t.Errorf("no rounds: %+v, %v", res0, err)
	}
}

// TestAnalyseRotation checks the torsional coordinate against the closed
// form of a power-law torque τ = C/(θc - θ)³ (invented): pull-in at
// x* = (3C/k)^(1/4) from contact (DESIGN §12 with n = 3).
func TestAnalyseRotation(t *testing.T) {
	const cTau = 1e-4 // ħc/L0 rad³
	contact := 0.4
	at := func(theta float64) scatter.Point {
		x := contact - theta
		tau := cTau / (x * x * x)
		return scatter.Point{Turn: scatter.Turn{Axis: r3.Vec{Y: 1}, Angle: theta}, Torque: r3.Vec{Y: tau}, Stiffness: -3 * tau / x}
	}
	var pts []scatter.Point
	for _, deg := range []float64{0, 5, 10, 15, 20} {
		pts = append(pts, at(deg*math.Pi/180))
	}
	c := Coordinate{Unit: unit, Torsional: true, Axis: r3.Vec{Y: 1}, Contact: contact}
	compute := func(ctx context.Context, values []float64) ([]scatter.Point, error) {
		var out []scatter.Point
		for _, v := range values {
			out = append(out, at(v*math.Pi/180))
		}
		return out, nil
	}
	cc := unit.NewtonMetres(cTau)
	k := 3 * cc / math.Pow(0.15, 4) // pull-in at 0.15 rad from contact
	res, err := Analyse(context.Background(), c, sticking.Spring{Stiffness: k, Rest: c.Position(0), Torsional: true}, pts, compute, Options{Rounds: 3, Tol: 1e-3})
	if err != nil {
		t.Fatal(err)
	}
	if p := res.Report.PullIn; math.Abs(p.X-0.15) > 1e-6 || p.Location != sticking.Sampled || !res.Report.Torsional {
		t.Errorf("pull-in %+v, want x = 0.15 rad", p)
	}
}

func TestAnalyseErrors(t *testing.T) {
	c := Coordinate{Unit: unit, Direction: down}
	// The force along ê is negative: a repulsion, or a direction pointing
	// away from the neighbour.
	up := []scatter.Point{plates(0.1, 1), plates(0.2, 1)}
	for i := range up {
		up[i].Force = r3.Scale(-1, up[i].Force)
	}
	_, err := Analyse(context.Background(), c, sticking.Spring{Stiffness: 1, Rest: 0.15e-6}, up, nil, Options{})
	if err == nil || !strings.Contains(err.Error(), "a repulsion") || !strings.Contains(err.Error(), "gap 0.1 um") {
		t.Errorf("repulsion: %v", err)
	}
	// A failing solver.
	pts := []scatter.Point{plates(0.05, 1e4), plates(0.1, 1e4), plates(0.2, 1e4)}
	pts[1].Force = r3.Scale(2, pts[1].Force) // not a power law: refinement is asked for
	fail := func(context.Context, []float64) ([]scatter.Point, error) { return nil, errors.New("no memory") }
	_, err = Analyse(context.Background(), c, sticking.Spring{Stiffness: 40, Rest: 0.15e-6}, pts, fail, Options{Rounds: 1, Tol: 1e-3})
	if err == nil || !strings.Contains(err.Error(), "no memory") {
		t.Errorf("failing solver: %v", err)
	}
}
