package scatter

import (
	"context"
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/bem"
	"github.com/fluctus/fluctus/mesh"
)

const (
	// kappaCutoff bounds the integrand's range: beyond κ = kappaCutoff/gap
	// it is below exp(-2 kappaCutoff) of its value at small κ (DESIGN §4).
	// Runs stop earlier, at the accuracy's own cutoff (cutoffFor).
	kappaCutoff = 30
	// tailShare is the fraction of the requested accuracy that the part of
	// the κ integral beyond the cutoff may take (cutoffFor).
	tailShare = 1.0 / 100
	// firstRule and lastRule are the smallest and largest Fejér rule sizes.
	// The first error estimate compares the 15-, 7- and 3-node rules: with
	// fewer nodes two rules can agree by chance.
	firstRule = 16
	lastRule  = 128
	// zeroKappa sets the small wavenumbers, in units of 1/(scene size), from
	// which the κ → 0 limit is extrapolated for the n = 0 Matsubara term.
	zeroKappa = 0.05
	// stiffnessStep is the central-difference step of the stiffness, in
	// units of the gap: truncation (step)² ≈ 1e-6 relative.
	stiffnessStep = 1e-3
)

func (s Settings) withDefaults() Settings {
	if s.Accuracy <= 0 {
		s.Accuracy = 1e-3
	}
	return s
}

// Energies returns the Casimir energy of the scene at every point of the
// sweep (DESIGN §4), at T = 0 by adaptive integration over κ and at T > 0 by
// the Matsubara sum. Every point is checked for overlapping or touching bodies
// before any work starts. With Settings.Points only those points are
// computed; the others carry their placement, gap and PFA estimate only.
// With Settings.Store, units the store holds are not evaluated again.
func Energies(ctx context.Context, bodies []Body, sweep Sweep, set Settings) ([]Point, error) {
	set = set.withDefaults()
	if set.Accuracy >= 1 {
		return nil, fmt.Errorf("scatter: accuracy %g must be below 1 (a relative target such as 1e-3)", set.Accuracy)
	}
	if set.ThermalWavenumber < 0 || math.IsNaN(set.ThermalWavenumber) {
		return nil, fmt.Errorf("scatter: negative temperature")
	}
	if p := set.Substrate; p != nil {
		if l := r3.Norm(p.Normal); !(l > 0) {
			return nil, fmt.Errorf("scatter: the substrate normal is zero")
		}
		set.Substrate = &Plane{Point: p.Point, Normal: r3.Unit(p.Normal)}
	}
	gaps, scale, err := gapsAndScales(bodies, sweep, set.Substrate)
	if err != nil {
		return nil, err
	}
	if err := checkPoints(set.Points, len(sweep.Offsets)); err != nil {
		return nil, err
	}
	sys, err := newSystem(bodies, sweep.Body, set.Threads, set.Substrate)
	if err != nil {
		return nil, err
	}
	sys.compress = newCompression(set)
	if err := sys.setMaterials(bodies, set.Length); err != nil {
		return nil, err
	}
	pts := make([]Point, len(sweep.Offsets))
	for i, off := range sweep.Offsets {
		pts[i] = Point{Offset: off, Turn: sweep.turn(i), Gap: gaps[i]}
		if set.ThermalWavenumber > 0 {
			pts[i].StaticModel = staticModels(bodies)
		}
	}
	if set.Stiffness {
		set.Forces = true
		if l := r3.Norm(sweep.Direction); l > 0 {
			sweep.Direction = r3.Scale(1/l, sweep.Direction)
		} else if len(sweep.Turns) == 0 {
			return nil, fmt.Errorf("scatter: the stiffness needs a sweep direction")
		}
	}
	run := &runner{sys: sys, set: set, sweep: sweep, pts: pts, scale: scale, delta: make([]float64, len(pts)), cutoff: cutoffFor(set.Accuracy)}
	for i := range pts {
		run.delta[i] = stiffnessStep * scale[i]
		if len(sweep.Turns) != 0 {
			run.delta[i] = stiffnessStep * angularStep(bodies[sweep.Body].Mesh, sweep.Turns[i], scale[i])
		}
	}
	if set.ThermalWavenumber > 0 {
		err = run.matsubara(ctx, sceneSize(bodies, sweep))
	} else {
		err = run.integrate(ctx)
	}
	if err != nil {
		return nil, err
	}
	opts, err := materialPFA(ctx, bodies, sweep, set, gaps)
	if err != nil {
		return nil, err
	}
	for i := range pts {
		pts[i].PFA = pfaAt(bodies, sweep, i, 0, set.Substrate, opts...)
		if set.Forces {
			h := pfaStep * scale[i]
			plus, minus := pfaAt(bodies, sweep, i, h, set.Substrate, opts...), pfaAt(bodies, sweep, i, -h, set.Substrate, opts...)
			pts[i].PFA.Force = -(plus.Mean - minus.Mean) / (2 * h)
		}
	}
	return pts, nil
}

