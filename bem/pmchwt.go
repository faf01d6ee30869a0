package bem

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// DielectricSelf assembles the PMCHWT self block of a homogeneous body of
// permittivity eps (finite, ≥ 1) at imaginary wavenumber κ > 0 into dst,
// which must be 2n×2n for the n RWG functions of a; the unknowns are ordered
// (J, M), electric then magnetic surface currents (DESIGN §13):
//
//	[[ G~_e + G~_i/√ε,   K_e + K_i          ],
//	 [ K_e + K_i,        -(G~_e + √ε G~_i)  ]],
//
// with G~ the EFIE matrix and K the KFIE matrix, at κ outside (e) and at
// κ_i = √ε κ inside (i). The block is symmetric and indefinite.
func (as Assembler) DielectricSelf(ctx context.Context, dst *mat.SymDense, a *Surface, kappa, eps float64) error {
	n := a.Len()
	if dst.SymmetricDim() != 2*n {
		return fmt.Errorf("bem: dielectric self block is %d×%d, surface has %d unknowns (needs %d)", dst.SymmetricDim(), dst.SymmetricDim(), n, 2*n)
	}
	if !(eps >= 1) || math.IsInf(eps, 0) {
		return fmt.Errorf("bem: permittivity %g must be finite and ≥ 1", eps)
	}
	root := math.Sqrt(eps)
	ge, gi, ke, ki := mat.NewSymDense(n, nil), mat.NewSymDense(n, nil), mat.NewSymDense(n, nil), mat.NewSymDense(n, nil)
	for _, job := range []struct {
		dst  *mat.SymDense
		k    float64
		efie bool
	}{{ge, kappa, true}, {gi, root * kappa, true}, {ke, kappa, false}, {ki, root * kappa, false}} {
		var op Operator
		var err error
		if job.efie {
			op, err = NewEFIE(job.k)
		} else {
			op, err = NewKFIE(job.k)
		}
		if err != nil {
			return err
		}
		if err := as.Self(ctx, job.dst, op, a); err != nil {
			return err
		}
	}
	for i := 0; i < n; i++ {
		for j := i; j < n; j++ {
			g, gg, k := ge.At(i, j), gi.At(i, j), ke.At(i, j)+ki.At(i, j)
			dst.SetSym(i, j, g+gg/root)
			dst.SetSym(n+i, n+j, -(g + root*gg))
			dst.SetSym(i, n+j, k)
			dst.SetSym(j, n+i, k)
		}
	}
	return nil
}

// DielectricCross assembles the vacuum interaction block between surfaces a
// (rows) and b (columns) into dst. A surface with magnetic unknowns (ma, mb:
// a real body) contributes rows or columns (J, M), one without (a perfect
// conductor, where M = 0) rows or columns J only; dst must have those
// dimensions (DESIGN §13):
//
//	[[ G~_e, K_e ], [ K_e, -G~_e ]]  restricted accordingly.
func (as Assembler) DielectricCross(ctx context.Context, dst *mat.Dense, a *Surface, ma bool, b *Surface, mb bool, kappa float64) error {
	na, nb := a.Len(), b.Len()
	ra, cb := na, nb
	if ma {
		ra *= 2
	}
	if mb {
		cb *= 2
	}
	if r, c := dst.Dims(); r != ra || c != cb {
		return fmt.Errorf("bem: dielectric cross block is %d×%d, needs %d×%d", r, c, ra, cb)
	}
	efie, err := NewEFIE(kappa)
	if err != nil {
		return err
	}
	g := dst.Slice(0, na, 0, nb).(*mat.Dense)
	if err := as.Cross(ctx, g, efie, a, b); err != nil {
		return err
	}
	if ma && mb {
		gm := dst.Slice(na, 2*na, nb, 2*nb).(*mat.Dense)
		gm.Scale(-1, g)
	}
	if !ma && !mb {
		return nil
	}
	kop, err := NewKFIE(kappa)
	if err != nil {
		return err
	}
	k := mat.NewDense(na, nb, nil)
	if err := as.Cross(ctx, k, kop, a, b); err != nil {
		return err
	}
	if mb {
		dst.Slice(0, na, nb, 2*nb).(*mat.Dense).Copy(k)
	}
	if ma {
		dst.Slice(na, 2*na, 0, nb).(*mat.Dense).Copy(k)
	}
	return nil
}
