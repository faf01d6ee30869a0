package scatter

import (
	"context"
	"fmt"
	"math"

	"github.com/fluctus/fluctus/scatter/lifshitz"
	"github.com/fluctus/fluctus/scatter/material"
)

// PlateTable is the Lifshitz energy per area (DESIGN §13; Lifshitz 1956) of
// the materials of every pair of facing surfaces of a scene, for the PFA
// baseline with real materials (PFAEnergy with WithPlateLaw(t.Energy)).
//
// Because PFA sums the plate law over many panel gaps, the ratio
//
//	η(d) = E_Lifshitz(d, T) / E_Casimir(d),  E_Casimir(d) = -π² ħc/(720 d³),
//
// is computed once per pair of bodies (and per body and the perfectly
// conducting substrate) on a grid uniform in ln d, and interpolated by a
// four-point Lagrange (cubic) rule in ln d; Energy returns η(d) E_Casimir(d).
// η is smooth and of order one, so the interpolation error is small:
// InterpolationError is its estimate, from the error of the same rule on
// the grid of every other node divided by 2⁴ (the rule is of fourth order);
// with 16 nodes per decade it is about 4e-6 at T = 0 and 4e-5 at 300 K for
// gold, and the errors measured against direct evaluation are below it.
// Outside the tabulated range η is held at its end value.
//
// A pair of perfect conductors keeps Casimir's T = 0 law exactly, as
// PFAEnergy uses without materials. A PlateTable is immutable and safe for
// concurrent use.
//
// Energies fills Point.PFA with this law when some body has a real
// material (materialPFA); a caller of PFAEnergy passes
// WithPlateLaw(t.Energy) itself.
type PlateTable struct {
	temperatureK float64
	unit         Unit
	lnMin, step  float64 // grid of ln(d/L0)
	n            int     // grid nodes
	// eta[k] holds the grid values for pair k; pairs maps (i, j) to k, or
	// to -1 for a pair of perfect conductors.
	eta   [][]float64
	pairs map[[2]int]int
	// InterpolationError is the estimated largest relative error of η
	// between grid nodes (see PlateTable).
	InterpolationError float64
}

// plateNodesPerDecade is the density of the ln d grid of a PlateTable
// (h = ln 10/16 ≈ 0.14); the error of the cubic rule falls like h⁴ (measured
// in TestPlateTableInterpolation).
const plateNodesPerDecade = 16

// plateTolerance is the relative accuracy of each Lifshitz evaluation,
// below the interpolation error.
const plateTolerance = 1e-6

// NewPlateTable tabulates the Lifshitz energy per area for every pair of
// bodies and, with substrate, every body over the perfectly conducting
// substrate, for gaps from dMin to dMax (L0, 0 < dMin < dMax), with L0 =
// unit metres and at temperatureK kelvin (0: the T = 0 integral; above it
// the Matsubara sum, whose n = 0 term follows each material's static kind,
// see material.Kind). A body without a material is a perfect conductor.
func NewPlateTable(ctx context.Context, bodies []Body, substrate bool, unit Unit, temperatureK, dMin, dMax float64) (*PlateTable, error) {
	switch {
	case !(unit > 0) || math.IsInf(float64(unit), 0):
		return nil, fmt.Errorf("scatter: PFA with materials: the length unit L0 = %g m must be a positive number of metres", float64(unit))
	case !(dMin > 0) || !(dMax > dMin) || math.IsInf(dMax, 0):
		return nil, fmt.Errorf("scatter: PFA with materials: gap range %g to %g L0: want 0 < dMin < dMax", dMin, dMax)
	case !(temperatureK >= 0) || math.IsInf(temperatureK, 0):
		return nil, fmt.Errorf("scatter: PFA with materials: temperature %g K: want a finite temperature ≥ 0", temperatureK)
	}
	// One node beyond each end keeps the four-point rule centred there.
	step := math.Ln10 / plateNodesPerDecade
	lnMin := math.Log(dMin) - step
	n := int(math.Ceil((math.Log(dMax)-math.Log(dMin))/step)) + 3
	if n < 5 {
		n = 5
	}
	t := &PlateTable{temperatureK: temperatureK, unit: unit, lnMin: lnMin, step: step, n: n, pairs: make(map[[2]int]int)}
	models := make([]material.Model, len(bodies))
	for i, b := range bodies {
		models[i] = b.Material
		if models[i] == nil {
			models[i] = material.Perfect{}
		}
		if err := material.Validate(models[i]); err != nil {
			return nil, fmt.Errorf("scatter: body %q: %w", b.Name, err)
		}
	}
	add := func(i, j int, a, b material.Model, what string) error {
		if perfect(a) && perfect(b) {
			t.pairs[pairKey(i, j)] = -1
			return nil
		}
		eta, err := t.curve(ctx, a, b)
		if err != nil {
			return fmt.Errorf("scatter: PFA with materials, %s: %w", what, err)
		}
		t.pairs[pairKey(i, j)] = len(t.eta)
		t.eta = append(t.eta, eta)
		return nil
	}
	for i := range bodies {
		for j := i + 1; j < len(bodies); j++ {
			if err := add(i, j, models[i], models[j], fmt.Sprintf("bodies %q and %q", bodies[i].Name, bodies[j].Name)); err != nil {
				return nil, err
			}
		}
		if substrate {
			if err := add(i, SubstrateIndex, models[i], material.Perfect{}, fmt.Sprintf("body %q over the substrate", bodies[i].Name)); err != nil {
				return nil, err
			}
		}
	}
	for _, eta := range t.eta {
		t.InterpolationError = math.Max(t.InterpolationError, coarseError(eta)/16)
	}
	return t, nil
}

