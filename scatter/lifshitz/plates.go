package lifshitz

import (
	"context"
	"fmt"
	"math"

	"github.com/fluctus/fluctus/scatter/material"
)

// Physical constants, CODATA 2018 (exact in the revised SI).
const (
	hbar      = material.Hbar // J s
	lightC    = 299792458.0   // m/s
	boltzmann = 1.380649e-23  // J/K
	hbarC     = hbar * lightC // J m
)

// Tolerances accepted by Plates.
const (
	DefaultTolerance = 1e-6  // used when tol = 0
	MinTolerance     = 1e-12 // below this rounding dominates
	MaxTolerance     = 0.1
)

// MaxMatsubaraTerms bounds the Matsubara sum. The sum needs about
// (35 + ln(1/tol)) ħc/(4π d k_B T) terms, so this limit is reached only when
// the thermal wavelength ħc/(k_B T) exceeds the gap by more than about 10^5;
// there T = 0 is the appropriate model.
const MaxMatsubaraTerms = 200000

// maxSegments bounds each adaptive quadrature.
const maxSegments = 1000

// Result is the interaction of two plates at one gap and temperature.
type Result struct {
	// Energy is the (free) energy per unit area, J/m²; negative is binding.
	Energy float64
	// Pressure is -∂(Energy)/∂d, Pa; negative is attraction.
	Pressure float64
	// EnergyRatio and PressureRatio are Energy and Pressure divided by those
	// of perfect conductors at the same gap and temperature.
	EnergyRatio, PressureRatio float64
	// EnergyError and PressureError are estimated absolute errors, J/m² and
	// Pa (conservative: the quadrature's Kronrod–Gauss differences).
	EnergyError, PressureError float64
	// Frequencies is the number of imaginary frequencies at which the
	// materials were evaluated (the Matsubara terms at T > 0).
	Frequencies int
	// Evaluations is the number of evaluations of the k integrand.
	Evaluations int
}

// CasimirEnergy returns the energy per unit area of two perfectly
// conducting plates at gap d (m) and T = 0, -π² ħc/(720 d³) in J/m²
// (H. B. G. Casimir, Proc. K. Ned. Akad. Wet. 51, 793 (1948)).
func CasimirEnergy(d float64) float64 { return -math.Pi * math.Pi * hbarC / (720 * d * d * d) }

// CasimirPressure returns the pressure between two perfectly conducting
// plates at gap d (m) and T = 0, -π² ħc/(240 d⁴) in Pa (Casimir 1948).
func CasimirPressure(d float64) float64 {
	return -math.Pi * math.Pi * hbarC / (240 * d * d * d * d)
}

