package scatter

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
	"github.com/fluctus/fluctus/scatter/lifshitz"
	"github.com/fluctus/fluctus/scatter/material"
)

func named(t testing.TB, name string) material.Model {
	t.Helper()
	m, err := material.Named(name)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// TestPlateTableInterpolation checks the tabulated ratio η(d) =
// E_Lifshitz/E_Casimir between the grid nodes (where the interpolation error
// is largest) against lifshitz.Plates evaluated there directly. Tolerance:
// the table's own error estimate InterpolationError, times 3 for the
// estimate's looseness, plus twice the Lifshitz tolerance; and that estimate
// must stay below 1e-4, the accuracy the PFA baseline is stated to (PFA
// itself is an approximation far coarser than that). Measured: estimates
// 4e-6 at T = 0 and 4e-5 at 300 K, errors at most 3e-6 and 1e-5.
func TestPlateTableInterpolation(t *testing.T) {
	cases := []struct {
		name    string
		a       material.Model
		subst   bool
		unit    Unit
		T       float64
		lo, hi  float64 // L0
		checkAt []float64
	}{
		{"gold-drude pair, T=0", named(t, "gold-drude"), false, 1e-9, 0, 10, 3000, []float64{13, 47, 230, 2100}},
		{"silicon over substrate, T=0", named(t, "silicon"), true, 1e-6, 0, 0.01, 10, []float64{0.013, 0.3, 7}},
		{"gold-drude pair, 300 K", named(t, "gold-drude"), false, 1e-6, 300, 0.1, 10, []float64{0.13, 0.9, 6.5}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			bodies := []Body{{Name: "a", Material: c.a}}
			if !c.subst {
				bodies = append(bodies, Body{Name: "b", Material: c.a})
			}
			tab, err := NewPlateTable(context.Background(), bodies, c.subst, c.unit, c.T, c.lo, c.hi)
			if err != nil {
				t.Fatal(err)
			}
			if tab.InterpolationError > 1e-4 {
				t.Errorf("estimated interpolation error %.3g above 1e-4", tab.InterpolationError)
			}
			j := 1
			var b material.Model = c.a
			if c.subst {
				j, b = SubstrateIndex, material.Perfect{}
			}
			worst := 0.0
			for _, d := range c.checkAt {
				r, err := lifshitz.Plates(context.Background(), c.a, b, c.unit.Metres(d), c.T, 1e-8)
				if err != nil {
					t.Fatal(err)
				}
				want := r.Energy / lifshitz.CasimirEnergy(c.unit.Metres(d))
				got := tab.Ratio(0, j, d)
				rel := math.Abs(got/want - 1)
				worst = math.Max(worst, rel)
				if tol := 3*tab.InterpolationError + 2*plateTolerance; rel > tol {
					t.Errorf("d = %g L0: η = %.9g, direct %.9g: relative error %.3g above %.3g", d, got, want, rel, tol)
				}
				if e := tab.Energy(0, j, d); math.Abs(e/(want*plateEnergy(d))-1) > 3*tab.InterpolationError+2*plateTolerance {
					t.Errorf("d = %g L0: energy per area %.6g, want %.6g", d, e, want*plateEnergy(d))
				}
			}
			t.Logf("%d nodes, estimated interpolation error %.2g, largest measured %.2g", tab.n, tab.InterpolationError, worst)
		})
	}
}

