package report

import (
	"math"
	"strconv"

	"github.com/fluctus/fluctus/cmd/internal/job"
	"github.com/fluctus/fluctus/scatter"
)

// Notice states the limits of every result; it ends every table and is the
// notice field of result.json.
const Notice = "Results are idealised: smooth, homogeneous, perfectly conducting bodies in vacuum " +
	"at the stated temperature, with no surface roughness, patch charges or humidity. " +
	"Keep margin in any design and defer to your own qualification practice and the applicable standards."

// Result is everything a run reports. Its JSON form is result.json.
type Result struct {
	Notice       string  `json:"notice"`
	Job          string  `json:"job"`
	Unit         string  `json:"unit"`
	TemperatureK float64 `json:"temperature_K"`
	Accuracy     float64 `json:"accuracy"`
	Unknowns     int     `json:"unknowns"`
	MatrixBytes  int64   `json:"matrix_bytes"`
	Bodies       []Body  `json:"bodies"`
	Sweep        Sweep   `json:"sweep"`
	Points       []Point `json:"points"`
}

// Body describes one body of the scene.
type Body struct {
	Name      string `json:"name"`
	Source    string `json:"source"` // mesh file or generated shape
	Triangles int    `json:"triangles"`
	Unknowns  int    `json:"unknowns"` // RWG functions (edges of the closed mesh)
}

// Sweep describes how the moving body was displaced.
type Sweep struct {
	Body      string     `json:"body"`
	Direction [3]float64 `json:"direction"` // unit vector
	By        string     `json:"by"`        // "gaps" or "offsets", as the job gave it
}

// Point is the result at one sweep point. Lengths in the job's unit,
// energies in J.
type Point struct {
	Gap          Float    `json:"gap"`
	Offset       [3]Float `json:"offset"`
	EnergyJ      Float    `json:"energy_J"`
	EnergyErrorJ Float    `json:"energy_error_J"`
	PFAEnergyJ   Float    `json:"pfa_energy_J"` // mean of the two PFA estimates
	PFAMovingJ   Float    `json:"pfa_moving_J"` // PFA from the moving body's panels
	PFAFixedJ    Float    `json:"pfa_fixed_J"`  // PFA from the other bodies' panels
	RatioPFA     Float    `json:"ratio_pfa"`    // energy_J / pfa_energy_J
	Samples      []Sample `json:"samples"`
}

// Sample is one evaluation of the frequency integrand.
type Sample struct {
	KappaPerUnit Float `json:"kappa_per_unit"` // imaginary wavenumber κ, 1/(job unit)
	Integrand    Float `json:"integrand"`      // ln det[M(κ) M_∞(κ)⁻¹], dimensionless
}

// Float is a float64 whose JSON form is null when it is NaN or infinite
// (JSON has no such numbers), e.g. the E/PFA ratio when the PFA is zero.
type Float float64

// MarshalJSON writes f in the shortest form that reads back exactly.
func (f Float) MarshalJSON() ([]byte, error) {
	x := float64(f)
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, x, 'g', -1, 64), nil
}

// New assembles the result of a run of scene s with cost c from the
// solver's points (one per sweep point, in sweep order; lengths in L0,
// energies in ħc/L0).
func New(s *job.Scene, c scatter.Cost, points []scatter.Point) *Result {
	j := s.Job
	u := j.Unit
	r := &Result{
		Notice:       Notice,
		Job:          j.Path,
		Unit:         u.Name(),
		TemperatureK: j.Temperature,
		Accuracy:     j.Accuracy,
		Unknowns:     c.Unknowns,
		MatrixBytes:  c.MatrixBytes,
		Sweep: Sweep{
			Body:      j.Bodies[s.Sweep.Body].Name,
			Direction: [3]float64{s.Sweep.Direction.X, s.Sweep.Direction.Y, s.Sweep.Direction.Z},
			By:        "offsets",
		},
	}
	if len(j.Sweep.Gaps) > 0 {
		r.Sweep.By = "gaps"
	}
	for i, b := range s.Bodies {
		st := b.Mesh.Stats()
		r.Bodies = append(r.Bodies, Body{
			Name:      b.Name,
			Source:    j.Bodies[i].Source(),
			Triangles: st.Triangles,
			Unknowns:  st.Edges,
		})
	}
	for _, p := range points {
		q := Point{
			Gap:          Float(p.Gap),
			Offset:       [3]Float{plusZero(p.Offset.X), plusZero(p.Offset.Y), plusZero(p.Offset.Z)},
			EnergyJ:      Float(u.Joules(p.Energy)),
			EnergyErrorJ: Float(u.Joules(p.EnergyError)),
			PFAEnergyJ:   Float(u.Joules(p.PFA.Mean)),
			PFAMovingJ:   Float(u.Joules(p.PFA.FromMoving)),
			PFAFixedJ:    Float(u.Joules(p.PFA.FromFixed)),
			RatioPFA:     Float(ratio(p.Energy, p.PFA.Mean)),
			Samples:      make([]Sample, len(p.Samples)),
		}
		for k, smp := range p.Samples {
			q.Samples[k] = Sample{KappaPerUnit: Float(smp.Kappa), Integrand: Float(smp.Value)}
		}
		r.Points = append(r.Points, q)
	}
	return r
}

// plusZero returns x with a negative zero (from scaling a direction with
// zero components) made positive, so that files never show "-0".
func plusZero(x float64) Float {
	if x == 0 {
		return 0
	}
	return Float(x)
}

// ratio returns a/b, NaN when b is zero.
func ratio(a, b float64) float64 {
	if b == 0 {
		return math.NaN()
	}
	return a / b
}