// Plates returns the Lifshitz energy per unit area and pressure between
// half-spaces of materials a and b across a vacuum gap d (metres) at
// temperature temperatureK (kelvin; 0 for the zero-temperature integral),
// with relative accuracy tol (0 selects DefaultTolerance; allowed
// MinTolerance to MaxTolerance).
//
// In the variables x = 2qd and y = 2ξd/c (so y ≤ x) both integrals are
// dimensionless,
//
//	E/A = ħc/(32π² d³) ∫_0^∞ dy I_E(y),   P = -ħc/(32π² d⁴) ∫_0^∞ dy I_P(y),
//	I_E(y) = ∫_y^∞ x dx Σ_p ln(1 - R_p e^{-x}),
//	I_P(y) = ∫_y^∞ x² dx Σ_p R_p e^{-x}/(1 - R_p e^{-x}),
//
// with R_p = r_p^a r_p^b and q_m/q = sqrt(1 + (eps - 1) y²/x²). At T > 0 the
// y integral becomes the Matsubara sum F/A = k_B T/(8π d²) Σ'_n I_E(y_n),
// P = -k_B T/(8π d³) Σ'_n I_P(y_n), y_n = 4π n d k_B T/(ħc), stopped when the
// remaining terms (bounded by a geometric series) are below tol/10 of the sum.
// The integrals are adaptive Gauss–Kronrod (10, 21) quadratures on [y, ∞) and
// [0, ∞), mapped to [0, 1); each material is evaluated once per frequency.
//
// The n = 0 term uses the static limit of each material: a perfect conductor
// has r_TE = -1, r_TM = 1; a plasma metal r_TE = (k - sqrt(k² + ω_p²/c²))/(k +
// sqrt(k² + ω_p²/c²)) and r_TM = 1; a Drude metal r_TE = 0, r_TM = 1; a
// dielectric r_TE = 0, r_TM = (eps(0) - 1)/(eps(0) + 1).
//
// If the quadrature cannot reach tol, Plates returns its best Result along
// with an error.
func Plates(ctx context.Context, a, b material.Model, d, temperatureK, tol float64) (Result, error) {
	if tol == 0 {
		tol = DefaultTolerance
	}
	switch {
	case a == nil || b == nil:
		return Result{}, fmt.Errorf("lifshitz: both plate materials must be given")
	case !(d > 0) || math.IsInf(d, 0):
		return Result{}, fmt.Errorf("lifshitz: gap d = %g m: give a finite distance > 0 in metres", d)
	case !(temperatureK >= 0) || math.IsInf(temperatureK, 0):
		return Result{}, fmt.Errorf("lifshitz: temperature %g K: give a finite temperature ≥ 0 in kelvin", temperatureK)
	case !(tol >= MinTolerance && tol <= MaxTolerance):
		return Result{}, fmt.Errorf("lifshitz: tolerance %g out of range [%g, %g] (0 selects %g)", tol, MinTolerance, MaxTolerance, DefaultTolerance)
	}
	if err := material.Validate(a); err != nil {
		return Result{}, fmt.Errorf("lifshitz: plate a: %w", err)
	}
	if err := material.Validate(b); err != nil {
		return Result{}, fmt.Errorf("lifshitz: plate b: %w", err)
	}
	p := &plates{a: a, b: b, sa: a.Static(), sb: b.Static(), d: d, tol: tol}
	if temperatureK == 0 {
		return p.zeroTemperature(ctx)
	}
	return p.matsubara(ctx, temperatureK)
}

// plates is one Plates computation.
type plates struct {
	a, b   material.Model
	sa, sb material.Static
	d, tol float64
	res    Result
}

// mirror is the reflection of one plate at one imaginary frequency.
type mirror struct {
	perfect bool
	eps     float64 // eps(iξ) for ξ > 0
	static  bool    // ξ = 0: use teW2 and rTM0
	teW2    float64 // ξ = 0, plasma kind: (2 d ω_p/c)²; 0 otherwise
	rTM0    float64 // ξ = 0: r_TM
}

// mirrorAt evaluates the material m with static limit st at ξ (rad/s).
func (p *plates) mirrorAt(m material.Model, st material.Static, xi float64) (mirror, error) {
	if st.Kind == material.KindPerfect {
		return mirror{perfect: true}, nil
	}
	if xi == 0 {
		mr := mirror{static: true, rTM0: 1}
		if !math.IsInf(st.Epsilon, 1) {
			mr.rTM0 = (st.Epsilon - 1) / (st.Epsilon + 1)
		}
		if st.Kind == material.KindPlasma {
			w := 2 * p.d * st.PlasmaRadPerS / lightC
			mr.teW2 = w * w
		}
		return mr, nil
	}
	eps := m.Epsilon(xi)
	switch {
	case !(eps >= 1):
		return mirror{}, fmt.Errorf("lifshitz: material %s gives eps(iξ) = %g < 1 at ξ = %g rad/s", m.Name(), eps, xi)
	case eps > 1e150: // r_TE = -1, r_TM = 1 to double precision
		return mirror{perfect: true}, nil
	}
	return mirror{eps: eps}, nil
}

