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
