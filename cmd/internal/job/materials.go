package job

import (
	"context"
	"fmt"
	"strings"

	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/scatter/material"
)

// MakePlates tabulates the Lifshitz energy per area of the scene's
// materials (scatter.PlateTable) for the PFA baseline, over every gap a PFA
// sum of the scene's sweep can meet (scatter.PlateGapRange, gaps being the
// closest distances of the sweep points, L0), so that the solver can use the
// same table. It does nothing when every body is a perfect conductor: the
// PFA then keeps Casimir's law exactly.
func (s *Scene) MakePlates(ctx context.Context, gaps []float64) error {
	s.Plates = nil
	if !s.RealMaterials() || len(gaps) == 0 {
		return nil
	}
	dMin, dMax := scatter.PlateGapRange(s.Bodies, s.Sweep, gaps)
	if !(dMin > 0) {
		return fmt.Errorf("%s: PFA with materials: smallest gap %g: want a gap > 0", s.Job.Path, 2*dMin)
	}
	t, err := scatter.NewPlateTable(ctx, s.Bodies, s.Substrate != nil, s.Job.Unit, s.Job.Temperature, dMin, dMax)
	if err != nil {
		return fmt.Errorf("%s: %w", s.Job.Path, err)
	}
	s.Plates = t
	return nil
}

// RealMaterials reports whether some body of the scene is not a perfect
// conductor.
func (s *Scene) RealMaterials() bool {
	for _, b := range s.Bodies {
		if b.Material != nil && material.KindOf(b.Material) != material.KindPerfect {
			return true
		}
	}
	return false
}

// PFAOptions returns the options of scatter.PFAEnergy for the scene: the
// Lifshitz law of its materials once MakePlates has made it, none when
// every body is a perfect conductor.
func (s *Scene) PFAOptions() []scatter.PFAOption {
	if s.Plates == nil {
		return nil
	}
	return []scatter.PFAOption{scatter.WithPlateLaw(s.Plates.Energy)}
}

// MaterialSummary describes the materials of the job in one line, e.g.
// "ball: gold-drude (drude); pad: perfect", or "" when every body is a
// perfect conductor.
func (j *Job) MaterialSummary() string {
	if !j.RealMaterials() {
		return ""
	}
	var parts []string
	for i := range j.Bodies {
		b := &j.Bodies[i]
		switch {
		case b.Material != nil:
			parts = append(parts, fmt.Sprintf("%s: %s (%s)", b.Name, b.MaterialName(), material.KindOf(b.Material)))
		case b.materialSpec != nil: // a table not read yet
			parts = append(parts, fmt.Sprintf("%s: %s", b.Name, b.MaterialName()))
		default:
			parts = append(parts, b.Name+": perfect conductor")
		}
	}
	return strings.Join(parts, "; ")
}

// ZeroFrequency describes the n = 0 Matsubara term of the job's materials
// at T > 0 — Drude metals without their TE contribution, plasma metals
// with it — e.g. "the n = 0 Matsubara term follows the Drude model for ball
// (no TE contribution)"; it returns "" at T = 0 or without real materials.
func (j *Job) ZeroFrequency() string {
	if j.Temperature == 0 || !j.RealMaterials() {
		return ""
	}
	kinds := map[material.Kind][]string{}
	for i := range j.Bodies {
		b := &j.Bodies[i]
		if b.Material != nil {
			k := material.KindOf(b.Material)
			kinds[k] = append(kinds[k], b.Name)
		}
	}
	var parts []string
	if n := kinds[material.KindDrude]; len(n) > 0 {
		parts = append(parts, fmt.Sprintf("the Drude model for %s (no TE contribution)", strings.Join(n, ", ")))
	}
	if n := kinds[material.KindPlasma]; len(n) > 0 {
		parts = append(parts, fmt.Sprintf("the plasma model for %s (TE reflection kept)", strings.Join(n, ", ")))
	}
	if n := kinds[material.KindDielectric]; len(n) > 0 {
		parts = append(parts, fmt.Sprintf("the static permittivity eps(0) for %s", strings.Join(n, ", ")))
	}
	if len(parts) == 0 {
		return ""
	}
	return "the n = 0 Matsubara term follows " + strings.Join(parts, ", ")
}
