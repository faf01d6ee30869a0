package scatter

import (
	"context"
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack/lapack64"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/bem"
)

// The substrate integrand by one factorisation (DESIGN §6).
//
// With the plane every block of M becomes M_ij - M(i, img j), the self
// blocks included, so the whitened matrix I - Δ of evaluatePlane is dense
// in all its blocks: whitening costs two triangular solves of the whole
// n×n matrix (2n³ flops) before its own factorisation (n³/3). The same
// integrand is
//
//	ln det[M_P M_∞^-1] = ln det M_P - Σ_i ln det M_ii,
//
// with M_P assembled whole and factored once (n³/3) and ln det M_ii from the
// self factors already held — about seven times fewer flops, and M_P^-1
// for the gradient comes from the same factor without whitening back.
// Cancellation between the two log-determinants costs absolute digits of
// order n ε cond(M) (about 1e-11 on the meshes the tool uses), far below
// the smallest integrand that matters to a 1e-3 energy; TestPlaneDirect
// compares the two routes.

// planeFactor is the Cholesky factor of M_P, lower triangle of an n×n
// row-major slice, with the first unknown of each body.
type planeFactor struct {
	lower []float64
	n     int
	start []int
}

// factorPlane assembles M_P for the surfaces surf with their images imgs and
// returns ln det[M_P M_∞^-1] and the factor of M_P.
func (sys *system) factorPlane(ctx context.Context, sf *selfFactors, surf, imgs []*bem.Surface) (float64, planeInverse, error) {
	start := make([]int, len(surf)+1)
	for i, s := range surf {
		start[i+1] = start[i] + s.Len()
	}
	n := start[len(surf)]
	// d holds the lower triangle of M_P, then its Cholesky factor.
	d := make([]float64, n*n)
	sub := func(r0, c0 int, b *mat.Dense, sign float64) { // d[r0+r, c0+c] += sign b[c, r]
		raw := b.RawMatrix()
		for r := 0; r < raw.Cols; r++ {
			row := d[(r0+r)*n+c0:]
			for c := 0; c < raw.Rows; c++ {
				row[c] += sign * raw.Data[c*raw.Stride+r]
			}
		}
	}
	// symmetric subtracts the symmetric part of the square block b from the
	// lower triangle at (r0, r0): M(i, img i) is symmetric up to the
	// quadrature error of mirrored pairs, which the mean removes.
	symmetric := func(r0 int, b *mat.Dense) {
		raw := b.RawMatrix()
		for r := 0; r < raw.Rows; r++ {
			row := d[(r0+r)*n+r0:]
			for c := 0; c <= r; c++ {
				row[c] -= 0.5 * (raw.Data[r*raw.Stride+c] + raw.Data[c*raw.Stride+r])
			}
		}
	}
	for i := range surf {
		ni := surf[i].Len()
		self := sf.blocks[i]
		for r := 0; r < ni; r++ {
			row := d[(start[i]+r)*n+start[i]:]
			for c := 0; c <= r; c++ {
				row[c] = self.At(r, c)
			}
		}
		img := mat.NewDense(ni, ni, nil)
		if err := sys.asm.Cross(ctx, img, sf.op, surf[i], imgs[i]); err != nil {
			return 0, nil, err
		}
		symmetric(start[i], img)
		for j := i + 1; j < len(surf); j++ {
			nj := surf[j].Len()
			b := mat.NewDense(ni, nj, nil)
			if err := sys.asm.Cross(ctx, b, sf.op, surf[i], surf[j]); err != nil {
				return 0, nil, err
			}
			sub(start[j], start[i], b, 1)
			b.Zero()
			if err := sys.asm.Cross(ctx, b, sf.op, surf[i], imgs[j]); err != nil {
				return 0, nil, err
			}
			sub(start[j], start[i], b, -1)
		}
		if err := ctx.Err(); err != nil {
			return 0, nil, err
		}
	}
	if pivot, ok := choleskyLower(d, n, n); !ok {
		return 0, nil, sys.checkPositive(sf.kappa, &ErrNotPositive{What: "the matrix with the substrate", Pivot: pivot})
	}
	ld := (&factor{l: blas64.Triangular{Uplo: blas.Lower, Diag: blas.NonUnit, N: n, Stride: n, Data: d}}).logDet()
	for i := range surf {
		ld -= sf.f[i].logDet()
	}
	return ld, &planeFactor{lower: d, n: n, start: start}, nil
}

// inverseColumn returns the blocks (M_P^-1)_im of the moving body's column m
// for every body i: two triangular solves with the factor of M_P, or, when
// the column is most of the matrix (one body over the substrate, the common
// case), the whole inverse from the factor by LAPACK's Dpotri — L^-1, then
// L^-T L^-1, about 2n³/3 flops against the 2n³ of solving for the n
// columns of the identity.
func (pf *planeFactor) inverseColumn(m int) []*mat.Dense {
	n, start := pf.n, pf.start
	nm := start[m+1] - start[m]
	if 3*nm >= 2*n {
		if out, ok := pf.inverseByPotri(m); ok {
			return out
		}
	}
	return pf.inverseBySolves(m)
}

