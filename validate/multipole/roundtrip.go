package multipole

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack/lapack64"
)

// The round-trip operator of the TGTG formula (Emig, Graham, Jaffe & Kardar,
// PRL 99, 170403 (2007); Rahi et al., PRD 80, 085021 (2009)),
//
//	N = T1 U12 T2 U21,   E = (ħc/2π) ∫_0^∞ dκ ln det(I - N(κ)),
//
// maps the regular-wave amplitudes about sphere 1 to themselves: scatter at 1,
// translate the outgoing wave to 2 (U21), scatter at 2, translate back (U12).
// Along the z axis every m is its own block; blocks m and -m are equal.
//
// Sphere–sphere: U21 = α(+L) (rows sphere 2, columns sphere 1) and, by
// reciprocity, U12 = S U21^T S with S = 1 for scalars and S = diag(1, -1) on
// (TE, TM) for the real form of the vector translation (B̃ changes sign with d).
// With that relation the two terms of dN/dL have equal traces, so
//
//	d ln det(I - N)/dL = -Tr[(I-N)^{-1} dN/dL] = -2 Tr[(I-N)^{-1} T1 U12 T2 dU21/dL].
//
// Sphere–plane: the plane is the image sphere at 2L below the centre. An
// outgoing wave about the centre O reflects into an outgoing wave about the image
// centre O' = O - 2L ẑ with the parity of Y_lm under z → -z, (-1)^{l+m}, and the
// sign of the boundary condition:
//
//	Dirichlet: -(-1)^{l+m};  Neumann: +(-1)^{l+m};
//	TE (M):    +(-1)^{l+m};  TM (N):  -(-1)^{l+m}
//
// (E_refl(r) = -P E(P r) for a perfect conductor, P the reflection; M is an
// axial and N a polar field, so P M(P r) = -(-1)^{l+m} M(r) and
// P N(P r) = (-1)^{l+m} N(r)). Translating back from O' to O is α(+2L), so
// N = T α(2L) P_plane and dN/dL = 2 T α'(2L) P_plane.

// kappaSetup holds what every m-block at one κ shares.
type kappaSetup struct {
	cfg    *Config
	kappa  float64
	lmax   int
	jmax   int           // rows of the scalar translation
	row    *sphereScales // sphere receiving the translated wave (sphere 2, or the sphere for the plane)
	col    *sphereScales // sphere sending it (sphere 1)
	lnEta  []float64
	d      float64 // translation distance: L, or 2L for the plane
	lf     logFactorials
	single bool // sphere-plane: row and col are the same sphere
}

func newKappaSetup(cfg *Config, kappa float64, lmax int, lf logFactorials) *kappaSetup {
	ks := &kappaSetup{cfg: cfg, kappa: kappa, lmax: lmax, jmax: lmax + 2, lf: lf}
	nRow := ks.jmax + lmax
	switch cfg.Geometry {
	case SpherePlane:
		s := newSphereScales(cfg.R1, kappa, nRow)
		ks.row, ks.col, ks.single = &s, &s, true
		ks.d = 2 * cfg.L
	default:
		s2 := newSphereScales(cfg.R2, kappa, nRow)
		s1 := newSphereScales(cfg.R1, kappa, lmax+1)
		ks.row, ks.col = &s2, &s1
		ks.d = cfg.L
	}
	ks.lnEta = distanceLogEta(ks.d, kappa, ks.jmax+lmax)
	return ks
}

// workspace holds the buffers of one worker, reused across blocks.
type workspace struct {
	v, c, g, dy []float64
	d1, d2, sg  []float64
	chol        nearIdentityCholesky
}

func grow(b []float64, n int) []float64 {
	if cap(b) < n {
		return make([]float64, n)
	}
	b = b[:n]
	clear(b)
	return b
}

