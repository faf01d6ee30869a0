package sticking

import (
	"fmt"
	"math"
	"strings"
	"testing"
)

// hbarC is ħc in J m (CODATA 2018, exact SI values; DESIGN §1).
const hbarC = 3.161526773e-26

// platesC is the coefficient C of the Casimir pressure times area between
// perfectly conducting parallel plates, F = π² ħc A/(240 g⁴) (H. B. G.
// Casimir, Proc. K. Ned. Akad. Wet. 51, 793 (1948)), for A = (100 µm)².
var platesC = math.Pi * math.Pi * hbarC * 1e-8 / 240

// TestPowerLaw checks the closed forms for F = C/g^n (DESIGN §12, derived
// from the tangency N = 0, dN/dg = 0): pull-in at g* = (nC/k)^(1/(n+1)),
// which for the softest spring is g* = n g0/(n+1), and
// k_min = (n+1)^(n+1)/n^n · C/g0^(n+1). The log–log Hermite interpolant is
// exact for a power law, so only rounding and the root solver's precision
// remain; 1e-6 relative is the accuracy asked of the analysis, and the
// measured differences are about 1e-14.
func TestPowerLaw(t *testing.T) {
	const g0 = 100e-9 // m
	for _, tc := range []struct {
		name string
		c, n float64
	}{
		{"n=2", 1e-20, 2},
		{"n=3", 1e-27, 3},
		{"n=4", 1e-35, 4},
		{"Casimir plates", platesC, 4},
	} {
		t.Run(tc.name, func(t *testing.T) {
			n := tc.n
			c := mustCurve(t, sampled(powerLaw(tc.c, n), 0.3*g0, g0, 16))
			kMin := math.Pow(n+1, n+1) / math.Pow(n, n) * tc.c / math.Pow(g0, n+1)

			r := mustAnalyse(t, c, Spring{Stiffness: 2 * kMin, Rest: g0})
			checkRel(t, "k_min", r.MinStiffness.Value, kMin, 1e-6)
			checkRel(t, "tangency", r.MinStiffness.At, n*g0/(n+1), 1e-6)
			xs := math.Pow(n*tc.c/(2*kMin), 1/(n+1))
			checkRel(t, "pull-in", r.PullIn.X, xs, 1e-6)
			checkRel(t, "x0_crit", r.MinRest.Value, xs*(n+1)/n, 1e-6)
			checkRel(t, "k/k_min", r.Margin.StiffnessRatio, 2, 1e-6)
			if r.Verdict != Free || r.MinStiffness.Location != Sampled || r.PullIn.Location != Sampled {
				t.Errorf("verdict %s, tangency %s, pull-in %s; want free, sampled, sampled", r.Verdict, r.MinStiffness.Location, r.PullIn.Location)
			}
			// The settled equilibrium solves k (g0 - g) = C/g^n.
			l, _ := powerLaw(tc.c, n)(r.Settled)
			checkRel(t, "spring force at equilibrium", 2*kMin*(g0-r.Settled), l, 1e-9)

			// The softest spring holds exactly g0 and pulls in at n g0/(n+1).
			r = mustAnalyse(t, c, Spring{Stiffness: kMin, Rest: g0})
			checkRel(t, "x0_crit at k_min", r.MinRest.Value, g0, 1e-6)
			checkRel(t, "pull-in at k_min", r.PullIn.X, n*g0/(n+1), 1e-6)
		})
	}
}

// tangency returns the reference k_min and tangency point for rest x0 by
// bisection on the analytic ψ(x) = L'(x)(x0 - x) + L(x) in [lo, x0).
func tangency(t *testing.T, f load, lo, x0 float64) (kMin, xt float64) {
	psi := func(x float64) float64 { l, dl := f(x); return dl*(x0-x) + l }
	xt = bisect(t, psi, lo, x0*(1-1e-9))
	l, _ := f(xt)
	return l / (x0 - xt), xt
}

