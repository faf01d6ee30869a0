package bem

import (
	"context"
	"fmt"
	"sync"
)

// CrossRows assembles selected rows of the interaction block between
// surfaces a (rows) and b (columns) without the rest of the block: row k of
// dst (len(rows) × b.Len(), overwritten) is row rows[k] of the block Cross
// writes. An RWG row is the two panels of edge rows[k] of a against every
// panel of b, so a row costs 2·len(b.Panels) pair integrals; the entries are
// the Cross block's to rounding (the same Operator.Pair calls, summed in
// another order). Compressed backends (adaptive cross approximation) sample
// a block this way.
func (as Assembler) CrossRows(ctx context.Context, dst []float64, op Operator, a, b *Surface, rows []int) error {
	nb := b.Len()
	if len(dst) != len(rows)*nb {
		return fmt.Errorf("bem: %d rows of a block with %d columns need %d values, have %d", len(rows), nb, len(rows)*nb, len(dst))
	}
	for k, e := range rows {
		if e < 0 || e >= a.Len() {
			return fmt.Errorf("bem: row %d out of range (surface has %d unknowns)", e, a.Len())
		}
		out := dst[k*nb : (k+1)*nb]
		err := as.sampled(ctx, out, a, e, len(b.Panels), func(s, ks, t int, blk *[3][3]float64, acc []float64) {
			op.Pair(blk, a, s, b, t, false)
			for l := 0; l < 3; l++ {
				acc[b.edge[t][l]] += blk[ks][l]
			}
		})
		if err != nil {
			return err
		}
	}
	return nil
}

// CrossColumns assembles selected columns of the interaction block between
// surfaces a (rows) and b (columns): row k of dst (len(cols) × a.Len(),
// overwritten) is column cols[k] of the block Cross writes, stored
// contiguously. A column costs 2·len(a.Panels) pair integrals; the entries
// are the Cross block's to rounding (the pairs are integrated with a as the
// observation surface, as in Cross).
func (as Assembler) CrossColumns(ctx context.Context, dst []float64, op Operator, a, b *Surface, cols []int) error {
	na := a.Len()
	if len(dst) != len(cols)*na {
		return fmt.Errorf("bem: %d columns of a block with %d rows need %d values, have %d", len(cols), na, len(cols)*na, len(dst))
	}
	for k, e := range cols {
		if e < 0 || e >= b.Len() {
			return fmt.Errorf("bem: column %d out of range (surface has %d unknowns)", e, b.Len())
		}
		out := dst[k*na : (k+1)*na]
		err := as.sampled(ctx, out, b, e, len(a.Panels), func(t, lt, s int, blk *[3][3]float64, acc []float64) {
			op.Pair(blk, a, s, b, t, false)
			for k := 0; k < 3; k++ {
				acc[a.edge[s][k]] += blk[k][lt]
			}
		})
		if err != nil {
			return err
		}
	}
	return nil
}

// sampled accumulates into out (overwritten) the contributions of the two
// panels of edge e of surface own against every panel 0..np-1 of the other
// surface: add(p, k, q, blk, acc) integrates panel p of own (on which e is
// local edge k) against panel q of the other and adds its entries to acc.
// The panels q are shared among the goroutines, each with its own
// accumulator, summed at the end.
func (as Assembler) sampled(ctx context.Context, out []float64, own *Surface, e, np int, add func(p, k, q int, blk *[3][3]float64, acc []float64)) error {
	ed := own.Basis.Edges[e]
	type half struct{ p, k int }
	var halves [2]half
	for i, p := range [2]int{ed.Plus, ed.Minus} {
		halves[i] = half{p: p, k: -1}
		for k := 0; k < 3; k++ {
			if own.edge[p][k] == e {
				halves[i].k = k
			}
		}
		if halves[i].k < 0 {
			return fmt.Errorf("bem: edge %d is not an edge of its triangle %d", e, p)
		}
	}
	for i := range out {
		out[i] = 0
	}
	nw := min(as.threads(), max(1, np/64))
	accs := make([][]float64, nw)
	var wg sync.WaitGroup
	for w := 0; w < nw; w++ {
		acc := out
		if w > 0 {
			acc = make([]float64, len(out))
		}
		accs[w] = acc
		wg.Add(1)
		go func(w int) {
			defer wg.Done()
			var blk [3][3]float64
			lo, hi := w*np/nw, (w+1)*np/nw
			for _, h := range halves {
				for q := lo; q < hi; q++ {
					add(h.p, h.k, q, &blk, acc)
				}
			}
		}(w)
	}
	wg.Wait()
	for _, acc := range accs[1:] {
		for i, v := range acc {
			out[i] += v
		}
	}
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("bem: assembly: %w", err)
	}
	return nil
}

