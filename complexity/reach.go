package complexity

import (
	"fmt"
	"math"
)

// reach answers Options.Reach (see Reached): each target's depth on the
// chosen curve, searched up to horizon times the observed reads, and its
// interval.
//
// The interval of a distinct or duplicate-fraction target inverts the
// distinct interval (band): Lo is the depth at which the upper bound of
// the expected distinct units reaches the target, Hi the depth at which
// the lower bound does (for dup, the other way round, since more units
// mean fewer duplicates). So the depth interval agrees with the distinct
// interval at every depth, model-error term included. Yield and coverage
// targets invert the same kind of interval on the yield (reachYield).
// Both are widened, if need be, to hold the point answer.
func (a *analysis) reach() []Reached {
	if len(a.opt.Reach) == 0 {
		return nil
	}
	maxT := horizon * float64(a.c.Reads())
	out := make([]Reached, len(a.opt.Reach))
	for i, t := range a.opt.Reach {
		q := Reached{Target: t, Reads: missing, Lo: missing, Hi: missing}
		switch {
		case t.invalid() != "":
			q.Note = t.String() + " is not a valid target: " + t.invalid()
		case a.c.Reads() == 0:
			q.Note = t.String() + " not reached: no reads"
		default:
			q.Reads = a.cv.ReadsFor(t, maxT)
		}
		if q.Note != "" || math.IsNaN(q.Reads) {
			if q.Note == "" {
				q.Note = a.unreached(t, maxT)
			}
			out[i] = q
			continue
		}
		switch {
		case t.Kind == TargetDistinct || t.Kind == TargetDup:
			q.Lo, q.Hi = a.reachBand(t, maxT, q.Reads)
		case t.Kind == TargetYield:
			q.Lo, q.Hi = a.reachYield(t.Value, maxT, q.Reads)
		case a.cv.Model != nil:
			q.Lo, q.Hi = a.reachYield(1-t.Value, maxT, q.Reads) // coverage as yield 1 − C
		}
		if !math.IsNaN(q.Lo) {
			q.Lo = math.Min(q.Lo, q.Reads)
		}
		if !math.IsNaN(q.Hi) {
			q.Hi = math.Max(q.Hi, q.Reads)
		}
		out[i] = q
	}
	return out
}

// invalid says why t cannot be a target ("" when it can).
func (t Target) invalid() string {
	v := t.Value
	switch t.Kind {
	case TargetDistinct:
		if !(v > 0) || math.IsInf(v, 1) {
			return "distinct units must be a positive number"
		}
	case TargetDup:
		if !(v >= 0 && v < 1) {
			return "a duplicate fraction is in [0, 1)"
		}
	case TargetCoverage:
		if !(v > 0 && v <= 1) {
			return "a coverage is in (0, 1]"
		}
	case TargetYield:
		if !(v > 0 && v <= 1) {
			return "a marginal yield is in (0, 1]"
		}
	default:
		return "unknown kind"
	}
	return ""
}

// unreached says why t is not reached by maxT and what the curve's limit
// is there.
func (a *analysis) unreached(t Target, maxT float64) string {
	m := a.cv.Model
	if m == nil {
		return fmt.Sprintf("%s not reached within the observed %s reads, and no curve extrapolates beyond them", t, fmtDepth(float64(a.c.Reads())))
	}
	within := fmt.Sprintf("%s not reached within %gx (%s reads)", t, horizon, fmtDepth(maxT))
	switch t.Kind {
	case TargetDistinct:
		if lim, ok := m.Limit(); ok && lim < t.Value {
			return fmt.Sprintf("%s not reached: the curve's limit is %.4g distinct (%.3gx the observed)", t, lim, lim/float64(a.c.Distinct()))
		}
		d := a.cv.Distinct(maxT)
		return fmt.Sprintf("%s: the curve gives %.4g distinct there (%.3gx the observed)", within, d, d/float64(a.c.Distinct()))
	case TargetDup:
		return fmt.Sprintf("%s: the curve gives dup %.4f there", within, a.cv.DupFraction(maxT))
	case TargetCoverage:
		if t.Value >= 1 {
			return t.String() + " not reached: coverage 1 is approached only at infinite depth"
		}
		return fmt.Sprintf("%s: coverage is %.4f there", within, a.cv.Coverage(maxT))
	}
	return fmt.Sprintf("%s: the curve gives yield %.4g there", within, a.cv.MarginalYield(maxT))
}

