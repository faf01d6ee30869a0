package scatter

import (
	"context"
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/bem"
	"github.com/fluctus/fluctus/scatter/material"
)

// Real materials (DESIGN §13).
//
// A body of permittivity ε(iξ) carries an electric current J and a magnetic
// current M on its surface, both expanded in its RWG functions (unknowns
// (J, M), 2E for E edges). A perfect conductor carries J only: its tangential
// E vanishes, so M = -n × E = 0.
//
// Field conditions. At k = iκ the field of currents (J, M) in a region r of
// wavenumber κ_r and impedance Z_r (Z_e = 1 outside, Z_i = 1/√ε inside) is
// E_r = ikZ_r L_r J - K_r M and H_r = K_r J + (ik/Z_r) L_r M. With the
// radiating currents of body j taken with the exterior sign and the
// interior currents with the opposite sign, the tangential continuity of E
// and H across the surface of a real body i, tested with its RWG functions,
// gives two rows of blocks; each row's impedance factor is divided out and
// the H rows negated, which makes the whole matrix symmetric (determinant
// ratios are unchanged). In terms of the EFIE matrix G~ of DESIGN §3 and the
// K matrix of bem.KFIE:
//
//	E rows of i:   (G~_e + G~_i/√ε) J_i + (K_e + K_i) M_i + Σ_j≠i [G~_e(i,j) J_j + K_e(i,j) M_j] = 0
//	-H rows of i:  (K_e + K_i) J_i - (G~_e + √ε G~_i) M_i + Σ_j≠i [K_e(i,j) J_j - G~_e(i,j) M_j] = 0
//
// (the interior operators act only within body i, whose inside is its own
// region). A perfect conductor p has only the E rows, with tangential E = 0
// on its outer side and nothing inside:
//
//	E rows of p:   G~_e(p,p) J_p + Σ_j≠p [G~_e(p,j) J_j + K_e(p,j) M_j] = 0.
//
// So a perfect body keeps its EFIE self block, and the coupling of any two
// bodies is the vacuum block [[G~_e, K_e], [K_e, -G~_e]] with the M rows and
// columns of perfect bodies struck out. The matrix is symmetric because G~
// and K are (bem.KFIE) and K_e(i,j)ᵀ = K_e(j,i); it is indefinite, so every
// factorisation here is LU and the integrand is ln |det(M M_∞^-1)|.
//
// The energy, the Matsubara sum and the force formula are those of perfect
// conductors (DESIGN §4, §5); ε is evaluated at ξ = c κ / L0.
//
// Substrate. Over the perfectly conducting plane (DESIGN §6) every current
// has an image under the reflection P (P maps a point y to its mirror image
// and a vector v to v - 2(v·n)n): an electric current J at y images to -P J
// at Py (horizontal components reversed, the normal one kept), a magnetic
// current M to +P M at Py (horizontal kept, normal reversed), which together
// make the tangential E of every current vanish on the plane. The images
// radiate in vacuum, so each block of M gains the vacuum block between body i
// and the image of body j, its J columns taken with -1 and its M columns with
// +1 — the self blocks included, while M_∞ keeps the free self blocks. As K
// changes sign under a reflection (a triple product), the image block of
// (j, i) is the transpose of that of (i, j) and the matrix stays symmetric.

// materials holds the permittivity models of the bodies of a system with
// at least one real (finite-ε) body.
type materials struct {
	models []material.Model // nil for a perfect conductor
	length float64          // L0 in metres
}

// realSelf holds the LU factors of the self blocks of every body at one κ:
// the EFIE block of a perfect conductor (E×E) or the PMCHWT block of a real
// body (2E×2E, unknowns J then M).
type realSelf struct {
	lu  []*luFactor
	mag []bool    // body has magnetic unknowns
	eps []float64 // ε(iξ) of each body at this κ (+Inf for perfect conductors)
}

// isPerfect reports whether the model is a perfect conductor.
func isPerfect(m material.Model) bool {
	return m == nil || material.KindOf(m) == material.KindPerfect
}