// angularStep is the turn, in radians, that moves the body's farthest point
// from the axis by about one gap.
func angularStep(m *mesh.Mesh, t Turn, gap float64) float64 {
	n := r3.Unit(t.Axis)
	reach := 0.0
	for _, v := range m.Vertices {
		d := r3.Sub(v, t.Pivot)
		reach = math.Max(reach, r3.Norm(r3.Sub(d, r3.Scale(r3.Dot(d, n), n))))
	}
	if reach == 0 {
		return 1
	}
	return gap / reach
}

// pfaStep is the central-difference step of the PFA force, in units of the
// gap.
const pfaStep = 1e-4

// pfaAt is the PFA estimate at point p with the moving body shifted by s
// along the sweep direction.
func pfaAt(bodies []Body, sweep Sweep, p int, s float64, plane *Plane, opts ...PFAOption) PFA {
	placed := append([]Body(nil), bodies...)
	m := sweep.place(bodies[sweep.Body].Mesh, p)
	if s != 0 {
		m = m.Translate(r3.Scale(s/r3.Norm(sweep.Direction), sweep.Direction))
	}
	placed[sweep.Body].Mesh = m
	return PFAEnergy(placed, sweep.Body, sweep.Direction, plane, opts...)
}

// Gaps checks every sweep point and returns the closest surface-to-surface
// distance of the moving body to the others at each — or, over a substrate,
// to the plane. Overlapping or touching bodies, or a body crossing or
// touching the substrate, are an error naming the point and the bodies.
func Gaps(bodies []Body, sweep Sweep, plane *Plane) ([]float64, error) {
	g, _, err := gapsAndScales(bodies, sweep, plane)
	return g, err
}

// planeGap returns the smallest height of m above the plane (negative when
// it crosses it).
func planeGap(m *mesh.Mesh, p *Plane) float64 {
	n := r3.Unit(p.Normal)
	d := math.Inf(1)
	for _, v := range m.Vertices {
		d = math.Min(d, r3.Dot(r3.Sub(v, p.Point), n))
	}
	return d
}

// gapsAndScales returns the reported gap of every point and the smallest
// gap anywhere in the scene (which sets the frequency scale).
func gapsAndScales(bodies []Body, sweep Sweep, plane *Plane) (gaps, scales []float64, err error) {
	bodyGaps, err := bodyGaps(bodies, sweep, plane == nil)
	if err != nil {
		return nil, nil, err
	}
	if plane == nil {
		return bodyGaps, bodyGaps, nil
	}
	fixedMin := math.Inf(1)
	for i, b := range bodies {
		if i == sweep.Body {
			continue
		}
		d := planeGap(b.Mesh, plane)
		if !(d > 0) {
			return nil, nil, fmt.Errorf("body %q crosses or touches the substrate (lowest point %g above it): lift it above the plane", b.Name, d)
		}
		fixedMin = math.Min(fixedMin, d)
	}
	gaps = make([]float64, len(sweep.Offsets))
	scales = make([]float64, len(sweep.Offsets))
	for p := range sweep.Offsets {
		d := planeGap(sweep.place(bodies[sweep.Body].Mesh, p), plane)
		if !(d > 0) {
			return nil, nil, fmt.Errorf("at sweep point %d body %q crosses or touches the substrate (lowest point %g above it): choose a larger gap", p+1, bodies[sweep.Body].Name, d)
		}
		gaps[p] = d
		scales[p] = math.Min(d, math.Min(fixedMin, bodyGaps[p]))
	}
	return gaps, scales, nil
}

// bodyGaps is Gaps between the bodies alone (infinite for a single body
// over a substrate); need says that the bodies must interact with each
// other (no substrate).
func bodyGaps(bodies []Body, sweep Sweep, need bool) ([]float64, error) {
	if sweep.Body < 0 || sweep.Body >= len(bodies) {
		return nil, fmt.Errorf("scatter: moving body index %d out of range (have %d bodies)", sweep.Body, len(bodies))
	}
	if len(sweep.Offsets) == 0 {
		return nil, fmt.Errorf("scatter: the sweep has no points")
	}
	for i := range bodies {
		for j := i + 1; j < len(bodies); j++ {
			if i == sweep.Body || j == sweep.Body {
				continue
			}
			if err := separated(bodies[i], bodies[j].Mesh, bodies[j].Name, "the fixed bodies"); err != nil {
				return nil, err
			}
		}
	}
	if len(sweep.Turns) != 0 && len(sweep.Turns) != len(sweep.Offsets) {
		return nil, fmt.Errorf("scatter: the sweep has %d offsets but %d turns", len(sweep.Offsets), len(sweep.Turns))
	}
	mv := bodies[sweep.Body]
	gaps := make([]float64, len(sweep.Offsets))
	if len(bodies) < 2 && need {
		return nil, fmt.Errorf("scatter: need at least two bodies, or one over a substrate")
	}
	for p, off := range sweep.Offsets {
		moved := sweep.place(mv.Mesh, p)
		gaps[p] = math.Inf(1)
		for j, b := range bodies {
			if j == sweep.Body {
				continue
			}
			where := fmt.Sprintf("sweep point %d (offset %.6g, %.6g, %.6g)", p+1, off.X, off.Y, off.Z)
			if err := separated(b, moved, mv.Name, where); err != nil {
				return nil, err
			}
			d, _, _ := mesh.Gap(moved, b.Mesh)
			gaps[p] = math.Min(gaps[p], d)
		}
	}
	return gaps, nil
}