// reachBand inverts the distinct interval for a distinct or dup target
// (see reach). Lo is where the band end that gets there first reaches the
// target, searched from the point answer r (a guess: for a monotone band
// end the answer does not depend on it; see solveNear); Hi is the first
// depth where the other end does (solveFirst: that end can turn back far
// out, and the first crossing is the valid one), searched from r, which
// it cannot precede (it bounds the point curve from the far side).
func (a *analysis) reachBand(t Target, maxT, r float64) (lo, hi float64) {
	var buf []float64
	bound := func(upper bool) func(float64) float64 {
		return func(T float64) float64 {
			var l, h float64
			l, h, buf = a.band(T, a.cv.Distinct(T), buf)
			d := l
			if upper {
				d = h
			}
			if t.Kind == TargetDup {
				return 1 - d/T
			}
			return d
		}
	}
	if a.reps == nil {
		maxT = math.Min(maxT, float64(a.c.Reads())) // no band above N
	}
	first, last, from := bound(true), bound(false), 0.0
	if t.Kind == TargetDup {
		// The most duplicates come with the fewest distinct units.
		first, last, from = last, first, 1
	}
	lo, hi = solveGuess(first, t.Value, from, maxT, r, math.NaN()), math.NaN()
	if !math.IsNaN(lo) {
		hi = solveFirst(last, t.Value, from, maxT, math.Max(lo, r))
	}
	if math.IsNaN(hi) && a.reps != nil {
		hi = math.Inf(1) // the bound is beyond the horizon
	}
	return lo, hi
}

// reachYield inverts the interval of the marginal yield for a yield
// target (and a coverage one, as yield 1 − C; see reach): at depth T the
// yield Y(T) has the log-scale interval Y·exp(∓z·s), s² = s_boot² +
// s_model(T/N)² + s_fit(T/N)² (adapt.go), with s_boot the spread of log Y over the replicates (each
// replicate's slope at T, in the sample's depths) and s_model the knots
// of the distinct intervals, as if the model's error on the new units
// carried over to their slope. Lo is where the lower end falls to the
// target, searched from the point answer r as in reachBand, Hi the first
// depth where the upper end does (+Inf beyond the horizon), searched
// from r as in reachBand: the upper end's spread grows fastest far out,
// where it can turn back up past the target (solveFirst).
func (a *analysis) reachYield(y, maxT, r float64) (lo, hi float64) {
	if a.reps == nil {
		return missing, missing
	}
	n := float64(a.c.Reads())
	buf := make([]float64, len(a.reps.curves))
	bound := func(sign float64) func(float64) float64 {
		return func(T float64) float64 {
			for b, cv := range a.reps.curves {
				buf[b] = missing
				if cv.Model != nil {
					buf[b] = a.reps.scale[b] * cv.MarginalYield(T*a.reps.scale[b])
				}
			}
			p := a.cv.MarginalYield(T)
			if !(p > 0) {
				return -p
			}
			return -p * math.Exp(sign*logSpread(buf, 0, a.level, math.Hypot(modelErr(a.knots, T/n), fitErr(a.fitKnots, T/n, a.bt))))
		}
	}
	lo, hi = a.cv.solveJoinedNear(bound(-1), -y, 1, 1, maxT, r), math.NaN()
	if !math.IsNaN(lo) {
		hi = a.cv.solveJoinedFirst(bound(1), -y, 1, 1, maxT, math.Max(lo, r))
	}
	if math.IsNaN(hi) {
		hi = math.Inf(1) // the bound is beyond the horizon
	}
	return lo, hi
}