// setMaterials records the materials of the bodies. It leaves the system
// on the perfect-conductor path when every body is perfect. length is L0 in
// metres, needed to turn κ into ξ.
func (sys *system) setMaterials(bodies []Body, length float64) error {
	real := false
	for _, b := range bodies {
		if isPerfect(b.Material) {
			continue
		}
		if err := material.Validate(b.Material); err != nil {
			return fmt.Errorf("scatter: body %q: %w", b.Name, err)
		}
		real = true
	}
	if !real {
		return nil
	}
	if !(length > 0) || math.IsInf(length, 0) {
		return fmt.Errorf("scatter: body materials need the length unit: set Settings.Length to L0 in metres (got %g)", length)
	}
	mats := &materials{length: length}
	for _, b := range bodies {
		if isPerfect(b.Material) {
			mats.models = append(mats.models, nil)
		} else {
			mats.models = append(mats.models, b.Material)
		}
	}
	// Copies share a self block only when their materials agree too.
	for i, j := range sys.copyOf {
		if j >= 0 && (mats.models[i] == nil) != (mats.models[j] == nil) {
			sys.copyOf[i] = -1
		} else if j >= 0 && mats.models[i] != nil && mats.models[i].Name() != mats.models[j].Name() {
			sys.copyOf[i] = -1
		}
	}
	sys.mats = mats
	return nil
}

// xi returns the imaginary angular frequency ξ = c κ / L0 in rad/s of the
// wavenumber κ in 1/L0.
func (m *materials) xi(kappa float64) float64 { return LightC * kappa / m.length }

// staticModels describes, for the report of a T > 0 run, the static (n = 0)
// limit each real body's model takes, or "" when all bodies are perfect.
func staticModels(bodies []Body) string {
	var parts []string
	for _, b := range bodies {
		if isPerfect(b.Material) {
			continue
		}
		parts = append(parts, fmt.Sprintf("%s: %s (%s)", b.Name, material.KindOf(b.Material), b.Material.Name()))
	}
	return strings.Join(parts, "; ")
}

// staticKappa returns the smallest of the wavenumbers ε, 2ε, 4ε from which
// the runner extrapolates the n = 0 Matsubara term, given its choice eps.
// Dielectric and plasma bodies are even in κ at that scale (their κ_i² is
// constant or κ² plus a constant) and keep eps. A Drude metal's interior
// wavenumber κ_i² = ε(iξ)κ² changes from plasma-like (ξ ≫ γ) to κ_i² ∝ κ
// (ξ ≪ γ), and only below ξ ≈ γ/20 does the integrand settle into its
// κ → 0 form (the TE part dies away like κ²; TestDrudeStaticLimit): eps is
// halved until ξ(ε(iξ) - 1), which tends to ω_p²/γ, is constant to 5 % over
// [2ε, 4ε], or eps has fallen by 1e4.
func (sys *system) staticKappa(eps float64) float64 {
	if sys.mats == nil {
		return eps
	}
	floor := eps * 1e-4
	for _, m := range sys.mats.models {
		if m == nil || material.KindOf(m) != material.KindDrude {
			continue
		}
		tail := func(k float64) float64 { xi := sys.mats.xi(k); return xi * (m.Epsilon(xi) - 1) }
		for eps > floor && math.Abs(tail(4*eps)/tail(eps/4)-1) > 0.05 {
			eps /= 2
		}
	}
	return eps
}

// factorSelfReal assembles and LU-factors the self block of every body at κ.
func (sys *system) factorSelfReal(ctx context.Context, kappa float64) (*selfFactors, error) {
	op, err := bem.NewEFIE(kappa)
	if err != nil {
		return nil, err
	}
	xi := sys.mats.xi(kappa)
	rs := &realSelf{}
	for i, s := range sys.surf {
		eps := math.Inf(1)
		if m := sys.mats.models[i]; m != nil {
			eps = m.Epsilon(xi)
			if math.IsNaN(eps) || eps < 1 {
				return nil, fmt.Errorf("scatter: body %q: model %s gives ε(iξ) = %g at ξ = %.4g rad/s; it must be ≥ 1", sys.names[i], m.Name(), eps, xi)
			}
		}
		rs.eps = append(rs.eps, eps)
		rs.mag = append(rs.mag, !math.IsInf(eps, 1))
		if j := sys.copyOf[i]; j >= 0 && rs.eps[j] == eps {
			rs.lu = append(rs.lu, rs.lu[j])
			continue
		}
		var blk *mat.Dense
		if math.IsInf(eps, 1) {
			m := mat.NewSymDense(s.Len(), nil)
			if err := sys.asm.Self(ctx, m, op, s); err != nil {
				return nil, err
			}
			blk = mat.DenseCopyOf(m)
		} else {
			m := mat.NewSymDense(2*s.Len(), nil)
			if err := sys.asm.DielectricSelf(ctx, m, s, kappa, eps); err != nil {
				return nil, fmt.Errorf("scatter: body %q: %w", sys.names[i], err)
			}
			blk = mat.DenseCopyOf(m)
		}
		lu, err := newLUFactor(blk)
		if err != nil {
			return nil, sys.coarse(kappa, "the self block of body "+sys.names[i], err)
		}
		rs.lu = append(rs.lu, lu)
	}
	return &selfFactors{kappa: kappa, op: op, real: rs}, nil
}

