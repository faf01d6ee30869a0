package scatter

import (
	"context"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/blas/blas64"

	"github.com/fluctus/fluctus/bem"
	"github.com/fluctus/fluctus/mesh"
)

// This file holds the balanced coordinates of the sweep basis at low κ
// (DESIGN §10). In RWG coordinates the block M = κA + B/κ is dominated by
// the charge term, and the divergence-free (loop) currents, which couple
// through κA only, need the block to a tolerance (κa)² tighter
// (scaledTolerance): the bases grow by half again or more below κa ≈ 0.3.
// In the loop–tree basis of each body (mesh.LoopTree, x = T y), with each
// function scaled to unit self-interaction,
//
//	x = T S y,  S = diag(s),  s_j = ((Tᵀ M_ii T)_jj)^-1/2,
//
// loops and charges weigh alike, M' = (T0 S0)ᵀ M01 (T1 S1), and the plain
// block tolerance holds the integrand: the two-body integrand does not
// change under a change of basis of either body (the whitened block
// L'^-1 M' L'^-T is the RWG one in other coordinates). Measured between
// two 1280-triangle spheres at gap R/2 and κR = 0.0048: rank 159 of the
// balanced block at the block tolerance against 332 in RWG coordinates at
// the tightened one (131 for the whitened block itself); at gap 1.2R, 85
// against 168. At κa near 1 the RWG block is the smaller (108–120 against
// 146–156 at κR = 0.5–2), hence balanceBelow.

// balanceBelow is the tightening factor min(1, (κa)²) of scaledTolerance
// below which the sweep basis works in balanced coordinates: measured on
// the spheres above, the references' rank at a quarter of the tolerance is
// 381, 299 and 221 in RWG coordinates at κR = 0.0048, 0.019 and 0.079
// (factors 3e-4, 5e-3 and 0.075) against 195 balanced.
const balanceBelow = 0.1

// balanceAt returns the balanced coordinates of the two bodies at the κ of
// sf, or two nils where the sweep basis stays in RWG coordinates: at κa
// with min(1, (κa)²) ≥ balanceBelow (a the larger bounding-box diagonal, as
// in scaledTolerance), or where a body has no loop–tree basis.
func (sys *system) balanceAt(sf *selfFactors) ([2]*balance, error) {
	var bal [2]*balance
	if len(sys.surf) != 2 || sys.loops[0] == nil || sys.loops[1] == nil || len(sf.f) != 2 {
		return bal, nil
	}
	_, size := surfacesClose(sys.surf[0], sys.surf[1])
	if scaledTolerance(1, sf.kappa, size) >= balanceBelow {
		return bal, nil
	}
	for i := range bal {
		bal[i] = newBalance(sys.loops[i], sf.f[i].l)
		for j, s := range bal[i].s {
			if !(s > 0) || math.IsInf(s, 0) {
				return [2]*balance{}, fmt.Errorf("scatter: balanced coordinates of %s at κ = %g: function %d has self-interaction %g", sys.names[i], sf.kappa, j, 1/(s*s))
			}
		}
	}
	return bal, nil
}

// balance is one body's balanced coordinates at one κ: its loop–tree basis
// and the scales s.
type balance struct {
	lt *mesh.LoopTree
	s  []float64
}

// newBalance returns the balanced coordinates of the loop–tree basis lt for
// the self block M = L Lᵀ (l its Cholesky factor): (Tᵀ M T)_jj =
// Σ_{e,f} T_ej T_fj L[e,:]·L[f,:] over the few edges of column j.
func newBalance(lt *mesh.LoopTree, l blas64.Triangular) *balance {
	n := lt.Len()
	bl := &balance{lt: lt, s: make([]float64, n)}
	row := func(e int) []float64 { return l.Data[e*l.Stride : e*l.Stride+e+1] }
	for j := 0; j < n; j++ {
		edges, coefs := lt.Column(j)
		d := 0.0
		for a, e := range edges {
			for b, f := range edges {
				k := min(e, f) + 1
				d += coefs[a] * coefs[b] * dot(row(e)[:k], row(f)[:k])
			}
		}
		bl.s[j] = 1 / math.Sqrt(d)
	}
	return bl
}

