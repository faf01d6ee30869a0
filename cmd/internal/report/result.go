package report

import (
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/cmd/internal/job"
	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/scatter/material"
	"github.com/fluctus/fluctus/scatter/sticking"
)

// Notice states the limits of every result; it ends every table and is the
// notice field of result.json.
const Notice = "Results are idealised: smooth, homogeneous, perfectly conducting bodies in vacuum " +
	"at the stated temperature, with no surface roughness, patch charges or humidity. " +
	"Keep margin in any design and defer to your own qualification practice and the applicable standards."

// NoticeFor returns the idealisation notice of a run of job j: Notice
// when every body is a perfect conductor, otherwise the same limits for
// bodies of the job's material models, with the n = 0 Matsubara treatment
// at T > 0.
func NoticeFor(j *job.Job) string {
	if !j.RealMaterials() {
		return Notice
	}
	n := "Results are idealised: smooth, homogeneous bodies of the stated material models (" + j.MaterialSummary() +
		") in vacuum at the stated temperature, with no surface roughness, patch charges or humidity; the models only approximate the optical response of real surfaces"
	if z := j.ZeroFrequency(); z != "" {
		n += "; at T > 0 the result depends on the model of the static limit: " + z
	}
	return n + ". Keep margin in any design and defer to your own qualification practice and the applicable standards."
}

// Modes of a run, the mode field of result.json.
const (
	ModeSolver  = "solver"   // the boundary-element solver
	ModePFAOnly = "pfa-only" // proximity-force estimates only
)

// AddedForSticking marks points computed for the sticking analysis.
const AddedForSticking = "sticking"

// Result is everything a run reports. Its JSON form is result.json.
type Result struct {
	Notice       string  `json:"notice"`
	Job          string  `json:"job"`
	Mode         string  `json:"mode"` // ModeSolver or ModePFAOnly
	Unit         string  `json:"unit"`
	TemperatureK float64 `json:"temperature_K"`
	Accuracy     float64 `json:"accuracy"`
	// Forces: the points carry forces, torques and stiffnesses.
	Forces      bool   `json:"forces"`
	Unknowns    int    `json:"unknowns"`
	MatrixBytes int64  `json:"matrix_bytes"`
	Bodies      []Body `json:"bodies"`
	Sweep       Sweep  `json:"sweep"`
	// Substrate is the conducting plane under the scene, if any.
	Substrate *Plane `json:"substrate,omitempty"`
	// With real materials: Materials lists each body's material,
	// ZeroFrequency states the n = 0 Matsubara treatment at T > 0 and
	// PFALaw the plate law of the PFA estimates. All empty when every body
	// is a perfect conductor.
	Materials     string  `json:"materials,omitempty"`
	ZeroFrequency string  `json:"zero_frequency,omitempty"`
	PFALaw        string  `json:"pfa_law,omitempty"`
	Points        []Point `json:"points"`
	// Sticking is the analysis of the moving body on its spring, if the job
	// gives one.
	Sticking *Sticking `json:"sticking,omitempty"`
	// Convergence is the mesh-convergence study of a --convergence run.
	Convergence *Convergence `json:"convergence,omitempty"`

	// kind is the job's sweep kind, for the table.
	kind job.SweepKind
}

// Body describes one body of the scene.
type Body struct {
	Name      string `json:"name"`
	Source    string `json:"source"` // mesh file or generated shape
	Triangles int    `json:"triangles"`
	Unknowns  int    `json:"unknowns"` // RWG functions (edges of the closed mesh)
	// Material and MaterialKind (dielectric, drude, plasma or perfect) are
	// set for every body when some body has a real material.
	Material     string `json:"material,omitempty"`
	MaterialKind string `json:"material_kind,omitempty"`
}

// Sweep describes how the moving body was displaced.
type Sweep struct {
	Body      string     `json:"body"`
	Direction [3]float64 `json:"direction"` // unit approach direction ê
	By        string     `json:"by"`        // "gaps", "offsets" or "angles", as the job gave it
	// Axis is the unit rotation axis n of an angle sweep.
	Axis *[3]float64 `json:"axis,omitempty"`
	// TorqueAbout is the point torques are taken about, fixed to the moving
	// body, at its reference placement (job unit); for an angle sweep the
	// rotation point.
	TorqueAbout [3]Float `json:"torque_about"`
}

