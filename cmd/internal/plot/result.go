package plot

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"

	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/scatter/sticking"
)

// ResultName is the file of a run's output directory that Load reads.
const ResultName = "result.json"

// Result is the content of result.json as this package reads it. Lengths
// are in Unit, energies in J, forces in N, torques in N m. Optional sections
// are nil when the run did not compute them.
type Result struct {
	Notice       string  `json:"notice"`
	Job          string  `json:"job"`  // the job file as given to the run
	Mode         string  `json:"mode"` // "solver", or "pfa-only" (no exact values)
	Unit         string  `json:"unit"`
	TemperatureK float64 `json:"temperature_K"`
	Accuracy     float64 `json:"accuracy"`
	Unknowns     int     `json:"unknowns"`
	MatrixBytes  int64   `json:"matrix_bytes"`
	Bodies       []Body  `json:"bodies"`
	Sweep        Sweep   `json:"sweep"`
	// Substrate is the infinite conducting plane under the scene, if any.
	Substrate *Plane `json:"substrate"`
	// Materials, ZeroFrequency (the n = 0 Matsubara treatment at T > 0)
	// and PFALaw are empty when every body is a perfect conductor.
	Materials     string  `json:"materials"`
	ZeroFrequency string  `json:"zero_frequency"`
	PFALaw        string  `json:"pfa_law"`
	Points        []Point `json:"points"`
	// Sticking is the pull-in analysis of a suspended body, if any.
	Sticking *Sticking `json:"sticking"`
}

// Body describes one body of the scene.
type Body struct {
	Name      string `json:"name"`
	Source    string `json:"source"` // mesh file or generated shape
	Triangles int    `json:"triangles"`
	Unknowns  int    `json:"unknowns"`
	// Material and MaterialKind are set when some body has a real material.
	Material     string `json:"material"`
	MaterialKind string `json:"material_kind"`
}

// Sweep describes how the moving body was displaced.
type Sweep struct {
	Body      string     `json:"body"`
	Direction [3]float64 `json:"direction"` // unit vector ê, or zero
	By        string     `json:"by"`        // "gaps", "offsets" or "angles"
	// Axis is the unit axis of an angle sweep; torques are shown along it.
	Axis *[3]float64 `json:"axis"`
}

// Plane is an infinite plane through Point (Unit) with unit Normal pointing
// to the side of the bodies.
type Plane struct {
	Point  [3]float64 `json:"point"`
	Normal [3]float64 `json:"normal"`
}

// Point is the result at one sweep point. Pointer fields are nil when the
// run did not compute them (or wrote null).
type Point struct {
	Gap          Num      `json:"gap"`
	Offset       [3]Num   `json:"offset"`
	EnergyJ      Num      `json:"energy_J"`
	EnergyErrorJ Num      `json:"energy_error_J"`
	PFAEnergyJ   Num      `json:"pfa_energy_J"`
	PFAMovingJ   Num      `json:"pfa_moving_J"`
	PFAFixedJ    Num      `json:"pfa_fixed_J"`
	RatioPFA     Num      `json:"ratio_pfa"`
	Samples      []Sample `json:"samples"`

	AngleDeg *Num `json:"angle_deg"` // angle of an angle sweep, degrees

	ForceN      *[3]Num `json:"force_N"`       // on the moving body
	ForceAlongN *Num    `json:"force_along_N"` // F·ê, if the run wrote it
	ForceErrorN *Num    `json:"force_error_N"`
	PFAForceN   *Num    `json:"pfa_force_N"`     // PFA force along ê
	RatioForce  *Num    `json:"ratio_force_pfa"` // F·ê / pfa_force_N

	TorqueNm      *[3]Num `json:"torque_Nm"`
	TorqueAlongNm *Num    `json:"torque_along_Nm"` // τ·axis, if the run wrote it
	TorqueErrorNm *Num    `json:"torque_error_Nm"`

	StiffnessNPerM        *Num `json:"stiffness_N_per_m"` // -d(F·ê)/ds
	StiffnessErrorNPerM   *Num `json:"stiffness_error_N_per_m"`
	TorsionalStiffness    *Num `json:"torsional_stiffness_Nm_per_rad"`
	TorsionalStiffnessErr *Num `json:"torsional_stiffness_error_Nm_per_rad"`

	// AddedFor names the analysis an extra point was computed for (such as
	// "sticking"); empty for the points of the job's own sweep.
	AddedFor string `json:"added_for"`
}