// pairKey orders a pair of body indices, the substrate last.
func pairKey(i, j int) [2]int {
	if j != SubstrateIndex && j < i {
		i, j = j, i
	}
	return [2]int{i, j}
}

// perfect reports whether m is a perfect conductor.
func perfect(m material.Model) bool { return m == nil || material.KindOf(m) == material.KindPerfect }

// curve returns η at every grid node for plates of a and b.
func (t *PlateTable) curve(ctx context.Context, a, b material.Model) ([]float64, error) {
	eta := make([]float64, t.n)
	for k := range eta {
		d := t.unit.Metres(math.Exp(t.lnMin + float64(k)*t.step))
		r, err := lifshitz.Plates(ctx, a, b, d, t.temperatureK, plateTolerance)
		if err != nil {
			return nil, fmt.Errorf("gap %.4g m: %w", d, err)
		}
		eta[k] = r.Energy / lifshitz.CasimirEnergy(d)
	}
	return eta, nil
}

// Temperature returns the temperature of the table in kelvin.
func (t *PlateTable) Temperature() float64 { return t.temperatureK }

// Ratio returns η(d) = E_Lifshitz/E_Casimir of the pair (i, j) at the gap d
// (L0); j may be SubstrateIndex. The pair must have been tabulated.
func (t *PlateTable) Ratio(i, j int, d float64) float64 {
	k, ok := t.pairs[pairKey(i, j)]
	if !ok {
		panic(fmt.Sprintf("scatter: PlateTable has no pair (%d, %d)", i, j))
	}
	if k < 0 {
		return 1
	}
	return lagrange4(t.eta[k], (math.Log(d)-t.lnMin)/t.step)
}

// Energy is the PlateLaw of the table: the Lifshitz energy per area, in
// ħc/L0 per L0², of the pair (i, j) at gap d (L0), η(d) (-π²/(720 d³)).
func (t *PlateTable) Energy(i, j int, d float64) float64 {
	if k, ok := t.pairs[pairKey(i, j)]; ok && k < 0 {
		return plateEnergy(d) // exactly the perfect-conductor law
	}
	return t.Ratio(i, j, d) * plateEnergy(d)
}

