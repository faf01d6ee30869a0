package bem

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// Motion holds the derivatives of a scalar Σ_ab H_ab M_ab with respect to a
// rigid motion of the second surface of a block: Translation[i] for a
// displacement along axis i, Rotation[i] for a turn about axis i through the
// chosen centre (per radian).
type Motion struct {
	Translation r3.Vec
	Rotation    r3.Vec
}

// CrossGradient returns the derivatives of Σ_ab H_ab M_ab(κ), the contraction
// of the EFIE interaction block between surfaces a (rows) and b (columns)
// with the weight matrix h (a.Len() × b.Len()), when b moves rigidly
// (DESIGN §5). For a displacement u of b the kernel changes as
// ∂G/∂u = g(R)(x - y) with g = -G'(R)/R = (1 + κR) exp(-κR)/(4πR³); for a turn
// about axis n through centre the points move by n × (y - centre) and the
// basis functions turn with them, which adds κ ∫∫ n·(f_b × f_a) G.
//
// The contraction is done pair by pair: for each triangle pair the nine
// weights h_kl c_k c_l collapse the RWG products into one polynomial in the
// local coordinates, integrated with the pair's product rule (the same as the
// energy's; near pairs are subdivided). Surfaces a and b must be different
// bodies (no touching panels).
func (as Assembler) CrossGradient(ctx context.Context, h *mat.Dense, op *EFIE, a, b *Surface, centre r3.Vec) (Motion, error) {
	r, c := h.Dims()
	if r != a.Len() || c != b.Len() {
		return Motion{}, fmt.Errorf("bem: weight matrix is %d×%d, surfaces have %d and %d unknowns", r, c, a.Len(), b.Len())
	}
	return as.contract(ctx, h, op, a, b, centre, func(int) bool { return true }, nil)
}

// CrossGradientSparse is CrossGradient for a weight matrix h whose nonzero
// entries all lie in the listed rows (basis indices of a) or the listed
// columns (basis indices of b). Only the triangle pairs that carry such an
// entry are integrated: those with a panel of a on a listed row, against
// every panel of b, and the others against the panels of b on a listed
// column — about 2(len(rows)·T_b + len(cols)·T_a) pairs instead of T_a·T_b.
// Entries of h outside the listed rows and columns must be zero; the
// result is then that of CrossGradient to rounding (the pairs are summed in
// the same order, so the sum is deterministic as well).
func (as Assembler) CrossGradientSparse(ctx context.Context, h *mat.Dense, op *EFIE, a, b *Surface, centre r3.Vec, rows, cols []int) (Motion, error) {
	r, c := h.Dims()
	if r != a.Len() || c != b.Len() {
		return Motion{}, fmt.Errorf("bem: weight matrix is %d×%d, surfaces have %d and %d unknowns", r, c, a.Len(), b.Len())
	}
	onRow := make([]bool, a.Len())
	for _, i := range rows {
		if i < 0 || i >= a.Len() {
			return Motion{}, fmt.Errorf("bem: weight row %d outside the %d unknowns of the rows' surface", i, a.Len())
		}
		onRow[i] = true
	}
	onCol := make([]bool, b.Len())
	for _, j := range cols {
		if j < 0 || j >= b.Len() {
			return Motion{}, fmt.Errorf("bem: weight column %d outside the %d unknowns of the columns' surface", j, b.Len())
		}
		onCol[j] = true
	}
	var colPanels []int // panels of b with a listed column, ascending
	for t := range b.Panels {
		if e := b.edge[t]; onCol[e[0]] || onCol[e[1]] || onCol[e[2]] {
			colPanels = append(colPanels, t)
		}
	}
	onRowPanel := func(s int) bool {
		e := a.edge[s]
		return onRow[e[0]] || onRow[e[1]] || onRow[e[2]]
	}
	return as.contract(ctx, h, op, a, b, centre, onRowPanel, colPanels)
}

