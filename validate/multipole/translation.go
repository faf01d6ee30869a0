package multipole

import "math"

// Translation of spherical waves along the z axis at imaginary frequency.
//
// Scalar waves: regular φ_lm = i_l(κr) Y_lm(r̂), outgoing ψ_lm = k_l(κr) Y_lm(r̂),
// with Y_lm the orthonormal spherical harmonics (Condon–Shortley phase). An
// outgoing wave about P, seen from Q = P + d ẑ (d of either sign, |r'| < |d|),
//
//	ψ_lm(r' + d ẑ) = Σ_j α^m_jl(d) φ_jm(r'),
//	α^m_jl(d) = (-1)^j 4π Σ_λ k_λ(κ|d|) Y_λ0(sgn d ẑ) ∫ Y_lm Y*_jm Y_λ0 dΩ,
//
// is the real-frequency addition theorem (Stein 1961; Cruzan, Q. Appl. Math.
// 20, 33 (1962)) continued to k = iκ with h_l(iκr) = -i^{-l} k_l(κr) and
// j_l(iκr) = i^l i_l(κr). m is conserved. At l = m the Gaunt integral has
// closed form (below); the other columns follow from the exact recurrence got
// by applying ∂_z (which commutes with the translation) to both sides,
//
//	a⁺_l α_{j,l+1} = -a⁻_l α_{j,l-1} - a⁺_{j-1} α_{j-1,l} - a⁻_{j+1} α_{j+1,l},
//	a⁺_l = sqrt(((l+1)²-m²)/((2l+1)(2l+3))),  a⁻_l = sqrt((l²-m²)/((2l-1)(2l+1))),
//
// using ∂_z(i_l Y_lm) = κ(a⁺_l i_{l+1} Y_{l+1,m} + a⁻_l i_{l-1} Y_{l-1,m}) and
// ∂_z(k_l Y_lm) = -κ(a⁺_l k_{l+1} Y_{l+1,m} + a⁻_l k_{l-1} Y_{l-1,m}). The
// derivative in d follows from the same ∂_z (see generator).
//
// Vector waves M_lm = ∇×(r ψ)/sqrt(l(l+1)), N_lm = ∇×M_lm/κ (so ∇×N = -κM):
//
//	M^out_l = Σ_j A_jl M^reg_j + B_jl N^reg_j,   N^out_l = Σ_j -B_jl M^reg_j + A_jl N^reg_j,
//	A_jl = [j(j+1) α_jl + κd (j a⁺_j α_{j+1,l} - (j+1) a⁻_j α_{j-1,l})] / sqrt(j(j+1) l(l+1)),
//	B_jl = i m κd α_jl / sqrt(j(j+1) l(l+1)).
//
// B follows from the radial component r'·M^out = i m d ψ/sqrt(l(l+1)) and A from
// L·M^out with L = -i r×∇ (the angular-momentum form of the translation
// coefficients of Cruzan 1962 and Wittmann, IEEE TAP 36, 1078 (1988)). The i is
// removed by the similarity N → iN of the TM amplitudes, which leaves every
// round-trip determinant unchanged: in the (TE, TM) basis the translation is the
// real matrix [[A, B̃], [B̃, A]] with B̃ = m κd α/sqrt(j(j+1)l(l+1)).
//
// All matrices are stored scaled, β_jl = s^row_j α_jl s^col_l with the sphere
// scales s_l = sqrt(i_l(κR)/k_l(κR)) of bessel.go, which keeps them O(e^{-κ·gap})
// for every l, κ ≥ 0 and also at κ = 0.

// logFactorials holds ln n! for n = 0..len-1.
type logFactorials []float64

func newLogFactorials(n int) logFactorials {
	f := make(logFactorials, n+1)
	for k := 2; k <= n; k++ {
		f[k] = f[k-1] + math.Log(float64(k))
	}
	return f
}

// startCoefficient returns c, the coefficient of k_λ(κd) in α^m_{j,m}(d) for
// d > 0:
//
//	α^m_{jm} = Σ_λ c_λ k_λ,  c_λ = (-1)^{j+m} (2λ+1) sqrt((2m+1)(2j+1)) (m j λ; 0 0 0)(m j λ; m -m 0),
//
// for j ≥ m, λ = j-m, j-m+2, ..., j+m. It uses the closed forms
//
//	(j1 j2 j3; 0 0 0) = (-1)^g sqrt[(2g-2j1)!(2g-2j2)!(2g-2j3)!/(2g+1)!] g!/((g-j1)!(g-j2)!(g-j3)!),  2g = j1+j2+j3,
//	(j1 j2 j3; j1 m2 m3) = (-1)^{j1-j2-m3} sqrt[(2j1)!(j2+j3-j1)!(j2-m2)!(j3-m3)! /
//	                       ((j1+j2+j3+1)!(j1+j2-j3)!(j1-j2+j3)!(j2+m2)!(j3+m3)!)],
//
// (Edmonds, Angular Momentum in Quantum Mechanics, 1957; the second is the
// single surviving term of Racah's sum when m1 = j1). The sign of the product is
// (-1)^{g+m-j}, so c_λ has sign (-1)^g.
func startCoefficient(lf logFactorials, m, j, lam int) float64 {
	g := (m + j + lam) / 2
	l000 := 0.5*(lf[2*g-2*m]+lf[2*g-2*j]+lf[2*g-2*lam]-lf[2*g+1]) +
		lf[g] - lf[g-m] - lf[g-j] - lf[g-lam]
	lmm0 := 0.5 * (lf[2*m] + lf[j+lam-m] + lf[j+m] -
		lf[m+j+lam+1] - lf[m+j-lam] - lf[m-j+lam] - lf[j-m])
	c := float64(2*lam+1) * math.Sqrt(float64((2*m+1)*(2*j+1))) * math.Exp(l000+lmm0)
	if g%2 == 1 {
		c = -c
	}
	return c
}

