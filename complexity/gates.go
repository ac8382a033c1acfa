package complexity

import (
	"fmt"
	"math"
)

// Verdict is a sample's QC outcome.
type Verdict string

// Verdicts. VerdictNone means no gate was set.
const (
	VerdictNone Verdict = ""
	VerdictPass Verdict = "pass"
	VerdictWarn Verdict = "warn"
	VerdictFail Verdict = "fail"
)

// Gates are QC thresholds evaluated at a target depth. A NaN threshold is
// unset. Zero is a real threshold (a maximum duplicate fraction of 0), so
// start from NoGates(), not from the zero value, and set what is wanted.
type Gates struct {
	Target      float64 // depth in reads at which gates are evaluated
	MaxDup      float64 // fail above this duplicate fraction
	MinDistinct float64 // fail below this many distinct units
	MinCoverage float64 // fail below this sample coverage
}

// NoGates returns Gates with every threshold unset.
func NoGates() Gates {
	return Gates{Target: math.NaN(), MaxDup: math.NaN(), MinDistinct: math.NaN(), MinCoverage: math.NaN()}
}

// Any reports whether at least one threshold is set.
func (g Gates) Any() bool {
	return !math.IsNaN(g.MaxDup) || !math.IsNaN(g.MinDistinct) || !math.IsNaN(g.MinCoverage)
}

// Evaluate applies the gates to a prediction at the target depth.
//
// A gate fails when the point estimate is on the wrong side of its
// threshold. It warns when the point estimate passes but the interval
// [lo, hi] reaches across the threshold (the data cannot tell), or when
// the prediction is missing. It passes otherwise. The reasons are short
// phrases for the notes column.
func (g Gates) Evaluate(p Prediction) (Verdict, []string) {
	if !g.Any() {
		return VerdictNone, nil
	}
	v := VerdictPass
	var why []string
	worse := func(w Verdict, reason string) {
		if w == VerdictFail || (w == VerdictWarn && v == VerdictPass) {
			v = w
		}
		why = append(why, reason)
	}
	at := fmtDepth(p.Reads)
	if !math.IsNaN(g.MaxDup) {
		d := p.DupFraction
		lo, hi := dupBounds(p)
		switch {
		case math.IsNaN(d):
			worse(VerdictWarn, "duplicate fraction at "+at+" unknown")
		case d > g.MaxDup:
			worse(VerdictFail, fmt.Sprintf("dup %.3f > %.3f at %s", d, g.MaxDup, at))
		case !math.IsNaN(hi) && hi > g.MaxDup && lo <= g.MaxDup:
			worse(VerdictWarn, fmt.Sprintf("dup interval reaches %.3f > %.3f at %s", hi, g.MaxDup, at))
		}
	}
	if !math.IsNaN(g.MinDistinct) {
		switch {
		case math.IsNaN(p.Distinct):
			worse(VerdictWarn, "distinct at "+at+" unknown")
		case p.Distinct < g.MinDistinct:
			worse(VerdictFail, fmt.Sprintf("distinct %.4g < %.4g at %s", p.Distinct, g.MinDistinct, at))
		case !math.IsNaN(p.Lo) && p.Lo < g.MinDistinct:
			worse(VerdictWarn, fmt.Sprintf("distinct interval reaches %.4g < %.4g at %s", p.Lo, g.MinDistinct, at))
		}
	}
	if !math.IsNaN(g.MinCoverage) {
		switch {
		case math.IsNaN(p.Coverage):
			worse(VerdictWarn, "coverage at "+at+" unknown")
		case p.Coverage < g.MinCoverage:
			worse(VerdictFail, fmt.Sprintf("coverage %.4f < %.4f at %s", p.Coverage, g.MinCoverage, at))
		}
	}
	return v, why
}

// dupBounds turns the distinct interval into a duplicate-fraction interval
// (more distinct units means fewer duplicates).
func dupBounds(p Prediction) (lo, hi float64) {
	if math.IsNaN(p.Lo) || math.IsNaN(p.Hi) || !(p.Reads > 0) {
		return math.NaN(), math.NaN()
	}
	return 1 - p.Hi/p.Reads, 1 - p.Lo/p.Reads
}

// fmtDepth writes a depth in reads compactly (12.5M, 3.2G, 40000).
func fmtDepth(t float64) string {
	switch {
	case math.IsNaN(t):
		return "?"
	case t >= 1e9:
		return fmt.Sprintf("%.3gG", t/1e9)
	case t >= 1e6:
		return fmt.Sprintf("%.3gM", t/1e6)
	case t >= 1e4:
		return fmt.Sprintf("%.3gk", t/1e3)
	}
	return fmt.Sprintf("%.3g", t)
}