// CrossGradientBlock is CrossGradient for a weight that lives on the listed
// rows (basis indices of a) and columns (basis indices of b) only: h is
// len(rows) × len(cols), row major, with the weight of entry (rows[k],
// cols[l]) at k·len(cols)+l. Only the panels of the listed rows are
// integrated against the panels of the listed columns (the pairs
// CrossBlock integrates for the same lists); the result is that of
// CrossGradient with h placed in an otherwise zero matrix, to rounding.
func (as Assembler) CrossGradientBlock(ctx context.Context, h []float64, op *EFIE, a, b *Surface, centre r3.Vec, rows, cols []int) (Motion, error) {
	m, n := len(rows), len(cols)
	if len(h) != m*n {
		return Motion{}, fmt.Errorf("bem: a %d×%d weight needs %d values, have %d", m, n, m*n, len(h))
	}
	ri, err := positions(rows, a.Len(), "weight row")
	if err != nil {
		return Motion{}, err
	}
	ci, err := positions(cols, b.Len(), "weight column")
	if err != nil {
		return Motion{}, err
	}
	onRow := touched(a, ri)
	colPanels := listed(b, ci)
	part := make([]Motion, len(a.Panels))
	err = as.byColor(ctx, a, func(s int) {
		if !onRow[s] {
			return
		}
		var off [3]int
		for k, e := range a.edge[s] {
			off[k] = -1
			if r := ri[e]; r >= 0 {
				off[k] = r * n
			}
		}
		acc := &part[s]
		for _, t := range colPanels {
			var col [3]int
			for l, f := range b.edge[t] {
				col[l] = ci[f]
			}
			gradPairAt(acc, h, off, col, op, a, s, b, t, centre)
		}
	})
	var total Motion
	for _, p := range part {
		total.Translation = r3.Add(total.Translation, p.Translation)
		total.Rotation = r3.Add(total.Rotation, p.Rotation)
	}
	return total, err
}

// contract sums the derivatives of the pairs that carry weight: panel s of
// a against every panel of b when full(s), else against the panels others
// (ascending). Each panel of a keeps its own sum, added in panel order
// afterwards, so the result does not depend on how the threads were
// scheduled (a resumed or sharded run reproduces an uninterrupted one bit
// for bit).
func (as Assembler) contract(ctx context.Context, h *mat.Dense, op *EFIE, a, b *Surface, centre r3.Vec, full func(s int) bool, others []int) (Motion, error) {
	raw := h.RawMatrix()
	part := make([]Motion, len(a.Panels))
	err := as.byColor(ctx, a, func(s int) {
		acc := &part[s]
		if full(s) {
			for t := range b.Panels {
				gradPair(acc, raw.Data, raw.Stride, op, a, s, b, t, centre)
			}
			return
		}
		for _, t := range others {
			gradPair(acc, raw.Data, raw.Stride, op, a, s, b, t, centre)
		}
	})
	var total Motion
	for _, p := range part {
		total.Translation = r3.Add(total.Translation, p.Translation)
		total.Rotation = r3.Add(total.Rotation, p.Rotation)
	}
	return total, err
}

// gradPair adds the derivatives contributed by panel s of a and panel t of b,
// with the weights of the full matrix h (row stride stride).
func gradPair(acc *Motion, h []float64, stride int, op *EFIE, a *Surface, s int, b *Surface, t int, centre r3.Vec) {
	var off, col [3]int
	for k := 0; k < 3; k++ {
		off[k], col[k] = a.edge[s][k]*stride, b.edge[t][k]
	}
	gradPairAt(acc, h, off, col, op, a, s, b, t, centre)
}

// gradPairAt is gradPair with the weight of pairing (k, l) at
// h[off[k]+col[l]], or zero where off[k] or col[l] is negative.
func gradPairAt(acc *Motion, h []float64, off, col [3]int, op *EFIE, a *Surface, s int, b *Surface, t int, centre r3.Vec) {
	pp := collapse(h, off, col, op.Kappa, a, s, b, t, centre)
	if pp.S == 0 && pp.gamma == 0 && pp.alpha == (r3.Vec{}) && pp.beta == (r3.Vec{}) {
		return
	}
	ps, pt := &a.Panels[s], &b.Panels[t]
	lv, _ := op.Quad.level(op.Kernel, ps, pt)
	if lv < 0 {
		// Near pair of two bodies: subdivide until the sub-pairs are well
		// separated (they never touch, so this ends at the gap's scale).
		pp.subdivide(ps.V, ps.Centroid, pt.V, pt.Centroid, 0)
	} else {
		pp.product(a.points[lv][s], b.points[lv][t])
	}
	acc.Translation = r3.Add(acc.Translation, pp.force)
	acc.Rotation = r3.Add(acc.Rotation, pp.torque)
}

