package material

import (
	"fmt"
	"sort"
	"strings"
)

// libraryEntry is one built-in material.
type libraryEntry struct {
	name  string
	model func() Model
}

// library lists the built-in materials. It is a function so that every call
// hands out fresh values and the package keeps no mutable state.
func library() []libraryEntry {
	return []libraryEntry{
		// Gold: ħω_p = 9.0 eV, ħγ = 35 meV, the values conventionally used in
		// the Casimir literature, e.g. A. Lambrecht and S. Reynaud, Eur. Phys.
		// J. D 8, 309 (2000).
		{"gold-plasma", func() Model { return Plasma{PlasmaEV: 9.0} }},
		{"gold-drude", func() Model { return Drude{PlasmaEV: 9.0, DampingEV: 0.035} }},
		// Aluminium: ħω_p = 11.5 eV (plasma wavelength ≈ 107 nm), ħγ = 50 meV.
		// Recalled from memory as the conventional values of the same
		// literature (Lambrecht & Reynaud 2000); not checked against the paper.
		{"aluminium-plasma", func() Model { return Plasma{PlasmaEV: 11.5} }},
		{"aluminium-drude", func() Model { return Drude{PlasmaEV: 11.5, DampingEV: 0.050} }},
		// Silicon: eps(iξ) = eps_∞ + (eps_0 - eps_∞) ω_0²/(ω_0² + ξ²) with
		// eps_0 = 11.87, eps_∞ = 1.035, ω_0 = 6.6e15 rad/s, the single-oscillator
		// form used by A. Lambrecht, I. Pirozhenko, L. Duraffourg and
		// Ph. Andreucci, EPL 77, 44006 (2007). Recalled from memory.
		{"silicon", func() Model {
			return Sum{
				Constant{Eps: 1.035},
				Lorentz{Oscillators: []Oscillator{{Strength: 11.87 - 1.035, ResonanceEV: ToEV(6.6e15)}}},
			}
		}},
		{"perfect", func() Model { return Perfect{} }},
	}
}

// aliases maps alternative spellings to library names.
func aliases(name string) string {
	switch name {
	case "aluminum-plasma":
		return "aluminium-plasma"
	case "aluminum-drude":
		return "aluminium-drude"
	}
	return name
}

// Names returns the names of the built-in materials, sorted.
func Names() []string {
	lib := library()
	names := make([]string, len(lib))
	for i, e := range lib {
		names[i] = e.name
	}
	sort.Strings(names)
	return names
}

// Named returns the built-in material called name (case-insensitive; the
// American spelling "aluminum-..." is accepted) as a Labelled model whose Name
// is the library name.
func Named(name string) (Model, error) {
	key := aliases(strings.ToLower(strings.TrimSpace(name)))
	for _, e := range library() {
		if e.name == key {
			return Labelled{Model: e.model(), Label: e.name}, nil
		}
	}
	return nil, fmt.Errorf("material: unknown material %q: known names are %s, or give an inline model ({drude: ...}, {plasma: ...}, {lorentz: [...]}, {permittivity: ...}, {table: FILE})",
		name, strings.Join(Names(), ", "))
}

// Labelled is a model with a name of its own, as returned by Named; the
// underlying model (e.g. a Drude value) is its Model field.
type Labelled struct {
	Model
	Label string
}

// Name returns the label.
func (l Labelled) Name() string { return l.Label }

// Validate validates the underlying model.
func (l Labelled) Validate() error { return Validate(l.Model) }