// coefficients returns r_TE and r_TM at x = 2qd, y = 2ξd/c (0 < y ≤ x, or
// y = 0 for the static mirror). With s = q_m/q = sqrt(1 + (eps - 1) y²/x²)
// they are written without cancellation as
//
//	r_TE = (1 - s)/(1 + s)     = -(eps - 1) t²/(1 + s)²,
//	r_TM = (eps - s)/(eps + s) = (eps - 1)(eps + 1 - t²)/(eps + s)²,  t = y/x.
func (m mirror) coefficients(x, y float64) (rTE, rTM float64) {
	switch {
	case m.perfect:
		return -1, 1
	case m.static:
		if m.teW2 > 0 {
			u := m.teW2 / (x * x) // ω_p²/(c² k²)
			s := math.Sqrt(1 + u)
			rTE = -u / ((1 + s) * (1 + s))
		}
		return rTE, m.rTM0
	}
	t := y / x
	t2 := t * t
	em1 := m.eps - 1
	s := math.Sqrt(1 + em1*t2)
	return -em1 * t2 / ((1 + s) * (1 + s)), em1 * (m.eps + 1 - t2) / ((m.eps + s) * (m.eps + s))
}

// Components of the inner integrand.
const (
	compEnergy = iota
	compPressure
	compRefEnergy   // perfect conductors, for the ratios at T > 0
	compRefPressure //
	numComp
)

// inner returns I_E(y), I_P(y) and, with withRef, the same for perfect
// conductors, each with its error estimate.
func (p *plates) inner(ctx context.Context, ma, mb mirror, y float64, withRef bool) (val, err []float64, e error) {
	dim := 2
	if withRef {
		dim = numComp
	}
	f := func(x float64, dst []float64) error {
		e := math.Exp(-x)
		em := 1 - e // 1 - e^{-x}, exact enough unless x is small
		if x < 0.7 {
			em = -math.Expm1(-x)
		}
		teA, tmA := ma.coefficients(x, y)
		teB, tmB := mb.coefficients(x, y)
		var energy, pressure float64
		for _, r := range [2]float64{teA * teB, tmA * tmB} {
			// 1 - R e^{-x} = (1 - R) + R (1 - e^{-x}), R ∈ [0, 1].
			den := (1 - r) + r*em
			if r*e < 0.5 {
				energy += x * math.Log1p(-r*e)
			} else {
				energy += x * math.Log(den)
			}
			if r != 0 {
				pressure += x * x * r * e / den
			}
		}
		dst[compEnergy], dst[compPressure] = energy, pressure
		if withRef { // R = 1 in both polarizations
			if e < 0.5 {
				dst[compRefEnergy] = 2 * x * math.Log1p(-e)
			} else {
				dst[compRefEnergy] = 2 * x * math.Log(em)
			}
			dst[compRefPressure] = 2 * x * x * e / em
		}
		return nil
	}
	val, err, n, e := adaptive(ctx, semiInfinite(f, y), 0, 1, dim, dim, p.tol/4, maxSegments)
	p.res.Evaluations += n
	if e != nil {
		return val, err, fmt.Errorf("lifshitz: k integral at y = 2ξd/c = %g: %w", y, e)
	}
	return val, err, nil
}

// zeroTemperature integrates over y = 2ξd/c ∈ [0, ∞).
func (p *plates) zeroTemperature(ctx context.Context) (Result, error) {
	var innerErr error
	g := func(y float64, dst []float64) error {
		xi := y * lightC / (2 * p.d)
		ma, e := p.mirrorAt(p.a, p.sa, xi)
		if e != nil {
			return e
		}
		mb, e := p.mirrorAt(p.b, p.sb, xi)
		if e != nil {
			return e
		}
		p.res.Frequencies++
		val, err, e := p.inner(ctx, ma, mb, y, false)
		if e != nil {
			if val == nil || ctx.Err() != nil {
				return e
			}
			innerErr = e // keep the estimate, report the failure
		}
		dst[0], dst[1], dst[2], dst[3] = val[0], val[1], err[0], err[1]
		return nil
	}
	val, err, _, e := adaptive(ctx, semiInfinite(g, 0), 0, 1, 4, 2, p.tol/2, maxSegments)
	if val == nil {
		return Result{}, e
	}
	eScale := hbarC / (32 * math.Pi * math.Pi * p.d * p.d * p.d)
	pScale := -eScale / p.d
	r := &p.res
	r.Energy, r.Pressure = eScale*val[0], pScale*val[1]
	r.EnergyError = eScale * (err[0] + math.Abs(val[2]))
	r.PressureError = -pScale * (err[1] + math.Abs(val[3]))
	r.EnergyRatio = r.Energy / CasimirEnergy(p.d)
	r.PressureRatio = r.Pressure / CasimirPressure(p.d)
	if e != nil {
		return *r, fmt.Errorf("lifshitz: frequency integral: %w", e)
	}
	if innerErr != nil {
		return *r, innerErr
	}
	return *r, nil
}

