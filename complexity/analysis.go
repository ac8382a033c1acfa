package complexity

import "math"

// horizon is the deepest multiple of the observed reads the package
// speaks for: the accuracy benchmark measured the extrapolation up to 100×
// (BENCHMARKS.md). A total needs the curve near its limit there; a reach
// target beyond it is not reached.
const horizon = 100.0

// analysis is the state Analyze's steps share: the table, the options
// resolved to their defaults, the chosen curve and the bootstrap.
type analysis struct {
	c        Counts
	opt      Options
	level    float64
	threads  int
	knots    []Knot
	fitKnots []Knot  // weights of the adaptive term (adapt.go)
	bt       float64 // the self-backtest error, missing when none
	maxT     float64 // deepest depth the curve must be admissible to
	cv       Curve
	kind     curveKind
	reps     *replicates // nil without bootstrap
}

// Analyze estimates everything Report holds for one sample. It never
// fails: what cannot be estimated is missing (NaN) and explained in Notes.
//
// The steps, each in the file named for it: observe (the table's own
// statistics), fit (choose the curve above N, fit.go), bootstrap
// (replicate curves, bootstrap.go), intervals (interval.go), total
// (total.go), backtest (backtest.go), reach (reach.go) and the gates
// (gates.go).
func Analyze(c Counts, opt Options) Report {
	a := newAnalysis(c, opt)
	r := a.observe()
	a.fit(&r)
	pts := a.points()
	// The self-backtest (its own stream of the seed) also widens the
	// intervals of a curve that fits the sample badly (adapt.go).
	if a.kind.backtested() {
		r.BacktestError = backtest(c, a.cv.Model, opt.Seed)
	}
	a.bt = r.BacktestError
	a.bootstrap(&r)
	point, lo, hi := a.intervals(pts)
	a.total(&r)
	n := len(opt.Depths)
	r.Predictions = a.predictions(pts[:n], point[:n], lo[:n], hi[:n])
	if len(opt.Curve) > 0 {
		k := n + len(opt.Curve)
		r.Points = a.predictions(pts[n:k], point[n:k], lo[n:k], hi[n:k])
	}
	r.Reach = a.reach()
	if a.gated() {
		i := len(pts) - 1
		p := a.predictions(pts[i:], point[i:], lo[i:], hi[i:])[0]
		p.Coverage = a.cv.Coverage(p.Reads) // known from the counts even without a curve
		v, why := opt.Gates.Evaluate(p)
		r.Verdict = v
		r.Notes = append(r.Notes, why...)
	}
	r.Curve = a.cv
	return r
}

// newAnalysis resolves the options' defaults and the depth up to which
// the curve must be admissible: twice the observed reads, every depth
// asked for, and the reach horizon when targets are asked.
func newAnalysis(c Counts, opt Options) *analysis {
	a := &analysis{c: c, opt: opt, level: opt.Level, threads: opt.Threads, knots: opt.ModelError, cv: Curve{Counts: c}, bt: missing}
	if a.level == 0 {
		a.level = 0.95
	}
	if a.threads < 1 {
		a.threads = 1
	}
	if a.knots == nil {
		a.knots = defaultKnots
	}
	if a.fitKnots = opt.FitError; a.fitKnots == nil {
		a.fitKnots = defaultFitKnots
	}
	n := float64(c.Reads())
	a.maxT = 2 * n
	for _, t := range opt.Depths {
		a.maxT = math.Max(a.maxT, t)
	}
	for _, t := range opt.Curve {
		a.maxT = math.Max(a.maxT, t)
	}
	if g := opt.Gates.Target; g > 0 {
		a.maxT = math.Max(a.maxT, g)
	}
	if len(opt.Reach) > 0 {
		a.maxT = math.Max(a.maxT, horizon*n)
	}
	return a
}

// observe fills the statistics of the observed table.
func (a *analysis) observe() Report {
	c := a.c
	n, d := c.Reads(), c.Distinct()
	r := Report{Reads: n, Distinct: d, Singletons: c.Units(1), Doubletons: c.Units(2),
		DupFraction: missing, SampleCoverage: missing, MarginalYield: missing,
		Total: missing, TotalLo: missing, TotalHi: missing, Saturation: missing, BacktestError: missing}
	if n > 0 {
		r.DupFraction = 1 - float64(d)/float64(n)
		r.SampleCoverage = sampleCoverage(c)
		r.MarginalYield = marginalYield(c)
	}
	return r
}

// gated reports whether the gates are evaluated.
func (a *analysis) gated() bool { return a.opt.Gates.Target > 0 && a.opt.Gates.Any() }

// points are the depths at which values and intervals are wanted: the
// predictions, the curve, the gate target, in that order.
func (a *analysis) points() []float64 {
	var pts []float64
	pts = append(pts, a.opt.Depths...)
	pts = append(pts, a.opt.Curve...)
	if a.gated() {
		pts = append(pts, a.opt.Gates.Target)
	}
	return pts
}

// predictions assembles the predictions at depths pts from their values
// and intervals.
func (a *analysis) predictions(pts, point, lo, hi []float64) []Prediction {
	n := float64(a.c.Reads())
	out := make([]Prediction, len(pts))
	for i, t := range pts {
		p := Prediction{Reads: t, Distinct: point[i], Lo: lo[i], Hi: hi[i], DupFraction: missing, Coverage: missing, Kind: KindExtrapolated}
		if t > 0 && isFinite(point[i]) {
			p.DupFraction = 1 - point[i]/t
			p.Coverage = a.cv.Coverage(t)
		}
		switch {
		case t < n:
			p.Kind = KindRarefied
		case t == n:
			p.Kind = KindObserved
		}
		out[i] = p
	}
	return out
}
