package sticking

import (
	"fmt"
	"math"
	"slices"
)

// Spring is the suspension of the body.
type Spring struct {
	Stiffness float64 // k: N/m, or N m/rad when Torsional; > 0
	Rest      float64 // x0, the position without load: gap in m, or angle from contact in rad
	Torsional bool    // a rotation: x is an angle and the load a torque (see the package documentation)
}

// Verdict is the plain answer of Analyse.
type Verdict string

const (
	// Free: released at its rest position the body settles at a stable
	// equilibrium inside the sampled range.
	Free Verdict = "free"
	// Sticks: there is no stable equilibrium between the rest position and
	// the lower end of the samples, and the attraction there is already
	// stiffer than the spring, so the body collapses onto its neighbour. A
	// spring exactly at the pull-in limit (a degenerate equilibrium) counts
	// as sticking: it has no margin.
	Sticks Verdict = "sticks"
	// Undetermined: no equilibrium in the sampled range, but at its lower end
	// the spring is still stiffer than the attraction, so an equilibrium may
	// lie below the samples. Report.ExtrapolatedVerdict gives the answer of a
	// power-law continuation; compute the load at smaller x to decide.
	Undetermined Verdict = "undetermined"
)

// Location tells where a critical point lies relative to the samples.
type Location string

const (
	Sampled    Location = "sampled"     // inside the sampled range: interpolated
	BelowRange Location = "below_range" // below the smallest sampled x
	AboveRange Location = "above_range" // above the largest sampled x
)

// Report is the result of Analyse. Positions are in the unit of x (m or rad),
// loads in N (N m), stiffnesses in N/m (N m/rad). It has no NaN or infinite
// values, so it marshals to JSON as is.
type Report struct {
	Stiffness    float64    `json:"stiffness"`     // k of the spring analysed
	Rest         float64    `json:"rest"`          // x0 of the spring analysed
	Torsional    bool       `json:"torsional"`     // x is an angle, the load a torque
	SampledRange [2]float64 `json:"sampled_range"` // [lo, hi] of the samples
	LogLog       bool       `json:"log_log"`       // the interpolation was log–log

	// Equilibria are all solutions of k (x0 - x) = L(x) in [lo, x0], ordered
	// from the rest position towards contact.
	Equilibria []Equilibrium `json:"equilibria"`
	// PullIn is where this spring loses its equilibrium: dL/dx = -k.
	PullIn PullIn `json:"pull_in"`
	// MinStiffness is the smallest k that keeps the rest position x0 stable;
	// At is the tangency point x_t where that spring would pull in.
	MinStiffness Limit `json:"min_stiffness"`
	// MinRest is the smallest rest position this k holds, x0_crit =
	// x* + L(x*)/k; At is the pull-in point x*.
	MinRest Limit `json:"min_rest"`

	Verdict Verdict `json:"verdict"`
	// ExtrapolatedVerdict is set when Verdict is Undetermined: Free or Sticks
	// according to a power-law continuation below the samples.
	ExtrapolatedVerdict Verdict `json:"extrapolated_verdict,omitempty"`
	// Settled is the stable equilibrium the body settles at when Verdict is
	// Free (the first entry of Equilibria that is stable), else zero.
	Settled float64 `json:"settled"`
	Margin  Margin  `json:"margin"`

	// InterpolationError is the largest relative error estimate of the load
	// or its slope (Curve.ErrorEstimate) at the sampled points the answer
	// rests on: the equilibria, the pull-in point and the tangency.
	InterpolationError float64 `json:"interpolation_error"`
	// Body names the suspended body in the summary; empty says "the
	// electrode".
	Body string `json:"body,omitempty"`
	// Material names the material model the load was computed with; empty
	// means perfect conductors. Analyse leaves it empty for the caller to set;
	// Summary uses it in the caveat.
	Material string `json:"material,omitempty"`
	// Notes explain anything extrapolated or marginal, one plain sentence each.
	Notes []string `json:"notes,omitempty"`
}

// Equilibrium is one solution of k (x0 - x) = L(x).
type Equilibrium struct {
	X    float64 `json:"x"`
	Load float64 `json:"load"` // L(x), carried by the spring
	// Stable: the net restoring stiffness is positive.
	Stable bool `json:"stable"`
	// Degenerate: the tangency itself (k at the pull-in limit, within about
	// 1e-9 relative); it is not stable.
	Degenerate bool `json:"degenerate"`
	// StiffnessMargin is the net restoring stiffness k + dL/dx, which is
	// k - |dL/dx| for an attraction that weakens with x.
	StiffnessMargin float64 `json:"stiffness_margin"`
}