// TestPlateTablePerfect checks that perfect conductors keep Casimir's law
// (Casimir 1948) exactly, so that a job without materials has the same PFA
// as before, bit for bit (tolerance: none, the values must be equal).
func TestPlateTablePerfect(t *testing.T) {
	m, err := mesh.SphereLevel(1, 8)
	if err != nil {
		t.Fatal(err)
	}
	bodies := []Body{{Name: "a", Mesh: m}, {Name: "b", Mesh: m.Translate(r3.Vec{Z: 2.1}), Material: material.Perfect{}}}
	tab, err := NewPlateTable(context.Background(), bodies, true, 1e-6, 300, 0.05, 5)
	if err != nil {
		t.Fatal(err)
	}
	plane := &Plane{Point: r3.Vec{Z: -0.2}, Normal: r3.Vec{Z: 1}}
	before := PFAEnergy(bodies, 1, r3.Vec{Z: -1}, plane)
	for _, opt := range []PFAOption{WithPlateLaw(nil), WithPlateLaw(tab.Energy)} {
		if got := PFAEnergy(bodies, 1, r3.Vec{Z: -1}, plane, opt); got != before {
			t.Errorf("PFA of perfect conductors changed: %+v, want %+v", got, before)
		}
	}
	for _, d := range []float64{0.01, 0.3, 9} { // also outside the table
		if got, want := tab.Energy(0, 1, d), -math.Pi*math.Pi/(720*d*d*d); got != want {
			t.Errorf("d = %g: %v, want Casimir's %v", d, got, want)
		}
	}
}

// TestPFAWithMaterials checks the PFA sum with a material law. For two
// parallel plates every facing panel sees the same gap d, so the material
// PFA must be the perfect one times η(d) (tolerance 1e-12: rounding only).
// For two gold spheres of radius R at gap d the ratio of the material PFA to
// the perfect one is the mean of η over the gaps of the surface profile
// weighted by the perfect energy per area,
//
//	∫ ρ dρ η(g) g⁻³ / ∫ ρ dρ g⁻³,  g(ρ) = d + 2(R - sqrt(R² - ρ²))
//
// (Derjaguin 1934), evaluated here by quadrature. Tolerance 3e-3: the mesh
// facets shift the gaps, an error that falls like h² (measured 1.7e-3 on the
// 32-division sphere used here, 4.3e-4 on 64 divisions); the ratio differs
// from η(d) itself by 20 % here (0.62 against 0.52), so the check is sharp.
func TestPFAWithMaterials(t *testing.T) {
	gold := named(t, "gold-drude")
	const unit = Unit(1e-6)
	t.Run("plates", func(t *testing.T) {
		const d = 0.2
		a, err := mesh.Plate(2, 2, 0.3, 0.5)
		if err != nil {
			t.Fatal(err)
		}
		bodies := []Body{{Name: "a", Mesh: a, Material: gold}, {Name: "b", Mesh: a.Translate(r3.Vec{Z: 0.3 + d}), Material: gold}}
		tab, err := NewPlateTable(context.Background(), bodies, false, unit, 0, 0.1, 10)
		if err != nil {
			t.Fatal(err)
		}
		perf := PFAEnergy(bodies, 1, r3.Vec{Z: -1}, nil)
		mat := PFAEnergy(bodies, 1, r3.Vec{Z: -1}, nil, WithPlateLaw(tab.Energy))
		eta := tab.Ratio(0, 1, d)
		if r := mat.Mean / perf.Mean; math.Abs(r/eta-1) > 1e-12 {
			t.Errorf("plates: E_PFA ratio %.12g, want η(d) = %.12g", r, eta)
		}
	})
	t.Run("spheres", func(t *testing.T) {
		const R, d = 1.0, 0.1
		m, err := mesh.SphereLevel(R, 32)
		if err != nil {
			t.Fatal(err)
		}
		bodies := []Body{{Name: "a", Mesh: m, Material: gold}, {Name: "b", Mesh: m.Translate(r3.Vec{Z: 2*R + d}), Material: gold}}
		tab, err := NewPlateTable(context.Background(), bodies, false, unit, 0, 0.05, 10)
		if err != nil {
			t.Fatal(err)
		}
		perf := PFAEnergy(bodies, 1, r3.Vec{Z: -1}, nil)
		mat := PFAEnergy(bodies, 1, r3.Vec{Z: -1}, nil, WithPlateLaw(tab.Energy))
		gap := func(rho float64) float64 { return d + 2*(R-math.Sqrt(R*R-rho*rho)) }
		num := quad.Fixed(func(rho float64) float64 { g := gap(rho); return rho * tab.Ratio(0, 1, g) / (g * g * g) }, 0, R, 2000, nil, 0)
		den := quad.Fixed(func(rho float64) float64 { g := gap(rho); return rho / (g * g * g) }, 0, R, 2000, nil, 0)
		want := num / den
		got := mat.Mean / perf.Mean
		t.Logf("spheres: E_PFA ratio %.6g, profile mean of η %.6g, η(d) %.6g", got, want, tab.Ratio(0, 1, d))
		if math.Abs(got/want-1) > 3e-3 {
			t.Errorf("spheres: E_PFA ratio %.6g, want the profile mean of η %.6g", got, want)
		}
	})
}