// TestTwoRegime compares the analysis of 16 samples of L = C4/x^4 + C3/x^3
// with a direct bisection solve on the analytic function. The crossover of
// the two laws lies inside the range, so the interpolant is not exact; its
// error is about h⁴/384 times the fourth log-derivative of ln L, ~1e-8 for
// the spacing h = ln(1/0.3)/15 used, and the slope's ~1e-7; 1e-5 relative
// leaves ample room (measured: ≤ 3e-8).
func TestTwoRegime(t *testing.T) {
	const g0 = 1e-6 // m
	f := twoRegime(0.5e-6*2e-27, 2e-27)
	lo := 0.3 * g0
	c := mustCurve(t, sampled(f, lo, g0, 16))

	kMin, xt := tangency(t, f, lo, g0)
	k := 1.5 * kMin
	xs := bisect(t, func(x float64) float64 { _, dl := f(x); return k + dl }, lo, g0)
	n := func(x float64) float64 { l, _ := f(x); return k*(g0-x) - l }
	outer := bisect(t, n, xs, g0)
	inner := bisect(t, n, lo, xs)
	ls, _ := f(xs)

	r := mustAnalyse(t, c, Spring{Stiffness: k, Rest: g0})
	checkRel(t, "k_min", r.MinStiffness.Value, kMin, 1e-5)
	checkRel(t, "tangency", r.MinStiffness.At, xt, 1e-5)
	checkRel(t, "pull-in", r.PullIn.X, xs, 1e-5)
	checkRel(t, "x0_crit", r.MinRest.Value, xs+ls/k, 1e-5)
	if len(r.Equilibria) != 2 {
		t.Fatalf("%d equilibria, want 2: %+v", len(r.Equilibria), r.Equilibria)
	}
	checkRel(t, "stable equilibrium", r.Equilibria[0].X, outer, 1e-5)
	checkRel(t, "unstable equilibrium", r.Equilibria[1].X, inner, 1e-5)
	checkRel(t, "pull-in distance", r.Margin.PullInDistance, outer-xs, 1e-4) // a difference of two 1e-5 numbers, ~3x smaller
	t.Logf("relative differences: k_min %.1e, x_t %.1e, x* %.1e, outer %.1e, inner %.1e; error estimate %.1e",
		relDiff(r.MinStiffness.Value, kMin), relDiff(r.MinStiffness.At, xt), relDiff(r.PullIn.X, xs),
		relDiff(r.Equilibria[0].X, outer), relDiff(r.Equilibria[1].X, inner), r.InterpolationError)
}

// TestEquilibria checks the count and stability of the equilibria around the
// softest spring: above it a stable outer and an unstable inner equilibrium,
// at it one degenerate equilibrium, below it none (common practice: the
// saddle-node picture of pull-in).
func TestEquilibria(t *testing.T) {
	const g0 = 1e-6
	for _, tc := range []struct {
		name string
		f    load
	}{
		{"power law n=4", powerLaw(1e-30, 4)},
		{"two regimes", twoRegime(0.5e-6*2e-27, 2e-27)},
	} {
		c := mustCurve(t, sampled(tc.f, 0.3*g0, g0, 16))
		kMin := mustAnalyse(t, c, Spring{Stiffness: 1, Rest: g0}).MinStiffness.Value
		for _, f := range []struct {
			factor  float64
			count   int
			verdict Verdict
		}{{1.1, 2, Free}, {1, 1, Sticks}, {0.9, 0, Sticks}} {
			r := mustAnalyse(t, c, Spring{Stiffness: f.factor * kMin, Rest: g0})
			eq := r.Equilibria
			name := fmt.Sprintf("%s, k/k_min = %g", tc.name, f.factor)
			if len(eq) != f.count || r.Verdict != f.verdict {
				t.Errorf("%s: %d equilibria, verdict %s; want %d, %s: %+v", name, len(eq), r.Verdict, f.count, f.verdict, eq)
				continue
			}
			switch f.count {
			case 2:
				if !eq[0].Stable || eq[1].Stable || eq[0].X <= eq[1].X || eq[0].StiffnessMargin <= 0 || eq[1].StiffnessMargin >= 0 || eq[0].Degenerate || eq[1].Degenerate {
					t.Errorf("%s: want stable outer and unstable inner equilibrium: %+v", name, eq)
				}
				if r.Settled != eq[0].X || !(r.Settled > r.PullIn.X && r.PullIn.X > eq[1].X) {
					t.Errorf("%s: settled %g, pull-in %g; want settled = outer > pull-in > inner: %+v", name, r.Settled, r.PullIn.X, eq)
				}
			case 1:
				if !eq[0].Degenerate || eq[0].Stable {
					t.Errorf("%s: want one degenerate, not stable equilibrium: %+v", name, eq)
				}
				checkRel(t, name+": degenerate equilibrium vs tangency", eq[0].X, r.MinStiffness.At, 1e-9)
			}
		}
	}
}