// block returns ln det(I - N_m) and, if wantTrace, Tr[(I - N_m)^{-1} dN_m/dL]
// (= -d ln det(I - N_m)/dL) for one m ≥ 0.
//
// Both geometries reduce to a symmetric positive definite matrix. Write each
// scaled T-matrix as T̂ = J D with D = |T̂| and J = -S (electromagnetic: TE
// -1, TM +1), -1 (Dirichlet) or +1 (Neumann); J S_rec is then ±1 for the
// reciprocity sign S_rec of U12 = S_rec U21ᵀ S_rec, so
//
//	sphere-sphere:  N = D1 Vᵀ D2 V  ~  CᵀC,   C = D2^½ V D1^½,
//	sphere-plane:   N ~ D V Π J      ~  Y = D^½ V Π J D^½   (Y symmetric),
//
// with V = U21 (scaled) and Π the plane's reflection signs. I - CᵀC and I - Y
// are positive definite (the round trip is a contraction); ln det comes from a
// Cholesky factorisation I - CᵀC = L Lᵀ that keeps the digits of tiny round
// trips. With dV/dd = Ĝ V_ext (generator, banded) the derivatives are
//
//	sphere-sphere:  Tr[(I-N)^{-1} dN/dL] = 2 Tr[(I-CᵀC)^{-1} Cᵀ D2^½ Ĝ H]
//	                = 2 Σ_j D2_j Σ_k Ĝ_jk P_k·P_j,   H = V_ext D1^½,  P = H L^{-T},
//	sphere-plane:   Tr[(I-Y)^{-1} Y'],  Y' = 2 D^½ (Ĝ V_ext) Π J D^½  (dd/dL = 2),
//
// costing one triangular solve (two spheres) or one inverse (plane).
func (ks *kappaSetup) block(m int, wantTrace bool, ws *workspace) (logDet, trace float64, err error) {
	cfg := ks.cfg
	lmax := ks.lmax
	t := newScalarTranslation(m, ks.d, ks.row, ks.col, ks.lnEta, ks.lf, ks.jmax, lmax)

	// Basis of the block: scalar l = m..lmax; vector (TE then TM) l = max(1,m)..lmax.
	var n, lo, nExt int
	vector := cfg.Field == Electromagnetic
	if vector {
		lo = max(1, m)
		n = 2 * (lmax - lo + 1)
		nExt = n + 2
	} else {
		lo = m
		n = lmax - lo + 1
		nExt = n + 1
	}
	if n <= 0 {
		return 0, 0, nil
	}
	nl := lmax - lo + 1
	// V_ext: rows of the block, then the extra rows j = lmax+1.
	ws.v = grow(ws.v, nExt*n)
	v := ws.v
	if vector {
		vectorTranslation(t, lmax, true, v)
	} else {
		for j := lo; j <= lmax+1; j++ {
			for l := lo; l <= lmax; l++ {
				v[(j-lo)*n+(l-lo)] = t.at(j, l)
			}
		}
	}

	// D^½ of both spheres and, for the plane, the signs Π J.
	ws.d1, ws.d2, ws.sg = grow(ws.d1, n), grow(ws.d2, n), grow(ws.sg, n)
	for i := 0; i < n; i++ {
		l := lo + i
		pol := scalarWave
		if vector {
			pol = transverseElectric
			if i >= nl {
				l = lo + i - nl
				pol = transverseMagnetic
			}
		}
		ws.d1[i] = math.Sqrt(math.Abs(scaledT(cfg.Field, pol, ks.col, l)))
		ws.d2[i] = math.Sqrt(math.Abs(scaledT(cfg.Field, pol, ks.row, l)))
		// Reflection sign of the plane, times J = sign of T̂.
		parity := 1.0
		if (l+m)%2 == 1 {
			parity = -1
		}
		pi := parity // Neumann, TE
		if cfg.Field == Dirichlet || pol == transverseMagnetic {
			pi = -parity
		}
		j := 1.0
		if cfg.Field == Dirichlet || pol == transverseElectric {
			j = -1
		}
		ws.sg[i] = pi * j
	}

	ws.g = grow(ws.g, n*n)
	g := ws.g
	if ks.single {
		// G = Y = D^½ V Π J D^½ (symmetric; the lower triangle is used).
		for i := 0; i < n; i++ {
			for j := 0; j <= i; j++ {
				g[i*n+j] = ws.d1[i] * v[i*n+j] * ws.sg[j] * ws.d1[j]
			}
		}
	} else {
		// H = V_ext D1^½ (in place), C = D2^½ H (rows of the block), G = CᵀC.
		for i := 0; i < nExt; i++ {
			row := v[i*n : (i+1)*n]
			for j := range row {
				row[j] *= ws.d1[j]
			}
		}
		ws.c = grow(ws.c, n*n)
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				ws.c[i*n+j] = ws.d2[i] * v[i*n+j]
			}
		}
		blas64.Syrk(blas.Trans, 1, blas64.General{Rows: n, Cols: n, Stride: n, Data: ws.c}, 0,
			blas64.Symmetric{Uplo: blas.Lower, N: n, Stride: n, Data: g})
	}
	if err := ws.chol.factorize(g, n); err != nil {
		return 0, 0, fmt.Errorf("m = %d: %w", m, err)
	}
	logDet = ws.chol.logDet
	if !wantTrace {
		return logDet, 0, nil
	}
	gen := generator(t, lmax, vector)
	lower := blas64.Triangular{Uplo: blas.Lower, Diag: blas.NonUnit, N: n, Stride: n, Data: g}
	if ks.single {
		if _, ok := lapack64.Potri(lower); !ok {
			return 0, 0, fmt.Errorf("m = %d: %w", m, errNotPositive)
		}
		// Y' = 2 D^½ (Ĝ V_ext) Π J D^½; trace = Σ_ij (I-Y)^{-1}_ij Y'_ji.
		ws.dy = grow(ws.dy, n*n)
		dy := ws.dy
		for i := 0; i < n; i++ {
			row := dy[i*n : (i+1)*n]
			for _, e := range gen[i] {
				src := v[e.k*n : (e.k+1)*n]
				for j, x := range src {
					row[j] += e.g * x
				}
			}
			for j := range row {
				row[j] *= 2 * ws.d1[i] * ws.sg[j] * ws.d1[j]
			}
		}
		for i := 0; i < n; i++ {
			trace += g[i*n+i] * dy[i*n+i]
			for j := 0; j < i; j++ {
				trace += g[i*n+j] * (dy[i*n+j] + dy[j*n+i])
			}
		}
		return logDet, trace, nil
	}
	// P = H L^{-T} for all nExt rows of H.
	blas64.Trsm(blas.Right, blas.Trans, 1, lower, blas64.General{Rows: nExt, Cols: n, Stride: n, Data: v})
	for j := 0; j < n; j++ {
		pj := v[j*n : (j+1)*n]
		s := 0.0
		for _, e := range gen[j] {
			s += e.g * blas64.Dot(blas64.Vector{N: n, Inc: 1, Data: v[e.k*n : (e.k+1)*n]}, blas64.Vector{N: n, Inc: 1, Data: pj})
		}
		trace += ws.d2[j] * ws.d2[j] * s
	}
	return logDet, 2 * trace, nil
}
