package multipole

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// gauntQuad returns ∫ Y_lm Y*_jm Y_λ0 dΩ = 2π ∫_{-1}^{1} P̄_lm P̄_jm P̄_λ0 dx by
// Gauss–Legendre quadrature (gonum), exact for this polynomial of degree
// l+j+λ.
func gauntQuad(l, j, lam, m int) float64 {
	n := (l+j+lam)/2 + 2
	if n == 26 {
		n = 27 // gonum v0.17.0's 26-point Legendre rule is wrong (tabulated data)
	}
	return 2 * math.Pi * quad.Fixed(func(x float64) float64 {
		return legendreY(l, m, x) * legendreY(j, m, x) * legendreY(lam, 0, x)
	}, -1, 1, n, quad.Legendre{}, 0)
}

// directAlpha returns the scalar translation coefficient from its definition
// (Cruzan 1962, continued to imaginary frequency),
// α_jl(d) = (-1)^j 4π Σ_λ k_λ(κ|d|) Y_λ0(sgn d ẑ) ∫ Y_lm Y*_jm Y_λ0 dΩ.
// It also returns the sum of the terms' magnitudes, the scale of its rounding
// error (the terms cancel strongly at large κd and m).
func directAlpha(j, l, m int, kappa, d float64) (alpha, scale float64) {
	s := 0.0
	for lam := abs(l - j); lam <= l+j; lam++ {
		y := math.Sqrt(float64(2*lam+1) / (4 * math.Pi))
		if d < 0 && lam%2 == 1 {
			y = -y
		}
		term := BesselK(lam, kappa*math.Abs(d)) * y * gauntQuad(l, j, lam, m)
		s += term
		scale += math.Abs(term)
	}
	if j%2 == 1 {
		s = -s
	}
	return 4 * math.Pi * s, 4 * math.Pi * scale
}

func abs(n int) int {
	if n < 0 {
		return -n
	}
	return n
}

// translationFor builds the package's scaled scalar translation for tests.
func translationFor(m int, kappa, d, rRow, rCol float64, lmax int) (*scalarTranslation, *sphereScales, *sphereScales) {
	jmax := lmax + 2
	row := newSphereScales(rRow, kappa, jmax+lmax)
	col := newSphereScales(rCol, kappa, lmax+1)
	eta := distanceLogEta(math.Abs(d), kappa, jmax+lmax)
	lf := newLogFactorials(4*lmax + 16)
	return newScalarTranslation(m, d, &row, &col, eta, lf, jmax, lmax), &row, &col
}

// The closed-form Gaunt coefficients of the first column (Edmonds 1957 3j
// symbols) against quadrature. Tolerance 1e-12 relative to the largest
// coefficient of the column (quadrature of polynomials, exact up to rounding).
func TestStartCoefficient(t *testing.T) {
	lf := newLogFactorials(200)
	for _, m := range []int{0, 1, 2, 5, 9} {
		for j := m; j <= m+20; j++ {
			big := 0.0
			want := map[int]float64{}
			for lam := j - m; lam <= j+m; lam += 2 {
				w := 4 * math.Pi * math.Sqrt(float64(2*lam+1)/(4*math.Pi)) * gauntQuad(m, j, lam, m)
				if j%2 == 1 {
					w = -w
				}
				want[lam] = w
				big = math.Max(big, math.Abs(w))
			}
			for lam, w := range want {
				got := startCoefficient(lf, m, j, lam)
				if math.Abs(got-w) > 1e-12*big {
					t.Errorf("m=%d j=%d λ=%d: coefficient %.15g, quadrature %.15g", m, j, lam, got, w)
				}
			}
		}
	}
}