// TestOutsideRange checks that points outside the samples are reported as
// such, with power-law continuations that are exact for a power law (so
// 1e-9 relative, rounding plus the root solver) and verdicts that do not
// pretend to know.
func TestOutsideRange(t *testing.T) {
	const (
		g0 = 1e-6
		cc = 1e-30
		n  = 4.0
	)
	f := powerLaw(cc, n)
	kMin := math.Pow(n+1, n+1) / math.Pow(n, n) * cc / math.Pow(g0, n+1)

	t.Run("tangency below", func(t *testing.T) {
		// Sampled from 0.85 g0: the tangency 0.8 g0 lies below.
		c := mustCurve(t, sampled(f, 0.85*g0, g0, 8))
		for _, tc := range []struct {
			factor float64
			want   Verdict
		}{{1.01, Free}, {0.99, Sticks}} {
			r := mustAnalyse(t, c, Spring{Stiffness: tc.factor * kMin, Rest: g0})
			ms := r.MinStiffness
			if ms.Location != BelowRange || !ms.Extrapolated || !r.Margin.Extrapolated {
				t.Errorf("min stiffness %+v, margin %+v; want below range, extrapolated", ms, r.Margin)
			}
			checkRel(t, "extrapolated k_min", ms.Value, kMin, 1e-9)
			checkRel(t, "extrapolated tangency", ms.At, 0.8*g0, 1e-9)
			if r.Verdict != Undetermined || r.ExtrapolatedVerdict != tc.want || len(r.Notes) == 0 {
				t.Errorf("k = %g k_min: verdict %s (extrapolated %s), notes %q; want undetermined (%s) with notes", tc.factor, r.Verdict, r.ExtrapolatedVerdict, r.Notes, tc.want)
			}
			xs, err := Suggest(c, Spring{Stiffness: tc.factor * kMin, Rest: g0}, 1e-6)
			if err != nil {
				t.Fatal(err)
			}
			if len(xs) == 0 || xs[0] >= 0.85*g0 {
				t.Errorf("suggested %g; want a position below the samples", xs)
			}
		}
	})

	t.Run("stiff spring: equilibrium sampled, pull-in below", func(t *testing.T) {
		c := mustCurve(t, sampled(f, 0.85*g0, g0, 8))
		k := 20 * kMin
		r := mustAnalyse(t, c, Spring{Stiffness: k, Rest: g0})
		if r.Verdict != Free || r.PullIn.Location != BelowRange || !r.PullIn.Extrapolated {
			t.Errorf("verdict %s, pull-in %+v; want free, pull-in below range extrapolated", r.Verdict, r.PullIn)
		}
		checkRel(t, "extrapolated pull-in", r.PullIn.X, math.Pow(n*cc/k, 1/(n+1)), 1e-9)
	})

	t.Run("soft spring: pull-in above", func(t *testing.T) {
		c := mustCurve(t, sampled(f, 0.3*g0, g0, 16))
		k := 0.01 * kMin // x* = (4C/k)^(1/5) ≈ 2 g0
		r := mustAnalyse(t, c, Spring{Stiffness: k, Rest: g0})
		xs := math.Pow(n*cc/k, 1/(n+1))
		if r.Verdict != Sticks || r.PullIn.Location != AboveRange || r.MinRest.Location != AboveRange || !r.MinRest.Extrapolated {
			t.Errorf("verdict %s, pull-in %+v, min rest %+v; want sticks, above range, extrapolated", r.Verdict, r.PullIn, r.MinRest)
		}
		checkRel(t, "extrapolated pull-in", r.PullIn.X, xs, 1e-9)
		checkRel(t, "extrapolated x0_crit", r.MinRest.Value, xs*(n+1)/n, 1e-9)
		checkRel(t, "k/k_min", r.Margin.StiffnessRatio, 0.01, 1e-9)
	})

	t.Run("sticks with pull-in sampled", func(t *testing.T) {
		c := mustCurve(t, sampled(f, 0.3*g0, g0, 16))
		r := mustAnalyse(t, c, Spring{Stiffness: 0.5 * kMin, Rest: g0})
		if r.Verdict != Sticks || r.PullIn.Location != Sampled || !(r.Margin.RestRatio < 1) || r.Margin.PullInDistance != 0 {
			t.Errorf("verdict %s, pull-in %+v, margin %+v; want sticks, sampled, rest ratio < 1", r.Verdict, r.PullIn, r.Margin)
		}
	})
}

