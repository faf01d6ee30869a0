package report

import (
	"fmt"
	"math"

	"github.com/fluctus/fluctus/cmd/internal/converge"
	"github.com/fluctus/fluctus/cmd/internal/job"
)

// Convergence is a mesh-convergence study: the job run at two or three mesh
// levels, and per point the values at each level with their Richardson
// extrapolation (package converge).
type Convergence struct {
	Levels []Level `json:"levels"`
	// OrderAssumed: with two levels the order is not observed but taken as
	// converge.AssumedOrder.
	OrderAssumed bool               `json:"order_assumed"`
	Note         string             `json:"note"`
	Points       []ConvergencePoint `json:"points"`
}

// Level is one mesh level of a convergence study.
type Level struct {
	MeshScale float64 `json:"mesh_scale"` // factor on every mesh size of the job
	// MeshH is the mean triangle size sqrt(area/triangles) over all bodies
	// (job unit), the h of the extrapolation.
	MeshH     Float `json:"mesh_h"`
	Triangles []int `json:"triangles"` // per body
	Unknowns  int   `json:"unknowns"`
}

// ConvergencePoint holds one sweep point at every level, in level order
// (coarsest first).
type ConvergencePoint struct {
	Gap                 Float   `json:"gap"` // at the finest level
	AngleDeg            *Float  `json:"angle_deg,omitempty"`
	EnergyJ             []Float `json:"energy_J"`
	ExtrapolatedEnergyJ Float   `json:"extrapolated_energy_J"` // null: no monotone convergence
	EnergyOrder         Float   `json:"energy_order"`          // observed (or assumed) p
	EnergyErrorJ        Float   `json:"energy_discretisation_error_J"`
	// The load along the sweep: F·ê (N) for gap and offset sweeps, τ·n
	// (N m) for angle sweeps, when the run has forces.
	Load             []Float `json:"load,omitempty"`
	LoadName         string  `json:"load_name,omitempty"` // "force_along_N" or "torque_along_Nm"
	ExtrapolatedLoad *Float  `json:"extrapolated_load,omitempty"`
	LoadOrder        *Float  `json:"load_order,omitempty"`
	LoadError        *Float  `json:"load_discretisation_error,omitempty"`
}

// NewConvergence builds the study from the results of each level (coarsest
// first), with the level descriptions. The results must have the same
// sweep points.
func NewConvergence(levels []Level, results []*Result) (*Convergence, error) {
	c := &Convergence{Levels: levels, OrderAssumed: len(levels) == 2}
	h := make([]float64, len(levels))
	for i, l := range levels {
		h[i] = float64(l.MeshH)
	}
	switch {
	case c.OrderAssumed:
		c.Note = "two levels: the order of convergence is assumed to be p = 2 (error ∝ h²), not observed; run three levels to observe it"
	default:
		c.Note = "three levels: the order p is observed from the three values; an order far from 2, or none (null), means the meshes are not yet in the asymptotic range, so trust the finest level only to within its difference from the others"
	}
	finest := results[len(results)-1]
	for k, fp := range finest.Points {
		if fp.AddedFor != "" {
			continue // computed at the finest level only
		}
		for i, r := range results {
			if k >= len(r.Points) {
				return nil, fmt.Errorf("level %d has %d points, the finest level %d", i+1, len(r.Points), len(finest.Points))
			}
		}
		cp := ConvergencePoint{Gap: fp.Gap, AngleDeg: fp.AngleDeg}
		energies := make([]float64, len(results))
		for i, r := range results {
			energies[i] = float64(r.Points[k].EnergyJ)
			cp.EnergyJ = append(cp.EnergyJ, r.Points[k].EnergyJ)
		}
		est, err := converge.Richardson(h, energies)
		if err != nil {
			return nil, err
		}
		cp.ExtrapolatedEnergyJ, cp.EnergyOrder, cp.EnergyErrorJ = Float(est.Value), Float(est.Order), Float(est.Error)
		if finest.Forces {
			loads := make([]float64, len(results))
			cp.LoadName = "force_along_N"
			if finest.kind == job.ByAngles {
				cp.LoadName = "torque_along_Nm"
			}
			for i, r := range results {
				p := r.Points[k]
				v := math.NaN()
				if finest.kind == job.ByAngles && p.TorqueAlongNm != nil {
					v = float64(*p.TorqueAlongNm)
				} else if p.ForceAlongN != nil {
					v = float64(*p.ForceAlongN)
				}
				loads[i] = v
				cp.Load = append(cp.Load, Float(v))
			}
			if est, err := converge.Richardson(h, loads); err == nil {
				cp.ExtrapolatedLoad, cp.LoadOrder, cp.LoadError = ptr(est.Value), ptr(est.Order), ptr(est.Error)
			} else {
				cp.ExtrapolatedLoad, cp.LoadOrder, cp.LoadError = ptr(math.NaN()), ptr(math.NaN()), ptr(math.NaN())
			}
		}
		c.Points = append(c.Points, cp)
	}
	return c, nil
}
