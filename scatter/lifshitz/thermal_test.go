package lifshitz

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"

	"github.com/fluctus/fluctus/scatter/material"
)

// zeta3 is Apéry's constant ζ(3) (Abramowitz & Stegun Table 23.3).
const zeta3 = 1.2020569031595942

// polylog returns Li_s(z) = Σ_{m≥1} z^m/m^s for 0 ≤ z < 1 (Abramowitz &
// Stegun 27.7, the series definition), summed to double precision (slowly as
// z → 1; used here for z ≤ 0.72).
func polylog(s int, z float64) float64 {
	var sum float64
	p := z
	for m := 1; p > 1e-18*sum || m == 1; m++ {
		sum += p / math.Pow(float64(m), float64(s))
		p *= z
	}
	return sum
}

// temperatureFor returns T such that 2 d k_B T/(ħc) = t.
func temperatureFor(t, d float64) float64 { return t * hbarC / (2 * d * boltzmann) }

// TestPerfectMatsubaraClosedForm: for perfect mirrors every Matsubara term has
// a closed form. Expanding ln(1 - e^-x) = -Σ e^{-mx}/m and integrating term by
// term (elementary; polylogarithms as in Abramowitz & Stegun 27.7),
//
//	I_E(y) = 2∫_y^∞ x ln(1 - e^-x) dx = -2[y Li₂(e^-y) + Li₃(e^-y)],
//	I_P(y) = 2∫_y^∞ x² e^-x/(1 - e^-x) dx = 2Σ_m e^{-my}(y²/m + 2y/m² + 2/m³),
//
// with I_E(0) = -2ζ(3), I_P(0) = 4ζ(3), F/A = k_B T/(8π d²) Σ' I_E(y_n),
// P = -k_B T/(8π d³) Σ' I_P(y_n). At d = 1 µm, T = 300 K (y_1 = 1.65, so
// e^-y ≤ 0.2 and the series converge fast) Plates at tol 1e-11 must agree to
// 1e-9.
func TestPerfectMatsubaraClosedForm(t *testing.T) {
	const d, temp = 1e-6, 300.0
	kT := boltzmann * temp
	step := 4 * math.Pi * d * kT / hbarC
	sumE, sumP := -zeta3, 2*zeta3 // halved n = 0 terms
	for n := 1; n < 200; n++ {
		y := float64(n) * step
		z := math.Exp(-y)
		sumE += -2 * (y*polylog(2, z) + polylog(3, z))
		var ip float64
		for m := 1; m < 200; m++ {
			fm := float64(m)
			ip += 2 * math.Exp(-fm*y) * (y*y/fm + 2*y/(fm*fm) + 2/(fm*fm*fm))
		}
		sumP += ip
	}
	wantE := kT / (8 * math.Pi * d * d) * sumE
	wantP := -kT / (8 * math.Pi * d * d * d) * sumP
	r := mustPlates(t, material.Perfect{}, material.Perfect{}, d, temp, 1e-11)
	if e := relDiff(r.Energy, wantE); e > 1e-9 {
		t.Errorf("F/A = %.14g J/m², closed form %.14g (relative %.2g)", r.Energy, wantE, e)
	}
	if e := relDiff(r.Pressure, wantP); e > 1e-9 {
		t.Errorf("P = %.14g Pa, closed form %.14g (relative %.2g)", r.Pressure, wantP, e)
	}
	if r.EnergyRatio != 1 || r.PressureRatio != 1 {
		t.Errorf("ratios to perfect mirrors %g, %g, want exactly 1", r.EnergyRatio, r.PressureRatio)
	}
}