// The recurrence for α_jl against the definition (directAlpha, Gaunt integrals
// by quadrature), both signs of d, κd from 0.05 to 60. Tolerance 1e-10
// relative to the larger of the row's largest element (the scaled entries fall
// steeply along a row; what matters for the determinant is the error relative
// to the row's dominant entries) and the sum of the magnitudes of the terms of
// the definition (its own rounding scale).
func TestScalarTranslationRecurrence(t *testing.T) {
	const lmax = 24
	for _, c := range []struct {
		m          int
		kappa, d   float64
		rRow, rCol float64
	}{
		{0, 0.02, 2.5, 1, 1},
		{0, 1, 3, 0.7, 1.3},
		{1, 1, -3, 1, 1},
		{3, 4, 2.2, 1, 1},
		{7, 20, 3, 1, 1.5},
		{2, 0.5, -2.5, 1.1, 0.6},
	} {
		tr, row, col := translationFor(c.m, c.kappa, c.d, c.rRow, c.rCol, lmax)
		sr, sc := scales(row, lmax), scales(col, lmax)
		for j := c.m; j <= lmax; j++ {
			want := make([]float64, lmax+1)
			scale := make([]float64, lmax+1)
			big := 0.0
			for l := c.m; l <= lmax; l++ {
				a, s := directAlpha(j, l, c.m, c.kappa, c.d)
				want[l], scale[l] = sr[j]*a*sc[l], sr[j]*s*sc[l]
				big = math.Max(big, math.Abs(want[l]))
			}
			for l := c.m; l <= lmax; l++ {
				if got := tr.at(j, l); math.Abs(got-want[l]) > 1e-10*math.Max(big, scale[l]) {
					t.Errorf("m=%d κ=%g d=%g: β_%d,%d = %.12g, definition %.12g (row max %.3g)", c.m, c.kappa, c.d, j, l, got, want[l], big)
				}
			}
		}
	}
}

// Addition theorem, scalar waves: k_l(κ|r'+dẑ|) Y_lm = Σ_j α_jl(d) i_j(κr') Y_jm(r̂')
// for |r'| < |d|, evaluated at points (Cruzan 1962; the definition of α).
// Tolerance 1e-10 relative to the larger of the wave and the sum of the
// magnitudes of the series' terms (which cancel where Y_lm is small); the
// series is summed to j = 70 at |r'|/|d| ≤ 0.45, remainder < 0.45^70.
func TestScalarAdditionTheorem(t *testing.T) {
	const jmax = 70
	for _, c := range []struct {
		m, l     int
		kappa, d float64
	}{{0, 0, 0.8, 2}, {0, 3, 2, -2.5}, {1, 1, 0.3, 3}, {2, 5, 1.5, 2}, {4, 6, 5, -1.8}} {
		tr, row, col := translationFor(c.m, c.kappa, c.d, 1, 1, jmax)
		sr, sc := scales(row, jmax), scales(col, jmax)
		for _, p := range []point{{0.2, 0.5}, {0.6, -0.4}, {0.1, -0.85}, {0.8, 0.1}} {
			rp := point{p.rho * math.Abs(c.d), p.z * math.Abs(c.d)}
			if r, _ := rp.spherical(); r > 0.45*math.Abs(c.d) {
				rp = point{rp.rho * 0.45 * math.Abs(c.d) / r, rp.z * 0.45 * math.Abs(c.d) / r}
			}
			want := scalarWaveAt(c.l, c.m, c.kappa, point{rp.rho, rp.z + c.d}, true)
			got, scale := 0.0, 0.0
			for j := c.m; j <= jmax; j++ {
				alpha := tr.at(j, c.l) / (sr[j] * sc[c.l])
				term := alpha * scalarWaveAt(j, c.m, c.kappa, rp, false)
				got += term
				scale += math.Abs(term)
			}
			if math.Abs(got-want) > 1e-10*math.Max(math.Abs(want), scale) {
				t.Errorf("m=%d l=%d κ=%g d=%g at %v: expansion %.14g, wave %.14g", c.m, c.l, c.kappa, c.d, rp, got, want)
			}
		}
	}
}

// vectorCoefficients returns unscaled A_jl and B_jl = i B̃_jl (B̃ real) from the
// package's real scaled matrix [[Â, B̂], [B̂, Â]].
func vectorCoefficients(m int, kappa, d float64, lmax int) (A, B func(j, l int) complex128) {
	tr, row, col := translationFor(m, kappa, d, 1, 1, lmax)
	lo := max(1, m)
	n := lmax - lo + 1
	v := make([]float64, 4*n*n)
	vectorTranslation(tr, lmax, false, v)
	sr, sc := scales(row, lmax), scales(col, lmax)
	A = func(j, l int) complex128 {
		return complex(v[(j-lo)*2*n+(l-lo)]/(sr[j]*sc[l]), 0)
	}
	B = func(j, l int) complex128 {
		return complex(0, v[(j-lo)*2*n+(l-lo)+n]/(sr[j]*sc[l]))
	}
	return A, B
}