// collapse sums the nine RWG pairings of panels s and t with their weights
// h_kl c_k c_l (h_kl = h[off[k]+col[l]], zero where either is negative)
// into one polynomial in the local coordinates x̃, ỹ (relative to the
// centroids): Σ_kl h_kl (x-p_k)·(y-p_l) = S x̃·ỹ - x̃·α - ỹ·β + γ and
// Σ_kl h_kl (y-p_l)×(x-p_k) = S ỹ×x̃ - ỹ×β - α×x̃ + δ.
func collapse(h []float64, off, col [3]int, kappa float64, a *Surface, s int, b *Surface, t int, centre r3.Vec) pairPoly {
	ps, pt := &a.Panels[s], &b.Panels[t]
	pp := pairPoly{kappa: kappa, lever: r3.Sub(pt.Centroid, centre), sep: subSeparation, leaf: subRule}
	for k := 0; k < 3; k++ {
		if off[k] < 0 {
			continue
		}
		pk := r3.Sub(ps.V[k], ps.Centroid)
		row := h[off[k]:]
		for l := 0; l < 3; l++ {
			if col[l] < 0 {
				continue
			}
			pl := r3.Sub(pt.V[l], pt.Centroid)
			w := row[col[l]] * a.coef[s][k] * b.coef[t][l]
			pp.S += w
			pp.alpha = r3.Add(pp.alpha, r3.Scale(w, pl))
			pp.beta = r3.Add(pp.beta, r3.Scale(w, pk))
			pp.gamma += w * r3.Dot(pk, pl)
			pp.delta = r3.Add(pp.delta, r3.Scale(w, r3.Cross(pl, pk)))
		}
	}
	return pp
}

// pairPoly is the collapsed polynomial weight of one triangle pair and the
// derivatives accumulated for it.
type pairPoly struct {
	kappa, S, gamma    float64
	alpha, beta, delta r3.Vec
	lever              r3.Vec  // centroid of the moving panel minus the centre of rotation
	sep                float64 // separation, in sub-triangle sizes, that ends the subdivision
	leaf               *Rule   // rule on the sub-triangles
	force, torque      r3.Vec
}

// subRule is the product rule applied to well-separated sub-triangles, and
// subSeparation the centroid distance, in sub-triangle sizes, that counts as
// well separated.
var subRule = Radon7()

const (
	subSeparation = 3
	subDepth      = 12
)

// subdivide integrates over the triangles u (of the observation panel, whose
// centroid is cu) and v (of the moving panel, centroid cv), splitting the
// larger into four at its edge midpoints until the two are well separated.
func (pp *pairPoly) subdivide(u [3]r3.Vec, cu r3.Vec, v [3]r3.Vec, cv r3.Vec, depth int) {
	su, sv := triSize(u), triSize(v)
	gu, gv := triCentroid(u), triCentroid(v)
	if r3.Norm(r3.Sub(gu, gv)) >= pp.sep*math.Max(su, sv) || depth >= subDepth {
		pp.product(subPoints(u, cu, pp.leaf), subPoints(v, cv, pp.leaf))
		return
	}
	if su >= sv {
		for _, q := range splitTriangle(u) {
			pp.subdivide(q, cu, v, cv, depth+1)
		}
		return
	}
	for _, q := range splitTriangle(v) {
		pp.subdivide(u, cu, q, cv, depth+1)
	}
}

func triSize(v [3]r3.Vec) float64 {
	return math.Max(r3.Norm(r3.Sub(v[1], v[0])), math.Max(r3.Norm(r3.Sub(v[2], v[1])), r3.Norm(r3.Sub(v[0], v[2]))))
}

func triCentroid(v [3]r3.Vec) r3.Vec { return r3.Scale(1.0/3, r3.Add(r3.Add(v[0], v[1]), v[2])) }

// splitTriangle returns the four midpoint sub-triangles of v.
func splitTriangle(v [3]r3.Vec) [4][3]r3.Vec {
	m01 := r3.Scale(0.5, r3.Add(v[0], v[1]))
	m12 := r3.Scale(0.5, r3.Add(v[1], v[2]))
	m20 := r3.Scale(0.5, r3.Add(v[2], v[0]))
	return [4][3]r3.Vec{{v[0], m01, m20}, {m01, v[1], m12}, {m20, m12, v[2]}, {m01, m12, m20}}
}

