package material

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
)

// drudeFitPoints is the number of lowest table points a Drude tail is fitted to.
const drudeFitPoints = 4

// Table is a dielectric function known from tabulated optical data: the
// imaginary part eps″(ω) of the permittivity on real frequencies ω, turned
// into eps(iξ) by the Kramers–Kronig relation (Landau & Lifshitz, Electrodynamics
// of Continuous Media, §82)
//
//	eps(iξ) = 1 + (2/π) ∫_0^∞ ω eps″(ω) / (ω² + ξ²) dω.
//
// Between the tabulated points eps″ is interpolated linearly in ω, and the
// integral over each segment is done in closed form, so it is exact for the
// interpolant; one evaluation costs O(number of points). Outside the table:
//
//   - below the first point, eps″ is that of a Drude metal,
//     eps″ = ω_p² γ / (ω (ω² + γ²)), fitted to the lowest points or given
//     (its integral is done in closed form), or zero for an insulator;
//   - above the last point, eps″ falls as ω^-3 from the last value (common
//     practice: the free-electron high-frequency tail).
//
// A Table with a Drude tail is a KindDrude metal; without one it is a
// dielectric with finite eps(0). A Table is not changed after it is built and
// is safe for concurrent use.
type Table struct {
	name  string
	omega []float64 // rad/s, > 0, strictly increasing
	eps2  []float64 // eps″(omega), ≥ 0
	below *Drude    // tail under omega[0], nil for eps″ = 0
}

// LoadTable reads tabulated optical data from a text file (see ReadTable for
// the format). Below the first point eps″ is continued by a Drude tail fitted
// to the lowest points (FitDrude) or, when eps″ of the first point is zero,
// by zero. It fails when the lowest points absorb but do not fit a Drude form;
// then choose the tail with LoadTableBelow.
func LoadTable(path string) (*Table, error) {
	energy, eps2, err := readTableFile(path)
	if err != nil {
		return nil, err
	}
	t, err := newTableFit(filepath.Base(path), energy, eps2)
	if err != nil {
		return nil, fmt.Errorf("material: table %s: %w", path, err)
	}
	return t, nil
}

// LoadTableBelow is LoadTable with the tail below the first point given:
// a Drude model, or nil for eps″ = 0 there (insulators).
func LoadTableBelow(path string, below *Drude) (*Table, error) {
	energy, eps2, err := readTableFile(path)
	if err != nil {
		return nil, err
	}
	t, err := NewTable(filepath.Base(path), energy, eps2, below)
	if err != nil {
		return nil, fmt.Errorf("material: table %s: %w", path, err)
	}
	return t, nil
}

func readTableFile(path string) (energyEV, eps2 []float64, err error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, fmt.Errorf("material: optical data table: %w", err)
	}
	defer f.Close()
	return ReadTable(f, path)
}