// separated returns an error when the body b and the mesh m (of body name)
// overlap or touch.
func separated(b Body, m *mesh.Mesh, name, where string) error {
	if mesh.Overlap(b.Mesh, m) {
		return fmt.Errorf("at %s bodies %q and %q overlap: move them apart or choose larger gaps", where, b.Name, name)
	}
	if d, _, _ := mesh.Gap(b.Mesh, m); !(d > 0) {
		return fmt.Errorf("at %s bodies %q and %q touch (gap %g): the gap must be positive", where, b.Name, name, d)
	}
	return nil
}

// runner evaluates the integrand for all points, κ by κ, sharing the self
// factors of each κ between the points that need it.
type runner struct {
	sys        *system
	set        Settings
	sweep      Sweep
	pts        []Point
	scale      []float64 // smallest gap anywhere in the scene at each point, L0
	delta      []float64 // stiffness step of each point, L0
	cutoff     float64   // κ·gap beyond which no node is computed (cutoffFor)
	done, todo int
}

// Quantities integrated over κ, as positions in a value vector: the
// log-determinant, then with forces its six derivatives (displacements and
// turns of the moving body), then with stiffness the derivative of the
// displacement gradient along the sweep direction.
const (
	qLogDet = 0
	qGrad   = 1
	qStiff  = 7
)

// width is the length of the value vector.
func (r *runner) width() int {
	switch {
	case r.set.Stiffness:
		return qStiff + 1
	case r.set.Forces:
		return qGrad + 6
	}
	return 1
}

// request is one evaluation of the value vector of point p at κ, stored
// into dst.
type request struct {
	p     int
	kappa float64
	dst   []float64
	// weight is the node's weight in the frequency rule that asks for it
	// (Jacobian included) and nodes that rule's number of nodes; they let
	// the block tolerance follow the node's share of the integral
	// (looseness). Zero weight keeps the tolerance as it is.
	weight float64
	nodes  int
}

// placementOf returns the placement of point p moved on by s: along the
// sweep direction for a translation sweep, or by s radians more about the
// turn's axis for an angle sweep.
func (r *runner) placementOf(p int, s float64) placement {
	off := r.sweep.Offsets[p]
	t := r.sweep.turn(p)
	if len(r.sweep.Turns) != 0 {
		t.Angle += s
	} else {
		off = r3.Add(off, r3.Scale(s, r.sweep.Direction))
	}
	return placement{offset: off, turn: t, centre: r3.Add(t.apply(r.sweep.Centre), off)}
}

// along returns the component of the gradient conjugate to the sweep's own
// motion: the displacement along ê, or for an angle sweep the turn about the
// turn's axis.
func (r *runner) along(grad [6]float64, p int) float64 {
	if len(r.sweep.Turns) != 0 {
		n := r3.Unit(r.sweep.Turns[p].Axis)
		return grad[3]*n.X + grad[4]*n.Y + grad[5]*n.Z
	}
	e := r.sweep.Direction
	return grad[0]*e.X + grad[1]*e.Y + grad[2]*e.Z
}

