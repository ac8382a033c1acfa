package complexity

import "fmt"

// curveKind is how the curve above the observed depth was chosen; it
// decides which later steps apply (the method name is only for people).
type curveKind uint8

const (
	curveNone      curveKind = iota // no curve: nothing above N
	curveSelected                   // extrapolate's choice (select.go)
	curveFallback                   // the Chao1-based curve after a failed fit
	curveTrunc2                     // singletons removed upstream: fitted without them
	curveSaturated                  // no singletons: nothing new remains
)

// bootstrapped reports whether bootstrap replicates refit the curve: a
// saturated curve has no spread to measure.
func (k curveKind) bootstrapped() bool { return k != curveNone && k != curveSaturated }

// backtested reports whether the self-backtest applies: it thins the
// observed table, which means nothing for a saturated one, and a thinned
// table whose singletons were removed upstream is no longer such a table.
func (k curveKind) backtested() bool {
	return k == curveSelected || k == curveFallback
}

// minExtrapolateReads is the fewest reads a sample needs for a curve
// above its observed depth. On simulated samples of 5 to 2,000 reads
// (scripts/tinybench, BENCHMARKS.md "Tiny samples") the 95% intervals at
// 2x / 10x covered the truth in 23/33% of samples of 5 reads, 39/52% at
// 10 and 58/75% at 20, with median errors at 10x of 43%, 31% and 23%:
// below 50 reads a prediction says nothing a reader should act on.
// (From 50 reads on the intervals are still too narrow for small
// libraries, 69–79% at 2x; the note on intervals says so.)
const minExtrapolateReads = 50

// fit chooses the curve above the observed depth and names it in
// r.Method, with a note when the choice is not the ordinary one.
func (a *analysis) fit(r *Report) {
	c, maxT := a.c, a.maxT
	use := func(m Model, k curveKind) { a.cv.Model, a.kind, r.Method = m, k, m.Name() }
	switch {
	case c.Reads() == 0:
		r.Notes = append(r.Notes, "no reads: nothing to estimate")
	case c.Distinct() < 2:
		r.Notes = append(r.Notes, "only one distinct unit: too little to extrapolate from")
	case c.Reads() < minExtrapolateReads:
		r.Notes = append(r.Notes, fmt.Sprintf("only %d reads: too few to extrapolate from (below %d reads the 95%% intervals covered at most 58%% of the truth in the tiny-sample benchmark); observed values only", c.Reads(), minExtrapolateReads))
	case SingletonsDepleted(c):
		// Singletons removed or absorbed upstream: fit without them.
		if m, err := fitTrunc2(c, nil); err == nil && m.admissible(c, maxT) {
			use(m, curveTrunc2)
			r.Notes = append(r.Notes, "singletons look removed upstream: extrapolation ignores them (nb-trunc2) and predictions include the units they hid")
		} else {
			sm := newShenModel(c)
			use(sm, curveFallback)
			r.Notes = append(r.Notes, "singletons look removed upstream but no fit without them is admissible; "+sm.Name()+" used, its totals are lower bounds")
		}
	case c.Units(1) == 0:
		r.Notes = append(r.Notes, "no singletons: every unit seen at least twice, the sample looks saturated; extrapolation assumes nothing new remains")
		use(constantModel(float64(c.Distinct())), curveSaturated)
	default:
		// Without a bootstrap no family but the chosen one is refitted, so
		// none need be kept for the reselection (select.go).
		keep := reselectGap
		if a.opt.Bootstrap <= 0 {
			keep = 0
		}
		m, method, err := extrapolateKeep(c, maxT, keep)
		switch {
		case err != nil:
			r.Notes = append(r.Notes, "no admissible extrapolation: "+err.Error())
		case !isAdmissible(m, c, maxT):
			// A safety net under every selection rule: a curve that falls,
			// bends upward or outgrows the reads is never reported.
			sm := newShenModel(c)
			use(sm, curveFallback)
			r.Notes = append(r.Notes, "the fitted "+method+" curve was not admissible; fell back to "+sm.Name())
		default:
			use(m, curveSelected)
			r.Method = method
		}
	}
}

// constantModel is the curve of a saturated sample: no new units.
type constantModel float64

func (k constantModel) Name() string             { return "saturated" }
func (k constantModel) Distinct(float64) float64 { return float64(k) }
func (k constantModel) Limit() (float64, bool)   { return float64(k), true }