// ReadTable parses optical data: one point per line, columns separated by
// white space, commas or semicolons, '#' starting a comment, and one optional
// header line of column names before the data. Each line holds either
//
//	E  eps″      (2 columns)   or   E  n  k      (3 columns, eps″ = 2 n k)
//
// with E the photon energy in eV, strictly increasing. name labels errors.
// It returns the energies (eV) and eps″ values.
func ReadTable(r io.Reader, name string) (energyEV, eps2 []float64, err error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64*1024), 1024*1024)
	columns, line := 0, 0
	headerAllowed := true
	for sc.Scan() {
		line++
		text := sc.Text()
		if i := strings.IndexByte(text, '#'); i >= 0 {
			text = text[:i]
		}
		fields := strings.FieldsFunc(text, func(r rune) bool {
			return r == ',' || r == ';' || r == ' ' || r == '\t' || r == '\r'
		})
		if len(fields) == 0 {
			continue
		}
		values := make([]float64, len(fields))
		numeric := 0
		var bad string
		for i, s := range fields {
			v, perr := strconv.ParseFloat(s, 64)
			if perr == nil {
				values[i] = v
				numeric++
			} else if bad == "" {
				bad = s
			}
		}
		if numeric == 0 && headerAllowed {
			headerAllowed = false // a line of column names
			continue
		}
		headerAllowed = false
		if bad != "" {
			return nil, nil, fmt.Errorf("material: %s:%d: %q is not a number (mark comments with #)", name, line, bad)
		}
		if columns == 0 {
			if len(values) != 2 && len(values) != 3 {
				return nil, nil, fmt.Errorf("material: %s:%d: %d columns: give 2 (energy eV, eps'') or 3 (energy eV, n, k)", name, line, len(values))
			}
			columns = len(values)
		} else if len(values) != columns {
			return nil, nil, fmt.Errorf("material: %s:%d: %d columns where the first data line has %d", name, line, len(values), columns)
		}
		for _, v := range values {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, nil, fmt.Errorf("material: %s:%d: values must be finite", name, line)
			}
		}
		e := values[0]
		if !(e > 0) {
			return nil, nil, fmt.Errorf("material: %s:%d: photon energy %g eV must be > 0", name, line, e)
		}
		if n := len(energyEV); n > 0 && !(e > energyEV[n-1]) {
			return nil, nil, fmt.Errorf("material: %s:%d: photon energy %g eV does not exceed the previous %g eV: sort the table by increasing energy without repeats", name, line, e, energyEV[n-1])
		}
		var im float64
		if columns == 2 {
			im = values[1]
			if im < 0 {
				return nil, nil, fmt.Errorf("material: %s:%d: eps'' = %g < 0 (a passive medium absorbs: eps'' ≥ 0)", name, line, im)
			}
		} else {
			n, k := values[1], values[2]
			if n < 0 || k < 0 {
				return nil, nil, fmt.Errorf("material: %s:%d: n = %g, k = %g: both must be ≥ 0", name, line, n, k)
			}
			im = 2 * n * k
		}
		energyEV = append(energyEV, e)
		eps2 = append(eps2, im)
	}
	if err := sc.Err(); err != nil {
		return nil, nil, fmt.Errorf("material: reading %s: %w", name, err)
	}
	if len(energyEV) < 2 {
		return nil, nil, fmt.Errorf("material: %s: %d data lines: a table needs at least 2 points", name, len(energyEV))
	}
	return energyEV, eps2, nil
}

// NewTable builds a Table from photon energies in eV (strictly increasing,
// > 0) and the values eps″ ≥ 0 at them. below is the tail under the first
// point: a Drude model, or nil for eps″ = 0 there (insulators). The slices
// are copied.
func NewTable(name string, energyEV, eps2 []float64, below *Drude) (*Table, error) {
	if len(energyEV) != len(eps2) {
		return nil, fmt.Errorf("material: table %s: %d energies but %d eps'' values", name, len(energyEV), len(eps2))
	}
	if len(energyEV) < 2 {
		return nil, fmt.Errorf("material: table %s: %d points: a table needs at least 2", name, len(energyEV))
	}
	t := &Table{name: name, omega: make([]float64, len(energyEV)), eps2: make([]float64, len(eps2))}
	for i, e := range energyEV {
		if !(e > 0) || math.IsInf(e, 0) || (i > 0 && !(e > energyEV[i-1])) {
			return nil, fmt.Errorf("material: table %s: point %d: energies must be finite, > 0 and strictly increasing (got %g eV)", name, i+1, e)
		}
		if !(eps2[i] >= 0) || math.IsInf(eps2[i], 0) {
			return nil, fmt.Errorf("material: table %s: point %d: eps'' = %g must be finite and ≥ 0", name, i+1, eps2[i])
		}
		t.omega[i] = FromEV(e)
		t.eps2[i] = eps2[i]
	}
	if below != nil {
		if err := below.Validate(); err != nil {
			return nil, fmt.Errorf("material: table %s: tail below the data: %w", name, err)
		}
		d := *below
		t.below = &d
	}
	return t, nil
}