// subPoints returns the points of rule r on triangle v with positions
// relative to the parent panel's centroid c.
func subPoints(v [3]r3.Vec, c r3.Vec, r *Rule) []qpoint {
	area := r3.Norm(r3.Cross(r3.Sub(v[1], v[0]), r3.Sub(v[2], v[0]))) / 2
	q := make([]qpoint, r.Len())
	for i, b := range r.Bary {
		x := r3.Add(r3.Add(r3.Scale(b[0], v[0]), r3.Scale(b[1], v[1])), r3.Scale(b[2], v[2]))
		q[i] = qpoint{x: x, rel: r3.Sub(x, c), w: r.Weight[i] * area}
	}
	return q
}

// product integrates the pair's derivative integrands with a product rule.
// Per point pair the force density is w W g d (d = x - y, W the collapsed
// RWG weight) and the torque density (lever + ỹ) × that plus w κ G times
// the turning basis S ỹ×x̃ - ỹ×β - α×x̃ + δ; the parts that are linear in
// x̃ or ỹ alone, and the lever, are summed first and crossed once per
// pair of panels. The exponential is fastExp.
func (pp *pairPoly) product(xs, ys []qpoint) {
	kappa, S, alpha, beta, gamma := pp.kappa, pp.S, pp.alpha, pp.beta, pp.gamma
	div := 4 * S / kappa
	var fx, fy, fz float64      // Σ fd
	var tx, ty, tz float64      // Σ ỹ × fd
	var sx, sy, sz float64      // Σ c2 ỹ × x̃
	var yx, yy, yz float64      // Σ c2 ỹ
	var qx, qy, qz, c2s float64 // Σ c2 x̃, Σ c2
	for i := range xs {
		x := &xs[i]
		xa := x.rel.X*alpha.X + x.rel.Y*alpha.Y + x.rel.Z*alpha.Z
		var gx, gy, gz, c2x float64 // this row's Σ c2 ỹ and Σ c2
		for j := range ys {
			y := &ys[j]
			dx, dy, dz := x.x.X-y.x.X, x.x.Y-y.x.Y, x.x.Z-y.x.Z
			R := math.Sqrt(dx*dx + dy*dy + dz*dz)
			inv := 1 / R
			e := fastExp(-kappa*R) * inv4Pi
			G := e * inv
			g := (1 + kappa*R) * G * inv * inv
			w := x.w * y.w
			xy := x.rel.X*y.rel.X + x.rel.Y*y.rel.Y + x.rel.Z*y.rel.Z
			yb := y.rel.X*beta.X + y.rel.Y*beta.Y + y.rel.Z*beta.Z
			W := kappa*(S*xy-xa-yb+gamma) + div
			c1 := w * W * g
			ex, ey, ez := c1*dx, c1*dy, c1*dz
			fx += ex
			fy += ey
			fz += ez
			tx += y.rel.Y*ez - y.rel.Z*ey
			ty += y.rel.Z*ex - y.rel.X*ez
			tz += y.rel.X*ey - y.rel.Y*ex
			c2 := w * kappa * G
			sx += c2 * (y.rel.Y*x.rel.Z - y.rel.Z*x.rel.Y)
			sy += c2 * (y.rel.Z*x.rel.X - y.rel.X*x.rel.Z)
			sz += c2 * (y.rel.X*x.rel.Y - y.rel.Y*x.rel.X)
			gx += c2 * y.rel.X
			gy += c2 * y.rel.Y
			gz += c2 * y.rel.Z
			c2x += c2
		}
		yx += gx
		yy += gy
		yz += gz
		qx += c2x * x.rel.X
		qy += c2x * x.rel.Y
		qz += c2x * x.rel.Z
		c2s += c2x
	}
	f := r3.Vec{X: fx, Y: fy, Z: fz}
	pp.force = r3.Add(pp.force, f)
	// Σ (lever + ỹ) × fd + Σ c2 (S ỹ×x̃ - ỹ×β - α×x̃ + δ).
	t := r3.Add(r3.Cross(pp.lever, f), r3.Vec{X: tx, Y: ty, Z: tz})
	t = r3.Add(t, r3.Scale(S, r3.Vec{X: sx, Y: sy, Z: sz}))
	t = r3.Sub(t, r3.Cross(r3.Vec{X: yx, Y: yy, Z: yz}, beta))
	t = r3.Sub(t, r3.Cross(alpha, r3.Vec{X: qx, Y: qy, Z: qz}))
	t = r3.Add(t, r3.Scale(c2s, pp.delta))
	pp.torque = r3.Add(pp.torque, t)
}