// TestEnergiesMaterialPFA: Energies fills Point.PFA with the Lifshitz law of
// the bodies' materials (the same sums as PFAEnergy with the plate table),
// here for two gold plates at d = 0.2 µm where no point is solved
// (Settings.Points empty), so only the PFA is compared. Both tables
// interpolate Lifshitz values (each to 1e-6) on grids placed over slightly
// different gap ranges, with a 4e-6 interpolation error: tolerance 2e-5.
func TestEnergiesMaterialPFA(t *testing.T) {
	gold := named(t, "gold-drude")
	const d = 0.2
	a, err := mesh.Plate(2, 2, 0.3, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	bodies := []Body{{Name: "a", Mesh: a, Material: gold}, {Name: "b", Mesh: a.Translate(r3.Vec{Z: 0.3 + d}), Material: gold}}
	pts, err := Energies(context.Background(), bodies, Sweep{Body: 1, Direction: r3.Vec{Z: -1}, Offsets: []r3.Vec{{}}},
		Settings{Length: 1e-6, Points: []int{}})
	if err != nil {
		t.Fatal(err)
	}
	tab, err := NewPlateTable(context.Background(), bodies, false, Unit(1e-6), 0, 0.1, 10)
	if err != nil {
		t.Fatal(err)
	}
	want := PFAEnergy(bodies, 1, r3.Vec{Z: -1}, nil, WithPlateLaw(tab.Energy))
	perf := PFAEnergy(bodies, 1, r3.Vec{Z: -1}, nil)
	got := pts[0].PFA
	t.Logf("PFA with gold %.8g, from the table %.8g, perfect %.8g", got.Mean, want.Mean, perf.Mean)
	if math.Abs(got.Mean/want.Mean-1) > 2e-5 {
		t.Errorf("Energies PFA %.8g, want %.8g", got.Mean, want.Mean)
	}
	// A table the caller made over PlateGapRange is used as it is (the same
	// numbers bit for bit), and one that does not fit (another unit) is
	// ignored.
	sweep := Sweep{Body: 1, Direction: r3.Vec{Z: -1}, Offsets: []r3.Vec{{}}}
	dMin, dMax := PlateGapRange(bodies, sweep, []float64{pts[0].Gap})
	for _, unit := range []Unit{1e-6, 1e-9} {
		// A wider grid than Energies would make, so its values differ in the
		// last digits and show which table was used.
		given, err := NewPlateTable(context.Background(), bodies, false, unit, 0, dMin/1.5, 1.5*dMax)
		if err != nil {
			t.Fatal(err)
		}
		want := got.Mean // ignored: Energies tabulates its own, as above
		if unit == 1e-6 {
			want = PFAEnergy(bodies, 1, r3.Vec{Z: -1}, nil, WithPlateLaw(given.Energy)).Mean
			if want == got.Mean {
				t.Fatal("the wider table gives the same PFA: the check cannot tell the tables apart")
			}
		}
		pts, err := Energies(context.Background(), bodies, sweep, Settings{Length: 1e-6, Points: []int{}, Plates: given})
		if err != nil {
			t.Fatal(err)
		}
		if pts[0].PFA.Mean != want {
			t.Errorf("with a table for L0 = %g m: PFA %.12g, want %.12g", float64(unit), pts[0].PFA.Mean, want)
		}
	}
}