// matsubara sums over ξ_n = 2π n k_B T/ħ, i.e. y_n = n·4π d k_B T/(ħc).
func (p *plates) matsubara(ctx context.Context, temperatureK float64) (Result, error) {
	kT := boltzmann * temperatureK
	yStep := 4 * math.Pi * p.d * kT / hbarC
	if need := (35 + math.Log(1/p.tol)) / yStep; need > MaxMatsubaraTerms {
		return Result{}, fmt.Errorf("lifshitz: T = %g K at gap %g m needs about %.3g Matsubara terms (limit %d): the thermal wavelength ħc/(k_B T) = %.3g m is far above the gap; use T = 0",
			temperatureK, p.d, need, MaxMatsubaraTerms, hbarC/kT)
	}
	var sum, errSum, prev [numComp]float64
	var failed error
	for n := 0; ; n++ {
		if e := ctx.Err(); e != nil {
			return Result{}, e
		}
		y := float64(n) * yStep
		xi := y * lightC / (2 * p.d)
		ma, e := p.mirrorAt(p.a, p.sa, xi)
		if e != nil {
			return Result{}, e
		}
		mb, e := p.mirrorAt(p.b, p.sb, xi)
		if e != nil {
			return Result{}, e
		}
		p.res.Frequencies++
		val, err, e := p.inner(ctx, ma, mb, y, true)
		if e != nil {
			if val == nil || ctx.Err() != nil {
				return Result{}, e
			}
			failed = e
		}
		w := 1.0
		if n == 0 {
			w = 0.5 // the primed sum
		}
		for c := range sum {
			sum[c] += w * val[c]
			errSum[c] += w * err[c]
		}
		// Stop when the remaining terms, bounded by a geometric series with
		// the current ratio of successive terms, are below tol/10 of the sum.
		if n >= 2 && y >= 2 {
			done := true
			var tail [numComp]float64
			for c := range sum {
				if val[c] == 0 {
					continue
				}
				rho := val[c] / prev[c]
				if !(rho >= 0 && rho < 1) {
					done = false
					break
				}
				tail[c] = math.Abs(val[c]) * rho / (1 - rho)
				if tail[c] > 0.1*p.tol*math.Abs(sum[c]) {
					done = false
				}
			}
			if done {
				for c := range errSum {
					errSum[c] += tail[c]
				}
				break
			}
		}
		if n >= MaxMatsubaraTerms {
			failed = fmt.Errorf("lifshitz: Matsubara sum not converged after %d terms", n)
			break
		}
		prev = [numComp]float64(val)
	}
	eScale := kT / (8 * math.Pi * p.d * p.d)
	pScale := -eScale / p.d
	r := &p.res
	r.Energy, r.Pressure = eScale*sum[compEnergy], pScale*sum[compPressure]
	r.EnergyError, r.PressureError = eScale*errSum[compEnergy], -pScale*errSum[compPressure]
	r.EnergyRatio = sum[compEnergy] / sum[compRefEnergy]
	r.PressureRatio = sum[compPressure] / sum[compRefPressure]
	return *r, failed
}