// evaluate computes all requests, grouped by κ.
func (r *runner) evaluate(ctx context.Context, reqs []request) error {
	sort.SliceStable(reqs, func(i, j int) bool { return reqs[i].kappa < reqs[j].kappa })
	r.todo += len(reqs)
	r.progress()
	reqs = r.loadStored(reqs)
	grad := r.set.Forces || r.set.Stiffness
	for i := 0; i < len(reqs); {
		kappa := reqs[i].kappa
		sf, err := r.sys.factorSelf(ctx, kappa)
		if err != nil {
			return err
		}
		refs, between := r.basisRefs(kappa)
		if refs != nil {
			if sf.basis, err = r.sys.buildCrossBasis(ctx, sf, refs); err != nil {
				return err
			}
		}
		j := i
		for j < len(reqs) && reqs[j].kappa == kappa {
			j++
		}
		evs, err := r.evaluateAt(ctx, sf, reqs[i:j], grad, between)
		if err != nil {
			return err
		}
		for k, rq := range reqs[i:j] {
			ev := evs[k]
			rq.dst[qLogDet] = ev.logDet
			r.pts[rq.p].Ranks = mergeRanks(r.pts[rq.p].Ranks, ev.ranks)
			if grad {
				copy(rq.dst[qGrad:qGrad+6], ev.grad[:])
			}
			if r.set.Stiffness {
				// Central difference of the displacement gradient along ê at
				// the same κ (so the frequency rule is shared exactly).
				d := r.delta[rq.p]
				plus, err := r.sys.evaluateFine(ctx, sf, r.placementOf(rq.p, d))
				if err != nil {
					return fmt.Errorf("sweep point %d: %w", rq.p+1, err)
				}
				minus, err := r.sys.evaluateFine(ctx, sf, r.placementOf(rq.p, -d))
				if err != nil {
					return fmt.Errorf("sweep point %d: %w", rq.p+1, err)
				}
				rq.dst[qStiff] = (r.along(plus.grad, rq.p) - r.along(minus.grad, rq.p)) / (2 * d)
			}
			if err := r.save(rq, ev.ranks); err != nil {
				return err
			}
			r.addSample(rq)
		}
		i = j
		if err := ctx.Err(); err != nil {
			return err
		}
	}
	return nil
}

