package bem

import (
	"context"
	"fmt"
	"runtime"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/mat"
)

// Assembler is the dense assembly backend: it loops over triangle pairs in
// parallel and accumulates their 3×3 contributions into RWG blocks. Panels of
// one color share no edge, so the goroutines working on one color write
// disjoint rows and need no locks.
type Assembler struct {
	// Threads is the number of goroutines; 0 means GOMAXPROCS.
	Threads int
}

func (as Assembler) threads() int {
	if as.Threads > 0 {
		return as.Threads
	}
	return runtime.GOMAXPROCS(0)
}

// chunk is the number of panels a goroutine takes at a time.
const chunk = 4

// Self assembles the symmetric block of surface a with itself into dst, which
// must be a.Len()×a.Len() (it is overwritten). Only pairs s ≤ t are
// integrated; the block is A + Aᵀ with the diagonal pairs halved, which makes
// it exactly symmetric.
func (as Assembler) Self(ctx context.Context, dst *mat.SymDense, op Operator, a *Surface) error {
	n := a.Len()
	if dst.SymmetricDim() != n {
		return fmt.Errorf("bem: self block is %d×%d, surface has %d unknowns", dst.SymmetricDim(), dst.SymmetricDim(), n)
	}
	raw := dst.RawSymmetric()
	data, stride := raw.Data, raw.Stride
	for i := 0; i < n; i++ {
		row := data[i*stride : i*stride+n]
		for j := range row {
			row[j] = 0
		}
	}
	np := len(a.Panels)
	err := as.byColor(ctx, a, func(s int) {
		var blk [3][3]float64
		for t := s; t < np; t++ {
			op.Pair(&blk, a, s, a, t, true)
			f := 1.0
			if t == s {
				f = 0.5
			}
			for k := 0; k < 3; k++ {
				row := data[a.edge[s][k]*stride:]
				for l := 0; l < 3; l++ {
					row[a.edge[t][l]] += f * blk[k][l]
				}
			}
		}
	})
	if err != nil {
		return err
	}
	// Symmetrise into the upper triangle: M = A + Aᵀ.
	for i := 0; i < n; i++ {
		data[i*stride+i] *= 2
		for j := i + 1; j < n; j++ {
			data[i*stride+j] += data[j*stride+i]
		}
	}
	return nil
}

// Cross assembles the interaction block between surfaces a (rows) and b
// (columns) into dst, which must be a.Len()×b.Len() (it is overwritten).
func (as Assembler) Cross(ctx context.Context, dst *mat.Dense, op Operator, a, b *Surface) error {
	r, c := dst.Dims()
	if r != a.Len() || c != b.Len() {
		return fmt.Errorf("bem: cross block is %d×%d, surfaces have %d and %d unknowns", r, c, a.Len(), b.Len())
	}
	raw := dst.RawMatrix()
	data, stride := raw.Data, raw.Stride
	for i := 0; i < r; i++ {
		row := data[i*stride : i*stride+c]
		for j := range row {
			row[j] = 0
		}
	}
	return as.byColor(ctx, a, func(s int) {
		var blk [3][3]float64
		var rows [3][]float64
		for k := range rows {
			e := a.edge[s][k]
			rows[k] = data[e*stride : e*stride+c]
		}
		for t := range b.Panels {
			op.Pair(&blk, a, s, b, t, false)
			cols := &b.edge[t]
			for k := range rows {
				row := rows[k]
				for l, j := range cols {
					row[j] += blk[k][l]
				}
			}
		}
	})
}

// byColor runs work(s) for every panel s of a, color by color, with the panels
// of each color shared dynamically among the goroutines.
func (as Assembler) byColor(ctx context.Context, a *Surface, work func(s int)) error {
	nw := as.threads()
	for _, class := range a.colors {
		var next atomic.Int64
		var wg sync.WaitGroup
		for w := 0; w < nw; w++ {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for {
					if ctx.Err() != nil {
						return
					}
					i := int(next.Add(chunk)) - chunk
					if i >= len(class) {
						return
					}
					for _, s := range class[i:min(i+chunk, len(class))] {
						work(s)
					}
				}
			}()
		}
		wg.Wait()
		if err := ctx.Err(); err != nil {
			return fmt.Errorf("bem: assembly: %w", err)
		}
	}
	return nil
}
