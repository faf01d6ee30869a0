package bem

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// TestCrossRowsColumns checks that sampled rows and columns equal those of
// the dense Cross block. They come from the same pair integrals summed in
// another order, so they agree to rounding: 1e-13 of the block's largest
// entry (a few ulps of the four-term sums). The close placement (gap 0.1 of
// the radius) includes near pairs with the edge-reduced rules; the far one
// only product rules.
func TestCrossRowsColumns(t *testing.T) {
	a := testSurface(t, 3)
	ctx := context.Background()
	for _, tc := range []struct {
		name  string
		shift r3.Vec
		kappa float64
	}{
		{"close", r3.Vec{X: 0.05, Z: 2.1}, 0.8},
		{"far", r3.Vec{Y: 1, Z: 5}, 2},
	} {
		t.Run(tc.name, func(t *testing.T) {
			b := a.Translate(tc.shift)
			op, err := NewEFIE(tc.kappa)
			if err != nil {
				t.Fatal(err)
			}
			as := Assembler{Threads: 2}
			dense := mat.NewDense(a.Len(), b.Len(), nil)
			if err := as.Cross(ctx, dense, op, a, b); err != nil {
				t.Fatal(err)
			}
			scale := mat.Norm(dense, math.Inf(1)) / float64(b.Len())
			rows := []int{0, 7, a.Len() / 2, a.Len() - 1}
			got := make([]float64, len(rows)*b.Len())
			if err := as.CrossRows(ctx, got, op, a, b, rows); err != nil {
				t.Fatal(err)
			}
			for k, i := range rows {
				for j := 0; j < b.Len(); j++ {
					if d := math.Abs(got[k*b.Len()+j] - dense.At(i, j)); d > 1e-13*scale {
						t.Fatalf("row %d, column %d: %g, dense %g", i, j, got[k*b.Len()+j], dense.At(i, j))
					}
				}
			}
			cols := []int{3, b.Len() / 3, b.Len() - 2}
			gotc := make([]float64, len(cols)*a.Len())
			if err := as.CrossColumns(ctx, gotc, op, a, b, cols); err != nil {
				t.Fatal(err)
			}
			for k, j := range cols {
				for i := 0; i < a.Len(); i++ {
					if d := math.Abs(gotc[k*a.Len()+i] - dense.At(i, j)); d > 1e-13*scale {
						t.Fatalf("column %d, row %d: %g, dense %g", j, i, gotc[k*a.Len()+i], dense.At(i, j))
					}
				}
			}
			if err := as.CrossRows(ctx, got[:b.Len()], op, a, b, []int{a.Len()}); err == nil {
				t.Error("a row out of range gave no error")
			}
		})
	}
}

// TestCrossBlock checks a sub-block on scattered rows and columns against
// the dense Cross block: the same pair integrals summed in another order,
// so they agree to rounding (1e-13 of the block's largest entry, as for the
// rows), and bad lists are errors.
func TestCrossBlock(t *testing.T) {
	a := testSurface(t, 3)
	b := a.Translate(r3.Vec{X: 0.05, Z: 2.1})
	op, err := NewEFIE(0.8)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	as := Assembler{Threads: 2}
	dense := mat.NewDense(a.Len(), b.Len(), nil)
	if err := as.Cross(ctx, dense, op, a, b); err != nil {
		t.Fatal(err)
	}
	scale := mat.Norm(dense, math.Inf(1)) / float64(b.Len())
	rows := []int{a.Len() - 1, 0, 7, 8, a.Len() / 2}
	cols := []int{3, b.Len() / 3, 4, b.Len() - 2}
	got := make([]float64, len(rows)*len(cols))
	if err := as.CrossBlock(ctx, got, op, a, b, rows, cols); err != nil {
		t.Fatal(err)
	}
	for k, i := range rows {
		for l, j := range cols {
			if d := math.Abs(got[k*len(cols)+l] - dense.At(i, j)); d > 1e-13*scale {
				t.Errorf("entry (%d, %d): %g, dense %g", i, j, got[k*len(cols)+l], dense.At(i, j))
			}
		}
	}
	for _, bad := range [][2][]int{{{-1}, {0}}, {{0}, {b.Len()}}, {{2, 2}, {0}}} {
		if err := as.CrossBlock(ctx, make([]float64, len(bad[0])*len(bad[1])), op, a, b, bad[0], bad[1]); err == nil {
			t.Errorf("rows %v, columns %v accepted", bad[0], bad[1])
		}
	}
}