// Addition theorem, vector waves (Cruzan 1962; Wittmann 1988), at points:
//
//	M^out_l(r'+dẑ) = Σ_j A_jl M^reg_j(r') + B_jl N^reg_j(r'),
//	N^out_l(r'+dẑ) = Σ_j -B_jl M^reg_j(r') + A_jl N^reg_j(r').
//
// Tolerance 1e-8 relative to |field|: the test fields take ∂_θ Y by central
// differences (error ~1e-10) and the series is summed to j = 60 at
// |r'|/|d| ≤ 0.4.
func TestVectorAdditionTheorem(t *testing.T) {
	const jmax = 60
	for _, c := range []struct {
		m, l     int
		kappa, d float64
	}{{0, 1, 0.7, 2}, {1, 1, 1.2, -2.5}, {1, 3, 0.4, 3}, {2, 4, 2, 2}, {3, 3, 4, -2}} {
		A, B := vectorCoefficients(c.m, c.kappa, c.d, jmax)
		for _, p := range []point{{0.3, 0.4}, {0.5, -0.3}, {0.2, -0.7}} {
			rp := point{p.rho * 0.45 * math.Abs(c.d), p.z * 0.45 * math.Abs(c.d)}
			wantM, wantN := vectorWaves(c.l, c.m, c.kappa, point{rp.rho, rp.z + c.d}, true)
			var gotM, gotN vec3
			for j := max(1, c.m); j <= jmax; j++ {
				Mj, Nj := vectorWaves(j, c.m, c.kappa, rp, false)
				a, b := A(j, c.l), B(j, c.l)
				gotM = gotM.add(Mj, a).add(Nj, b)
				gotN = gotN.add(Mj, -b).add(Nj, a)
			}
			if e := gotM.add(wantM, -1).norm(); e > 1e-8*wantM.norm() {
				t.Errorf("M m=%d l=%d κ=%g d=%g at %v: |Δ| = %.2e of %.2e", c.m, c.l, c.kappa, c.d, rp, e, wantM.norm())
			}
			if e := gotN.add(wantN, -1).norm(); e > 1e-8*wantN.norm() {
				t.Errorf("N m=%d l=%d κ=%g d=%g at %v: |Δ| = %.2e of %.2e", c.m, c.l, c.kappa, c.d, rp, e, wantN.norm())
			}
		}
	}
}

// The generator of axial translations, dV/dd = Ĝ V_ext, against the
// five-point difference quotient of the translation matrices in d (step
// h = 2e-4 d: truncation ~h⁴ f⁽⁵⁾/30 ≲ 1e-10 for entries varying like
// e^{-κd}(R/d)^l, l ≤ 16; rounding ~1e-12), scalar and vector, κ = 0 included.
// Tolerance 1e-8 relative to the largest element of the derivative.
func TestTranslationGenerator(t *testing.T) {
	const lmax = 16
	for _, c := range []struct {
		m        int
		kappa, d float64
		vector   bool
	}{{0, 0.5, 2.5, true}, {1, 2, 2.2, true}, {3, 0, 3, true}, {2, 6, -2.4, true},
		{0, 0.5, 2.5, false}, {2, 0, 2.2, false}, {1, 4, -3, false}} {
		lo := c.m
		n := lmax - lo + 1
		nExt := n + 1
		if c.vector {
			lo = max(1, c.m)
			n = 2 * (lmax - lo + 1)
			nExt = n + 2
		}
		mat := func(d float64) ([]float64, *scalarTranslation) {
			tr, _, _ := translationFor(c.m, c.kappa, d, 1, 1.2, lmax)
			v := make([]float64, nExt*n)
			if c.vector {
				vectorTranslation(tr, lmax, true, v)
			} else {
				for j := lo; j <= lmax+1; j++ {
					for l := lo; l <= lmax; l++ {
						v[(j-lo)*n+(l-lo)] = tr.at(j, l)
					}
				}
			}
			return v, tr
		}
		h := 2e-4 * math.Abs(c.d)
		v, tr := mat(c.d)
		vp, _ := mat(c.d + h)
		vm, _ := mat(c.d - h)
		vp2, _ := mat(c.d + 2*h)
		vm2, _ := mat(c.d - 2*h)
		gen := generator(tr, lmax, c.vector)
		dv := make([]float64, n*n)
		big := 0.0
		for i := 0; i < n; i++ {
			for _, e := range gen[i] {
				for j := 0; j < n; j++ {
					dv[i*n+j] += e.g * v[e.k*n+j]
				}
			}
			for j := 0; j < n; j++ {
				big = math.Max(big, math.Abs(dv[i*n+j]))
			}
		}
		for i := 0; i < n*n; i++ {
			fd := (-vp2[i] + 8*vp[i] - 8*vm[i] + vm2[i]) / (12 * h)
			if math.Abs(fd-dv[i]) > 1e-8*big {
				t.Errorf("vector=%v m=%d κ=%g d=%g element %d: generator %.10g, difference %.10g", c.vector, c.m, c.kappa, c.d, i, dv[i], fd)
			}
		}
	}
}

