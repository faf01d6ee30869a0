package scatter

import (
	"fmt"
	"slices"
)

// WorkUnit is one finished work unit of a run: the value vector of the
// integrand at one sweep point and one imaginary wavenumber (a node of the
// point's frequency rule, or a Matsubara frequency, or one of the small
// wavenumbers of the n = 0 extrapolation).
//
// Values holds ln det[M M_∞^-1] (dimensionless), then with Settings.Forces
// its six derivatives (as Sample.Gradient), then with Settings.Stiffness the
// derivative of the displacement gradient along the sweep direction. A run
// with the same bodies, sweep and settings computes the same units at
// exactly the same wavenumbers, so a unit is identified by (Point, Kappa).
type WorkUnit struct {
	Point  int     // index into Sweep.Offsets
	Kappa  float64 // 1/L0
	Values []float64
	// Ranks records how the unit's interaction blocks were handled (see
	// Point.Ranks), so that a resumed run reports them as a whole one.
	Ranks []BlockRank
}

// A Store keeps the finished units of a run so that an interrupted run can
// resume, or the points of a sweep can be computed by several runs and
// combined. The runner asks Load before evaluating a unit and calls Save
// after evaluating one; Load's values must be exactly those saved (every
// bit), which makes a resumed run give the same results as an uninterrupted
// one. Both are called from one goroutine at a time.
type Store interface {
	// Load returns the values of the unit (point, kappa) if the store has
	// it.
	Load(point int, kappa float64) (u WorkUnit, ok bool)
	// Save records a finished unit; an error stops the run.
	Save(u WorkUnit) error
}

// checkPoints validates Settings.Points against a sweep of n points.
func checkPoints(points []int, n int) error {
	for _, p := range points {
		if p < 0 || p >= n {
			return fmt.Errorf("scatter: Settings.Points holds point %d, outside the sweep's 0..%d", p, n-1)
		}
	}
	return nil
}

// owns reports whether this run computes point p (Settings.Points).
func (r *runner) owns(p int) bool {
	return r.set.Points == nil || slices.Contains(r.set.Points, p)
}

// loadStored fills the requests the store already holds, records their
// samples, and returns the requests left to evaluate.
func (r *runner) loadStored(reqs []request) []request {
	if r.set.Store == nil {
		return reqs
	}
	left := reqs[:0:0]
	for _, rq := range reqs {
		u, ok := r.set.Store.Load(rq.p, rq.kappa)
		if !ok || len(u.Values) != len(rq.dst) {
			left = append(left, rq)
			continue
		}
		copy(rq.dst, u.Values)
		r.pts[rq.p].Ranks = mergeRanks(r.pts[rq.p].Ranks, u.Ranks)
		r.addSample(rq)
	}
	return left
}

// save records the evaluated request, whose blocks were handled as ranks
// says, in the store.
func (r *runner) save(rq request, ranks []BlockRank) error {
	if r.set.Store == nil {
		return nil
	}
	u := WorkUnit{Point: rq.p, Kappa: rq.kappa, Values: append([]float64(nil), rq.dst...), Ranks: append([]BlockRank(nil), ranks...)}
	if err := r.set.Store.Save(u); err != nil {
		return fmt.Errorf("sweep point %d, κ = %g: saving the checkpoint: %w", rq.p+1, rq.kappa, err)
	}
	return nil
}

// addSample records the integrand of a finished request at its point and
// counts it as done.
func (r *runner) addSample(rq request) {
	smp := Sample{Kappa: rq.kappa, Value: rq.dst[qLogDet]}
	if r.set.Forces || r.set.Stiffness {
		copy(smp.Gradient[:], rq.dst[qGrad:qGrad+6])
	}
	r.pts[rq.p].Samples = append(r.pts[rq.p].Samples, smp)
	r.done++
	r.progress()
}