// Plane is an infinite plane through Point (job unit) with unit Normal
// pointing to the side of the bodies.
type Plane struct {
	Point  [3]float64 `json:"point"`
	Normal [3]float64 `json:"normal"`
}

// Point is the result at one sweep point. Lengths in the job's unit,
// energies in J, forces in N, torques in N m. Optional values are left out
// when the run did not compute them.
type Point struct {
	Gap          Float    `json:"gap"`
	Offset       [3]Float `json:"offset"`
	AngleDeg     *Float   `json:"angle_deg,omitempty"` // angle sweeps
	EnergyJ      Float    `json:"energy_J"`
	EnergyErrorJ Float    `json:"energy_error_J"`
	PFAEnergyJ   Float    `json:"pfa_energy_J"` // mean of the two PFA estimates
	PFAMovingJ   Float    `json:"pfa_moving_J"` // PFA from the moving body's panels
	PFAFixedJ    Float    `json:"pfa_fixed_J"`  // PFA from the other bodies' panels
	RatioPFA     Float    `json:"ratio_pfa"`    // energy_J / pfa_energy_J

	ForceN      *[3]Float `json:"force_N,omitempty"`       // on the moving body
	ForceAlongN *Float    `json:"force_along_N,omitempty"` // F·ê, > 0 for an attraction
	ForceErrorN *Float    `json:"force_error_N,omitempty"` // norm of the vector error
	PFAForceN   *Float    `json:"pfa_force_N,omitempty"`   // -dE_PFA/ds along ê
	RatioForce  *Float    `json:"ratio_force_pfa,omitempty"`

	TorqueNm      *[3]Float `json:"torque_Nm,omitempty"`       // about the torque point
	TorqueAlongNm *Float    `json:"torque_along_Nm,omitempty"` // τ·n (angle sweeps)
	TorqueErrorNm *Float    `json:"torque_error_Nm,omitempty"`

	// StiffnessNPerM is -d(F·ê)/ds (gap and offset sweeps): negative when
	// the attraction grows as the body advances.
	StiffnessNPerM      *Float `json:"stiffness_N_per_m,omitempty"`
	StiffnessErrorNPerM *Float `json:"stiffness_error_N_per_m,omitempty"`
	// TorsionalStiffness is -d(τ·n)/dθ (angle sweeps).
	TorsionalStiffness      *Float `json:"torsional_stiffness_Nm_per_rad,omitempty"`
	TorsionalStiffnessError *Float `json:"torsional_stiffness_error_Nm_per_rad,omitempty"`

	// AddedFor names the analysis a point was computed for (AddedForSticking);
	// empty for the job's own sweep points.
	AddedFor string `json:"added_for,omitempty"`

	// BlockRanks tells how each interaction block was handled: the largest
	// rank where it was compressed, how many frequency evaluations were
	// compressed or dense, and how many of the compressed ones went through
	// the sweep's shared basis.
	BlockRanks []BlockRank `json:"block_ranks,omitempty"`

	Samples []Sample `json:"samples"`
}

// BlockRank is the handling of one interaction block between two bodies.
type BlockRank struct {
	Rows       string `json:"rows"`
	Cols       string `json:"cols"`
	Rank       int    `json:"max_rank"`
	Compressed int    `json:"compressed"`
	Dense      int    `json:"dense"`
	ViaBasis   int    `json:"via_sweep_basis"`
	// ViaSamples counts the evaluations through the basis that needed only
	// a sampled sub-block of the interaction block.
	ViaSamples int `json:"via_basis_samples"`
}

// Sample is one evaluation of the frequency integrand.
type Sample struct {
	KappaPerUnit Float `json:"kappa_per_unit"` // imaginary wavenumber κ, 1/(job unit)
	Integrand    Float `json:"integrand"`      // ln det[M(κ) M_∞(κ)⁻¹], dimensionless
}

