package scatter

import (
	"context"
	"errors"
	"fmt"
	"runtime"

	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/bem"
	"github.com/fluctus/fluctus/mesh"
)

// system is the set of bodies of one computation, discretised: one bem
// surface per body at its reference placement, and which body moves.
type system struct {
	names   []string
	surf    []*bem.Surface
	moving  int
	threads int
	asm     bem.Assembler
	maxSize float64 // largest panel size over all bodies, L0
	// copyOf[i] is the index of an earlier body whose mesh body i's is a
	// translate of (its self block is then the same matrix), or -1.
	copyOf []int
}

func newSystem(bodies []Body, moving, threads int) (*system, error) {
	if len(bodies) < 2 {
		return nil, fmt.Errorf("scatter: need at least two bodies, have %d", len(bodies))
	}
	if moving < 0 || moving >= len(bodies) {
		return nil, fmt.Errorf("scatter: moving body index %d out of range (have %d bodies)", moving, len(bodies))
	}
	if threads <= 0 {
		threads = runtime.GOMAXPROCS(0)
	}
	sys := &system{moving: moving, threads: threads, asm: bem.Assembler{Threads: threads}}
	for _, b := range bodies {
		if b.Mesh == nil {
			return nil, fmt.Errorf("scatter: body %q has no mesh", b.Name)
		}
		basis, err := mesh.NewBasis(b.Mesh)
		if err != nil {
			return nil, fmt.Errorf("scatter: body %q: %w", b.Name, err)
		}
		s, err := bem.NewSurface(basis)
		if err != nil {
			return nil, fmt.Errorf("scatter: body %q: %w", b.Name, err)
		}
		for i := range s.Panels {
			sys.maxSize = max(sys.maxSize, s.Panels[i].Size)
		}
		sys.names = append(sys.names, b.Name)
		sys.surf = append(sys.surf, s)
		orig := -1
		for j := range sys.surf[:len(sys.surf)-1] {
			if isTranslate(bodies[j].Mesh, b.Mesh) {
				orig = j
				break
			}
		}
		sys.copyOf = append(sys.copyOf, orig)
	}
	return sys, nil
}

// isTranslate reports whether mesh b is mesh a moved rigidly without turning
// (same triangles, every vertex shifted by one vector to 1e-12 of the size).
func isTranslate(a, b *mesh.Mesh) bool {
	if len(a.Vertices) != len(b.Vertices) || len(a.Triangles) != len(b.Triangles) || len(a.Vertices) == 0 {
		return false
	}
	for t := range a.Triangles {
		if a.Triangles[t] != b.Triangles[t] {
			return false
		}
	}
	shift := r3.Sub(b.Vertices[0], a.Vertices[0])
	st := a.Stats()
	tol := 1e-12 * r3.Norm(r3.Sub(st.Max, st.Min))
	for i, v := range a.Vertices {
		if r3.Norm(r3.Sub(r3.Sub(b.Vertices[i], v), shift)) > tol {
			return false
		}
	}
	return true
}

// selfFactors holds the Cholesky factors of every self block at one κ: they
// do not depend on where the bodies are, so one set serves every sweep point.
type selfFactors struct {
	kappa float64
	op    *bem.EFIE
	f     []*factor
}

// factorSelf assembles and factors the self blocks at κ.
func (sys *system) factorSelf(ctx context.Context, kappa float64) (*selfFactors, error) {
	op, err := bem.NewEFIE(kappa)
	if err != nil {
		return nil, err
	}
	sf := &selfFactors{kappa: kappa, op: op}
	for i, s := range sys.surf {
		if j := sys.copyOf[i]; j >= 0 {
			sf.f = append(sf.f, sf.f[j]) // translation invariance: the same block
			continue
		}
		m := mat.NewSymDense(s.Len(), nil)
		if err := sys.asm.Self(ctx, m, op, s); err != nil {
			return nil, err
		}
		f, err := newFactor(m)
		if err != nil {
			return nil, sys.coarse(kappa, sys.names[i], err)
		}
		sf.f = append(sf.f, f)
	}
	return sf, nil
}

