package bem

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// TestSelfBlockSymmetricPositive checks the properties DESIGN §3 states for
// M(κ): real, symmetric and positive definite for κ > 0 (G is a positive
// definite kernel). Symmetry holds exactly by construction; positive
// definiteness is checked by Cholesky and by the smallest eigenvalue.
func TestSelfBlockSymmetricPositive(t *testing.T) {
	s := testSurface(t, 3)
	for _, kappa := range []float64{1e-3, 0.5, 4} {
		op, _ := NewEFIE(kappa)
		n := s.Len()
		m := mat.NewSymDense(n, nil)
		if err := (Assembler{}).Self(context.Background(), m, op, s); err != nil {
			t.Fatal(err)
		}
		var ch mat.Cholesky
		if !ch.Factorize(m) {
			t.Errorf("κ=%g: self block not positive definite", kappa)
		}
		var eig mat.EigenSym
		if !eig.Factorize(m, false) {
			t.Fatalf("κ=%g: eigen decomposition failed", kappa)
		}
		if v := eig.Values(nil); v[0] <= 0 {
			t.Errorf("κ=%g: smallest eigenvalue %g", kappa, v[0])
		}
	}
}

// TestCrossBlockTransposes checks that the interaction block of (a, b) is the
// transpose of that of (b, a) to the quadrature accuracy (1e-5 of the block's
// norm: near pairs put the outer rule on the first panel, so the two orders
// integrate differently), and that translating both surfaces together leaves
// it unchanged (relative 1e-12: the moments use panel-local origins, so the
// coordinates' size does not enter).
func TestCrossBlockTransposes(t *testing.T) {
	a := testSurface(t, 2)
	b := a.Translate(r3.Vec{X: 0.3, Y: 0.1, Z: 2.6})
	op, _ := NewEFIE(0.7)
	n := a.Len()
	ab := mat.NewDense(n, n, nil)
	ba := mat.NewDense(n, n, nil)
	ctx := context.Background()
	as := Assembler{Threads: 2}
	if err := as.Cross(ctx, ab, op, a, b); err != nil {
		t.Fatal(err)
	}
	if err := as.Cross(ctx, ba, op, b, a); err != nil {
		t.Fatal(err)
	}
	far := r3.Vec{X: 1e3, Y: -2e3, Z: 5e2}
	shifted := mat.NewDense(n, n, nil)
	if err := as.Cross(ctx, shifted, op, a.Translate(far), b.Translate(far)); err != nil {
		t.Fatal(err)
	}
	scale := mat.Norm(ab, math.Inf(1))
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if d := math.Abs(ab.At(i, j) - ba.At(j, i)); d > 1e-5*scale {
				t.Fatalf("M_ab(%d,%d)=%g but M_ba(%d,%d)=%g", i, j, ab.At(i, j), j, i, ba.At(j, i))
			}
			if d := math.Abs(ab.At(i, j) - shifted.At(i, j)); d > 1e-12*scale {
				t.Fatalf("translation changed entry (%d,%d): %g vs %g", i, j, ab.At(i, j), shifted.At(i, j))
			}
		}
	}
}

// BenchmarkAssembleSelf reports triangle pairs per second for the self block
// of a 1280-triangle sphere at κR = 1 (DESIGN §10 cost model: assembly is
// O(T²) pairs).
func BenchmarkAssembleSelf(b *testing.B) {
	s := testSurface(b, 8)
	op, _ := NewEFIE(1)
	m := mat.NewSymDense(s.Len(), nil)
	pairs := float64(len(s.Panels)) * float64(len(s.Panels)+1) / 2
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if err := (Assembler{}).Self(context.Background(), m, op, s); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(pairs*float64(b.N)/b.Elapsed().Seconds(), "pairs/s")
	b.ReportMetric(float64(s.Len()), "unknowns")
}

// BenchmarkAssembleCross reports triangle pairs per second for the
// interaction block of two 1280-triangle spheres at gap R.
func BenchmarkAssembleCross(b *testing.B) {
	s := testSurface(b, 8)
	o := s.Translate(r3.Vec{Z: 3})
	op, _ := NewEFIE(1)
	m := mat.NewDense(s.Len(), o.Len(), nil)
	pairs := float64(len(s.Panels)) * float64(len(o.Panels))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if err := (Assembler{}).Cross(context.Background(), m, op, s, o); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(pairs*float64(b.N)/b.Elapsed().Seconds(), "pairs/s")
}
