package material

import (
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"strings"
)

// modelKeys returns the keys of an inline model, in the order their terms are
// summed.
func modelKeys() []string { return []string{"permittivity", "plasma", "drude", "lorentz", "table"} }

// Parse builds a model from a material specification as decoded from YAML
// (strings, numbers, map[string]any and []any). The forms are
//
//	perfect                                    a library name (see Named)
//	{drude: {plasma_eV: 9, damping_eV: 0.035}}
//	{plasma: {plasma_eV: 9}}
//	{lorentz: [{strength: 10.8, resonance_eV: 4.34, damping_eV: 0}, ...]}
//	{permittivity: 11.7}
//	{table: FILE}                               optical data, see LoadTable
//	{table: FILE, below: {drude: {...}}}        ... with the tail below the data given
//	{table: FILE, below: none}                  ... with eps″ = 0 below the data
//
// Several of drude, plasma, lorentz and permittivity in one mapping are summed
// as in Sum (so {permittivity: 1.035, lorentz: [...]} is eps_∞ plus
// oscillators). FILE is relative to baseDir unless absolute. Keys of the
// parameter mappings are matched without regard to case.
func Parse(spec any, baseDir string) (Model, error) {
	switch v := spec.(type) {
	case nil:
		return nil, fmt.Errorf("material: no material given: name one of %s or give an inline model such as {drude: {plasma_eV: 9, damping_eV: 0.035}}", strings.Join(Names(), ", "))
	case string:
		return Named(v)
	case int, int64, uint64, float64, float32:
		return nil, fmt.Errorf("material: a bare number (%v) is not a material: for a constant permittivity write {permittivity: %v}", v, v)
	}
	m, ok := asMap(spec)
	if !ok {
		return nil, fmt.Errorf("material: cannot read %T %v as a material: give a name (%s) or a mapping such as {drude: {...}}", spec, spec, strings.Join(Names(), ", "))
	}
	if len(m) == 0 {
		return nil, fmt.Errorf("material: empty mapping: give one of the keys %s", strings.Join(modelKeys(), ", "))
	}
	for key := range m {
		if key != "below" && !slices.Contains(modelKeys(), key) {
			return nil, fmt.Errorf("material: unknown key %q: use %s", key, strings.Join(modelKeys(), ", "))
		}
	}
	if file, ok := m["table"]; ok {
		return parseTable(m, file, baseDir)
	}
	if _, ok := m["below"]; ok {
		return nil, fmt.Errorf("material: below is the tail of a table: it needs table: FILE beside it")
	}
	var terms Sum
	for _, key := range modelKeys() {
		val, ok := m[key]
		if !ok {
			continue
		}
		var (
			term Model
			err  error
		)
		switch key {
		case "permittivity":
			var eps float64
			if eps, err = number(val); err != nil {
				return nil, fmt.Errorf("material: permittivity: %w", err)
			}
			term = Constant{Eps: eps}
		case "plasma":
			term, err = parsePlasma(val)
		case "drude":
			term, err = parseDrude(val)
		case "lorentz":
			term, err = parseLorentz(val)
		}
		if err != nil {
			return nil, err
		}
		if err := Validate(term); err != nil {
			return nil, err
		}
		terms = append(terms, term)
	}
	if len(terms) == 1 {
		return terms[0], nil
	}
	return terms, nil
}

func parseTable(m map[string]any, file any, baseDir string) (Model, error) {
	for key := range m {
		if key != "table" && key != "below" {
			return nil, fmt.Errorf("material: table cannot be combined with %s: a table already holds the whole response (only below: may stand beside it)", key)
		}
	}
	path, ok := file.(string)
	if !ok || strings.TrimSpace(path) == "" {
		return nil, fmt.Errorf("material: table: want a file name, got %v", file)
	}
	if !filepath.IsAbs(path) {
		path = filepath.Join(baseDir, path)
	}
	below, ok := m["below"]
	if !ok {
		return LoadTable(path)
	}
	switch b := below.(type) {
	case string:
		switch strings.ToLower(strings.TrimSpace(b)) {
		case "none":
			return LoadTableBelow(path, nil)
		case "fit":
			energy, eps2, err := readTableFile(path)
			if err != nil {
				return nil, err
			}
			d, err := FitDrude(energy, eps2)
			if err != nil {
				return nil, fmt.Errorf("material: table %s: below: fit: %w", path, err)
			}
			return NewTable(filepath.Base(path), energy, eps2, &d)
		}
		return nil, fmt.Errorf("material: table: below: %q: use none, fit or {drude: {plasma_eV: ..., damping_eV: ...}}", b)
	}
	bm, ok := asMap(below)
	if !ok || len(bm) != 1 || bm["drude"] == nil {
		return nil, fmt.Errorf("material: table: below: want none, fit or {drude: {plasma_eV: ..., damping_eV: ...}}, got %v", below)
	}
	d, err := parseDrude(bm["drude"])
	if err != nil {
		return nil, fmt.Errorf("material: table: below: %w", err)
	}
	return LoadTableBelow(path, &d)
}