// Reciprocity and mirror symmetry, used to build the round trips: translating
// from sphere 2 to sphere 1 (d = -L, rows scaled by sphere 1) equals the
// transpose of translating from 1 to 2 (d = +L), up to S = diag(1, -1) on
// (TE, TM) for vector waves; and a translation between two copies of one
// sphere satisfies V = P Vᵀ P, P = diag((-1)^l), so V P is symmetric (the
// sphere–plane matrix Y). Tolerance 1e-12 relative to the largest element.
func TestTranslationReciprocity(t *testing.T) {
	const lmax = 20
	const r1, r2, L = 1.3, 0.7, 2.4
	for _, kappa := range []float64{0, 0.3, 3} {
		for _, m := range []int{0, 1, 4} {
			lo := max(1, m)
			n := 2 * (lmax - lo + 1)
			t21, _, _ := translationFor(m, kappa, L, r2, r1, lmax)
			t12, _, _ := translationFor(m, kappa, -L, r1, r2, lmax)
			v21, v12 := make([]float64, n*n), make([]float64, n*n)
			vectorTranslation(t21, lmax, false, v21)
			vectorTranslation(t12, lmax, false, v12)
			big := 0.0
			for _, x := range v21 {
				big = math.Max(big, math.Abs(x))
			}
			s := func(i int) float64 {
				if i >= n/2 {
					return -1
				}
				return 1
			}
			for i := 0; i < n; i++ {
				for j := 0; j < n; j++ {
					want := s(i) * v21[j*n+i] * s(j)
					if math.Abs(v12[i*n+j]-want) > 1e-12*big {
						t.Fatalf("κ=%g m=%d: U12[%d,%d] = %.15g, S U21ᵀ S = %.15g", kappa, m, i, j, v12[i*n+j], want)
					}
				}
			}
			for j := m; j <= lmax; j++ {
				for l := m; l <= lmax; l++ {
					if d := t12.at(j, l) - t21.at(l, j); math.Abs(d) > 1e-12*big {
						t.Fatalf("κ=%g m=%d: scalar β12[%d,%d] = %.15g, β21ᵀ = %.15g", kappa, m, j, l, t12.at(j, l), t21.at(l, j))
					}
				}
			}
			// Mirror symmetry of a translation between copies of one sphere.
			ts, _, _ := translationFor(m, kappa, 2*L, r1, r1, lmax)
			vs := make([]float64, n*n)
			vectorTranslation(ts, lmax, false, vs)
			parity := func(i int) float64 {
				l := lo + i%(n/2)
				return float64(1 - 2*(l%2))
			}
			bigS := 0.0
			for _, x := range vs {
				bigS = math.Max(bigS, math.Abs(x))
			}
			for i := 0; i < n; i++ {
				for j := 0; j < i; j++ {
					a, b := vs[i*n+j]*parity(j), vs[j*n+i]*parity(i)
					if math.Abs(a-b) > 1e-12*bigS {
						t.Fatalf("κ=%g m=%d: V P not symmetric at [%d,%d]: %.15g vs %.15g", kappa, m, i, j, a, b)
					}
				}
			}
		}
	}
}

