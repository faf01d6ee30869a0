package multipole

import (
	"fmt"
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// Closed forms, Abramowitz & Stegun §10.2 (i_n^{(1)} and k_n for n = 0, 1, 2;
// our k_l is 2/π times theirs):
//
//	i_0 = sinh x/x, i_1 = (x cosh x - sinh x)/x², i_2 = ((x²+3) sinh x - 3x cosh x)/x³,
//	k_0 = e^{-x}/x, k_1 = e^{-x}(x+1)/x², k_2 = e^{-x}(x²+3x+3)/x³.
//
// Tolerance 1e-13 relative: the closed forms of i_1, i_2 cancel by a factor
// ≲ 15 for x ≥ 0.5, so they are themselves good to ~1e-14.
func TestBesselClosedForms(t *testing.T) {
	forms := []struct {
		name string
		l    int
		i, k func(x float64) float64
	}{
		{"0", 0,
			func(x float64) float64 { return math.Sinh(x) / x },
			func(x float64) float64 { return math.Exp(-x) / x }},
		{"1", 1,
			func(x float64) float64 { return (x*math.Cosh(x) - math.Sinh(x)) / (x * x) },
			func(x float64) float64 { return math.Exp(-x) * (x + 1) / (x * x) }},
		{"2", 2,
			func(x float64) float64 { return ((x*x+3)*math.Sinh(x) - 3*x*math.Cosh(x)) / (x * x * x) },
			func(x float64) float64 { return math.Exp(-x) * (x*x + 3*x + 3) / (x * x * x) }},
	}
	for _, f := range forms {
		for _, x := range []float64{0.5, 1, 2, 5, 10, 30, 100, 500} {
			checkRel(t, fmt.Sprintf("i_%s(%g)", f.name, x), BesselI(f.l, x), f.i(x), 1e-13)
			checkRel(t, fmt.Sprintf("k_%s(%g)", f.name, x), BesselK(f.l, x), f.k(x), 1e-13)
		}
	}
	// i_0 and k_0 down to x = 1e-6 (no cancellation in these two).
	for _, x := range []float64{1e-6, 1e-3, 0.1} {
		checkRel(t, fmt.Sprintf("i_0(%g)", x), BesselI(0, x), math.Sinh(x)/x, 1e-15)
		checkRel(t, fmt.Sprintf("k_0(%g)", x), BesselK(0, x), math.Exp(-x)/x, 1e-15)
	}
}

// Series for every order (Abramowitz & Stegun 10.2.5; DLMF 10.53.3 and 10.49.12):
//
//	i_l(x) = x^l Σ_k (x²/2)^k / (k! (2l+2k+1)!!),
//	k_l(x) = (e^{-x}/x) Σ_{k=0}^{l} (l+k)!/(k!(l-k)!) (2x)^{-k},
//
// both of positive terms, summed here in logarithms with ratios of successive
// terms, for l ≤ 300 and x from 1e-6 to 1e3. Compared as logarithms (the
// values reach e^{±5800}) with tolerance 3e-12 + 2e-15 |ln z|: both sides are
// sums of up to 10³ logarithms of size up to ~10, each rounded to 1e-16.
func TestBesselSeries(t *testing.T) {
	seriesI := func(l int, x float64) float64 { // ln i_l(x)
		ln0 := float64(l) * math.Log(x)
		for k := 1; k <= l; k++ {
			ln0 -= math.Log(float64(2*k + 1))
		}
		// ln of the terms relative to the first; they rise to a peak near
		// k ≈ x/2 and then fall.
		lt := []float64{0}
		for k := 0; k < 100000; k++ {
			next := lt[k] + math.Log((x*x/2)/(float64(k+1)*float64(2*l+2*k+3)))
			lt = append(lt, next)
			if next < lt[0]-40 && next < lt[k] && next < slices.Max(lt)-40 {
				break
			}
		}
		top := slices.Max(lt)
		s := 0.0
		for _, v := range lt {
			s += math.Exp(v - top)
		}
		return ln0 + top + math.Log(s)
	}
	seriesK := func(l int, x float64) float64 { // ln k_l(x)
		// Terms t_k grow or fall monotonically in k; sum relative to the last.
		lt := make([]float64, l+1)
		for k := 0; k < l; k++ {
			lt[k+1] = lt[k] + math.Log(float64((l+k+1)*(l-k))/(float64(k+1)*2*x))
		}
		top := lt[0]
		for _, v := range lt {
			top = math.Max(top, v)
		}
		s := 0.0
		for _, v := range lt {
			s += math.Exp(v - top)
		}
		return -x - math.Log(x) + top + math.Log(s)
	}
	for _, l := range []int{0, 1, 3, 10, 50, 100, 200, 300} {
		for _, x := range []float64{1e-6, 1e-3, 0.1, 1, 7.5, 40, 200, 1000} {
			b := newBesselRatios(l+1, x)
			gotI, gotK := b.logI(l), b.logK(l)
			wantI, wantK := seriesI(l, x), seriesK(l, x)
			// Compare values (relative), via the difference of logarithms.
			if e, tol := math.Abs(gotI-wantI), 3e-12+2e-15*math.Abs(wantI); e > tol {
				t.Errorf("ln i_%d(%g) = %.15g, series %.15g (|Δ| = %.1e > %.1e)", l, x, gotI, wantI, e, tol)
			}
			if e, tol := math.Abs(gotK-wantK), 3e-12+2e-15*math.Abs(wantK); e > tol {
				t.Errorf("ln k_%d(%g) = %.15g, series %.15g (|Δ| = %.1e > %.1e)", l, x, gotK, wantK, e, tol)
			}
		}
	}
	// The exported functions overflow to +Inf and underflow to 0, never NaN.
	if v := BesselK(300, 1e-6); !math.IsInf(v, 1) {
		t.Errorf("k_300(1e-6) = %g, want +Inf (overflow)", v)
	}
	if v := BesselI(300, 1e-6); v != 0 {
		t.Errorf("i_300(1e-6) = %g, want 0 (underflow)", v)
	}
	if v := BesselI(-1, 1); !math.IsNaN(v) {
		t.Errorf("i_{-1}(1) = %g, want NaN", v)
	}
}

// Integral representations (general-purpose quadrature from gonum):
//
//	K_ν(x) = ∫_0^∞ e^{-x cosh t} cosh(νt) dt               (A&S 9.6.24),
//	i_n(x) = x^n / (2^{n+1} n!) ∫_{-1}^{1} e^{xt} (1-t²)^n dt  (A&S 10.2 with 9.6.18),
//
// so k_l(x) = sqrt(2/(πx)) K_{l+1/2}(x). 400-point Gauss–Legendre on a finite
// range reaches ~1e-14; tolerance 1e-12.
func TestBesselIntegralRepresentations(t *testing.T) {
	for _, l := range []int{0, 1, 4, 10} {
		for _, x := range []float64{0.3, 1, 6, 25} {
			nu := float64(l) + 0.5
			// e^{-x cosh t} < 1e-300 beyond t = acosh(700/x + 1).
			tMax := math.Acosh(700/x + 1)
			kInt := quad.Fixed(func(t float64) float64 {
				return math.Exp(-x*math.Cosh(t)+nu*t) * (1 + math.Exp(-2*nu*t)) / 2
			}, 0, tMax, 400, quad.Legendre{}, 0)
			checkRel(t, fmt.Sprintf("k_%d(%g) vs K integral", l, x), BesselK(l, x), math.Sqrt(2/(math.Pi*x))*kInt, 1e-12)

			lg, _ := math.Lgamma(float64(l + 1))
			pre := math.Exp(float64(l)*math.Log(x) - float64(l+1)*math.Ln2 - lg)
			iInt := quad.Fixed(func(t float64) float64 {
				return math.Exp(x*t) * math.Pow(1-t*t, float64(l))
			}, -1, 1, 400, quad.Legendre{}, 0)
			checkRel(t, fmt.Sprintf("i_%d(%g) vs integral", l, x), BesselI(l, x), pre*iInt, 1e-12)
		}
	}
}

// Wronskian i_l k_{l+1} + i_{l+1} k_l = 1/x² (A&S §10.2, which has π/(2x²) for
// its k_n) and the recurrences z_{l-1} - z_{l+1} = (2l+1) z_l/x for i_l and
// k_{l+1} - k_{l-1} = (2l+1) k_l/x (A&S 10.2.18 with the k sign convention),
// for l ≤ 100. Tolerance 1e-13 relative to the largest term (products and
// differences of values each good to ~1e-15).
func TestBesselIdentities(t *testing.T) {
	for _, x := range []float64{0.5, 1, 3, 20, 100, 800} {
		for l := 0; l <= 100; l++ {
			il, il1 := BesselI(l, x), BesselI(l+1, x)
			kl, kl1 := BesselK(l, x), BesselK(l+1, x)
			if math.IsInf(kl1, 0) || il == 0 || math.IsInf(il1, 0) {
				continue // outside float64 range
			}
			w := il*kl1 + il1*kl
			checkRel(t, fmt.Sprintf("Wronskian l=%d x=%g (×x²)", l, x), w*x*x, 1, 1e-13)
			if l == 0 {
				continue
			}
			im, km := BesselI(l-1, x), BesselK(l-1, x)
			ri := im - il1 - float64(2*l+1)/x*il
			if s := math.Max(im, math.Abs(il1)); math.Abs(ri) > 1e-13*s {
				t.Errorf("i recurrence l=%d x=%g: residual %.2e of %.2e", l, x, ri, s)
			}
			rk := kl1 - km - float64(2*l+1)/x*kl
			if math.Abs(rk) > 1e-13*kl1 {
				t.Errorf("k recurrence l=%d x=%g: residual %.2e of %.2e", l, x, rk, kl1)
			}
		}
	}
}

// Plane-wave expansion e^{x cos θ} = Σ_l (2l+1) i_l(x) P_l(cos θ) at θ = 0 and
// π (A&S 10.2.36 as recalled; Watson §4.8), summed to l = 200: tests i_l for all
// orders at once. Tolerance 1e-13 for θ = 0 (positive terms) and 1e-11 for θ =
// π, where the sum cancels by e^{2x} ≤ e^{10}.
func TestBesselGeneratingFunction(t *testing.T) {
	for _, x := range []float64{0.01, 0.7, 3, 5, 40} {
		var plus, minus float64
		for l := 200; l >= 0; l-- {
			v := float64(2*l+1) * BesselI(l, x)
			plus += v
			if l%2 == 0 {
				minus += v
			} else {
				minus -= v
			}
		}
		checkRel(t, fmt.Sprintf("Σ(2l+1) i_l(%g)", x), plus, math.Exp(x), 1e-13)
		if x <= 5 {
			checkRel(t, fmt.Sprintf("Σ(-1)^l(2l+1) i_l(%g)", x), minus, math.Exp(-x), 1e-11)
		}
	}
}

// Gegenbauer's addition theorem for k_0 (A&S 10.2.35 as recalled; Watson §11.41):
//
//	e^{-|r-r'|}/|r-r'| = Σ_l (2l+1) i_l(r_<) k_l(r_>) P_l(cos γ),
//
// the identity behind the translation matrices. Tolerance 1e-12 (the series is
// summed to l = 120 at r_</r_> ≤ 0.6, remainder < 0.6^120).
func TestBesselAdditionTheorem(t *testing.T) {
	for _, c := range []struct{ r, rp, cosg float64 }{{0.3, 2, 0.4}, {1.2, 2, -0.9}, {5, 9, 0.1}, {30, 50, 0.99}} {
		dist := math.Sqrt(c.r*c.r + c.rp*c.rp - 2*c.r*c.rp*c.cosg)
		want := math.Exp(-dist) / dist
		sum := 0.0
		p0, p1 := 1.0, c.cosg
		for l := 0; l <= 120; l++ {
			var pl float64
			switch l {
			case 0:
				pl = p0
			case 1:
				pl = p1
			default:
				pl = (float64(2*l-1)*c.cosg*p1 - float64(l-1)*p0) / float64(l)
				p0, p1 = p1, pl
			}
			ik := BesselI(l, c.r) * BesselK(l, c.rp)
			if ik == 0 || math.IsNaN(ik) {
				break
			}
			sum += float64(2*l+1) * ik * pl
		}
		checkRel(t, fmt.Sprintf("Gegenbauer r=%g r'=%g", c.r, c.rp), sum, want, 1e-12)
	}
}

// The scale factors used by the translation matrices: s_l² = i_l/k_l with
// s_l = (κR)^{l+½} σ_l, σ_l(0)² = 1/((2l+1)!!(2l-1)!!) (leading terms of the
// series above), continuous at x = 0: ln σ_0(x) = x/2 + O(x²) (s_0² = e^x sinh x)
// and ln σ_l(x) = ln σ_l(0) + O(x²) for l ≥ 1 (e^{x}/(1+x) = 1 + O(x²) in s_1², etc.). Tolerance on the logarithm
// 1e-12 + 1e-14 |ln σ_l|: a sum of l logarithms each rounded to 1e-16 relative.
func TestSphereScales(t *testing.T) {
	const n = 150
	s0 := newSphereScales(1, 0, n)
	sTiny := newSphereScales(1, 1e-9, n)
	for l := 0; l <= n; l++ {
		want := 0.0
		for k := 1; k <= l; k++ {
			want -= 0.5 * (math.Log(float64(2*k+1)) + math.Log(float64(2*k-1)))
		}
		tol := 1e-12 + 1e-14*math.Abs(want)
		if e := math.Abs(s0.lnSigma[l] - want); e > tol {
			t.Errorf("ln σ_%d(0) = %.15g, want %.15g", l, s0.lnSigma[l], want)
		}
		lin := 0.0
		if l == 0 {
			lin = 0.5e-9
		}
		if e := math.Abs(sTiny.lnSigma[l] - want - lin); e > tol {
			t.Errorf("ln σ_%d(1e-9) = %.15g, want %.15g (continuity at 0)", l, sTiny.lnSigma[l], want)
		}
	}
	for _, x := range []float64{0.01, 1, 30, 900} {
		s := newSphereScales(1, x, 60)
		b := newBesselRatios(61, x)
		for _, l := range []int{0, 1, 7, 30, 60} {
			want := 0.5*(b.logI(l)-b.logK(l)) - (float64(l)+0.5)*math.Log(x)
			if e := math.Abs(s.lnSigma[l] - want); e > 1e-12*math.Max(1, math.Abs(want)) {
				t.Errorf("ln σ_%d(%g) = %.15g, want %.15g", l, x, s.lnSigma[l], want)
			}
		}
	}
}