// dim returns the number of unknowns of body i.
func (rs *realSelf) dim(surf []*bem.Surface, i int) int {
	if rs.mag[i] {
		return 2 * surf[i].Len()
	}
	return surf[i].Len()
}

// crossReal assembles the vacuum block between bodies i (rows) and j.
func (sys *system) crossReal(ctx context.Context, sf *selfFactors, surf []*bem.Surface, i, j int) (*mat.Dense, error) {
	rs := sf.real
	b := mat.NewDense(rs.dim(surf, i), rs.dim(surf, j), nil)
	if err := sys.asm.DielectricCross(ctx, b, surf[i], rs.mag[i], surf[j], rs.mag[j], sf.kappa); err != nil {
		return nil, err
	}
	return b, nil
}

// evaluateReal is the integrand ln |det(M M_∞^-1)| of a scene with real
// bodies, and its gradient when grad is set. Two bodies use the reduction
// ln det(I - M11^-1 M12 M22^-1 M21); more use N = M_∞^-1 M = I + Δ with
// Δ_ij = M_ii^-1 M_ij, both through logDetIPlus.
func (sys *system) evaluateReal(ctx context.Context, sf *selfFactors, surf []*bem.Surface, pl placement, grad bool) (evaluation, error) {
	var imgs []*bem.Surface
	if p := sys.plane; p != nil {
		imgs = append([]*bem.Surface(nil), sys.images...)
		imgs[sys.moving] = surf[sys.moving].Mirror(p.Point, p.Normal)
	} else if len(surf) == 2 {
		return sys.evaluateRealPair(ctx, sf, surf, pl, grad)
	}
	rs := sf.real
	start := make([]int, len(surf)+1)
	for i := range surf {
		start[i+1] = start[i] + rs.dim(surf, i)
	}
	n := start[len(surf)]
	delta := mat.NewDense(n, n, nil)
	for i := range surf {
		if imgs != nil {
			b, err := sys.imageReal(ctx, sf, surf, imgs, i, i)
			if err != nil {
				return evaluation{}, err
			}
			delta.Slice(start[i], start[i+1], start[i], start[i+1]).(*mat.Dense).Copy(rs.lu[i].solve(b))
		}
		for j := i + 1; j < len(surf); j++ {
			b, err := sys.crossReal(ctx, sf, surf, i, j)
			if err != nil {
				return evaluation{}, err
			}
			if imgs != nil {
				bi, err := sys.imageReal(ctx, sf, surf, imgs, i, j)
				if err != nil {
					return evaluation{}, err
				}
				b.Add(b, bi)
			}
			delta.Slice(start[i], start[i+1], start[j], start[j+1]).(*mat.Dense).Copy(rs.lu[i].solve(b))
			delta.Slice(start[j], start[j+1], start[i], start[i+1]).(*mat.Dense).Copy(rs.lu[j].solve(b.T()))
		}
	}
	var nmat *mat.Dense
	if grad {
		nmat = mat.DenseCopyOf(delta)
	}
	raw := delta.RawMatrix()
	ld, err := logDetIPlus(raw.Data, n, raw.Stride)
	if err != nil {
		return evaluation{}, sys.coarse(sf.kappa, "the scene matrix", err)
	}
	ev := evaluation{logDet: ld}
	if !grad {
		return ev, nil
	}
	// (M^-1)_im = (N^-1)_im M_mm^-1 for the moving body m: one block column
	// of N^-1 from the LU factors of N.
	m := sys.moving
	for i := 0; i < n; i++ {
		nmat.Set(i, i, nmat.At(i, i)+1)
	}
	var lu mat.LU
	lu.Factorize(nmat)
	nm := start[m+1] - start[m]
	e := mat.NewDense(n, nm, nil)
	for r := 0; r < nm; r++ {
		e.Set(start[m]+r, r, 1)
	}
	var z mat.Dense
	if err := lu.SolveTo(&z, false, e); err != nil {
		return evaluation{}, fmt.Errorf("scatter: solve with the scene matrix: %w", err)
	}
	var total bem.Motion
	add := func(t, r r3.Vec, f float64) {
		total.Translation = r3.Add(total.Translation, r3.Scale(f, t))
		total.Rotation = r3.Add(total.Rotation, r3.Scale(f, r))
	}
	for i := range surf {
		if i == m && imgs == nil {
			continue
		}
		zi := z.Slice(start[i], start[i+1], 0, nm)
		// H = Z_i M_mm^-1, i.e. Hᵀ = M_mm^-1 Z_iᵀ (M_mm is symmetric).
		h := mat.DenseCopyOf(rs.lu[m].solve(zi.T()).T())
		if i != m {
			// Blocks (i, m) and (m, i), counted twice.
			mot, err := sys.realGradient(ctx, sf, surf[i], rs.mag[i], surf[m], rs.mag[m], h, pl.centre)
			if err != nil {
				return evaluation{}, err
			}
			add(mot.Translation, mot.Rotation, 2)
		}
		if imgs == nil {
			continue
		}
		// The image block: the J columns of the image enter with -1.
		nmj := surf[m].Len()
		hj := h.Slice(0, h.RawMatrix().Rows, 0, nmj).(*mat.Dense)
		hj.Scale(-1, hj)
		mi, err := sys.realGradient(ctx, sf, surf[i], rs.mag[i], imgs[m], rs.mag[m], h, pl.centre)
		if err != nil {
			return evaluation{}, err
		}
		ti, ri := sys.imageMotion(mi, pl.centre)
		if i == m {
			// Self-image block: the body's rows move too, which is the
			// image moving by the inverse motion; counted once.
			add(r3.Sub(ti, mi.Translation), r3.Sub(ri, mi.Rotation), 1)
			continue
		}
		add(ti, ri, 2)
	}
	ev.setGrad(total, 1)
	return ev, nil
}