// column returns the RWG edges and coefficients of column j of T S.
func (bl *balance) column(j int) ([]int, []float64) {
	edges, coefs := bl.lt.Column(j)
	for k := range coefs {
		coefs[k] *= bl.s[j]
	}
	return edges, coefs
}

// transRows sets dst = (T S)ᵀ src for row-major N×k matrices.
func (bl *balance) transRows(dst, src []float64, k int) {
	bl.lt.MulTrans(dst, src, k)
	for j, s := range bl.s {
		blas64.Scal(s, blas64.Vector{N: k, Inc: 1, Data: dst[j*k : (j+1)*k]})
	}
}

// invTransRows sets dst = (T S)^-T src = T^-T S^-1 src for row-major N×k
// matrices: a basis of balanced currents as RWG coefficients that give the
// same block entries (M01 = (T0 S0)^-T M' (T1 S1)^-1).
func (bl *balance) invTransRows(dst, src []float64, k int) {
	tmp := append([]float64(nil), src[:bl.lt.Len()*k]...)
	for j, s := range bl.s {
		blas64.Scal(1/s, blas64.Vector{N: k, Inc: 1, Data: tmp[j*k : (j+1)*k]})
	}
	bl.lt.SolveTrans(dst, tmp, k)
}

// crossSource gives rows and columns of an interaction block to the
// adaptive cross approximation and to the sampled path's checks: the RWG
// block itself or its balanced form.
type crossSource interface {
	size() (m, n int)
	// rows writes the listed rows (each n values) and cols the listed
	// columns (each m values, stored as a row) into dst.
	rows(ctx context.Context, dst []float64, idx []int) error
	cols(ctx context.Context, dst []float64, idx []int) error
}

// rwgSource is the RWG block between surfaces a (rows) and b (columns).
type rwgSource struct {
	asm  bem.Assembler
	op   bem.Operator
	a, b *bem.Surface
}

func (s rwgSource) size() (int, int) { return s.a.Len(), s.b.Len() }
func (s rwgSource) rows(ctx context.Context, dst []float64, idx []int) error {
	return s.asm.CrossRows(ctx, dst, s.op, s.a, s.b, idx)
}
func (s rwgSource) cols(ctx context.Context, dst []float64, idx []int) error {
	return s.asm.CrossColumns(ctx, dst, s.op, s.a, s.b, idx)
}

// balancedSource is M' = (T0 S0)ᵀ M01 (T1 S1) between surfaces a and b with
// the balanced coordinates bal of their bodies. A row of M' combines the
// RWG rows of the few edges of its function (CrossBlock against every
// column, so the panels around a loop's vertex are integrated once), and
// then maps the combined row by (T1 S1)ᵀ; columns likewise.
type balancedSource struct {
	asm  bem.Assembler
	op   bem.Operator
	a, b *bem.Surface
	bal  [2]*balance
	all  [2][]int // 0 … N_i - 1
}

func newBalancedSource(asm bem.Assembler, op bem.Operator, a, b *bem.Surface, bal [2]*balance) *balancedSource {
	src := &balancedSource{asm: asm, op: op, a: a, b: b, bal: bal}
	for i, s := range []*bem.Surface{a, b} {
		src.all[i] = make([]int, s.Len())
		for k := range src.all[i] {
			src.all[i][k] = k
		}
	}
	return src
}

func (s *balancedSource) size() (int, int) { return s.a.Len(), s.b.Len() }

// rows writes rows fns of M' (len(fns) × N1) into dst.
func (s *balancedSource) rows(ctx context.Context, dst []float64, fns []int) error {
	n := s.b.Len()
	edges, at := supportOf(s.bal[0], fns)
	blk := make([]float64, len(edges)*n)
	if err := s.asm.CrossBlock(ctx, blk, s.op, s.a, s.b, edges, s.all[1]); err != nil {
		return err
	}
	comb := make([]float64, len(fns)*n)
	for k, terms := range at {
		for _, t := range terms {
			axpy(t.c, blk[t.pos*n:(t.pos+1)*n], comb[k*n:(k+1)*n])
		}
	}
	mapRows(dst, comb, len(fns), n, s.bal[1])
	return nil
}