// PullIn is the point x* where the load stiffness -dL/dx equals the spring's.
type PullIn struct {
	X    float64 `json:"x"`
	Load float64 `json:"load"` // L(x*)
	// Location is Sampled, or the side of the samples x* lies on.
	Location Location `json:"location"`
	// Extrapolated: X and Load come from a power-law continuation of the
	// nearest end of the samples. When Location is not Sampled and
	// Extrapolated is false, X and Load are zero: unknown.
	Extrapolated bool `json:"extrapolated"`
}

// Limit is a design limit: the smallest stiffness or rest position that still
// holds, found at the tangency point At.
type Limit struct {
	Value        float64  `json:"value"`
	At           float64  `json:"at"`
	Location     Location `json:"location"`     // of At
	Extrapolated bool     `json:"extrapolated"` // as for PullIn; zero Value = unknown
}

// Margin says how far the design is from sticking. Ratios above 1 hold;
// zero means unknown.
type Margin struct {
	StiffnessRatio float64 `json:"stiffness_ratio"` // k / k_min
	RestRatio      float64 `json:"rest_ratio"`      // x0 / x0_crit
	// PullInDistance is Settled - x*, how far the stable equilibrium lies
	// above the pull-in point (Free only, else zero).
	PullInDistance float64 `json:"pull_in_distance"`
	// Extrapolated: one of the numbers above uses a power-law continuation.
	Extrapolated bool `json:"extrapolated"`
}

// degenerateTol is the relative size of the net force, against the load, at
// a tangency below which that tangency is taken as an equilibrium itself:
// since ∂N/∂k = x0 - x = L/(-L') there, it is k within about this fraction
// of k_min.
const degenerateTol = 1e-9

// Analyse finds the equilibria of the body on spring s under the load c, its
// pull-in point, the smallest spring and the smallest rest position that
// hold, and the verdict. The rest position must lie in the sampled range.
func Analyse(c *Curve, s Spring) (Report, error) {
	if c == nil {
		return Report{}, errNilCurve
	}
	if err := s.check(c); err != nil {
		return Report{}, err
	}
	a := analysis{c: c, k: s.Stiffness, x0: s.Rest}
	a.lo, a.hi = c.Range()
	r := Report{
		Stiffness:    s.Stiffness,
		Rest:         s.Rest,
		Torsional:    s.Torsional,
		SampledRange: [2]float64{a.lo, a.hi},
		LogLog:       c.logLog,
		Equilibria:   []Equilibrium{},
	}
	u := s.units()

	// Critical points of N: dN/dx = -(k + L') = 0.
	crit := zeros(a.g, c.grid(a.lo, a.hi))
	r.Equilibria = a.equilibria(crit)
	r.PullIn, r.MinRest = a.pullIn(crit)
	r.MinStiffness = a.minStiffness()

	// Verdict: the body released at x0 settles at the first stable root
	// below it; degenerate roots (N ≤ 0 on both sides) are passed through.
	stable := slices.IndexFunc(r.Equilibria, func(e Equilibrium) bool { return e.Stable })
	nlo := a.n(a.lo)
	switch {
	case stable >= 0:
		r.Verdict = Free
		r.Settled = r.Equilibria[stable].X
	case nlo < 0 && a.g(a.lo) > 0:
		r.Verdict = Undetermined
		r.ExtrapolatedVerdict = Sticks
		if x0c, ok := a.tailCriticalRest(a.lo); ok && a.x0 > x0c {
			r.ExtrapolatedVerdict = Free
		}
		r.Notes = append(r.Notes, fmt.Sprintf("No equilibrium between the rest position and %s, but there the spring is still stiffer than the attraction: an equilibrium may lie below the samples; a power-law continuation of the lowest samples says %s.", u.pos(a.lo), r.ExtrapolatedVerdict))
	default:
		r.Verdict = Sticks
	}
	for _, e := range r.Equilibria {
		if e.Degenerate && stable < 0 {
			r.Notes = append(r.Notes, fmt.Sprintf("The spring is at the pull-in limit: the equilibrium at %s is the tangency itself (degenerate), and any disturbance collapses it.", u.pos(e.X)))
		}
	}

	// Margins.
	m := &r.Margin
	if v := r.MinStiffness.Value; v > 0 && finite(a.k/v) {
		m.StiffnessRatio = a.k / v
	}
	if v := r.MinRest.Value; v > 0 && finite(a.x0/v) {
		m.RestRatio = a.x0 / v
	}
	if r.Verdict == Free && (r.PullIn.Location == Sampled || r.PullIn.Extrapolated) {
		m.PullInDistance = r.Settled - r.PullIn.X
	}
	m.Extrapolated = r.MinStiffness.Extrapolated || r.MinRest.Extrapolated

	if r.MinStiffness.Location != Sampled {
		r.Notes = append(r.Notes, a.outsideNote("The tangency for the smallest stiffness", r.MinStiffness, u))
	}
	if r.PullIn.Location != Sampled {
		r.Notes = append(r.Notes, a.outsideNote("The pull-in point of this spring", r.MinRest, u))
	}

	for _, x := range restingPoints(r) {
		r.InterpolationError = math.Max(r.InterpolationError, c.relativeError(x))
	}
	return r, nil
}

