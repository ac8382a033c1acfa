package complexity

import "math"

// Intervals that adapt to the sample's own fit.
//
// The model-error term s_model(m) of the interval (interval.go) is the same
// for every sample at a depth multiple m. A sample also says how well its
// curve fits: the self-backtest refits the chosen family on a 10% thinning
// of the sample and predicts the observed depth, a 10x extrapolation whose
// truth is known; its relative error b (Report.BacktestError) is large when
// the family bends differently from the data. The adaptive term widens the
// interval of such samples, growing with the extrapolation's reach on the
// log scale (the backtest measured a reach of ln 10):
//
//	s_fit(m, b) = κ(m) · |b|,
//	s² = s_boot² + s_model(m)² + s_fit(m, b)²,
//
// κ(m) piecewise linear in log m through BacktestKnots (constant beyond
// the last knot; totals use the last). When no backtest could be run (a
// thinned table too small, fallback curves) |b| is taken as
// backtestMissing, about the 90th percentile of |b| on the simulated
// calibration set, so such a sample gets a wide interval rather than a
// bootstrap-only one.
//
// Calibration (scripts/realdata/calibrate.py, FIT=1): for each multiple m
// and each κ on the grid 0, 1, …, 30, s_model(m) is the smallest value for
// which 95% of the simulated calibration cases (scripts/accuracy -seed 2)
// hold the truth; κ(m) is the smallest weight for which 95% of the cells of
// the real-data tuning sources (scripts/realdata -seed 2) hold the truth
// while the simulated coverage stays at most 97%, or, where none reaches
// 95%, the one with the highest real coverage under that cap. The knots
// of ModelErrorKnots and BacktestKnots come from that one fit. Coverage is
// reported on draws and sources it never saw (accuracy seed 1, the
// held-out real sources): BENCHMARKS.md sections 1 and 6.

// BacktestKnots are the knots (depth multiple M, weight κ as S) of s_fit.
// Programs other than the calibration must treat them as read-only.
var BacktestKnots = []Knot{{1, 0}, {2, 2}, {10, 8}, {30, 13}, {100, 25}}

// backtestMissing stands in for |b| when a sample has no backtest.
const backtestMissing = 0.1

// fitErr returns s_fit at multiple m for backtest error bt (missing:
// backtestMissing).
func fitErr(m, bt float64) float64 {
	if !isFinite(bt) {
		bt = backtestMissing
	}
	return knotAt(BacktestKnots, m) * math.Abs(bt)
}

// knotAt interpolates knots (M ascending, the first at M = 1) at m:
// piecewise linear in log m, 0 at or below m = 1 and for no knots,
// constant beyond the last knot.
func knotAt(k []Knot, m float64) float64 {
	if !(m > 1) || len(k) == 0 {
		return 0
	}
	if m >= k[len(k)-1].M {
		return k[len(k)-1].S
	}
	for i := 1; i < len(k); i++ {
		if m <= k[i].M {
			a, b := k[i-1], k[i]
			f := (math.Log(m) - math.Log(a.M)) / (math.Log(b.M) - math.Log(a.M))
			return a.S + f*(b.S-a.S)
		}
	}
	return k[len(k)-1].S
}