// coarse explains a failed factorisation: inside the useful range of κ it
// means the mesh cannot resolve the kernel (DESIGN §4).
func (sys *system) coarse(kappa float64, what string, err error) error {
	return fmt.Errorf("scatter: %s at κ = %.4g per unit (κh = %.3g with largest triangle h = %.4g): %w; the mesh is too coarse for this gap, use a smaller mesh size",
		what, kappa, kappa*sys.maxSize, sys.maxSize, err)
}

// surfacesAt returns the surfaces with the moving body displaced by offset.
func (sys *system) surfacesAt(offset r3.Vec) []*bem.Surface {
	out := append([]*bem.Surface(nil), sys.surf...)
	if offset != (r3.Vec{}) {
		out[sys.moving] = sys.surf[sys.moving].Translate(offset)
	}
	return out
}

// logDet returns the integrand ln det[M M_∞^-1] at the κ of sf with the
// moving body displaced by offset.
func (sys *system) logDet(ctx context.Context, sf *selfFactors, offset r3.Vec) (float64, error) {
	surf := sys.surfacesAt(offset)
	if len(surf) == 2 {
		return sys.logDetPair(ctx, sf, surf)
	}
	return sys.logDetMany(ctx, sf, surf)
}

// whitened returns Kᵀ = L_j^-1 M_ji L_i^-T (N_j × N_i) for bodies i < j.
func (sys *system) whitened(ctx context.Context, sf *selfFactors, surf []*bem.Surface, i, j int) (blas64.General, error) {
	b := mat.NewDense(surf[i].Len(), surf[j].Len(), nil)
	if err := sys.asm.Cross(ctx, b, sf.op, surf[i], surf[j]); err != nil {
		return blas64.General{}, err
	}
	w := b.RawMatrix()
	solveLower(sf.f[i].l, w, sys.threads) // L_i^-1 M_ij
	y := transpose(w)
	solveLower(sf.f[j].l, y, sys.threads) // L_j^-1 (L_i^-1 M_ij)ᵀ
	return y, nil
}

// logDetPair is the two-body integrand ln det(I - Kᵀ K) (DESIGN §4), with
// K = L1^-1 M12 L2^-T, evaluated in the smaller of the two dimensions.
func (sys *system) logDetPair(ctx context.Context, sf *selfFactors, surf []*bem.Surface) (float64, error) {
	y, err := sys.whitened(ctx, sf, surf, 0, 1) // Kᵀ, N2 × N1
	if err != nil {
		return 0, err
	}
	if y.Rows > y.Cols {
		y = transpose(y) // K, N1 × N2
	}
	n := y.Rows
	delta := make([]float64, n*n)
	lowerRankUpdate(delta, n, n, y, sys.threads) // Δ = Y Yᵀ
	ld, err := logDetIMinus(delta, n, n, sys.threads)
	return ld, sys.checkPositive(sf.kappa, err)
}

// logDetMany is the n-body integrand: with every block whitened the matrix
// is I - Δ with Δ_ij = -K_ij off the diagonal and zero on it, factored in
// delta form.
func (sys *system) logDetMany(ctx context.Context, sf *selfFactors, surf []*bem.Surface) (float64, error) {
	start := make([]int, len(surf)+1)
	for i, s := range surf {
		start[i+1] = start[i] + s.Len()
	}
	n := start[len(surf)]
	delta := make([]float64, n*n)
	for i := range surf {
		for j := i + 1; j < len(surf); j++ {
			y, err := sys.whitened(ctx, sf, surf, i, j) // K_ijᵀ: block (j, i)
			if err != nil {
				return 0, err
			}
			for r := 0; r < y.Rows; r++ {
				row := delta[(start[j]+r)*n+start[i]:]
				for c, v := range y.Data[r*y.Stride : r*y.Stride+y.Cols] {
					row[c] = -v
				}
			}
		}
	}
	ld, err := logDetIMinus(delta, n, n, sys.threads)
	return ld, sys.checkPositive(sf.kappa, err)
}

func (sys *system) checkPositive(kappa float64, err error) error {
	var np *ErrNotPositive
	if errors.As(err, &np) {
		return sys.coarse(kappa, "the scene matrix", err)
	}
	return err
}