// Sample is one evaluation of the frequency integrand.
type Sample struct {
	KappaPerUnit Num `json:"kappa_per_unit"` // κ, 1/Unit
	Integrand    Num `json:"integrand"`      // ln det[M M_∞⁻¹], ≤ 0
}

// Sticking is the sticking section: a sticking.Report (positions in m or
// rad, loads in N or N m) with, optionally, its summary text and the load
// samples it was computed from.
type Sticking struct {
	sticking.Report
	Summary string            `json:"summary"`
	Samples []sticking.Sample `json:"samples"`
}

// Text returns the summary the run wrote, or the report's own.
func (s *Sticking) Text() string {
	if s.Summary != "" {
		return s.Summary
	}
	return s.Report.Summary()
}

// Num is a number of result.json; null (an undefined value such as the E/PFA
// ratio without a PFA estimate) reads as NaN.
type Num float64

// UnmarshalJSON reads a number or null.
func (n *Num) UnmarshalJSON(b []byte) error {
	if string(b) == "null" {
		*n = Num(math.NaN())
		return nil
	}
	f, err := strconv.ParseFloat(string(b), 64)
	if err != nil || len(b) == 0 || !(b[0] == '-' || b[0] >= '0' && b[0] <= '9') {
		// The decoder adds the field's path to this error.
		return &json.UnmarshalTypeError{Value: jsonKind(b), Type: reflect.TypeFor[float64]()}
	}
	*n = Num(f)
	return nil
}

// jsonKind names the kind of a JSON value by its first byte.
func jsonKind(b []byte) string {
	switch {
	case len(b) == 0:
		return "nothing"
	case b[0] == '"':
		return "string"
	case b[0] == '{':
		return "object"
	case b[0] == '[':
		return "array"
	case b[0] == 't' || b[0] == 'f':
		return "bool"
	}
	return "number " + string(b)
}

// val returns the value of an optional number, NaN when absent.
func val(n *Num) float64 {
	if n == nil {
		return math.NaN()
	}
	return float64(*n)
}

// Load reads dir/result.json. Errors name the directory or the file and
// say what to do.
func Load(dir string) (*Result, error) {
	fi, err := os.Stat(dir)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return nil, fmt.Errorf("%s: no such directory; give the output directory of a run (it holds %s)", dir, ResultName)
	case err != nil:
		return nil, fmt.Errorf("reading %s: %w", dir, err)
	case !fi.IsDir():
		return nil, fmt.Errorf("%s is not a directory; give the output directory of a run (it holds %s)", dir, ResultName)
	}
	path := filepath.Join(dir, ResultName)
	data, err := os.ReadFile(path)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, fmt.Errorf("%s: not found; %s is not the output directory of a finished run (fluctus run JOB.yaml writes it)", path, dir)
	}
	if err != nil {
		return nil, fmt.Errorf("reading %s: %w", path, err)
	}
	return Decode(path, data)
}

// Decode parses the content of a result.json; name labels errors.
func Decode(name string, data []byte) (*Result, error) {
	var r Result
	dec := json.NewDecoder(bytes.NewReader(data))
	if err := dec.Decode(&r); err != nil {
		return nil, decodeError(name, data, err)
	}
	if err := r.check(); err != nil {
		return nil, fmt.Errorf("%s: %w; write it again with fluctus run", name, err)
	}
	return &r, nil
}

// decodeError places a JSON error at its line and column.
func decodeError(name string, data []byte, err error) error {
	const fix = "the file is damaged or not a result of fluctus run; run the job again"
	if len(bytes.TrimSpace(data)) == 0 {
		return fmt.Errorf("%s: the file is empty; %s", name, fix)
	}
	var syn *json.SyntaxError
	var typ *json.UnmarshalTypeError
	var off int64 = -1
	switch {
	case errors.As(err, &syn):
		off = syn.Offset
	case errors.Is(err, io.ErrUnexpectedEOF):
		off = int64(len(data))
		err = errors.New("the file ends in the middle of the data")
	case errors.As(err, &typ):
		err = fmt.Errorf("%s: a JSON %s where a %s belongs", typ.Field, typ.Value, typ.Type)
		if typ.Offset > 0 {
			off = typ.Offset
		}
	}
	if off < 0 {
		return fmt.Errorf("%s: %v; %s", name, err, fix)
	}
	line, col := 1, 1
	for _, c := range data[:min(int(off), len(data))] {
		if c == '\n' {
			line, col = line+1, 1
		} else {
			col++
		}
	}
	return fmt.Errorf("%s:%d:%d: %v; %s", name, line, col, err, fix)
}

