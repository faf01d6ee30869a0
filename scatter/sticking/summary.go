package sticking

import (
	"fmt"
	"math"
	"strings"
)

// Summary returns a few plain sentences for the designer: the verdict, where
// the body settles, the limits and margins, what was extrapolated, and the
// standing caveat that the result is idealised.
func (r Report) Summary() string {
	u := Spring{Torsional: r.Torsional}.units()
	var b strings.Builder
	say := func(format string, args ...any) {
		if b.Len() > 0 {
			b.WriteByte(' ')
		}
		fmt.Fprintf(&b, format, args...)
	}
	lo, hi := r.SampledRange[0], r.SampledRange[1]
	body := "the electrode"
	if r.Body != "" {
		body = fmt.Sprintf("body %q", r.Body)
	}

	with := fmt.Sprintf("With k = %s and %s %s", u.stiff(r.Stiffness), u.rest, u.pos(r.Rest))
	switch r.Verdict {
	case Free:
		e := r.Equilibria[0]
		for _, q := range r.Equilibria {
			if q.X == r.Settled {
				e = q
				break
			}
		}
		say("%s %s is FREE: it settles at a stable equilibrium at %s, where the spring carries %s.", with, body, u.pos(r.Settled), u.load(e.Load))
	case Sticks:
		say("%s %s STICKS: there is no stable equilibrium between the rest position and %s, and the attraction outgrows the spring.", with, body, u.pos(lo))
		for _, e := range r.Equilibria {
			if e.Degenerate {
				say("It is exactly at the pull-in limit (a degenerate equilibrium at %s), which leaves no margin.", u.pos(e.X))
			}
		}
	case Undetermined:
		say("%s the sampled range cannot decide whether %s sticks: there is no equilibrium between the rest position and %s, but the spring is still stiffer than the attraction there.", with, body, u.pos(lo))
		say("Continuing the lowest samples as a power law it would be %s;", strings.ToUpper(string(r.ExtrapolatedVerdict)))
		if r.PullIn.Extrapolated {
			fmt.Fprintf(&b, " compute the %s down to about %s to decide.", u.loadName, u.pos(0.9*r.PullIn.X))
		} else {
			fmt.Fprintf(&b, " compute the %s at smaller %s to decide.", u.loadName, u.xName)
		}
	}

	if ms := r.MinStiffness; ms.Value > 0 {
		est := ""
		if ms.Extrapolated {
			est = fmt.Sprintf(" (estimated: the tangency at %s lies below the sampled range)", u.pos(ms.At))
		}
		say("The softest spring that holds this %s has k = %s%s; this one is %s times as stiff.", u.rest, u.stiff(ms.Value), est, ratio(r.Margin.StiffnessRatio))
	} else if ms.Location != Sampled {
		say("The smallest safe stiffness depends on the %s below %s, which was not sampled.", u.loadName, u.pos(lo))
	}
	if mr := r.MinRest; mr.Value > 0 {
		est := ""
		if mr.Extrapolated {
			est = fmt.Sprintf(" (estimated: its pull-in point lies %s the sampled range)", side(mr.Location))
		}
		say("The smallest %s this spring holds is %s%s; this one is %s times that.", u.rest, u.pos(mr.Value), est, ratio(r.Margin.RestRatio))
	} else if mr.Location != Sampled {
		say("The pull-in point of this spring lies %s the sampled range and cannot be estimated.", side(mr.Location))
	}
	if p := r.PullIn; p.Location == Sampled || p.Extrapolated {
		est := ""
		if p.Extrapolated {
			est = " (estimated)"
		}
		if r.Verdict == Free {
			say("Pull-in would happen at %s%s, %s below the equilibrium.", u.pos(p.X), est, u.pos(r.Margin.PullInDistance))
		} else {
			say("Pull-in happens at %s%s.", u.pos(p.X), est)
		}
	}
	if r.InterpolationError > 0 {
		say("The estimated interpolation error at these points is %.1g relative.", r.InterpolationError)
	}
	say("Results hold for the %s sampled from %s to %s.", u.loadName, u.pos(lo), u.pos(hi))

	model := "perfect conductors"
	if r.Material != "" {
		model = r.Material
	}
	say("These results are idealised: %s in vacuum, smooth surfaces without roughness, patch charges or humidity, and an ideal linear spring.", model)
	say("Keep a generous margin and defer to your own qualification practice and the applicable standards.")
	return b.String()
}

// ratio formats a margin ratio to three digits, or five near 1 so that a
// thin margin does not read as none.
func ratio(r float64) string {
	if r != 1 && math.Abs(r-1) < 0.01 {
		return fmt.Sprintf("%.5g", r)
	}
	return fmt.Sprintf("%.3g", r)
}

func side(l Location) string {
	if l == AboveRange {
		return "above"
	}
	return "below"
}

// units names and formats the quantities of a linear or a torsional spring.
type units struct {
	x, stiffness, loadUnit string // SI unit symbols
	xName, rest, loadName  string // words
}

func (s Spring) units() units {
	if s.Torsional {
		return units{x: "rad", stiffness: "N m/rad", loadUnit: "N m", xName: "angles", rest: "rest angle", loadName: "torque"}
	}
	return units{x: "m", stiffness: "N/m", loadUnit: "N", xName: "gaps", rest: "rest gap", loadName: "force"}
}

func (u units) pos(x float64) string   { return withPrefix(x, u.x) }
func (u units) load(l float64) string  { return withPrefix(l, u.loadUnit) }
func (u units) stiff(k float64) string { return fmt.Sprintf("%.3g %s", k, u.stiffness) }

// withPrefix formats v to three significant digits with an SI prefix:
// 3.96e-7 m as "396 nm".
func withPrefix(v float64, unit string) string {
	if v == 0 || !finite(v) {
		return fmt.Sprintf("%.3g %s", v, unit)
	}
	const prefixes = "afpnµm kMG" // 10^-18 … 10^9, in steps of 10^3; ' ' is none
	p := int(math.Floor(math.Log10(math.Abs(v)) / 3))
	p = min(max(p, -6), 3)
	s := v / math.Pow(1000, float64(p))
	if math.Abs(s) >= 999.5 && p < 3 { // rounding to 3 digits carries over
		p++
		s /= 1000
	}
	prefix := string([]rune(prefixes)[p+6])
	if prefix == " " {
		prefix = ""
	}
	return fmt.Sprintf("%.3g %s%s", s, prefix, unit)
}