// TestHighTemperature: at d k_B T/(ħc) ≫ 1 only the n = 0 term survives:
// perfect mirrors give F/A → -ζ(3) k_B T/(8π d²) and P → -ζ(3) k_B T/(4π d³)
// (recalled from memory; it is the n = 0 term, I_E(0) = -2ζ(3)); Drude metals
// lose the n = 0 TE term and give half of it (the classical limit of Drude
// metals, e.g. Boström & Sernelius, Phys. Rev. Lett. 84, 4757 (2000); recalled
// from memory); a dielectric gives -k_B T Li₃(Δ²)/(16π d²) with
// Δ = (eps(0) - 1)/(eps(0) + 1) (the n = 0 TM term integrated as above).
// The pressure is the same terms with I_P(0) = 2 Li₃(R). At d k_B T/(ħc) = 3
// (y_1 = 12π) the omitted n ≥ 1 terms are ≲ 2(y_1² + 2y_1 + 2)e^{-y_1}/ζ(3) ≈
// 1e-13 of the limit, so the tolerance 1e-9 is that of the quadrature
// (tol 1e-10).
func TestHighTemperature(t *testing.T) {
	const temp = 300.0
	kT := boltzmann * temp
	d := 3 * hbarC / kT // 22.9 µm
	si := named(t, "silicon")
	delta := (si.Static().Epsilon - 1) / (si.Static().Epsilon + 1)
	tests := []struct {
		name   string
		m      material.Model
		e0, p0 float64 // F/A and P in units of k_B T/(8π d²) and k_B T/(8π d³)
	}{
		{"perfect", material.Perfect{}, -zeta3, -2 * zeta3},
		{"gold-drude", named(t, "gold-drude"), -zeta3 / 2, -zeta3},
		{"silicon", si, -polylog(3, delta*delta) / 2, -polylog(3, delta*delta)},
	}
	for _, tc := range tests {
		r := mustPlates(t, tc.m, tc.m, d, temp, 1e-10)
		wantE := tc.e0 * kT / (8 * math.Pi * d * d)
		wantP := tc.p0 * kT / (8 * math.Pi * d * d * d)
		if e := relDiff(r.Energy, wantE); e > 1e-9 {
			t.Errorf("%s: F/A = %.12g J/m², high-T limit %.12g (relative %.2g)", tc.name, r.Energy, wantE, e)
		}
		if e := relDiff(r.Pressure, wantP); e > 1e-9 {
			t.Errorf("%s: P = %.12g Pa, high-T limit %.12g (relative %.2g)", tc.name, r.Pressure, wantP, e)
		}
	}
}

// TestLowTemperature: perfect mirrors at small t = 2 d k_B T/(ħc) follow
// F/A = E_0 [1 + (45 ζ(3)/π³) t³ - t⁴] up to terms exponentially small in 1/t
// (recalled from memory: J. Mehra, Physica 37, 145 (1967); L. S. Brown and
// G. J. Maclay, Phys. Rev. 184, 1272 (1969)), hence P = P_0 (1 + t⁴/3). Checked
// to 1e-9 absolute in the relative deviation (measured ≈ 1e-13 for t ≤ 0.2).
// Real metals tend to their T = 0 result too: gold-plasma at 100 nm deviates
// by 3e-6 at 100 K, and the deviation falls like T³ as for perfect mirrors
// (checked: the 100 K/30 K ratio within 5 % of (10/3)³; the deviations are
// ≥ 8e-8, far above the quadrature's 1e-10).
func TestLowTemperature(t *testing.T) {
	const d = 1e-6
	for _, tt := range []float64{0.05, 0.1, 0.2} {
		r := mustPlates(t, material.Perfect{}, material.Perfect{}, d, temperatureFor(tt, d), 1e-11)
		wantE := 45*zeta3/math.Pow(math.Pi, 3)*tt*tt*tt - tt*tt*tt*tt
		if got := r.Energy/CasimirEnergy(d) - 1; math.Abs(got-wantE) > 1e-9 {
			t.Errorf("t = %g: F/E_0 - 1 = %.12g, low-T series %.12g", tt, got, wantE)
		}
		if got, want := r.Pressure/CasimirPressure(d)-1, tt*tt*tt*tt/3; math.Abs(got-want) > 1e-9 {
			t.Errorf("t = %g: P/P_0 - 1 = %.12g, low-T series %.12g", tt, got, want)
		}
	}
	gold := named(t, "gold-plasma")
	r0 := mustPlates(t, gold, gold, 100e-9, 0, 1e-10)
	var dev [2]float64
	for i, temp := range []float64{100, 30} {
		r := mustPlates(t, gold, gold, 100e-9, temp, 1e-10)
		dev[i] = r.Energy/r0.Energy - 1
		t.Logf("gold-plasma, 100 nm, %g K: F/E(0) - 1 = %.4g, P/P(0) - 1 = %.4g (%d terms)", temp, dev[i], r.Pressure/r0.Pressure-1, r.Frequencies)
	}
	if want := math.Pow(10.0/3, 3); math.Abs(dev[0]/dev[1]/want-1) > 0.05 || math.Abs(dev[1]) > 1e-6 {
		t.Errorf("gold-plasma: deviations from T = 0 at 100 K and 30 K %.3g, %.3g: ratio %.3g, want ≈ %.3g (T³)", dev[0], dev[1], dev[0]/dev[1], want)
	}
}

