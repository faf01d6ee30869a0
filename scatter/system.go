package scatter

import (
	"context"
	"errors"
	"fmt"
	"runtime"

	"gonum.org/v1/gonum/blas"
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
	// plane is the substrate, or nil; images holds the mirrored surfaces of
	// the bodies at their reference placements.
	plane  *Plane
	images []*bem.Surface
	// compress says whether interaction blocks are compressed (compress.go);
	// the zero value keeps them dense.
	compress compression
	// loops holds each body's loop–tree basis (balance.go), nil for a
	// body that has none (a surface with handles).
	loops []*mesh.LoopTree
	// mats holds the body materials when any body is a real (finite-ε)
	// one (dielectric.go); nil keeps the perfect-conductor path.
	mats *materials
}

func newSystem(bodies []Body, moving, threads int, plane *Plane) (*system, error) {
	if len(bodies) < 2 && plane == nil {
		return nil, fmt.Errorf("scatter: need at least two bodies, or one over a substrate; have %d", len(bodies))
	}
	if len(bodies) == 0 {
		return nil, fmt.Errorf("scatter: no bodies")
	}
	if moving < 0 || moving >= len(bodies) {
		return nil, fmt.Errorf("scatter: moving body index %d out of range (have %d bodies)", moving, len(bodies))
	}
	if threads <= 0 {
		threads = runtime.GOMAXPROCS(0)
	}
	sys := &system{moving: moving, threads: threads, asm: bem.Assembler{Threads: threads}, plane: plane}
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
		// A translated copy has the same edges, so the same loop–tree basis.
		var lt *mesh.LoopTree
		if orig >= 0 {
			lt = sys.loops[orig]
		} else if lt, err = mesh.NewLoopTree(basis); err != nil {
			// Without it (a surface with handles or one that is not
			// closed) the sweep basis stays in RWG coordinates at low κ,
			// with the tightened tolerance: slower, as accurate.
			lt = nil
		}
		sys.loops = append(sys.loops, lt)
		if plane != nil {
			sys.images = append(sys.images, s.Mirror(plane.Point, plane.Normal))
		}
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
	// real holds the LU factors of a scene with real materials
	// (dielectric.go) in place of f.
	real *realSelf
	// blocks holds the assembled self blocks when a substrate needs them
	// (planedirect.go).
	blocks []*mat.SymDense
	// basis is the sweep basis of a two-body sweep at this κ (basis.go),
	// nil when the sweep has none.
	basis *crossBasis
}

