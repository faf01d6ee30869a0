package material

import (
	"fmt"
	"math"
)

// Physical constants, CODATA 2018 (exact in the revised SI).
const (
	Hbar             = 1.054571817e-34 // reduced Planck constant, J s
	ElementaryCharge = 1.602176634e-19 // C; also J per eV
)

// radPerSPerEV is the angular frequency of a 1 eV photon, e/ħ in rad/s.
const radPerSPerEV = ElementaryCharge / Hbar

// FromEV returns the angular frequency ω = E e/ħ, in rad/s, of a photon of
// energy E in eV.
func FromEV(energyEV float64) float64 { return energyEV * radPerSPerEV }

// ToEV returns the photon energy ħω/e, in eV, of the angular frequency ω in rad/s.
func ToEV(omega float64) float64 { return omega / radPerSPerEV }

// Model is a dielectric function evaluated on the imaginary frequency axis.
type Model interface {
	// Epsilon returns eps(iξ) for the imaginary angular frequency ξ ≥ 0 in
	// rad/s. The result is ≥ 1 (+Inf for a perfect conductor) and does not
	// increase with ξ. Epsilon(0) is the static limit (+Inf for metals).
	Epsilon(xi float64) float64
	// Name is a short human-readable label.
	Name() string
	// Static describes the limit ξ → 0 used by the n = 0 Matsubara term.
	Static() Static
}

// Kind classifies a model by its static (ξ → 0) behaviour.
type Kind int

const (
	// KindDielectric has a finite static permittivity eps(0).
	KindDielectric Kind = iota
	// KindDrude is a metal with Drude-type dissipation: eps(iξ) diverges like
	// 1/ξ, so ξ² eps(iξ) → 0 and the n = 0 TE reflection vanishes.
	KindDrude
	// KindPlasma is a dissipationless metal: ξ² eps(iξ) → ω_p² > 0, so the
	// n = 0 TE reflection stays finite.
	KindPlasma
	// KindPerfect is a perfect conductor: eps = +Inf at every frequency.
	KindPerfect
)

// String returns "dielectric", "drude", "plasma" or "perfect".
func (k Kind) String() string {
	switch k {
	case KindDielectric:
		return "dielectric"
	case KindDrude:
		return "drude"
	case KindPlasma:
		return "plasma"
	case KindPerfect:
		return "perfect"
	}
	return fmt.Sprintf("Kind(%d)", int(k))
}

// Static is the limit ξ → 0 of a model.
type Static struct {
	Kind Kind
	// Epsilon is eps(0): finite for KindDielectric, +Inf for every metal.
	Epsilon float64
	// PlasmaRadPerS is ω_p in rad/s with ξ² eps(iξ) → ω_p² as ξ → 0. It is
	// positive for KindPlasma and zero otherwise.
	PlasmaRadPerS float64
}

// KindOf returns the static kind of m.
func KindOf(m Model) Kind { return m.Static().Kind }

// Validate reports whether the parameters of m describe a physical model.
// Models of this package check themselves; other models are accepted.
func Validate(m Model) error {
	if m == nil {
		return fmt.Errorf("material: no model given")
	}
	if v, ok := m.(interface{ Validate() error }); ok {
		return v.Validate()
	}
	return nil
}

// positive reports an error unless v is finite and > 0.
func positive(what string, v float64) error {
	if !(v > 0) || math.IsInf(v, 0) {
		return fmt.Errorf("%s must be a finite number > 0, got %g", what, v)
	}
	return nil
}

// nonNegative reports an error unless v is finite and ≥ 0.
func nonNegative(what string, v float64) error {
	if !(v >= 0) || math.IsInf(v, 0) {
		return fmt.Errorf("%s must be a finite number ≥ 0, got %g", what, v)
	}
	return nil
}