// TestDrudeVersusPlasmaZeroTE: at T > 0 a plasma metal and a Drude metal with
// vanishing damping differ only by the n = 0 TE term the Drude metal lacks
// (at every ξ_n > 0 their eps differ by ~γ/ξ_1 ≈ 6e-9 here). That term,
//
//	ΔF/A = (k_B T/2π)·½ ∫_0^∞ k dk ln(1 - r² e^{-2kd}),
//	r = (k - sqrt(k² + ω_p²/c²))/(k + sqrt(k² + ω_p²/c²)),
//
// is computed here separately with gonum's Gauss–Legendre rule. Tolerance
// 1e-6 of ΔF (quadrature 1e-10 of F, F/ΔF ≲ 50).
func TestDrudeVersusPlasmaZeroTE(t *testing.T) {
	const temp, plasmaEV = 300.0, 9.0
	kT := boltzmann * temp
	k := material.FromEV(plasmaEV) / lightC // ω_p/c, 1/m
	plasma := material.Plasma{PlasmaEV: plasmaEV}
	drude := material.Drude{PlasmaEV: plasmaEV, DampingEV: 1e-9}
	for _, d := range []float64{100e-9, 1e-6} {
		// With u = 2kd: ∫ k dk f = (1/4d²) ∫ u du f; u = v² on [0, 1] removes
		// the logarithmic end point behaviour.
		w := 2 * d * k
		integrand := func(u float64) float64 {
			s := math.Sqrt(u*u + w*w)
			r := (u - s) / (u + s)
			return u * math.Log1p(-r*r*math.Exp(-u))
		}
		head := quad.Fixed(func(v float64) float64 { return 2 * v * integrand(v*v) }, 0, 1, 200, quad.Legendre{}, 0)
		tail := quad.Fixed(integrand, 1, 80, 2000, quad.Legendre{}, 0)
		want := kT / (2 * math.Pi) * 0.5 / (4 * d * d) * (head + tail)
		p := mustPlates(t, plasma, plasma, d, temp, 1e-10)
		dr := mustPlates(t, drude, drude, d, temp, 1e-10)
		got := p.Energy - dr.Energy
		if e := relDiff(got, want); e > 1e-6 {
			t.Errorf("d = %g m: F_plasma - F_drude = %.10g J/m², n = 0 TE term %.10g (relative %.2g)", d, got, want, e)
		}
		t.Logf("d = %g m: n = 0 TE term %.6g J/m² = %.3g of F_plasma", d, want, want/p.Energy)
	}
	// For information: gold with its real damping at 100 nm and 300 K.
	gp, gd := named(t, "gold-plasma"), named(t, "gold-drude")
	p, dr := mustPlates(t, gp, gp, 100e-9, temp, 1e-8), mustPlates(t, gd, gd, 100e-9, temp, 1e-8)
	t.Logf("gold, 100 nm, 300 K: F_drude/F_plasma = %.5f, P_drude/P_plasma = %.5f", dr.Energy/p.Energy, dr.Pressure/p.Pressure)
}