func parsePlasma(val any) (Model, error) {
	p, err := params("plasma", val, []string{"plasma_eV"}, nil)
	if err != nil {
		return nil, err
	}
	return Plasma{PlasmaEV: p["plasma_eV"]}, nil
}

func parseDrude(val any) (Drude, error) {
	p, err := params("drude", val, []string{"plasma_eV", "damping_eV"}, nil)
	if err != nil {
		return Drude{}, err
	}
	d := Drude{PlasmaEV: p["plasma_eV"], DampingEV: p["damping_eV"]}
	if err := d.Validate(); err != nil {
		return Drude{}, err
	}
	return d, nil
}

func parseLorentz(val any) (Model, error) {
	list, ok := val.([]any)
	if !ok {
		return nil, fmt.Errorf("material: lorentz: want a list of {strength: ..., resonance_eV: ..., damping_eV: ...}, got %v", val)
	}
	var l Lorentz
	for i, item := range list {
		p, err := params(fmt.Sprintf("lorentz oscillator %d", i+1), item,
			[]string{"strength", "resonance_eV"}, []string{"damping_eV"})
		if err != nil {
			return nil, err
		}
		l.Oscillators = append(l.Oscillators, Oscillator{
			Strength: p["strength"], ResonanceEV: p["resonance_eV"], DampingEV: p["damping_eV"],
		})
	}
	return l, nil
}

// params reads a mapping of numbers with the required and optional keys
// (matched case-insensitively; missing optional keys read as 0).
func params(what string, val any, required, optional []string) (map[string]float64, error) {
	all := append(append([]string{}, required...), optional...)
	m, ok := asMap(val)
	if !ok {
		return nil, fmt.Errorf("material: %s: want a mapping with keys %s, got %v", what, strings.Join(all, ", "), val)
	}
	out := make(map[string]float64, len(all))
	for key, v := range m {
		canon := ""
		for _, k := range all {
			if strings.EqualFold(k, key) {
				canon = k
			}
		}
		if canon == "" {
			return nil, fmt.Errorf("material: %s: unknown key %q: want %s", what, key, strings.Join(all, ", "))
		}
		x, err := number(v)
		if err != nil {
			return nil, fmt.Errorf("material: %s: %s: %w", what, canon, err)
		}
		out[canon] = x
	}
	for _, k := range required {
		if _, ok := out[k]; !ok {
			return nil, fmt.Errorf("material: %s: missing %s (%s)", what, k, paramHelp(k))
		}
	}
	return out, nil
}

func paramHelp(key string) string {
	switch key {
	case "plasma_eV":
		return "the plasma energy ħω_p in eV, e.g. 9 for gold"
	case "damping_eV":
		return "the damping energy ħγ in eV, e.g. 0.035 for gold"
	case "strength":
		return "the oscillator's contribution to eps(0) - 1"
	case "resonance_eV":
		return "the resonance energy ħω_j in eV"
	}
	return "a number"
}

// number converts a decoded YAML scalar to float64.
func number(v any) (float64, error) {
	var x float64
	switch n := v.(type) {
	case float64:
		x = n
	case float32:
		x = float64(n)
	case int:
		x = float64(n)
	case int64:
		x = float64(n)
	case uint64:
		x = float64(n)
	default:
		return 0, fmt.Errorf("want a number, got %v", v)
	}
	if math.IsNaN(x) {
		return 0, fmt.Errorf("want a number, got NaN")
	}
	return x, nil
}

// asMap accepts the mappings of YAML decoders with string or any keys.
func asMap(v any) (map[string]any, bool) {
	switch m := v.(type) {
	case map[string]any:
		return m, true
	case map[any]any:
		out := make(map[string]any, len(m))
		for k, val := range m {
			out[fmt.Sprint(k)] = val
		}
		return out, true
	}
	return nil, false
}