// Sticking is the sticking analysis: the sticking.Report (positions in m, or
// in rad from contact for a torsional spring; loads in N or N m) with its
// summary and the load samples it rests on.
type Sticking struct {
	sticking.Report
	Summary string            `json:"summary"`
	Samples []sticking.Sample `json:"samples"`
	// Position says what x is: "gap_m" or "angle_from_contact_rad".
	Position string `json:"position"`
	// ContactAngleDeg is the sweep angle at which the body touches (angle
	// sweeps), from which x is measured.
	ContactAngleDeg *Float `json:"contact_angle_deg,omitempty"`
	// Rounds of refinement run, and whether the last analysis asked for no
	// more points.
	Rounds    int  `json:"refinement_rounds"`
	Converged bool `json:"converged"`
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
// energies in ħc/L0, forces in ħc/L0², torques in ħc/L0, stiffnesses in
// ħc/L0³ or ħc/L0 per radian).
func New(s *job.Scene, c scatter.Cost, points []scatter.Point) *Result {
	r := header(s, c, s.Job.Forces)
	r.Add(s, points, "")
	return r
}

// header returns the result of scene s without points.
func header(s *job.Scene, c scatter.Cost, forces bool) *Result {
	j := s.Job
	r := &Result{
		Notice:       NoticeFor(j),
		Job:          j.Path,
		Mode:         ModeSolver,
		Unit:         j.Unit.Name(),
		TemperatureK: j.Temperature,
		Accuracy:     j.Accuracy,
		Forces:       forces,
		Unknowns:     c.Unknowns,
		MatrixBytes:  c.MatrixBytes,
		Sweep: Sweep{
			Body:        j.Bodies[s.Sweep.Body].Name,
			Direction:   [3]float64{s.Sweep.Direction.X, s.Sweep.Direction.Y, s.Sweep.Direction.Z},
			By:          string(j.Sweep.Kind()),
			TorqueAbout: vec(s.Sweep.Centre),
		},
		kind: j.Sweep.Kind(),
	}
	if rot := j.Sweep.Rotate; rot != nil {
		r.Sweep.Axis = &[3]float64{rot.Axis.X, rot.Axis.Y, rot.Axis.Z}
	}
	if p := s.Substrate; p != nil {
		r.Substrate = &Plane{Point: [3]float64{p.Point.X, p.Point.Y, p.Point.Z}, Normal: [3]float64{p.Normal.X, p.Normal.Y, p.Normal.Z}}
	}
	withMaterials := j.RealMaterials()
	for i, b := range s.Bodies {
		st := b.Mesh.Stats()
		rb := Body{
			Name:      b.Name,
			Source:    j.Bodies[i].Source(),
			Triangles: st.Triangles,
			Unknowns:  st.Edges,
		}
		if withMaterials {
			rb.Material, rb.MaterialKind = j.Bodies[i].MaterialName(), material.KindPerfect.String()
			if b.Material != nil {
				rb.MaterialKind = material.KindOf(b.Material).String()
			}
		}
		r.Bodies = append(r.Bodies, rb)
	}
	if withMaterials {
		r.Materials = j.MaterialSummary()
		r.ZeroFrequency = j.ZeroFrequency()
		r.PFALaw = "the Lifshitz energy per area of the two facing materials"
		if j.Temperature > 0 {
			r.PFALaw += fmt.Sprintf(" (the free energy at %g K)", j.Temperature)
		}
		r.PFALaw += " in place of Casimir's -π²ħc/(720 d³)"
		if s.Substrate != nil {
			r.PFALaw += "; the substrate is a perfect conductor"
		}
		if s.Plates != nil {
			r.PFALaw += fmt.Sprintf("; tabulated as η(d) = E_Lifshitz/E_Casimir on a grid in ln d and interpolated (estimated error %.1g relative)", s.Plates.InterpolationError)
		}
	}
	return r
}

// Add appends points computed for the scene s, marked as added for the
// named analysis (empty for the job's own points).
func (r *Result) Add(s *job.Scene, points []scatter.Point, addedFor string) {
	for _, p := range points {
		q := point(s, p, r.Forces)
		q.AddedFor = addedFor
		r.Points = append(r.Points, q)
	}
}

// NewPFA assembles the result of a PFA-only run: the estimates at every
// sweep point (ħc/L0, forces ħc/L0²) with the points' gaps (L0). The exact
// energies are left undefined (null).
func NewPFA(s *job.Scene, estimates []scatter.PFA, gaps []float64) *Result {
	points := make([]scatter.Point, len(estimates))
	for i, e := range estimates {
		points[i] = scatter.Point{Offset: s.Sweep.Offsets[i], Gap: gaps[i], PFA: e,
			Energy: math.NaN(), EnergyError: math.NaN()}
		if len(s.Sweep.Turns) > 0 {
			points[i].Turn = s.Sweep.Turns[i]
		}
	}
	r := header(s, scatter.Cost{}, false)
	r.Mode = ModePFAOnly
	r.Add(s, points, "")
	if s.Job.Forces {
		for i, e := range estimates {
			r.Points[i].PFAForceN = ptr(s.Job.Unit.Newtons(e.Force))
		}
	}
	return r
}

// point converts one solver point.
func point(s *job.Scene, p scatter.Point, forces bool) Point {
	j := s.Job
	u := j.Unit
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
	for _, r := range p.Ranks {
		q.BlockRanks = append(q.BlockRanks, BlockRank{Rows: r.Rows, Cols: r.Cols, Rank: r.Rank, Compressed: r.Compressed, Dense: r.Dense, ViaBasis: r.Basis, ViaSamples: r.Sampled})
	}
	angles := j.Sweep.Kind() == job.ByAngles
	if angles {
		q.AngleDeg = ptr(p.Turn.Angle * 180 / math.Pi)
	}
	if !forces {
		return q
	}
	e := s.Sweep.Direction
	if l := r3.Norm(e); l > 0 {
		e = r3.Scale(1/l, e)
	}
	f := vec(r3.Vec{X: u.Newtons(p.Force.X), Y: u.Newtons(p.Force.Y), Z: u.Newtons(p.Force.Z)})
	t := vec(r3.Vec{X: u.NewtonMetres(p.Torque.X), Y: u.NewtonMetres(p.Torque.Y), Z: u.NewtonMetres(p.Torque.Z)})
	along := r3.Dot(p.Force, e)
	q.ForceN, q.TorqueNm = &f, &t
	q.ForceAlongN = ptr(u.Newtons(along))
	q.ForceErrorN = ptr(u.Newtons(p.ForceError))
	q.TorqueErrorNm = ptr(u.NewtonMetres(p.TorqueError))
	q.PFAForceN = ptr(u.Newtons(p.PFA.Force))
	q.RatioForce = ptr(ratio(along, p.PFA.Force))
	if angles {
		n := j.Sweep.Rotate.Axis
		q.TorqueAlongNm = ptr(u.NewtonMetres(r3.Dot(p.Torque, n)))
		// ħc/L0 per radian is a torque per radian.
		q.TorsionalStiffness = ptr(u.NewtonMetres(p.Stiffness))
		q.TorsionalStiffnessError = ptr(u.NewtonMetres(p.StiffnessError))
	} else {
		q.StiffnessNPerM = ptr(u.NewtonsPerMetre(p.Stiffness))
		q.StiffnessErrorNPerM = ptr(u.NewtonsPerMetre(p.StiffnessError))
	}
	return q
}

// ptr returns a pointer to x as a Float.
func ptr(x float64) *Float {
	f := Float(x)
	return &f
}

// vec converts a vector, with negative zeros made positive.
func vec(v r3.Vec) [3]Float { return [3]Float{plusZero(v.X), plusZero(v.Y), plusZero(v.Z)} }

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

// SetSticking records the sticking analysis: the report, the samples it
// used, the refinement rounds run and whether they converged; contactDeg is
// the contact angle of an angle sweep (NaN otherwise).
func (r *Result) SetSticking(rep sticking.Report, samples []sticking.Sample, rounds int, converged bool, contactDeg float64) {
	st := &Sticking{Report: rep, Summary: rep.Summary(), Samples: samples, Position: "gap_m", Rounds: rounds, Converged: converged}
	if rep.Torsional {
		st.Position = "angle_from_contact_rad"
		st.ContactAngleDeg = ptr(contactDeg)
	}
	if st.Samples == nil {
		st.Samples = []sticking.Sample{}
	}
	r.Sticking = st
}
