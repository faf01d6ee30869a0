package material

import (
	"fmt"
	"math"
	"strings"
)

// Perfect is a perfect conductor: eps(iξ) = +Inf at every frequency.
type Perfect struct{}

// Epsilon returns +Inf.
func (Perfect) Epsilon(xi float64) float64 { return math.Inf(1) }

// Name returns "perfect".
func (Perfect) Name() string { return "perfect" }

// Static returns KindPerfect with eps(0) = +Inf.
func (Perfect) Static() Static { return Static{Kind: KindPerfect, Epsilon: math.Inf(1)} }

// Constant is a dispersionless dielectric, eps(iξ) = Eps at every frequency.
type Constant struct {
	Eps float64 // relative permittivity, finite and ≥ 1
}

// Epsilon returns c.Eps.
func (c Constant) Epsilon(xi float64) float64 { return c.Eps }

// Name returns "permittivity(Eps)".
func (c Constant) Name() string { return fmt.Sprintf("permittivity(%g)", c.Eps) }

// Static returns KindDielectric with eps(0) = Eps.
func (c Constant) Static() Static { return Static{Kind: KindDielectric, Epsilon: c.Eps} }

// Validate checks 1 ≤ Eps < +Inf.
func (c Constant) Validate() error {
	if math.IsInf(c.Eps, 1) {
		return fmt.Errorf("material: permittivity +Inf: use the perfect conductor model instead")
	}
	if !(c.Eps >= 1) {
		return fmt.Errorf("material: permittivity must be ≥ 1 at imaginary frequency, got %g", c.Eps)
	}
	return nil
}

// Plasma is the dissipationless free-electron metal,
//
//	eps(iξ) = 1 + (ω_p/ξ)²,
//
// with ω_p = PlasmaEV e/ħ.
type Plasma struct {
	PlasmaEV float64 // plasma energy ħω_p, eV
}

// Epsilon returns 1 + (ω_p/ξ)².
func (p Plasma) Epsilon(xi float64) float64 {
	r := FromEV(p.PlasmaEV) / xi
	return 1 + r*r
}

// Name returns "plasma(ħω_p)".
func (p Plasma) Name() string { return fmt.Sprintf("plasma(%g eV)", p.PlasmaEV) }

// Static returns KindPlasma with eps(0) = +Inf and the plasma frequency.
func (p Plasma) Static() Static {
	return Static{Kind: KindPlasma, Epsilon: math.Inf(1), PlasmaRadPerS: FromEV(p.PlasmaEV)}
}

// Validate checks PlasmaEV > 0.
func (p Plasma) Validate() error {
	if err := positive("plasma: plasma_eV", p.PlasmaEV); err != nil {
		return fmt.Errorf("material: %w", err)
	}
	return nil
}

// Drude is the free-electron metal with relaxation,
//
//	eps(iξ) = 1 + ω_p² / (ξ (ξ + γ)),
//
// with ω_p = PlasmaEV e/ħ and γ = DampingEV e/ħ. As γ → 0 it tends to Plasma
// at every ξ > 0, but its static kind stays KindDrude.
type Drude struct {
	PlasmaEV  float64 // plasma energy ħω_p, eV
	DampingEV float64 // relaxation energy ħγ, eV
}

// Epsilon returns 1 + ω_p²/(ξ(ξ+γ)).
func (d Drude) Epsilon(xi float64) float64 {
	wp := FromEV(d.PlasmaEV)
	return 1 + wp*wp/(xi*(xi+FromEV(d.DampingEV)))
}

// Name returns "drude(ħω_p, ħγ)".
func (d Drude) Name() string {
	return fmt.Sprintf("drude(%g eV, damping %g eV)", d.PlasmaEV, d.DampingEV)
}

// Static returns KindDrude with eps(0) = +Inf.
func (d Drude) Static() Static { return Static{Kind: KindDrude, Epsilon: math.Inf(1)} }

// Validate checks PlasmaEV > 0 and DampingEV > 0 (use Plasma for zero damping).
func (d Drude) Validate() error {
	if err := positive("drude: plasma_eV", d.PlasmaEV); err != nil {
		return fmt.Errorf("material: %w", err)
	}
	if d.DampingEV == 0 {
		return fmt.Errorf("material: drude: damping_eV is 0: use the plasma model for a metal without damping")
	}
	if err := positive("drude: damping_eV", d.DampingEV); err != nil {
		return fmt.Errorf("material: %w", err)
	}
	return nil
}