// aPlus and aMinus return a⁺_l and a⁻_l for azimuthal number m.
func aPlus(l, m int) float64 {
	n := (l+1)*(l+1) - m*m
	if n <= 0 {
		return 0
	}
	return math.Sqrt(float64(n) / float64((2*l+1)*(2*l+3)))
}

func aMinus(l, m int) float64 {
	n := l*l - m*m
	if n <= 0 {
		return 0
	}
	return math.Sqrt(float64(n) / float64((2*l-1)*(2*l+1)))
}

// scalarTranslation holds scaled coefficients β_jl = s^row_j α^m_jl(d) s^col_l
// for j = m..J (rows) and l = m..lmax (columns), valid for j ≤ J-(l-m).
type scalarTranslation struct {
	m, J, lmax int
	d          float64
	row, col   *sphereScales
	beta       []float64 // (J-m+1) × (lmax-m+1), row-major
	stride     int
}

func (t *scalarTranslation) at(j, l int) float64 {
	return t.beta[(j-t.m)*t.stride+(l-t.m)]
}

// newScalarTranslation computes β for one m ≥ 0 so that every row j ≤ jmax is
// complete for l ≤ lmax. row and col need orders up to jmax+lmax-m and lmax;
// lnEta (distanceLogEta at |d|) needs orders up to jmax+lmax.
func newScalarTranslation(m int, d float64, row, col *sphereScales, lnEta []float64,
	lf logFactorials, jmax, lmax int) *scalarTranslation {
	J := jmax + (lmax - m)
	t := &scalarTranslation{m: m, J: J, lmax: lmax, d: d, row: row, col: col,
		stride: lmax - m + 1}
	t.beta = make([]float64, (J-m+1)*t.stride)
	kappa := row.kappa
	ad := math.Abs(d)
	lnD, lnRr, lnRc := math.Log(ad), math.Log(row.R), math.Log(col.R)
	lnK := math.Inf(-1)
	if kappa > 0 {
		lnK = math.Log(kappa)
	}

	// Column l = m: β_{jm} = Σ_λ c_λ κ^{j+m-λ} R_r^{j+½} R_c^{m+½} |d|^{-(λ+1)} σ^r_j σ^c_m η_λ.
	for j := m; j <= J; j++ {
		base := row.lnSigma[j] + col.lnSigma[m] + (float64(j)+0.5)*lnRr + (float64(m)+0.5)*lnRc
		sum := 0.0
		for lam := j + m; lam >= j-m; lam -= 2 {
			p := j + m - lam // power of κ
			if p > 0 && kappa == 0 {
				break
			}
			e := base - float64(lam+1)*lnD + lnEta[lam]
			if p > 0 {
				e += float64(p) * lnK
			}
			sum += startCoefficient(lf, m, j, lam) * math.Exp(e)
		}
		if d < 0 && (j+m)%2 == 1 {
			sum = -sum
		}
		t.beta[(j-m)*t.stride] = sum
	}

	// Upward recurrence in l (see the package comment above), in scaled form:
	// β_{j,l+1} = -[a⁻_l c1 β_{j,l-1} + a⁺_{j-1} c2 β_{j-1,l} + a⁻_{j+1} c3 β_{j+1,l}] / a⁺_l,
	// c1 = s^c_{l+1}/s^c_{l-1} = κ² up^c_l up^c_{l-1},
	// c2 = (s^r_j/s^r_{j-1})(s^c_{l+1}/s^c_l) = κ² up^r_{j-1} up^c_l,
	// c3 = (s^r_j/s^r_{j+1})(s^c_{l+1}/s^c_l) = up^c_l / up^r_j.
	k2 := kappa * kappa
	for l := m; l < lmax; l++ {
		ap := aPlus(l, m)
		am := aMinus(l, m)
		upl := col.up[l]
		c1 := 0.0
		if l > m {
			c1 = k2 * upl * col.up[l-1]
		}
		lc := l - m
		jtop := J - (l - m) - 1
		for j := m; j <= jtop; j++ {
			r := (j - m) * t.stride
			v := aMinus(j+1, m) * (upl / row.up[j]) * t.beta[r+t.stride+lc]
			if j > m {
				v += aPlus(j-1, m) * k2 * row.up[j-1] * upl * t.beta[r-t.stride+lc]
			}
			if l > m {
				v += am * c1 * t.beta[r+lc-1]
			}
			t.beta[r+lc+1] = -v / ap
		}
	}
	return t
}