// CrossBlock assembles the entries of the interaction block between
// surfaces a (rows) and b (columns) on the listed rows and columns only:
// dst (len(rows) × len(cols), row major, overwritten) holds entry
// (rows[k], cols[l]) at k·len(cols)+l. Only the panels of the listed rows
// are integrated against the panels of the listed columns, so a sub-block
// of edges whose panels cluster costs about (2·len(rows))·(2·len(cols))
// pair integrals or fewer; the entries are the Cross block's to rounding.
// Sampled bases (interpolation on a few rows and columns of a block) fill
// their samples this way.
func (as Assembler) CrossBlock(ctx context.Context, dst []float64, op Operator, a, b *Surface, rows, cols []int) error {
	m, n := len(rows), len(cols)
	if len(dst) != m*n {
		return fmt.Errorf("bem: a %d×%d sub-block needs %d values, have %d", m, n, m*n, len(dst))
	}
	ri, err := positions(rows, a.Len(), "row")
	if err != nil {
		return err
	}
	ci, err := positions(cols, b.Len(), "column")
	if err != nil {
		return err
	}
	for i := range dst {
		dst[i] = 0
	}
	onRow := touched(a, ri)
	colPanels := listed(b, ci)
	// byColor never runs two panels of a that share an edge at once, so
	// the rows each panel adds to are its own.
	return as.byColor(ctx, a, func(s int) {
		if !onRow[s] {
			return
		}
		var blk [3][3]float64
		for _, t := range colPanels {
			op.Pair(&blk, a, s, b, t, false)
			for k, e := range a.edge[s] {
				r := ri[e]
				if r < 0 {
					continue
				}
				row := dst[r*n : (r+1)*n]
				for l, f := range b.edge[t] {
					if c := ci[f]; c >= 0 {
						row[c] += blk[k][l]
					}
				}
			}
		}
	})
}

// positions returns, for each of the n unknowns of a surface, its position
// in list or -1; an index outside 0..n-1 or listed twice is an error.
func positions(list []int, n int, what string) ([]int, error) {
	pos := make([]int, n)
	for i := range pos {
		pos[i] = -1
	}
	for k, e := range list {
		if e < 0 || e >= n {
			return nil, fmt.Errorf("bem: %s %d outside the %d unknowns of its surface", what, e, n)
		}
		if pos[e] >= 0 {
			return nil, fmt.Errorf("bem: %s %d listed twice", what, e)
		}
		pos[e] = k
	}
	return pos, nil
}

// touched reports for each panel of s whether one of its edges has a
// position (pos ≥ 0).
func touched(s *Surface, pos []int) []bool {
	on := make([]bool, len(s.Panels))
	for t := range s.Panels {
		e := s.edge[t]
		on[t] = pos[e[0]] >= 0 || pos[e[1]] >= 0 || pos[e[2]] >= 0
	}
	return on
}

// listed returns the panels of s with an edge that has a position,
// ascending.
func listed(s *Surface, pos []int) []int {
	var ps []int
	for t, on := range touched(s, pos) {
		if on {
			ps = append(ps, t)
		}
	}
	return ps
}