// lagrange4 interpolates the uniformly spaced values f at the fractional
// index x by the cubic through the four nearest nodes, holding the end
// values outside [0, len(f)-1].
func lagrange4(f []float64, x float64) float64 {
	n := len(f)
	switch {
	case !(x > 0):
		return f[0]
	case x >= float64(n-1):
		return f[n-1]
	}
	k := int(x) - 1 // nodes k..k+3 around x
	k = max(0, min(k, n-4))
	s := x - float64(k) // in [0, 3]
	// Lagrange basis on the nodes 0, 1, 2, 3.
	w0 := -(s - 1) * (s - 2) * (s - 3) / 6
	w1 := s * (s - 2) * (s - 3) / 2
	w2 := -s * (s - 1) * (s - 3) / 2
	w3 := s * (s - 1) * (s - 2) / 6
	return w0*f[k] + w1*f[k+1] + w2*f[k+2] + w3*f[k+3]
}

// coarseError returns the largest relative error of the four-point rule on
// the even nodes of f at the odd ones.
func coarseError(f []float64) float64 {
	even := make([]float64, 0, (len(f)+1)/2)
	for k := 0; k < len(f); k += 2 {
		even = append(even, f[k])
	}
	worst := 0.0
	for k := 1; k < len(f)-1; k += 2 {
		if len(even) < 4 {
			break
		}
		got := lagrange4(even, float64(k)/2)
		worst = math.Max(worst, math.Abs(got-f[k])/math.Abs(f[k]))
	}
	return worst
}

// materialPFA returns the PFA options of a run: none when every body is a
// perfect conductor (Casimir's law exactly), else the Lifshitz law of the
// materials over PlateGapRange at the run's temperature — Settings.Plates
// when it fits, else a table made here.
func materialPFA(ctx context.Context, bodies []Body, sweep Sweep, set Settings, gaps []float64) ([]PFAOption, error) {
	real := false
	for _, b := range bodies {
		real = real || !perfect(b.Material)
	}
	if !real || len(gaps) == 0 {
		return nil, nil
	}
	unit := Unit(set.Length)
	kelvin := 0.0
	if set.ThermalWavenumber > 0 {
		kelvin = set.ThermalWavenumber / unit.ThermalWavenumber(1) // κ_T is linear in T
	}
	dMin, dMax := PlateGapRange(bodies, sweep, gaps)
	t := set.Plates
	if !t.fits(len(bodies), set.Substrate != nil, unit, kelvin, dMin, dMax) {
		var err error
		if t, err = NewPlateTable(ctx, bodies, set.Substrate != nil, unit, kelvin, dMin, dMax); err != nil {
			return nil, err
		}
	}
	return []PFAOption{WithPlateLaw(t.Energy)}, nil
}

// PlateGapRange returns the gaps (L0) a PFA sum of the scene can meet over
// the sweep points with these closest gaps: from half the smallest gap to
// four times the size of the scene (the moving body at every point) plus the
// largest gap. A PlateTable over this range serves Energies on that sweep.
func PlateGapRange(bodies []Body, sweep Sweep, gaps []float64) (dMin, dMax float64) {
	lo, hi := math.Inf(1), 0.0
	for _, g := range gaps {
		lo, hi = math.Min(lo, g), math.Max(hi, g)
	}
	return lo / 2, 4 * (sceneSize(bodies, sweep) + hi)
}

// fits reports whether t (possibly nil) serves a scene of n bodies, with or
// without the substrate, at this unit and temperature for gaps from dMin to
// dMax (L0): its grid covers the range and it holds every pair.
func (t *PlateTable) fits(n int, substrate bool, unit Unit, kelvin, dMin, dMax float64) bool {
	// The temperature comes back from the thermal wavenumber, so it may
	// differ from the caller's in the last bits.
	if t == nil || t.unit != unit || math.Abs(t.temperatureK-kelvin) > 1e-12*kelvin {
		return false
	}
	// The grid runs one node beyond each end of the range it was made for.
	if math.Log(dMin) < t.lnMin+t.step*(1-1e-9) || math.Log(dMax) > t.lnMin+float64(t.n-2)*t.step {
		return false
	}
	for i := 0; i < n; i++ {
		for j := i + 1; j < n; j++ {
			if _, ok := t.pairs[pairKey(i, j)]; !ok {
				return false
			}
		}
		if _, ok := t.pairs[pairKey(i, SubstrateIndex)]; substrate && !ok {
			return false
		}
	}
	return true
}