// Oscillator is one term of a Lorentz sum.
type Oscillator struct {
	Strength    float64 // f_j, its contribution to eps(0) - 1 (dimensionless, ≥ 0)
	ResonanceEV float64 // ħω_j, eV (> 0)
	DampingEV   float64 // ħγ_j, eV (≥ 0)
}

// Lorentz is a sum of damped harmonic oscillators (bound charges),
//
//	eps(iξ) = 1 + Σ_j f_j ω_j² / (ω_j² + ξ² + γ_j ξ),
//
// the analytic continuation to ω = iξ of 1 + Σ f_j ω_j²/(ω_j² - ω² - iγ_j ω).
// Its static permittivity is 1 + Σ f_j.
type Lorentz struct {
	Oscillators []Oscillator
}

// Epsilon returns 1 + Σ f_j ω_j²/(ω_j² + ξ² + γ_j ξ).
func (l Lorentz) Epsilon(xi float64) float64 {
	eps := 1.0
	for _, o := range l.Oscillators {
		w := FromEV(o.ResonanceEV)
		eps += o.Strength * w * w / (w*w + xi*xi + FromEV(o.DampingEV)*xi)
	}
	return eps
}

// Name returns "lorentz(N oscillators)".
func (l Lorentz) Name() string {
	if len(l.Oscillators) == 1 {
		return "lorentz(1 oscillator)"
	}
	return fmt.Sprintf("lorentz(%d oscillators)", len(l.Oscillators))
}

// Static returns KindDielectric with eps(0) = 1 + Σ f_j.
func (l Lorentz) Static() Static {
	eps := 1.0
	for _, o := range l.Oscillators {
		eps += o.Strength
	}
	return Static{Kind: KindDielectric, Epsilon: eps}
}

// Validate checks that there is at least one oscillator and that every
// strength and damping is ≥ 0 and every resonance > 0.
func (l Lorentz) Validate() error {
	if len(l.Oscillators) == 0 {
		return fmt.Errorf("material: lorentz: no oscillators: give at least one {strength, resonance_eV, damping_eV}")
	}
	for j, o := range l.Oscillators {
		if err := nonNegative("strength", o.Strength); err != nil {
			return fmt.Errorf("material: lorentz oscillator %d: %w", j+1, err)
		}
		if err := positive("resonance_eV", o.ResonanceEV); err != nil {
			return fmt.Errorf("material: lorentz oscillator %d: %w (a free-electron term is a drude or plasma model)", j+1, err)
		}
		if err := nonNegative("damping_eV", o.DampingEV); err != nil {
			return fmt.Errorf("material: lorentz oscillator %d: %w", j+1, err)
		}
	}
	return nil
}

// Sum combines the susceptibilities of its terms,
//
//	eps(iξ) = 1 + Σ_j (eps_j(iξ) - 1),
//
// e.g. a Drude free-electron part plus Lorentz interband oscillators, or a
// Constant background eps_∞ plus oscillators (eps_∞ + Σ f_j ω_j²/(...)).
type Sum []Model

// Epsilon returns 1 + Σ (eps_j(iξ) - 1).
func (s Sum) Epsilon(xi float64) float64 {
	eps := 1.0
	for _, m := range s {
		eps += m.Epsilon(xi) - 1
	}
	return eps
}

// Name joins the names of the terms with "+".
func (s Sum) Name() string {
	names := make([]string, len(s))
	for i, m := range s {
		names[i] = m.Name()
	}
	return strings.Join(names, "+")
}

// Static combines the static limits of the terms: the kind is the strongest
// of them (perfect over plasma over Drude over dielectric), eps(0) is
// 1 + Σ (eps_j(0) - 1), and ω_p² is the sum of the plasma terms' ω_p².
func (s Sum) Static() Static {
	out := Static{Kind: KindDielectric, Epsilon: 1}
	var wp2 float64
	for _, m := range s {
		st := m.Static()
		if st.Kind > out.Kind {
			out.Kind = st.Kind
		}
		out.Epsilon += st.Epsilon - 1
		wp2 += st.PlasmaRadPerS * st.PlasmaRadPerS
	}
	if out.Kind == KindPlasma {
		out.PlasmaRadPerS = math.Sqrt(wp2)
	}
	return out
}

// Validate checks that the sum has terms and that every term is valid.
func (s Sum) Validate() error {
	if len(s) == 0 {
		return fmt.Errorf("material: empty sum of models")
	}
	for i, m := range s {
		if err := Validate(m); err != nil {
			return fmt.Errorf("%w (term %d of the sum %s)", err, i+1, s.Name())
		}
	}
	return nil
}