// TestTorsionAtZeroTorque covers the linear-space fallback and the torsional
// reading: x is the angle from contact, the torque vanishes at the parallel
// position X (the rest angle) and grows as C (x^-3 - X^-3) towards contact
// (an invented law with the power-law growth of a tilted plate). The rest
// position is then an equilibrium, stable when k > -L'(X) = 3C/X^4, which is
// k_min; that limit is read at a sample, so it is exact to rounding (1e-12).
func TestTorsionAtZeroTorque(t *testing.T) {
	const (
		bigX = 0.02 // rad from contact at the parallel position
		cc   = 1e-18
	)
	f := func(x float64) (float64, float64) {
		return cc * (math.Pow(x, -3) - math.Pow(bigX, -3)), -3 * cc * math.Pow(x, -4)
	}
	c := mustCurve(t, sampled(f, 0.3*bigX, bigX, 20))
	if c.LogLog() {
		t.Fatal("zero torque at the rest angle: want the linear-space interpolation")
	}
	kMin := 3 * cc / math.Pow(bigX, 4)

	r := mustAnalyse(t, c, Spring{Stiffness: 1.2 * kMin, Rest: bigX, Torsional: true})
	if r.Verdict != Free || r.Settled != bigX || !r.Torsional {
		t.Errorf("verdict %s at %g; want free at the rest angle %g", r.Verdict, r.Settled, bigX)
	}
	checkRel(t, "k_min", r.MinStiffness.Value, kMin, 1e-12)

	// Interpolation in linear space is not exact: compare the pull-in angle
	// with bisection on the analytic torque. 20 samples give 5e-5 here
	// (the error estimate says 3e-4); 2e-4 leaves room.
	k := 1.2 * kMin
	xs := bisect(t, func(x float64) float64 { _, dl := f(x); return k + dl }, 0.3*bigX, bigX)
	checkRel(t, "pull-in angle", r.PullIn.X, xs, 2e-4)

	r = mustAnalyse(t, c, Spring{Stiffness: 0.8 * kMin, Rest: bigX, Torsional: true})
	if r.Verdict != Sticks || len(r.Equilibria) != 1 || r.Equilibria[0].Stable {
		t.Errorf("k = 0.8 k_min: verdict %s, equilibria %+v; want sticks with only the unstable rest angle", r.Verdict, r.Equilibria)
	}
	if s := r.Summary(); !strings.Contains(s, "rest angle 20 mrad") || !strings.Contains(s, "N m/rad") {
		t.Errorf("torsional summary without angles and N m/rad: %s", s)
	}
}

func TestAnalyseBadInput(t *testing.T) {
	c := mustCurve(t, sampled(powerLaw(1e-30, 4), 0.3e-6, 1e-6, 8))
	for _, tc := range []struct {
		name string
		c    *Curve
		s    Spring
		want string
	}{
		{"nil curve", nil, Spring{Stiffness: 1, Rest: 1e-6}, "nil curve"},
		{"zero stiffness", c, Spring{Stiffness: 0, Rest: 1e-6}, "not a positive number"},
		{"negative stiffness", c, Spring{Stiffness: -1, Rest: 1e-6}, "not a positive number"},
		{"NaN stiffness", c, Spring{Stiffness: math.NaN(), Rest: 1e-6}, "not a positive number"},
		{"infinite stiffness", c, Spring{Stiffness: math.Inf(1), Rest: 1e-6}, "not a positive number"},
		{"NaN rest", c, Spring{Stiffness: 1, Rest: math.NaN()}, "not a number"},
		{"rest above range", c, Spring{Stiffness: 1, Rest: 2e-6}, "outside the sampled range [3e-07, 1e-06] m"},
		{"rest below range", c, Spring{Stiffness: 1, Rest: 1e-7}, "outside the sampled range [3e-07, 1e-06] m"},
		{"torsional units", c, Spring{Stiffness: -1, Rest: 1e-6, Torsional: true}, "N m/rad"},
	} {
		if _, err := Analyse(tc.c, tc.s); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v; want one containing %q", tc.name, err, tc.want)
		}
		if _, err := Suggest(tc.c, tc.s, 1e-4); err == nil {
			t.Errorf("%s: Suggest without error", tc.name)
		}
	}
	for _, tol := range []float64{0, -1, math.NaN(), math.Inf(1)} {
		if _, err := Suggest(c, Spring{Stiffness: 1, Rest: 1e-6}, tol); err == nil || !strings.Contains(err.Error(), "tolerance") {
			t.Errorf("tolerance %g: error %v; want one about the tolerance", tol, err)
		}
	}
}