// vectorTranslation fills the scaled electromagnetic translation matrix for
// one m, columns l = lo..lmax (lo = max(1, m), nl = lmax-lo+1, n = 2nl, TE then
// TM) into dst, row-major with stride n. The rows are TE j = lo..lmax, TM
// j = lo..lmax and, if ext, two more: TE and TM j = lmax+1 (what the
// generator of dU/dd needs): [[Â, B̂], [B̂, Â]]. t must have jmax ≥ lmax+2.
func vectorTranslation(t *scalarTranslation, lmax int, ext bool, dst []float64) {
	m := t.m
	lo := max(1, m)
	nl := lmax - lo + 1
	n := 2 * nl
	kappa := t.row.kappa
	k2 := kappa * kappa
	d := t.d
	up := t.row.up
	jtop := lmax
	if ext {
		jtop = lmax + 1
	}
	for j := lo; j <= jtop; j++ {
		fj := float64(j)
		ap, am := aPlus(j, m), aMinus(j, m)
		rTE, rTM := j-lo, j-lo+nl
		if j > lmax {
			rTE, rTM = n, n+1
		}
		for l := lo; l <= lmax; l++ {
			norm := 1 / math.Sqrt(fj*(fj+1)*float64(l*(l+1)))
			b := t.at(j, l)
			a := fj*(fj+1)*b + d*fj*ap*t.at(j+1, l)/up[j]
			if am != 0 {
				a -= k2 * d * up[j-1] * (fj + 1) * am * t.at(j-1, l)
			}
			a *= norm
			bb := float64(m) * kappa * d * b * norm
			il := l - lo
			dst[rTE*n+il] = a
			dst[rTM*n+il+nl] = a
			dst[rTE*n+il+nl] = bb
			dst[rTM*n+il] = bb
		}
	}
}

// genEntry is one non-zero Ĝ_ik of the generator.
type genEntry struct {
	k int
	g float64
}

// generator returns the scaled generator of axial translations for the
// receiving sphere of t, row by row: dV̂/dd = Ĝ V̂_ext, with V̂_ext the scaled
// translation matrix with its extra rows (j = lmax+1; index n, or n and n+1 for
// TE and TM). Moving the receiving centre by δ ẑ re-expands its regular waves,
// U(d+δ) = R(δ) U(d), so dU/dd = G U with G = R'(0), the matrix of ∂_z on
// regular waves:
//
//	scalar:  ∂_z φ_k = κ (a⁺_k φ_{k+1} + a⁻_k φ_{k-1}),
//	vector:  G^A_{j,j+1} = κ a⁺_j sqrt(j(j+2))/(j+1),  G^A_{j,j-1} = κ a⁻_j sqrt((j-1)(j+1))/j,
//	         G^B̃_{jj} = m κ/(j(j+1))   (TE↔TM),
//
// the vector entries being the first order in δ of A and B̃ above with
// α^{reg→reg}_jl(δ) = δ_jl + δ G^scalar_jl. Scaled, Ĝ_jk = s_j G_jk / s_k with
// s_j/s_{j+1} = 1/(κ up_j), s_j/s_{j-1} = κ up_{j-1}.
func generator(t *scalarTranslation, lmax int, vector bool) [][]genEntry {
	m := t.m
	kappa := t.row.kappa
	k2 := kappa * kappa
	up := t.row.up
	if !vector {
		lo := m
		n := lmax - lo + 1
		g := make([][]genEntry, n)
		for j := lo; j <= lmax; j++ {
			i := j - lo
			g[i] = append(g[i], genEntry{i + 1, aMinus(j+1, m) / up[j]})
			if j > lo {
				g[i] = append(g[i], genEntry{i - 1, k2 * up[j-1] * aPlus(j-1, m)})
			}
		}
		return g
	}
	lo := max(1, m)
	nl := lmax - lo + 1
	n := 2 * nl
	g := make([][]genEntry, n)
	for j := lo; j <= lmax; j++ {
		fj := float64(j)
		up1 := aPlus(j, m) * math.Sqrt(fj*(fj+2)) / ((fj + 1) * up[j])
		dn1 := 0.0
		if j > lo {
			dn1 = k2 * up[j-1] * aMinus(j, m) * math.Sqrt((fj-1)*(fj+1)) / fj
		}
		mix := float64(m) * kappa / (fj * (fj + 1))
		for pol := 0; pol < 2; pol++ {
			i := j - lo + pol*nl
			next := i + 1
			if j == lmax {
				next = n + pol
			}
			row := []genEntry{{next, up1}}
			if j > lo {
				row = append(row, genEntry{i - 1, dn1})
			}
			if mix != 0 {
				row = append(row, genEntry{j - lo + (1-pol)*nl, mix})
			}
			g[i] = row
		}
	}
	return g
}