// inverseBySolves is inverseColumn by two triangular solves with the factor
// for the columns of the identity in the moving body's block.
func (pf *planeFactor) inverseBySolves(m int) []*mat.Dense {
	n, start := pf.n, pf.start
	nm := start[m+1] - start[m]
	l := blas64.Triangular{Uplo: blas.Lower, Diag: blas.NonUnit, N: n, Stride: n, Data: pf.lower}
	x := blas64.General{Rows: n, Cols: nm, Stride: nm, Data: make([]float64, n*nm)}
	for r := 0; r < nm; r++ {
		x.Data[(start[m]+r)*nm+r] = 1
	}
	solveLowerInPlace(l, x)
	solveLowerTransInPlace(l, x)
	out := make([]*mat.Dense, len(start)-1)
	for i := range out {
		ni := start[i+1] - start[i]
		out[i] = mat.NewDense(ni, nm, x.Data[start[i]*nm:(start[i]+ni)*nm])
	}
	return out
}

// inverseByPotri is inverseColumn from the whole inverse of M_P (a copy of
// the factor is inverted, so the factor stays). It reports false if LAPACK
// finds the factor singular, which a successful Cholesky factorisation
// rules out in exact arithmetic.
func (pf *planeFactor) inverseByPotri(m int) ([]*mat.Dense, bool) {
	n, start := pf.n, pf.start
	inv, ok := lapack64.Potri(blas64.Triangular{Uplo: blas.Lower, Diag: blas.NonUnit, N: n, Stride: n, Data: append([]float64(nil), pf.lower...)})
	if !ok {
		return nil, false
	}
	c0, nm := start[m], start[m+1]-start[m]
	out := make([]*mat.Dense, len(start)-1)
	for i := range out {
		ni := start[i+1] - start[i]
		blk := mat.NewDense(ni, nm, nil)
		for r := 0; r < ni; r++ {
			gr := start[i] + r
			for c := 0; c < nm; c++ {
				gc := c0 + c
				if gc <= gr {
					blk.Set(r, c, inv.Data[gr*n+gc])
				} else {
					blk.Set(r, c, inv.Data[gc*n+gr]) // the upper triangle by symmetry
				}
			}
		}
		out[i] = blk
	}
	return out, true
}

// planeInverse gives the moving body's block column of M_P^-1.
type planeInverse interface {
	inverseColumn(m int) []*mat.Dense
}

// nearPlane reports whether some body is within its own size of the plane:
// the integrand is then large enough (above about 1e-2) that one
// factorisation of M_P loses nothing; farther away the whitened route keeps
// the digits of a small integrand.
func nearPlane(surf []*bem.Surface, p *Plane) bool {
	nn := r3.Unit(p.Normal)
	for _, s := range surf {
		m := s.Basis.Mesh
		lo, hi := m.Vertices[0], m.Vertices[0]
		h := math.Inf(1)
		for _, v := range m.Vertices {
			lo = r3.Vec{X: math.Min(lo.X, v.X), Y: math.Min(lo.Y, v.Y), Z: math.Min(lo.Z, v.Z)}
			hi = r3.Vec{X: math.Max(hi.X, v.X), Y: math.Max(hi.Y, v.Y), Z: math.Max(hi.Z, v.Z)}
			h = math.Min(h, r3.Dot(r3.Sub(v, p.Point), nn))
		}
		if h <= r3.Norm(r3.Sub(hi, lo)) {
			return true
		}
	}
	return false
}

// whitenedPlane is the substrate integrand in whitened form: with the free
// self factors the matrix is I - Δ with Δ_ii = L_i^-1 M(i, img i) L_i^-T and
// Δ_ij = -(K_ij - K(i, img j)), factored in delta form so that a small
// integrand keeps its digits (bodies far above the plane).
func (sys *system) whitenedPlane(ctx context.Context, sf *selfFactors, surf, imgs []*bem.Surface) (float64, planeInverse, error) {
	start := make([]int, len(surf)+1)
	for i, s := range surf {
		start[i+1] = start[i] + s.Len()
	}
	n := start[len(surf)]
	delta := make([]float64, n*n)
	put := func(r0, c0 int, y blas64.General, sign float64) { // adds sign*y at (r0, c0)
		for r := 0; r < y.Rows; r++ {
			row := delta[(r0+r)*n+c0:]
			for c, v := range y.Data[r*y.Stride : r*y.Stride+y.Cols] {
				row[c] += sign * v
			}
		}
	}
	for i := range surf {
		y, err := sys.whitenedWith(ctx, sf, surf[i], i, imgs[i], i)
		if err != nil {
			return 0, nil, err
		}
		put(start[i], start[i], y, 1)
		for j := i + 1; j < len(surf); j++ {
			k, err := sys.whitenedWith(ctx, sf, surf[i], i, surf[j], j)
			if err != nil {
				return 0, nil, err
			}
			ki, err := sys.whitenedWith(ctx, sf, surf[i], i, imgs[j], j)
			if err != nil {
				return 0, nil, err
			}
			put(start[j], start[i], k, -1)
			put(start[j], start[i], ki, 1)
		}
	}
	ld, err := logDetIMinus(delta, n, n, sys.threads)
	if err != nil {
		return 0, nil, sys.checkPositive(sf.kappa, err)
	}
	return ld, whitenedInverse{sys: sys, sf: sf, delta: delta, start: start}, nil
}

// whitenedInverse undoes the whitening for the gradient.
type whitenedInverse struct {
	sys   *system
	sf    *selfFactors
	delta []float64
	start []int
}

func (w whitenedInverse) inverseColumn(m int) []*mat.Dense {
	return w.sys.inverseColumn(w.sf, w.delta, w.start, m)
}