// The scaled T-matrices against their definitions (Rahi et al. 2009):
// T_D = T_TE = -i_l/k_l, T_N = -i_l'/k_l', T_TM = -[x i_l]'/[x k_l]', with the
// derivatives taken by central differences of BesselI/BesselK (step 1e-5 x,
// error ~1e-10) and T = T̂ s_l². Tolerance 1e-8 relative.
func TestTMatrices(t *testing.T) {
	for _, x := range []float64{0.05, 0.7, 3, 25} {
		s := newSphereScales(1, x, 30)
		ss := scales(&s, 30)
		h := 1e-5 * x
		d := func(f func(float64) float64) float64 { return (f(x+h) - f(x-h)) / (2 * h) }
		for _, l := range []int{0, 1, 2, 5, 12, 30} {
			s2 := ss[l] * ss[l]
			i := func(y float64) float64 { return BesselI(l, y) }
			k := func(y float64) float64 { return BesselK(l, y) }
			xi := func(y float64) float64 { return y * BesselI(l, y) }
			xk := func(y float64) float64 { return y * BesselK(l, y) }
			checkRel(t, fmt.Sprintf("T_D l=%d x=%g", l, x), scaledT(Dirichlet, scalarWave, &s, l)*s2, -i(x)/k(x), 1e-12)
			checkRel(t, fmt.Sprintf("T_N l=%d x=%g", l, x), scaledT(Neumann, scalarWave, &s, l)*s2, -d(i)/d(k), 1e-8)
			if l == 0 {
				continue
			}
			checkRel(t, fmt.Sprintf("T_TE l=%d x=%g", l, x), scaledT(Electromagnetic, transverseElectric, &s, l)*s2, -i(x)/k(x), 1e-12)
			checkRel(t, fmt.Sprintf("T_TM l=%d x=%g", l, x), scaledT(Electromagnetic, transverseMagnetic, &s, l)*s2, -d(xi)/d(xk), 1e-8)
		}
	}
	// Static limits: T̂_TM → (l+1)/l, T̂_N → l/(l+1) (electric and magnetic
	// multipole polarisabilities of a perfectly conducting sphere; for l = 1,
	// α_E = R³ and α_M = -R³/2, Jackson, Classical Electrodynamics, §9.5 and §10.1).
	s0 := newSphereScales(1, 0, 10)
	for l := 1; l <= 10; l++ {
		checkRel(t, fmt.Sprintf("T̂_TM(0) l=%d", l), scaledT(Electromagnetic, transverseMagnetic, &s0, l), float64(l+1)/float64(l), 1e-15)
		checkRel(t, fmt.Sprintf("T̂_N(0) l=%d", l), scaledT(Neumann, scalarWave, &s0, l), float64(l)/float64(l+1), 1e-15)
	}
}

// The sphere's boundary conditions hold for regular + T × outgoing waves on
// r = R (Dirichlet: the scalar field vanishes; perfect conductor: the
// tangential field, i.e. the θ̂ and φ̂ parts of M and N, vanishes).
// Tolerance 1e-8 relative (∂_θ by central differences in the test fields).
func TestSphereBoundaryConditions(t *testing.T) {
	const R = 1.3
	for _, kappa := range []float64{0.2, 1, 4} {
		s := newSphereScales(R, kappa, 12)
		ss := scales(&s, 12)
		for _, m := range []int{0, 1, 2} {
			for _, l := range []int{1, 2, 5} {
				if l < m {
					continue
				}
				tM := scaledT(Electromagnetic, transverseElectric, &s, l) * ss[l] * ss[l]
				tN := scaledT(Electromagnetic, transverseMagnetic, &s, l) * ss[l] * ss[l]
				for _, th := range []float64{0.4, 1.3, 2.5} {
					p := point{R * math.Sin(th), R * math.Cos(th)}
					Mr, Nr := vectorWaves(l, m, kappa, p, false)
					Mo, No := vectorWaves(l, m, kappa, p, true)
					eM := Mr.add(Mo, complex(tM, 0))
					eN := Nr.add(No, complex(tN, 0))
					// Tangential: φ̂ and θ̂ = cosθ ρ̂ - sinθ ẑ.
					tang := func(v vec3) float64 {
						return cmplx.Abs(v[1]) + cmplx.Abs(v[0]*complex(math.Cos(th), 0)-v[2]*complex(math.Sin(th), 0))
					}
					if e := tang(eM); e > 1e-8*Mr.norm() {
						t.Errorf("TE κ=%g m=%d l=%d θ=%g: tangential %.2e of %.2e", kappa, m, l, th, e, Mr.norm())
					}
					if e := tang(eN); e > 1e-8*Nr.norm() {
						t.Errorf("TM κ=%g m=%d l=%d θ=%g: tangential %.2e of %.2e", kappa, m, l, th, e, Nr.norm())
					}
				}
			}
		}
	}
}