// newTableFit is NewTable with the default tail: a Drude fit to the lowest
// points, or none when the first point does not absorb.
func newTableFit(name string, energyEV, eps2 []float64) (*Table, error) {
	if len(eps2) > 0 && eps2[0] == 0 {
		return NewTable(name, energyEV, eps2, nil)
	}
	d, err := FitDrude(energyEV, eps2)
	if err != nil {
		return nil, fmt.Errorf("%w; give the tail below the data explicitly (below: {drude: {plasma_eV: ..., damping_eV: ...}}) or, for an insulator, below: none", err)
	}
	return NewTable(name, energyEV, eps2, &d)
}

// errNoDrudeFit says the lowest points are not of Drude form.
var errNoDrudeFit = errors.New("the lowest points do not fit a Drude tail eps'' = ω_p² γ/(ω(ω² + γ²))")

// FitDrude fits the Drude form eps″(ω) = ω_p² γ / (ω (ω² + γ²)) to the lowest
// (up to 4) points of a table, energies in eV, by linear least squares in
// relative residuals on eps″ ω (ω² + γ²) = ω_p² γ (unknowns γ² and ω_p² γ).
// It fails unless the fit gives γ² > 0 and ω_p² > 0 and reproduces every
// point it used to 10 %.
func FitDrude(energyEV, eps2 []float64) (Drude, error) {
	n := min(drudeFitPoints, len(energyEV), len(eps2))
	if n < 2 {
		return Drude{}, fmt.Errorf("fitting a Drude tail needs at least 2 points, got %d", n)
	}
	// Row i: g/ω_i² - A/(e_i ω_i³) = -1 with g = γ², A = ω_p² γ (eV units).
	var s11, s12, s22, r1, r2 float64
	for i := 0; i < n; i++ {
		w, e := energyEV[i], eps2[i]
		if !(e > 0) {
			return Drude{}, fmt.Errorf("%w: eps'' = %g at %g eV", errNoDrudeFit, e, w)
		}
		a1, a2 := 1/(w*w), -1/(e*w*w*w)
		s11 += a1 * a1
		s12 += a1 * a2
		s22 += a2 * a2
		r1 -= a1
		r2 -= a2
	}
	det := s11*s22 - s12*s12
	g := (r1*s22 - s12*r2) / det
	a := (s11*r2 - s12*r1) / det
	if !(g > 0) || !(a > 0) || math.IsInf(g, 0) || math.IsInf(a, 0) {
		return Drude{}, fmt.Errorf("%w (fit gives γ² = %g eV², ω_p² γ = %g eV³)", errNoDrudeFit, g, a)
	}
	gamma := math.Sqrt(g)
	d := Drude{PlasmaEV: math.Sqrt(a / gamma), DampingEV: gamma}
	for i := 0; i < n; i++ {
		w := energyEV[i]
		model := a / (w * (w*w + g))
		if math.Abs(model-eps2[i]) > 0.1*eps2[i] {
			return Drude{}, fmt.Errorf("%w: the fit (ħω_p = %.4g eV, ħγ = %.4g eV) gives eps'' = %.4g at %g eV where the table has %.4g",
				errNoDrudeFit, d.PlasmaEV, d.DampingEV, model, w, eps2[i])
		}
	}
	return d, nil
}

// Name returns "table(NAME)".
func (t *Table) Name() string { return "table(" + t.name + ")" }

// Len returns the number of tabulated points.
func (t *Table) Len() int { return len(t.omega) }

// RangeEV returns the first and last tabulated photon energies, eV.
func (t *Table) RangeEV() (lo, hi float64) { return ToEV(t.omega[0]), ToEV(t.omega[len(t.omega)-1]) }

// Below returns the Drude tail used under the first point, or nil if eps″ is
// zero there.
func (t *Table) Below() *Drude {
	if t.below == nil {
		return nil
	}
	d := *t.below
	return &d
}

// Static returns KindDrude (eps(0) = +Inf) with a Drude tail, else
// KindDielectric with eps(0) from the Kramers–Kronig integral.
func (t *Table) Static() Static {
	if t.below != nil {
		return Static{Kind: KindDrude, Epsilon: math.Inf(1)}
	}
	return Static{Kind: KindDielectric, Epsilon: t.Epsilon(0)}
}