// restingPoints returns the sampled points the answer of r rests on.
func restingPoints(r Report) []float64 {
	var xs []float64
	for _, e := range r.Equilibria {
		xs = append(xs, e.X)
	}
	if r.PullIn.Location == Sampled {
		xs = append(xs, r.PullIn.X)
	}
	if r.MinStiffness.Location == Sampled {
		xs = append(xs, r.MinStiffness.At)
	}
	return xs
}

func (a *analysis) outsideNote(what string, l Limit, u units) string {
	side := "below"
	if l.Location == AboveRange {
		side = "above"
	}
	if !l.Extrapolated {
		return fmt.Sprintf("%s lies %s the sampled range [%s, %s] and cannot be estimated from it.", what, side, u.pos(a.lo), u.pos(a.hi))
	}
	return fmt.Sprintf("%s lies %s the sampled range [%s, %s]; it is estimated at %s by continuing the nearest samples as a power law.", what, side, u.pos(a.lo), u.pos(a.hi), u.pos(l.At))
}

func (s Spring) check(c *Curve) error {
	lo, hi := c.Range()
	u := s.units()
	switch {
	case !finite(s.Stiffness) || s.Stiffness <= 0:
		return fmt.Errorf("sticking: spring stiffness %g is not a positive number; give k in %s", s.Stiffness, u.stiffness)
	case !finite(s.Rest):
		return fmt.Errorf("sticking: rest position %g is not a number; give it in %s", s.Rest, u.x)
	case s.Rest < lo || s.Rest > hi:
		return fmt.Errorf("sticking: rest position %g %s lies outside the sampled range [%g, %g] %s; compute the load over a range that includes the rest position", s.Rest, u.x, lo, hi, u.x)
	}
	return nil
}

// analysis holds one spring against one curve.
type analysis struct {
	c      *Curve
	k, x0  float64
	lo, hi float64
}

// n is the net force along increasing x, N(x) = k (x0 - x) - L(x).
func (a *analysis) n(x float64) float64 { return a.k*(a.x0-x) - a.c.Load(x) }

// g is the net restoring stiffness k + dL/dx = -dN/dx.
func (a *analysis) g(x float64) float64 { return a.k + a.c.Slope(x) }

// equilibria returns the roots of N in [lo, x0], from x0 downwards. crit are
// the critical points of N; a critical point where N vanishes to within
// degenerateTol is a degenerate root, and its neighbourhood is searched no
// further, so a near-tangency never shows as two roots a rounding error apart.
func (a *analysis) equilibria(crit []float64) []Equilibrium {
	nodes := a.c.grid(a.lo, a.x0)
	degenerate := map[float64]bool{}
	for _, x := range crit {
		if x > a.lo && x < a.x0 {
			nodes = append(nodes, x)
		}
		if x >= a.lo && x <= a.x0 && math.Abs(a.n(x)) <= degenerateTol*math.Max(a.c.Load(x), math.SmallestNonzeroFloat64) {
			degenerate[x] = true
		}
	}
	slices.Sort(nodes)
	nodes = slices.Compact(nodes)
	val := func(x float64) float64 {
		if degenerate[x] {
			return 0
		}
		return a.n(x)
	}

	var roots []float64
	xa, fa := nodes[0], val(nodes[0])
	if fa == 0 {
		roots = append(roots, xa)
	}
	for _, xb := range nodes[1:] {
		fb := val(xb)
		switch {
		case fb == 0:
			roots = append(roots, xb)
		case fa != 0 && (fa < 0) != (fb < 0):
			roots = append(roots, brent(a.n, xa, xb, fa, fb))
		}
		xa, fa = xb, fb
	}

	eq := make([]Equilibrium, 0, len(roots))
	for _, x := range slices.Backward(roots) {
		e := Equilibrium{X: x, Load: a.c.Load(x), StiffnessMargin: a.g(x)}
		if degenerate[x] {
			e.Degenerate, e.StiffnessMargin = true, 0
		} else {
			e.Stable = e.StiffnessMargin > 0
		}
		eq = append(eq, e)
	}
	return eq
}

