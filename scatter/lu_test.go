package scatter

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestLUFactorSolve checks luFactor.solve against gonum's LU solve on a
// random unsymmetric matrix large enough to need pivoting and the blocked
// substitutions (n = 150 > leafSize); tolerance 1e-10 relative (rounding
// times the condition number of a random matrix, about 1e3).
func TestLUFactorSolve(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	n, m := 150, 7
	a := mat.NewDense(n, n, nil)
	b := mat.NewDense(n, m, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			a.Set(i, j, rng.NormFloat64())
		}
		for j := 0; j < m; j++ {
			b.Set(i, j, rng.NormFloat64())
		}
	}
	f, err := newLUFactor(a)
	if err != nil {
		t.Fatal(err)
	}
	got := f.solve(b)
	var lu mat.LU
	lu.Factorize(a)
	var want mat.Dense
	if err := lu.SolveTo(&want, false, b); err != nil {
		t.Fatal(err)
	}
	var d mat.Dense
	d.Sub(got, &want)
	if e := mat.Norm(&d, 1) / mat.Norm(&want, 1); e > 1e-10 {
		t.Errorf("solve differs from gonum's by %.2g relative", e)
	}
}

// TestLogDetIPlus compares ln|det(I + D)| in delta form (small D, no
// pivoting) and with pivoting (large D) against gonum's LU log-determinant,
// relative 1e-12 (plain rounding); for tiny D it must also keep the digits
// that ln of the pivots would lose: against the series tr D - tr D²/2 at
// |D| ~ 1e-9, relative 1e-9 where the plain route keeps only 1e-7.
func TestLogDetIPlus(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	n := 230 // more than two blocks
	for _, scale := range []float64{1e-3 / float64(n), 3 / math.Sqrt(float64(n))} {
		d := make([]float64, n*n)
		a := mat.NewDense(n, n, nil)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				v := scale * rng.NormFloat64()
				d[i*n+j] = v
				a.Set(i, j, v)
			}
			a.Set(i, i, a.At(i, i)+1)
		}
		got, err := logDetIPlus(d, n, n)
		if err != nil {
			t.Fatal(err)
		}
		var lu mat.LU
		lu.Factorize(a)
		want, _ := lu.LogDet()
		if math.Abs(got-want) > 1e-12*math.Max(1, math.Abs(want)) {
			t.Errorf("scale %g: ln|det| %.15g, gonum %.15g", scale, got, want)
		}
	}
	// Tiny D: ln det(I + D) = tr D - tr(D²)/2 + O(D³).
	m := 40
	d := make([]float64, m*m)
	for i := range d {
		d[i] = 1e-9 * rng.NormFloat64()
	}
	tr, tr2 := 0.0, 0.0
	for i := 0; i < m; i++ {
		tr += d[i*m+i]
		for j := 0; j < m; j++ {
			tr2 += d[i*m+j] * d[j*m+i]
		}
	}
	want := tr - tr2/2
	got, err := logDetIPlus(d, m, m)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(got-want) > 1e-9*math.Abs(want) {
		t.Errorf("tiny Δ: ln det %.15g, series %.15g", got, want)
	}
}