// check rejects results the figures cannot be drawn from.
func (r *Result) check() error {
	if _, err := scatter.ParseUnit(r.Unit); err != nil {
		return fmt.Errorf("unit: %w", err)
	}
	if len(r.Points) == 0 {
		return errors.New("it has no sweep points")
	}
	return nil
}

// metresPerUnit returns the job's length unit in metres.
func (r *Result) metresPerUnit() float64 {
	u, _ := scatter.ParseUnit(r.Unit) // checked by Decode
	return float64(u)
}

// unitLabel returns the length unit for axis labels (µm for um).
func (r *Result) unitLabel() string {
	if r.Unit == "um" {
		return "µm"
	}
	return r.Unit
}

// angleSweep reports whether the points carry angles: the sweep turns the
// body, and figures are drawn against the angle.
func (r *Result) angleSweep() bool {
	for _, p := range r.Points {
		if p.AngleDeg != nil {
			return true
		}
	}
	return r.Sweep.By == "angles"
}

// has reports whether any point has the optional value f returns.
func (r *Result) has(f func(*Point) bool) bool {
	for i := range r.Points {
		if f(&r.Points[i]) {
			return true
		}
	}
	return false
}

func (r *Result) hasForce() bool {
	return r.has(func(p *Point) bool { return p.ForceN != nil || p.ForceAlongN != nil })
}

func (r *Result) hasStiffness() bool {
	return r.has(func(p *Point) bool { return p.StiffnessNPerM != nil })
}

func (r *Result) hasTorque() bool {
	return r.has(func(p *Point) bool { return p.TorqueNm != nil || p.TorqueAlongNm != nil })
}

func (r *Result) hasTorsionalStiffness() bool {
	return r.has(func(p *Point) bool { return p.TorsionalStiffness != nil })
}

// forceMode says how the force figures show a force vector.
type forceMode int

const (
	alongGiven forceMode = iota // the run wrote F·ê
	projected                   // F·ê from force_N and the sweep direction
	norm                        // |F|: no direction to project on
)

// forceAlong returns the force component along the sweep direction in N
// (NaN when the point has none) and how it was obtained.
func (r *Result) forceAlong(p *Point) (float64, forceMode) {
	if p.ForceAlongN != nil {
		return float64(*p.ForceAlongN), alongGiven
	}
	if p.ForceN == nil {
		return math.NaN(), alongGiven
	}
	return component(*p.ForceN, &r.Sweep.Direction)
}

// torqueAlong returns the torque along the sweep's axis in N m (NaN when
// the point has none) and how it was obtained.
func (r *Result) torqueAlong(p *Point) (float64, forceMode) {
	if p.TorqueAlongNm != nil {
		return float64(*p.TorqueAlongNm), alongGiven
	}
	if p.TorqueNm == nil {
		return math.NaN(), alongGiven
	}
	return component(*p.TorqueNm, r.Sweep.Axis)
}

// component projects v on the unit vector u, or returns the norm of v when
// u is missing or zero.
func component(v [3]Num, u *[3]float64) (float64, forceMode) {
	if u != nil {
		if n := math.Sqrt(u[0]*u[0] + u[1]*u[1] + u[2]*u[2]); n > 0 {
			return (float64(v[0])*u[0] + float64(v[1])*u[1] + float64(v[2])*u[2]) / n, projected
		}
	}
	return math.Sqrt(float64(v[0]*v[0] + v[1]*v[1] + v[2]*v[2])), norm
}

// forceModeOf returns how the forces of r are shown (the weakest mode any
// point needs).
func (r *Result) forceModeOf(along func(*Point) (float64, forceMode)) forceMode {
	m := alongGiven
	for i := range r.Points {
		if _, pm := along(&r.Points[i]); pm > m {
			m = pm
		}
	}
	return m
}