// cols writes columns fns of M' (len(fns) × N0, each column stored as a
// row) into dst.
func (s *balancedSource) cols(ctx context.Context, dst []float64, fns []int) error {
	m := s.a.Len()
	edges, at := supportOf(s.bal[1], fns)
	ne := len(edges)
	blk := make([]float64, m*ne) // M01[:, edges], m × ne
	if err := s.asm.CrossBlock(ctx, blk, s.op, s.a, s.b, s.all[0], edges); err != nil {
		return err
	}
	comb := make([]float64, len(fns)*m)
	for k, terms := range at {
		c := comb[k*m : (k+1)*m]
		for _, t := range terms {
			blas64.Axpy(t.c, blas64.Vector{N: m, Inc: ne, Data: blk[t.pos:]}, blas64.Vector{N: m, Inc: 1, Data: c})
		}
	}
	mapRows(dst, comb, len(fns), m, s.bal[0])
	return nil
}

// mapRows sets each of the c rows of dst (c × n) to (T S)ᵀ of the same row
// of src, for the balance bl of the n-side: the rows are transposed to
// n × c, mapped, and transposed back.
func mapRows(dst, src []float64, c, n int, bl *balance) {
	if c == 1 {
		bl.transRows(dst[:n], src[:n], 1)
		return
	}
	t := transpose(blas64.General{Rows: c, Cols: n, Stride: n, Data: src})
	out := make([]float64, n*c)
	bl.transRows(out, t.Data, c)
	copy(dst[:c*n], transpose(blas64.General{Rows: n, Cols: c, Stride: c, Data: out}).Data)
}

// term is one RWG edge of a balanced function: its position in a support
// list and its coefficient.
type term struct {
	pos int
	c   float64
}

// supportOf returns the RWG edges that the functions fns of bl use,
// ascending, and for each function its terms on that list.
func supportOf(bl *balance, fns []int) ([]int, [][]term) {
	pos := map[int]int{}
	var edges []int
	cols := make([][]int, len(fns))
	coefs := make([][]float64, len(fns))
	for k, j := range fns {
		cols[k], coefs[k] = bl.column(j)
		for _, e := range cols[k] {
			if _, ok := pos[e]; !ok {
				pos[e] = 0
				edges = append(edges, e)
			}
		}
	}
	slices.Sort(edges)
	for i, e := range edges {
		pos[e] = i
	}
	at := make([][]term, len(fns))
	for k := range fns {
		for l, e := range cols[k] {
			at[k] = append(at[k], term{pos[e], coefs[k][l]})
		}
	}
	return edges, at
}

// balancedSub sets s (m0×m1) to P0ᵀ raw P1 for the RWG sub-block raw
// (len(supp0) × n1, row major) and the terms of the balanced functions on
// both sides (P_i sparse, a few edges per function).
func balancedSub(s, raw []float64, n1 int, t0, t1 [][]term) {
	m1 := len(t1)
	n0 := len(raw) / n1
	tmp := make([]float64, n0*m1) // raw P1
	for r := 0; r < n0; r++ {
		row, out := raw[r*n1:(r+1)*n1], tmp[r*m1:(r+1)*m1]
		for j, ts := range t1 {
			v := 0.0
			for _, t := range ts {
				v += t.c * row[t.pos]
			}
			out[j] = v
		}
	}
	clear(s[:len(t0)*m1])
	for i, ts := range t0 {
		out := s[i*m1 : (i+1)*m1]
		for _, t := range ts {
			axpy(t.c, tmp[t.pos*m1:(t.pos+1)*m1], out)
		}
	}
}

// balancedWeight sets hr (len(supp0) × n1) to P0 h P1ᵀ for the weight h
// (m0×m1) on balanced functions, the transpose of balancedSub: with it
// <h, P0ᵀ dM P1> = <hr, dM>.
func balancedWeight(hr, h []float64, n1, m1 int, t0, t1 [][]term) {
	n0 := len(hr) / n1
	tmp := make([]float64, n0*m1) // P0 h
	for i, ts := range t0 {
		in := h[i*m1 : (i+1)*m1]
		for _, t := range ts {
			axpy(t.c, in, tmp[t.pos*m1:(t.pos+1)*m1])
		}
	}
	clear(hr)
	for r := 0; r < n0; r++ {
		in, out := tmp[r*m1:(r+1)*m1], hr[r*n1:(r+1)*n1]
		for j, ts := range t1 {
			v := in[j]
			if v == 0 {
				continue
			}
			for _, t := range ts {
				out[t.pos] += t.c * v
			}
		}
	}
}
