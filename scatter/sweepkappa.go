package scatter

import (
	"math"
	"sort"
)

// sweepBand is the largest ratio of the frequency scales of the points that
// share one κc.
const sweepBand = 4

// sweepKappaScales returns κc of the map κ = κc t/(1-t) for every point,
// given the smallest gap of the scene at each point (L0). A point alone
// would take κc ≈ 2/gap; points sharing one κc share every κ node of the
// nested Fejér rules, and with them the self blocks (assembled and factored
// once per κ, the dominant cost of a sweep once the interaction blocks are
// compressed). The points are sorted by gap and cut into bands no wider
// than a factor sweepBand; a band takes the power of two nearest to
// 2/sqrt(gap_min gap_max), so that no point's κc is off by more than a
// factor 2√2 from its own 2/gap. The integrand decays like exp(-2κd) and
// the map only changes how fast the Fejér rules converge, not what they
// converge to: with the factor bounded the node counts grow little
// (TestSweepKappaScale measures it). κc depends on the gaps of all points
// of the sweep, not on which of them a run computes, so shards of one sweep
// integrate a point alike.
func sweepKappaScales(gaps []float64) []float64 {
	idx := make([]int, len(gaps))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(i, j int) bool { return gaps[idx[i]] < gaps[idx[j]] })
	kc := make([]float64, len(gaps))
	for lo := 0; lo < len(idx); {
		hi := lo + 1
		for hi < len(idx) && gaps[idx[hi]] <= sweepBand*gaps[idx[lo]] {
			hi++
		}
		c := dyadic(2 / math.Sqrt(gaps[idx[lo]]*gaps[idx[hi-1]]))
		for _, i := range idx[lo:hi] {
			kc[i] = c
		}
		lo = hi
	}
	return kc
}