// factorSelf assembles and factors the self blocks at κ.
func (sys *system) factorSelf(ctx context.Context, kappa float64) (*selfFactors, error) {
	if sys.mats != nil {
		return sys.factorSelfReal(ctx, kappa)
	}
	op, err := bem.NewEFIE(kappa)
	if err != nil {
		return nil, err
	}
	sf := &selfFactors{kappa: kappa, op: op}
	for i, s := range sys.surf {
		if j := sys.copyOf[i]; j >= 0 {
			sf.f = append(sf.f, sf.f[j]) // translation invariance: the same block
			if sys.plane != nil {
				sf.blocks = append(sf.blocks, sf.blocks[j])
			}
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
		if sys.plane != nil {
			sf.blocks = append(sf.blocks, m)
		}
	}
	return sf, nil
}

// coarse explains a failed factorisation: inside the useful range of κ it
// means the mesh cannot resolve the kernel (DESIGN §4).
func (sys *system) coarse(kappa float64, what string, err error) error {
	return fmt.Errorf("scatter: %s at κ = %.4g per unit (κh = %.3g with largest triangle h = %.4g): %w; the mesh is too coarse for this gap, use a smaller mesh size",
		what, kappa, kappa*sys.maxSize, sys.maxSize, err)
}

// placement is where the moving body sits at one evaluation.
type placement struct {
	offset r3.Vec
	turn   Turn
	centre r3.Vec // torque centre, placed
}

// surfacesAt returns the surfaces with the moving body placed.
func (sys *system) surfacesAt(pl placement) ([]*bem.Surface, error) {
	out := append([]*bem.Surface(nil), sys.surf...)
	mv := sys.surf[sys.moving]
	switch {
	case pl.turn.Angle != 0 && pl.turn.Axis != (r3.Vec{}):
		m := mv.Basis.Mesh.Rotate(r3.Unit(pl.turn.Axis), pl.turn.Angle, pl.turn.Pivot).Translate(pl.offset)
		basis, err := mesh.NewBasis(m)
		if err != nil {
			return nil, err
		}
		s, err := bem.NewSurface(basis)
		if err != nil {
			return nil, err
		}
		out[sys.moving] = s
	case pl.offset != (r3.Vec{}):
		out[sys.moving] = mv.Translate(pl.offset)
	}
	return out, nil
}

// evaluation is the integrand at one κ and placement.
type evaluation struct {
	logDet float64
	// grad holds d ln det M/d(u_x, u_y, u_z, θ_x, θ_y, θ_z) for a
	// displacement u and turns θ of the moving body about the centre.
	grad [6]float64
	// ranks records how the interaction blocks were handled.
	ranks []BlockRank
	// viaBasis tells that a compressed two-body block went through the
	// sweep basis (basis.go).
	viaBasis bool
}

// evaluate returns the integrand ln det[M M_∞^-1] at the κ of sf with the
// moving body placed, and its gradient when grad is set.
func (sys *system) evaluate(ctx context.Context, sf *selfFactors, pl placement, grad bool) (evaluation, error) {
	surf, err := sys.surfacesAt(pl)
	if err != nil {
		return evaluation{}, err
	}
	if sys.mats != nil {
		return sys.evaluateReal(ctx, sf, surf, pl, grad)
	}
	if sys.plane != nil {
		return sys.evaluatePlane(ctx, sf, surf, pl, grad)
	}
	if len(surf) == 2 {
		return sys.evaluateTwo(ctx, sf, surf, pl, grad)
	}
	return sys.evaluateMany(ctx, sf, surf, pl, grad)
}

// whitened returns Kᵀ = L_j^-1 M_ji L_i^-T (N_j × N_i) for bodies i < j.
func (sys *system) whitened(ctx context.Context, sf *selfFactors, surf []*bem.Surface, i, j int) (blas64.General, error) {
	return sys.whitenedWith(ctx, sf, surf[i], i, surf[j], j)
}

// whitenedWith returns L_j^-1 B^T L_i^-T for the block B between surface a
// (with the unknowns of body i) and surface b (those of body j), which may
// be an image.
func (sys *system) whitenedWith(ctx context.Context, sf *selfFactors, a *bem.Surface, i int, bs *bem.Surface, j int) (blas64.General, error) {
	b := mat.NewDense(a.Len(), bs.Len(), nil)
	if err := sys.asm.Cross(ctx, b, sf.op, a, bs); err != nil {
		return blas64.General{}, err
	}
	w := b.RawMatrix()
	solveLower(sf.f[i].l, w, sys.threads) // L_i^-1 M_ij
	y := transpose(w)
	solveLower(sf.f[j].l, y, sys.threads) // L_j^-1 (L_i^-1 M_ij)ᵀ
	return y, nil
}

// evaluatePair is the two-body integrand ln det(I - Kᵀ K) (DESIGN §4), with
// K = L0^-1 M01 L1^-T. Without the gradient it works in the smaller of the
// two dimensions. The gradient (DESIGN §5) is d ln det M/du = 2 <H, dM01/du>
// with H = (M^-1)_01 = -L0^-T Zᵀ, Z = L1^-T C^-1 Kᵀ and C = I - Kᵀ K the
// matrix whose Cholesky factor the log-determinant leaves behind.
func (sys *system) evaluatePair(ctx context.Context, sf *selfFactors, surf []*bem.Surface, pl placement, grad bool) (evaluation, error) {
	y, err := sys.whitened(ctx, sf, surf, 0, 1) // Kᵀ, N1 × N0
	if err != nil {
		return evaluation{}, err
	}
	small := y
	if !grad && y.Rows > y.Cols {
		small = transpose(y) // K, N0 × N1
	}
	n := small.Rows
	delta := make([]float64, n*n)
	lowerRankUpdate(delta, n, n, small, sys.threads) // Δ = Y Yᵀ
	ld, err := logDetIMinus(delta, n, n, sys.threads)
	if err != nil {
		return evaluation{}, sys.checkPositive(sf.kappa, err)
	}
	ev := evaluation{logDet: ld}
	if !grad {
		return ev, nil
	}
	lc := blas64.Triangular{Uplo: blas.Lower, Diag: blas.NonUnit, N: n, Stride: n, Data: delta}
	z := blas64.General{Rows: y.Rows, Cols: y.Cols, Stride: y.Cols, Data: append([]float64(nil), y.Data...)}
	solveLowerInPlace(lc, z)             // L_c^-1 Kᵀ
	solveLowerTransInPlace(lc, z)        // C^-1 Kᵀ
	solveLowerTransInPlace(sf.f[1].l, z) // L1^-T C^-1 Kᵀ
	h := transpose(z)                    // N0 × N1
	solveLowerTransInPlace(sf.f[0].l, h) // L0^-T Zᵀ = -H
	hm := mat.NewDense(h.Rows, h.Cols, h.Data)
	hm.Scale(-1, hm)
	fixed := 1 - sys.moving
	var mot bem.Motion
	if sys.moving == 1 {
		mot, err = sys.asm.CrossGradient(ctx, hm, sf.op, surf[fixed], surf[1], pl.centre)
	} else {
		mot, err = sys.asm.CrossGradient(ctx, mat.DenseCopyOf(hm.T()), sf.op, surf[fixed], surf[0], pl.centre)
	}
	if err != nil {
		return evaluation{}, err
	}
	ev.setGrad(mot, 2)
	return ev, nil
}

func (ev *evaluation) setGrad(m bem.Motion, f float64) {
	ev.grad = [6]float64{f * m.Translation.X, f * m.Translation.Y, f * m.Translation.Z,
		f * m.Rotation.X, f * m.Rotation.Y, f * m.Rotation.Z}
}

// evaluateMany is the n-body integrand: with every block whitened the matrix
// is N = I - Δ with Δ_ij = -K_ij off the diagonal and zero on it, factored
// in delta form. The gradient needs the blocks (M^-1)_im = L_i^-T (N^-1)_im
// L_m^-1 of the moving body's column m, from two triangular solves with the
// factor of N: d ln det M/du = 2 Σ_i <(M^-1)_im, dM_im/du>.
func (sys *system) evaluateMany(ctx context.Context, sf *selfFactors, surf []*bem.Surface, pl placement, grad bool) (evaluation, error) {
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
				return evaluation{}, err
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
	if err != nil {
		return evaluation{}, sys.checkPositive(sf.kappa, err)
	}
	ev := evaluation{logDet: ld}
	if !grad {
		return ev, nil
	}
	m := sys.moving
	w := sys.inverseColumn(sf, delta, start, m)
	var total bem.Motion
	for i := range surf {
		if i == m {
			continue
		}
		mot, err := sys.asm.CrossGradient(ctx, w[i], sf.op, surf[i], surf[m], pl.centre)
		if err != nil {
			return evaluation{}, err
		}
		total.Translation = r3.Add(total.Translation, mot.Translation)
		total.Rotation = r3.Add(total.Rotation, mot.Rotation)
	}
	ev.setGrad(total, 2)
	return ev, nil
}

// evaluatePlane is the integrand with the substrate (DESIGN §6): every block
// of M becomes M_ij - M(i, image of j), the self blocks included, while M_∞
// keeps the free-space self blocks; factorPlane factors that matrix M_P
// once (planedirect.go). The gradient contracts (M_P^-1)_im with the block
// derivatives and adds
// the motion of the moving body's image (mirrored displacement, turn by -θ
// about the mirrored axis through the mirrored centre).
func (sys *system) evaluatePlane(ctx context.Context, sf *selfFactors, surf []*bem.Surface, pl placement, grad bool) (evaluation, error) {
	p := sys.plane
	imgs := append([]*bem.Surface(nil), sys.images...)
	imgs[sys.moving] = surf[sys.moving].Mirror(p.Point, p.Normal)
	solve := sys.whitenedPlane
	if nearPlane(surf, p) {
		solve = sys.factorPlane
	}
	ld, pf, err := solve(ctx, sf, surf, imgs)
	if err != nil {
		return evaluation{}, err
	}
	ev := evaluation{logDet: ld}
	if !grad {
		return ev, nil
	}
	m := sys.moving
	wim := pf.inverseColumn(m)
	nn := r3.Unit(p.Normal)
	mirror := func(v r3.Vec) r3.Vec { return r3.Sub(v, r3.Scale(2*r3.Dot(v, nn), nn)) }
	pc := r3.Sub(pl.centre, r3.Scale(2*r3.Dot(r3.Sub(pl.centre, p.Point), nn), nn))
	// imageMotion converts derivatives for moving the image surface (about
	// centre c) into derivatives for moving the body: displacement u moves
	// the image by Pu; a turn θ about n through c turns it by -θ about Pn
	// through Pc, and R_Pc = R_c + (c - Pc) × T.
	imageMotion := func(mo bem.Motion) (r3.Vec, r3.Vec) {
		rpc := r3.Add(mo.Rotation, r3.Cross(r3.Sub(pl.centre, pc), mo.Translation))
		return mirror(mo.Translation), r3.Scale(-1, mirror(rpc))
	}
	var total bem.Motion
	add := func(t, r r3.Vec, f float64) {
		total.Translation = r3.Add(total.Translation, r3.Scale(f, t))
		total.Rotation = r3.Add(total.Rotation, r3.Scale(f, r))
	}
	for i := range surf {
		w := wim[i] // (M_plane^-1)_im
		// -M(i, img m): its image moves.
		mi, err := sys.asm.CrossGradient(ctx, w, sf.op, surf[i], imgs[m], pl.centre)
		if err != nil {
			return evaluation{}, err
		}
		ti, ri := imageMotion(mi)
		if i == m {
			// Self-image block: the body moves too, which is the image
			// moving by the inverse motion.
			add(r3.Sub(ti, mi.Translation), r3.Sub(ri, mi.Rotation), -1)
			continue
		}
		mo, err := sys.asm.CrossGradient(ctx, w, sf.op, surf[i], surf[m], pl.centre)
		if err != nil {
			return evaluation{}, err
		}
		// Blocks (i, m) and (m, i): M_im - M(i, img m), counted twice.
		add(mo.Translation, mo.Rotation, 2)
		add(ti, ri, -2)
	}
	ev.setGrad(total, 1)
	return ev, nil
}

// inverseColumn returns the blocks (M^-1)_im = L_i^-T (N^-1)_im L_m^-1 of
// the moving body's column m, for every body i, where the lower triangle of
// delta (n×n, row major) holds the Cholesky factor of the whitened matrix N
// and start the first unknown of each body. The block column of N^-1 takes
// two triangular solves with that factor.
func (sys *system) inverseColumn(sf *selfFactors, delta []float64, start []int, m int) []*mat.Dense {
	n := start[len(start)-1]
	nm := start[m+1] - start[m]
	ln := blas64.Triangular{Uplo: blas.Lower, Diag: blas.NonUnit, N: n, Stride: n, Data: delta}
	x := blas64.General{Rows: n, Cols: nm, Stride: nm, Data: make([]float64, n*nm)}
	for r := 0; r < nm; r++ {
		x.Data[(start[m]+r)*nm+r] = 1
	}
	solveLowerInPlace(ln, x)
	solveLowerTransInPlace(ln, x) // block column m of N^-1
	out := make([]*mat.Dense, len(start)-1)
	for i := range out {
		ni := start[i+1] - start[i]
		blk := blas64.General{Rows: ni, Cols: nm, Stride: nm, Data: x.Data[start[i]*nm : (start[i]+ni)*nm]}
		bt := transpose(blk)                  // nm × ni
		solveLowerTransInPlace(sf.f[m].l, bt) // L_m^-T X_imᵀ = (X_im L_m^-1)ᵀ
		h := transpose(bt)
		solveLowerTransInPlace(sf.f[i].l, h) // L_i^-T X_im L_m^-1
		out[i] = mat.NewDense(ni, nm, h.Data)
	}
	return out
}

func (sys *system) checkPositive(kappa float64, err error) error {
	var np *ErrNotPositive
	if errors.As(err, &np) {
		return sys.coarse(kappa, "the scene matrix", err)
	}
	return err
}