// evaluateAt returns the integrand of the requests reqs, all at the κ of
// sf, in their order. Where the κ has a sampled sweep basis, the sampled
// path (sampled.go) is tried for all of them side by side first: it is
// small (matrices of the basis' size) and partly serial, so that two
// points at once keep the cores busy; the points it does not take are then
// evaluated one after the other on the surfaces already placed for the
// attempt, as all points are without it. between gives the references of
// the sweep basis each point lies between (basisRefs).
func (r *runner) evaluateAt(ctx context.Context, sf *selfFactors, reqs []request, grad bool, between map[int][2]int) ([]evaluation, error) {
	evs := make([]evaluation, len(reqs))
	systems := make([]*system, len(reqs))
	for k, rq := range reqs {
		systems[k] = r.sys
		if f := r.looseness(rq); f > 1 {
			loose := *r.sys
			loose.compress.tol *= f
			systems[k] = &loose
		}
	}
	if !r.sys.hasSampled(sf) {
		for k, rq := range reqs {
			var err error
			if evs[k], err = systems[k].evaluate(ctx, sf, r.placementOf(rq.p, 0), grad); err != nil {
				return nil, fmt.Errorf("sweep point %d: %w", rq.p+1, err)
			}
		}
		return evs, nil
	}
	// rest[k] keeps the surfaces of a point the sampled path did not take.
	rest := make([][]*bem.Surface, len(reqs))
	err := forEach(ctx, len(reqs), r.sys.threads, func(ctx context.Context, k int) error {
		pl := r.placementOf(reqs[k].p, 0)
		surf, err := systems[k].surfacesAt(pl)
		if err != nil {
			return fmt.Errorf("sweep point %d: %w", reqs[k].p+1, err)
		}
		var ok bool
		lo, hi := -1, -1
		if b, in := between[reqs[k].p]; in {
			lo, hi = b[0], b[1]
		}
		if evs[k], ok, err = systems[k].sampledTwo(ctx, sf, surf, pl, grad, lo, hi); err != nil {
			return fmt.Errorf("sweep point %d: %w", reqs[k].p+1, err)
		}
		if !ok {
			rest[k] = surf
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	for k, surf := range rest {
		if surf == nil {
			continue
		}
		var err error
		if evs[k], err = systems[k].compressedTwo(ctx, sf, surf, r.placementOf(reqs[k].p, 0), grad); err != nil {
			return nil, fmt.Errorf("sweep point %d: %w", reqs[k].p+1, err)
		}
	}
	return evs, nil
}

// basisRefs returns the reference placements of the sweep basis at κ
// (basis.go): basisRefs points spread over those of the sweep whose
// cutoff admits κ (evenly in the inverse gap), in sweep order, or nil when
// the scene is not two bodies in free space with compression on, or fewer
// than basisMinPoints points admit κ. between gives, for every point that
// admits κ, the indices of the two references it lies between (twice the
// same for a reference): the level of the nested bases it needs
// (crossBasis.levelFor). The choice depends on the whole sweep only, never
// on which points a run computes or has stored, so every shard and every
// resumed run builds the same basis and computes a point alike.
func (r *runner) basisRefs(kappa float64) (refs []placement, between map[int][2]int) {
	sys := r.sys
	if !sys.compress.on || len(sys.surf) != 2 || sys.plane != nil || sys.mats != nil {
		return nil, nil
	}
	var admit []int
	for i, d := range r.scale {
		if kappa*d <= r.cutoff {
			admit = append(admit, i)
		}
	}
	if len(admit) < basisMinPoints {
		return nil, nil
	}
	// The references are spread evenly along the sweep in the inverse of
	// the gap, Σ |Δoffset| / gap² (for a gap sweep the step of 1/gap): the
	// number of directions a block needs grows about as the inverse gap
	// (the finer current patterns of a narrower contact zone), so equal
	// steps add about equally many new directions and close points get
	// close references. Measured on the 20-point sweep of BenchmarkSweep
	// (gaps R/2 to 2R): 9 evaluations went back to the compressed path
	// with the references evenly over the points, 8 with them evenly in
	// ln(gap), none evenly in 1/gap. A sweep with turns, or one that does
	// not move, spreads them evenly over its points.
	at := make([]float64, len(admit))
	for k := 1; k < len(admit); k++ {
		a, b := admit[k-1], admit[k]
		step := 1.0
		if len(r.sweep.Turns) == 0 {
			g := math.Min(r.scale[a], r.scale[b]) // positive: gapsAndScales rejects touching bodies
			step = r3.Norm(r3.Sub(r.sweep.Offsets[b], r.sweep.Offsets[a])) / (g * g)
		}
		at[k] = at[k-1] + step
	}
	if at[len(at)-1] == 0 {
		for k := range at {
			at[k] = float64(k)
		}
	}
	chosen := make([]int, 0, basisRefs) // indices into admit
	used := make([]bool, len(admit))
	for j := 0; j < basisRefs; j++ {
		target := at[len(at)-1] * float64(j) / float64(basisRefs-1)
		best := -1
		for k := range admit {
			if !used[k] && (best < 0 || math.Abs(at[k]-target) < math.Abs(at[best]-target)) {
				best = k
			}
		}
		used[best] = true
		chosen = append(chosen, best)
	}
	sort.Ints(chosen) // at grows along admit
	between = make(map[int][2]int, len(admit))
	for k, p := range admit {
		lo := 0
		for j, c := range chosen {
			if c <= k {
				lo = j
			}
		}
		hi := lo
		if chosen[lo] < k && lo+1 < len(chosen) {
			hi = lo + 1
		}
		between[p] = [2]int{lo, hi}
	}
	for _, c := range chosen {
		refs = append(refs, r.placementOf(admit[c], 0))
	}
	return refs, between
}

// maxLooseTolerance caps the block tolerance looseness may allow: a block
// known to 1 % still gives the integrand to about 2 %.
const maxLooseTolerance = 1e-2

// looseness is the factor by which the block tolerance may grow at the node
// of request rq because the node carries a small share of the integral
// (DESIGN §10). The tolerance ε of blockTolerance bounds the integrand's
// relative error by 2ε at every node; a node whose integrand is small
// against the whole integral I needs less. With the integrand's magnitude
// falling with κ (DESIGN §4, TestIntegrandSignAndDecay), every lower node
// κ' already computed for the point bounds I from below,
// I ≥ ∫_0^κ' |f| ≥ κ'|f(κ')|, and bounds the node's own value from above,
// |f(κ)| ≤ |f(κ')|. A node of weight w among n nodes whose relative error
// is allowed to grow to
//
//	ε_k = ε max(1, I_lb / (2 n w |f_prev|))
//
// adds at most ε I/2 over all n nodes to the integral's error, a tenth of
// the accuracy on top of the fifth blockTolerance spends. With forces the
// node's share of the force integral is larger by up to about 1 + 2κd (the
// gradient of e^{-2κd} brings 2κ, against 3/d for the whole force), so the
// factor is divided by that. Only values at lower κ of the same point are
// used, so the factor, and the result, do not depend on the order of the
// points or on which shard computes them.
func (r *runner) looseness(rq request) float64 {
	if rq.weight <= 0 || rq.nodes <= 0 || !r.sys.compress.on {
		return 1
	}
	lb, prev, prevKappa := 0.0, 0.0, 0.0
	for _, smp := range r.pts[rq.p].Samples {
		if smp.Kappa >= rq.kappa {
			continue
		}
		lb = math.Max(lb, smp.Kappa*math.Abs(smp.Value))
		if smp.Kappa > prevKappa {
			prevKappa, prev = smp.Kappa, math.Abs(smp.Value)
		}
	}
	if prev == 0 || lb == 0 {
		return 1
	}
	f := lb / (2 * float64(rq.nodes) * rq.weight * prev)
	if r.set.Forces || r.set.Stiffness {
		f /= 1 + 2*rq.kappa*r.scale[rq.p]
	}
	if limit := maxLooseTolerance / r.sys.compress.tol; f > limit {
		f = limit
	}
	return math.Max(f, 1)
}

func (r *runner) progress() {
	if r.set.Progress != nil {
		r.set.Progress(r.done, r.todo)
	}
}

// cutoffFor returns x = κ·gap beyond which the integrand is left out at
// relative accuracy acc: the part of the integral beyond x is at most
// tailShare·acc of the whole, for the energy, the force and the stiffness.
// The bound is that of two parallel perfect-conductor plates at the gap,
// where every point of the surfaces is as close as the closest (any other
// pair of bodies has its surfaces at the gap or further, and each local
// separation L ≥ gap contributes a tail beyond x/gap no larger than the
// plates' at L). For plates at separation L the integrand of the m-th
// derivative in L is, with x = κL (Lifshitz's formula at perfect
// reflection; the n = 1 term of ln(1 - e^{-2qL}) = -Σ e^{-2nqL}/n
// dominates the tail),
//
//	f_m(κ) ∝ ∫_κ^∞ q (2q)^m Σ_n n^{m-1} e^{-2nqL} dq,
//
// whose tail beyond x takes a share below e^{-2x} (1+x)³ of the whole for
// m = 0, 1, 2 (TestCutoffTail checks it against the integral itself). The
// result lies between 1 and kappaCutoff; about 9.25 at acc = 1e-3 and 13.2
// at 1e-6.
func cutoffFor(acc float64) float64 {
	bound := func(x float64) float64 { return math.Exp(-2*x) * math.Pow(1+x, 3) }
	target := tailShare * acc
	if bound(kappaCutoff) > target {
		return kappaCutoff
	}
	lo, hi := 1.0, float64(kappaCutoff) // bound falls on [1, ∞)
	for hi-lo > 1e-3 {
		mid := (lo + hi) / 2
		if bound(mid) > target {
			lo = mid
		} else {
			hi = mid
		}
	}
	return hi
}

// dyadic rounds x to the nearest power of two, so that sweep points with
// similar gaps share their κ nodes (and hence their self factors) exactly.
func dyadic(x float64) float64 { return math.Exp2(math.Round(math.Log2(x))) }

// finish converts the integrals of the value vector (ħc/L0 units after the
// factor 1/2π) into the point's results: E = I[ln det]/2π, F = -I[∇ ln det]/2π,
// stiffness = I[∂_s(ê·∇ ln det)]/2π; err holds the error estimates.
func (r *runner) finish(p int, q, err []float64) {
	pt := &r.pts[p]
	c := 1 / (2 * math.Pi)
	pt.Energy, pt.EnergyError = c*q[qLogDet], c*err[qLogDet]
	if len(q) > qGrad {
		pt.Force = r3.Vec{X: -c * q[qGrad], Y: -c * q[qGrad+1], Z: -c * q[qGrad+2]}
		pt.Torque = r3.Vec{X: -c * q[qGrad+3], Y: -c * q[qGrad+4], Z: -c * q[qGrad+5]}
		pt.ForceError = c * math.Sqrt(err[qGrad]*err[qGrad]+err[qGrad+1]*err[qGrad+1]+err[qGrad+2]*err[qGrad+2])
		pt.TorqueError = c * math.Sqrt(err[qGrad+3]*err[qGrad+3]+err[qGrad+4]*err[qGrad+4]+err[qGrad+5]*err[qGrad+5])
	}
	if len(q) > qStiff {
		pt.Stiffness, pt.StiffnessError = c*q[qStiff], c*err[qStiff]
	}
	sortSamples(pt.Samples)
}

// converged reports whether the integrals q with error estimates err meet the
// accuracy: the energy, and with forces the force vector, relatively.
func (r *runner) converged(q, err []float64) bool {
	acc := r.set.Accuracy
	if err[qLogDet] > acc*math.Abs(q[qLogDet]) {
		return false
	}
	if len(q) > qGrad {
		f := math.Sqrt(q[qGrad]*q[qGrad] + q[qGrad+1]*q[qGrad+1] + q[qGrad+2]*q[qGrad+2])
		e := math.Sqrt(err[qGrad]*err[qGrad] + err[qGrad+1]*err[qGrad+1] + err[qGrad+2]*err[qGrad+2])
		if e > acc*f {
			return false
		}
	}
	return true
}

// integrate computes the T = 0 results of every point (DESIGN §4):
//
//	E = (1/2π) ∫_0^∞ f(κ) dκ,  κ = κc t/(1-t),
//
// in units of ħc/L0 (forces likewise with the gradient of f), by nested
// Fejér rules in t, doubling the rule until the error estimate of
// convergedError meets the requested accuracy.
func (r *runner) integrate(ctx context.Context) error {
	type state struct {
		kc, cut float64
		n       int
		f       [][]float64 // value vector at each node of the n-rule; nil until computed
		done    bool
	}
	w := r.width()
	st := make([]*state, len(r.pts))
	kcs := sweepKappaScales(r.scale)
	for i := range r.pts {
		d := r.scale[i]
		st[i] = &state{kc: kcs[i], cut: r.cutoff / d, n: firstRule, f: make([][]float64, firstRule-1), done: !r.owns(i)}
	}
	for {
		var reqs []request
		for i, s := range st {
			if s.done {
				continue
			}
			rule := newFejer(s.n)
			for k, t := range rule.t {
				if s.f[k] != nil {
					continue
				}
				s.f[k] = make([]float64, w)
				kappa := s.kc * t / (1 - t)
				if kappa > s.cut {
					continue // negligible: left at zero
				}
				jac := rule.w[k] * s.kc / ((1 - t) * (1 - t))
				reqs = append(reqs, request{p: i, kappa: kappa, dst: s.f[k], weight: jac, nodes: len(rule.t)})
			}
		}
		if len(reqs) == 0 {
			break
		}
		if err := r.evaluate(ctx, reqs); err != nil {
			return err
		}
		for i, s := range st {
			if s.done {
				continue
			}
			sum := func(m int) []float64 { // Fejér sums with the m-rule (nested in n)
				rule := newFejer(m)
				out := make([]float64, w)
				for k, t := range rule.t {
					v := s.f[nestedIndex(k, m, s.n)]
					jac := rule.w[k] * s.kc / ((1 - t) * (1 - t))
					for j := range out {
						out[j] += jac * v[j]
					}
				}
				return out
			}
			qf, qc, qcc := sum(s.n), sum(s.n/2), sum(s.n/4)
			errs := make([]float64, w)
			for j := range errs {
				errs[j] = convergedError(math.Abs(qf[j]-qc[j]), math.Abs(qc[j]-qcc[j]))
			}
			if r.converged(qf, errs) || s.n >= lastRule {
				s.done = true
				r.finish(i, qf, errs)
				continue
			}
			next := make([][]float64, 2*s.n-1)
			for k, v := range s.f {
				next[nestedIndex(k, s.n, 2*s.n)] = v
			}
			s.n, s.f = 2*s.n, next
		}
	}
	return nil
}

// matsubara computes the free energy at temperature T (DESIGN §4):
//
//	F = (κ_T/2π) Σ'_{n≥0} f(n κ_T),  κ_T = 2π k_B T/(ħc),
//
// in ħc/L0 (forces likewise), the n = 0 term halved. The n = 0 term is the
// κ → 0 limit of f, which is even in κ for perfect conductors; it is
// extrapolated from κ = ε, 2ε and 4ε (ε = zeroKappa/size) by Richardson's
// rule in κ², never evaluated at κ = 0 (where the matrix is singular). The
// sum stops when a term falls below the accuracy target (or beyond the
// cutoff); the error estimate adds the extrapolation's last correction and
// the geometric tail.
func (r *runner) matsubara(ctx context.Context, size float64) error {
	kt := r.set.ThermalWavenumber
	eps := zeroKappa / size
	if eps > kt/8 {
		eps = kt / 8 // stay well below the first Matsubara frequency
	}
	eps = r.sys.staticKappa(eps) // Drude metals need smaller κ (dielectric.go)
	w := r.width()
	np := len(r.pts)
	fz := make([][3][]float64, np)
	var reqs []request
	for i := range r.pts {
		if !r.owns(i) {
			continue
		}
		for j := 0; j < 3; j++ {
			fz[i][j] = make([]float64, w)
			reqs = append(reqs, request{p: i, kappa: eps * float64(int(1)<<j), dst: fz[i][j]})
		}
	}
	if err := r.evaluate(ctx, reqs); err != nil {
		return err
	}
	sum := make([][]float64, np)
	errs := make([][]float64, np)
	last := make([]float64, np)
	active := make([]bool, np)
	for i := range r.pts {
		sum[i], errs[i] = make([]float64, w), make([]float64, w)
		if !r.owns(i) {
			continue
		}
		for j := 0; j < w; j++ {
			// f(κ) = f0 + aκ² + bκ⁴ + ...: Richardson in κ² on (ε, 2ε) and on
			// (2ε, 4ε), then once more to cancel the κ⁴ term.
			r1 := (4*fz[i][0][j] - fz[i][1][j]) / 3
			r2 := (4*fz[i][1][j] - fz[i][2][j]) / 3
			f0 := (16*r1 - r2) / 15
			sum[i][j] = f0 / 2
			errs[i][j] = math.Abs(r1-f0) / 2
		}
		last[i] = 2 * sum[i][qLogDet]
		active[i] = true
	}
	for n := 1; ; n++ {
		kappa := float64(n) * kt
		vals := make([][]float64, np)
		reqs = reqs[:0]
		for i := range r.pts {
			if active[i] && kappa*r.scale[i] > r.cutoff {
				active[i] = false
			}
			if active[i] {
				vals[i] = make([]float64, w)
				reqs = append(reqs, request{p: i, kappa: kappa, dst: vals[i]})
			}
		}
		if len(reqs) == 0 {
			break
		}
		if err := r.evaluate(ctx, reqs); err != nil {
			return err
		}
		for _, rq := range reqs {
			i := rq.p
			v := vals[i]
			for j := range v {
				sum[i][j] += v[j]
			}
			if n >= 2 && math.Abs(v[qLogDet]) <= r.set.Accuracy*1e-2*math.Abs(sum[i][qLogDet]) {
				// Geometric tail with the observed ratio of successive terms.
				tail := 1.0
				if ratio := v[qLogDet] / last[i]; ratio > 0 && ratio < 1 {
					tail = ratio / (1 - ratio)
				}
				for j := range v {
					errs[i][j] += math.Abs(v[j]) * tail
				}
				active[i] = false
			}
			last[i] = v[qLogDet]
		}
	}
	for i := range r.pts {
		if !r.owns(i) {
			continue
		}
		// (κ_T/2π) Σ' = (1/2π) × κ_T Σ': scale to the integral's units.
		for j := range sum[i] {
			sum[i][j] *= kt
			errs[i][j] *= kt
		}
		r.finish(i, sum[i], errs[i])
	}
	return nil
}

// convergedError estimates the error of the finest of three nested rules
// from the differences of successive rules, d = |Q_n - Q_n/2| and
// dPrev = |Q_n/2 - Q_n/4|. The integrand is analytic in t, so the rules
// converge geometrically and the error of Q_n is about d·(d/dPrev); the
// ratio is not trusted below 1/10 (two coarse rules may agree by chance),
// and where the differences do not fall the estimate is d itself
// (TestFrequencyIntegration).
func convergedError(d, dPrev float64) float64 {
	if d < dPrev {
		return d * math.Max(d/dPrev, 0.1)
	}
	return d
}

func sortSamples(s []Sample) {
	sort.Slice(s, func(i, j int) bool { return s[i].Kappa < s[j].Kappa })
}

// sceneSize is the diameter of the bounding box of all bodies over the sweep.
func sceneSize(bodies []Body, sweep Sweep) float64 {
	lo := r3.Vec{X: math.Inf(1), Y: math.Inf(1), Z: math.Inf(1)}
	hi := r3.Scale(-1, lo)
	grow := func(m *mesh.Mesh, off r3.Vec) {
		for _, v := range m.Vertices {
			v = r3.Add(v, off)
			lo = r3.Vec{X: math.Min(lo.X, v.X), Y: math.Min(lo.Y, v.Y), Z: math.Min(lo.Z, v.Z)}
			hi = r3.Vec{X: math.Max(hi.X, v.X), Y: math.Max(hi.Y, v.Y), Z: math.Max(hi.Z, v.Z)}
		}
	}
	for i, b := range bodies {
		if i == sweep.Body {
			for _, off := range sweep.Offsets {
				grow(b.Mesh, off)
			}
			continue
		}
		grow(b.Mesh, r3.Vec{})
	}
	return r3.Norm(r3.Sub(hi, lo))
}

// Estimate returns the unknown count and the peak dense-matrix memory of a
// run: the self factors, one interaction block and its whitened copy, and
// the reduced matrix (all bodies' unknowns for three or more bodies).
func Estimate(bodies []Body) Cost {
	var c Cost
	var sq, maxPair, minPair int64
	ns := make([]int64, len(bodies))
	for i, b := range bodies {
		e := int64(3 * len(b.Mesh.Triangles) / 2) // edges of a closed mesh
		if !isPerfect(b.Material) {
			e *= 2 // electric and magnetic currents (DESIGN §13)
		}
		ns[i] = e
		c.Unknowns += int(e)
		sq += e * e
	}
	for i := range ns {
		for j := i + 1; j < len(ns); j++ {
			maxPair = max(maxPair, ns[i]*ns[j])
			minPair = max(minPair, min(ns[i], ns[j]))
		}
	}
	reduced := minPair * minPair
	if len(bodies) > 2 {
		reduced = int64(c.Unknowns) * int64(c.Unknowns)
	}
	// Self blocks are assembled one at a time next to the factors kept.
	c.MatrixBytes = 8 * (sq + 2*maxPair + reduced + maxPair)
	return c
}