// imageMotion converts the derivatives for moving an image surface (about
// the centre c) into derivatives for moving the body (as evaluatePlane):
// displacement u moves the image by Pu; a turn θ about n through c turns it
// by -θ about Pn through Pc, and R_Pc = R_c + (c - Pc) × T.
func (sys *system) imageMotion(mo bem.Motion, c r3.Vec) (r3.Vec, r3.Vec) {
	p := sys.plane
	nn := r3.Unit(p.Normal)
	mirror := func(v r3.Vec) r3.Vec { return r3.Sub(v, r3.Scale(2*r3.Dot(v, nn), nn)) }
	pc := r3.Sub(c, r3.Scale(2*r3.Dot(r3.Sub(c, p.Point), nn), nn))
	rpc := r3.Add(mo.Rotation, r3.Cross(r3.Sub(c, pc), mo.Translation))
	return mirror(mo.Translation), r3.Scale(-1, mirror(rpc))
}

// imageReal returns the substrate's contribution to block (i, j): the
// vacuum block between body i and the image of body j with its J columns
// negated (electric currents image to -P J, magnetic ones to +P M).
func (sys *system) imageReal(ctx context.Context, sf *selfFactors, surf, imgs []*bem.Surface, i, j int) (*mat.Dense, error) {
	rs := sf.real
	b := mat.NewDense(rs.dim(surf, i), rs.dim(surf, j), nil)
	if err := sys.asm.DielectricCross(ctx, b, surf[i], rs.mag[i], imgs[j], rs.mag[j], sf.kappa); err != nil {
		return nil, err
	}
	nj := surf[j].Len()
	jc := b.Slice(0, rs.dim(surf, i), 0, nj).(*mat.Dense)
	jc.Scale(-1, jc)
	return b, nil
}