// Epsilon returns eps(iξ) by the Kramers–Kronig integral over the
// interpolated table and its tails, ξ ≥ 0 in rad/s.
func (t *Table) Epsilon(xi float64) float64 {
	if t.below != nil && xi == 0 {
		return math.Inf(1)
	}
	var sum float64 // ∫_0^∞ ω eps″(ω)/(ω² + ξ²) dω
	if t.below != nil {
		wp, gamma := FromEV(t.below.PlasmaEV), FromEV(t.below.DampingEV)
		sum += wp * wp * gamma * drudeLowIntegral(t.omega[0], gamma, xi)
	}
	xi2 := xi * xi
	for i := 0; i+1 < len(t.omega); i++ {
		wa, wb := t.omega[i], t.omega[i+1]
		ea, eb := t.eps2[i], t.eps2[i+1]
		dw := wb - wa
		// L = ∫ ω/(ω²+ξ²) dω, M = ∫ ω²/(ω²+ξ²) dω = Δω - ξ[atan(ωb/ξ) - atan(ωa/ξ)],
		// the atan difference taken as atan(z), z = ξΔω/(ξ² + ωaωb), and
		// Δω - ξ atan z = Δω ωaωb/(ξ² + ωaωb) + ξ (z - atan z) to keep digits.
		l := 0.5 * math.Log1p(dw*(wa+wb)/(wa*wa+xi2))
		m := dw * wa * wb / (xi2 + wa*wb)
		if xi > 0 {
			z := xi * dw / (xi2 + wa*wb)
			m += xi * z * z * z * atanRemainder(z)
		}
		// eps″ = ea (ωb - ω)/Δω + eb (ω - ωa)/Δω: weights L - B and B with
		// B = ∫ ω(ω - ωa)/(Δω (ω² + ξ²)) dω = (M - ωa L)/Δω.
		b := (m - wa*l) / dw
		sum += ea*(l-b) + eb*b
	}
	// eps″ = e_N (ω_N/ω)³ above the last point:
	// ∫_{ω_N}^∞ ω e_N ω_N³ ω^-3/(ω² + ξ²) dω = e_N (x - atan x)/x³, x = ξ/ω_N.
	n := len(t.omega) - 1
	sum += t.eps2[n] * atanRemainder(xi/t.omega[n])
	return 1 + 2/math.Pi*sum
}

// drudeLowIntegral returns J = ∫_0^{ω1} dω / ((ω² + γ²)(ω² + ξ²)) for γ > 0,
// ξ > 0, from partial fractions J = [atan(ω1/γ)/γ - atan(ω1/ξ)/ξ]/(ξ² - γ²),
// rearranged so that no term cancels (also for ξ → γ):
//
//	J = [ξ ω1 T(δ)/(ξγ + ω1²) + atan(ω1/ξ)] / (γ ξ (ξ + γ)),
//	δ = ω1 (ξ - γ)/(ξγ + ω1²),  T(δ) = atan(δ)/δ.
func drudeLowIntegral(w1, gamma, xi float64) float64 {
	den := xi*gamma + w1*w1
	return (xi*w1*atanOver(w1*(xi-gamma)/den)/den + math.Atan(w1/xi)) / (gamma * xi * (xi + gamma))
}

// atanOver returns atan(δ)/δ, 1 at δ = 0.
func atanOver(d float64) float64 {
	if math.Abs(d) < 1e-4 {
		return 1 - d*d/3
	}
	return math.Atan(d) / d
}

// atanRemainder returns (z - atan z)/z³ for z ≥ 0 (1/3 at z = 0), by its
// Taylor series 1/3 - z²/5 + z⁴/7 - ... for small z.
func atanRemainder(z float64) float64 {
	if z < 0.5 {
		z2 := z * z
		var s, p float64 = 0, 1
		for k := 0; k < 28; k++ {
			s += p / float64(2*k+3)
			p *= -z2
			if math.Abs(p) < 1e-17 {
				break
			}
		}
		return s
	}
	return (z - math.Atan(z)) / (z * z * z)
}