// The plane as the image sphere: an outgoing wave about the sphere's centre O
// (height h above the plane z = 0) plus its reflection, expanded about O as
// Σ_j π_l U_jl(2h) × (regular waves), satisfies the plane's boundary condition
// on points of the plane within the expansion's reach (|r - O| < 2h), with the
// reflection signs derived in roundtrip.go:
//
//	Dirichlet π = -(-1)^{l+m}, Neumann +(-1)^{l+m}, TE +(-1)^{l+m}, TM -(-1)^{l+m}.
//
// Dirichlet: the field vanishes; Neumann: ∂_z vanishes (central difference,
// step 1e-5 h); perfect conductor: the tangential (ρ̂, φ̂) field vanishes.
// Tolerance 1e-8 relative to the incident field (1e-7 for the Neumann
// difference quotient): the series is summed to j = 100 at |r - O|/2h ≤ 0.59,
// where its terms fall like j^l 0.59^j.
func TestPlaneImage(t *testing.T) {
	const jmax, h = 100, 1.0
	sign := func(l, m int) float64 { return float64(1 - 2*((l+m)%2)) }
	for _, kappa := range []float64{0.3, 2} {
		for _, m := range []int{0, 1, 3} {
			tr, row, col := translationFor(m, kappa, 2*h, 1, 1, jmax)
			sr, sc := scales(row, jmax), scales(col, jmax)
			A, B := vectorCoefficients(m, kappa, 2*h, jmax)
			for _, l := range []int{max(1, m), max(1, m) + 1, 6} {
				for _, rho := range []float64{0, 0.3, 0.6} {
					p := point{rho, -h} // the plane, relative to O
					// Scalar waves.
					psi := scalarWaveAt(l, m, kappa, p, true)
					field := func(zOff float64, pi float64) float64 {
						q := point{p.rho, p.z + zOff}
						v := scalarWaveAt(l, m, kappa, q, true)
						for j := m; j <= jmax; j++ {
							v += pi * tr.at(j, l) / (sr[j] * sc[l]) * scalarWaveAt(j, m, kappa, q, false)
						}
						return v
					}
					if e := field(0, -sign(l, m)); math.Abs(e) > 1e-8*math.Abs(psi)+1e-14 {
						t.Errorf("Dirichlet κ=%g m=%d l=%d ρ=%g: field %.2e of %.2e", kappa, m, l, rho, e, psi)
					}
					dz := 1e-5 * h
					dpsi := (scalarWaveAt(l, m, kappa, point{p.rho, p.z + dz}, true) - scalarWaveAt(l, m, kappa, point{p.rho, p.z - dz}, true)) / (2 * dz)
					dn := (field(dz, sign(l, m)) - field(-dz, sign(l, m))) / (2 * dz)
					if math.Abs(dn) > 1e-7*math.Abs(dpsi)+1e-14 {
						t.Errorf("Neumann κ=%g m=%d l=%d ρ=%g: ∂_z field %.2e of %.2e", kappa, m, l, rho, dn, dpsi)
					}
					// Vector waves.
					Mo, No := vectorWaves(l, m, kappa, p, true)
					eM, eN := Mo, No
					piM, piN := complex(sign(l, m), 0), complex(-sign(l, m), 0)
					for j := max(1, m); j <= jmax; j++ {
						Mj, Nj := vectorWaves(j, m, kappa, p, false)
						a, b := A(j, l), B(j, l)
						eM = eM.add(Mj, piM*a).add(Nj, piM*b)
						eN = eN.add(Mj, -piN*b).add(Nj, piN*a)
					}
					if e := cmplx.Abs(eM[0]) + cmplx.Abs(eM[1]); e > 1e-8*Mo.norm() {
						t.Errorf("TE κ=%g m=%d l=%d ρ=%g: tangential %.2e of %.2e", kappa, m, l, rho, e, Mo.norm())
					}
					if e := cmplx.Abs(eN[0]) + cmplx.Abs(eN[1]); e > 1e-8*No.norm() {
						t.Errorf("TM κ=%g m=%d l=%d ρ=%g: tangential %.2e of %.2e", kappa, m, l, rho, e, No.norm())
					}
				}
			}
		}
	}
}