// pullIn finds x*, the minimiser of the critical rest position
// T(x) = x + L(x)/k (T' = (k + L')/k vanishes where L' = -k), over the
// sampled range; min T is x0_crit. crit are the zeros of k + L'.
func (a *analysis) pullIn(crit []float64) (PullIn, Limit) {
	t := func(x float64) float64 { return x + a.c.Load(x)/a.k }
	best, bestT := math.NaN(), math.Inf(1)
	for _, x := range crit {
		if tx := t(x); tx < bestT {
			best, bestT = x, tx
		}
	}
	loc := Sampled
	for _, end := range []struct {
		x   float64
		out Location
	}{{a.lo, BelowRange}, {a.hi, AboveRange}} {
		if tx := t(end.x); tx < bestT {
			best, bestT, loc = end.x, tx, end.out
		}
	}
	if loc == Sampled {
		return PullIn{X: best, Load: a.c.Load(best), Location: Sampled},
			Limit{Value: bestT, At: best, Location: Sampled}
	}
	xs, ok := a.tailPullIn(best)
	if !ok {
		return PullIn{Location: loc}, Limit{Location: loc}
	}
	n, l0 := a.tail(best)
	ls := l0 * math.Pow(xs/best, -n)
	if !finite(ls) || !finite(xs+ls/a.k) {
		return PullIn{Location: loc}, Limit{Location: loc}
	}
	return PullIn{X: xs, Load: ls, Location: loc, Extrapolated: true},
		Limit{Value: xs + ls/a.k, At: xs, Location: loc, Extrapolated: true}
}

// minStiffness finds k_min = min over lo ≤ x < x0 of L(x)/(x0 - x), at the
// tangency where ψ(x) = L'(x)(x0 - x) + L(x) = 0 (ψ is the numerator of the
// derivative of that ratio).
func (a *analysis) minStiffness() Limit {
	phi := func(x float64) float64 { return a.c.Load(x) / (a.x0 - x) }
	psi := func(x float64) float64 { return a.c.Slope(x)*(a.x0-x) + a.c.Load(x) }
	best, bestK := math.NaN(), math.Inf(1)
	if a.x0 > a.lo {
		for _, x := range zeros(psi, a.c.grid(a.lo, a.x0)) {
			if x >= a.x0 {
				continue
			}
			if k := phi(x); k < bestK {
				best, bestK = x, k
			}
		}
	}
	if a.c.Load(a.x0) == 0 {
		// L(x)/(x0 - x) → -L'(x0) as x → x0.
		if k := math.Max(-a.c.Slope(a.x0), 0); k < bestK {
			best, bestK = a.x0, k
		}
	}
	if a.x0 == a.lo || phi(a.lo) < bestK {
		// Still falling towards the low end: the tangency lies below the
		// samples. Continue L(x) = L(lo) (x/lo)^-n below lo, for which the
		// tangency is x_t = n x0/(n+1) and k_min = -L'(x_t).
		n, l0 := a.tail(a.lo)
		if !(n > 0 && l0 > 0) {
			return Limit{Location: BelowRange}
		}
		xt := n * a.x0 / (n + 1)
		k := n * l0 / a.lo * math.Pow(xt/a.lo, -n-1)
		if !finite(k) {
			return Limit{Location: BelowRange}
		}
		return Limit{Value: k, At: xt, Location: BelowRange, Extrapolated: true}
	}
	return Limit{Value: bestK, At: best, Location: Sampled}
}

// tail returns the local power-law exponent n = -x L'/L and the load at the
// sample end x, for the continuation L(x') = L(x) (x'/x)^-n.
func (a *analysis) tail(x float64) (n, load float64) {
	load = a.c.Load(x)
	if load <= 0 {
		return 0, load
	}
	return -x * a.c.Slope(x) / load, load
}

// tailPullIn returns the pull-in point of the power-law continuation from the
// sample end x: -L'(x*) = n L(x)/x (x*/x)^-(n+1) = k.
func (a *analysis) tailPullIn(x float64) (float64, bool) {
	n, l0 := a.tail(x)
	if !(n > 0 && l0 > 0) {
		return 0, false
	}
	xs := x * math.Pow(n*l0/(a.k*x), 1/(n+1))
	return xs, finite(xs) && xs > 0
}

// tailCriticalRest returns x0_crit = x*(n+1)/n of the power-law continuation
// from the sample end x.
func (a *analysis) tailCriticalRest(x float64) (float64, bool) {
	xs, ok := a.tailPullIn(x)
	if !ok {
		return 0, false
	}
	n, _ := a.tail(x)
	return xs * (n + 1) / n, true
}