// evaluateRealPair is the two-body integrand ln |det(I - X)|,
// X = M11^-1 M12 M22^-1 M21. The gradient (DESIGN §5) is
// d ln det M/du = 2 <H, dM12/du> with H = (M^-1)_12 = -(I - X)^-1 M11^-1 M12 M22^-1.
func (sys *system) evaluateRealPair(ctx context.Context, sf *selfFactors, surf []*bem.Surface, pl placement, grad bool) (evaluation, error) {
	rs := sf.real
	b, err := sys.crossReal(ctx, sf, surf, 0, 1)
	if err != nil {
		return evaluation{}, err
	}
	d12 := rs.lu[0].solve(b)     // M11^-1 M12
	d21 := rs.lu[1].solve(b.T()) // M22^-1 M21
	var x mat.Dense
	x.Mul(d12, d21)
	n, _ := x.Dims()
	var a *mat.Dense
	if grad {
		a = mat.NewDense(n, n, nil)
		a.Scale(-1, &x)
		for i := 0; i < n; i++ {
			a.Set(i, i, a.At(i, i)+1)
		}
	}
	x.Scale(-1, &x)
	raw := x.RawMatrix()
	ld, err := logDetIPlus(raw.Data, n, raw.Stride)
	if err != nil {
		return evaluation{}, sys.coarse(sf.kappa, "the scene matrix", err)
	}
	ev := evaluation{logDet: ld}
	if !grad {
		return ev, nil
	}
	var lu mat.LU
	lu.Factorize(a)
	var z mat.Dense
	if err := lu.SolveTo(&z, false, d12); err != nil { // (I - X)^-1 M11^-1 M12
		return evaluation{}, fmt.Errorf("scatter: solve with I - X: %w", err)
	}
	ht := rs.lu[1].solve(z.T()) // M22^-1 Zᵀ = -Hᵀ
	var h *mat.Dense
	if sys.moving == 1 {
		h = mat.DenseCopyOf(ht.T())
	} else {
		h = ht
	}
	h.Scale(-1, h)
	fixed := 1 - sys.moving
	mot, err := sys.realGradient(ctx, sf, surf[fixed], rs.mag[fixed], surf[sys.moving], rs.mag[sys.moving], h, pl.centre)
	if err != nil {
		return evaluation{}, err
	}
	ev.setGrad(mot, 2)
	return ev, nil
}

// realGradient returns the derivatives of <H, B> for the vacuum block B
// between surface a (rows, magnetic unknowns when ma) and surface b
// (columns, mb) when b moves: with the (J, M) partition,
// <H, [[G~, K], [K, -G~]]> = <H_JJ - H_MM, G~> + <H_JM + H_MJ, K> (blocks of
// perfect bodies absent).
func (sys *system) realGradient(ctx context.Context, sf *selfFactors, a *bem.Surface, ma bool, b *bem.Surface, mb bool, h *mat.Dense, centre r3.Vec) (bem.Motion, error) {
	ni, nm := a.Len(), b.Len()
	hg := mat.DenseCopyOf(h.Slice(0, ni, 0, nm))
	if ma && mb {
		hg.Sub(hg, h.Slice(ni, 2*ni, nm, 2*nm))
	}
	mot, err := sys.asm.CrossGradient(ctx, hg, sf.op, a, b, centre)
	if err != nil {
		return bem.Motion{}, err
	}
	if !ma && !mb {
		return mot, nil
	}
	hk := mat.NewDense(ni, nm, nil)
	if mb {
		hk.Add(hk, h.Slice(0, ni, nm, 2*nm))
	}
	if ma {
		hk.Add(hk, h.Slice(ni, 2*ni, 0, nm))
	}
	kop, err := bem.NewKFIE(sf.kappa)
	if err != nil {
		return bem.Motion{}, err
	}
	mk, err := sys.asm.CrossGradientK(ctx, hk, kop, a, b, centre)
	if err != nil {
		return bem.Motion{}, err
	}
	mot.Translation = r3.Add(mot.Translation, mk.Translation)
	mot.Rotation = r3.Add(mot.Rotation, mk.Rotation)
	return mot, nil
}
