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
//	s_fit(m, b) = BacktestWeight · |b| · ln(m)/ln(10),
//	s² = s_boot² + s_model(m)² + s_fit(m, b)²,
//
// with m taken at most the last knot's multiple (totals use that). When no
// backtest could be run (tiny thinned table, fallback curves) s_fit is 0.
// BacktestWeight and the knots are calibrated together
// (scripts/realdata/calibrate.py): for each weight the knots are the
// smallest values for which 95% of the calibration cells hold the truth,
// the simulated calibration set (scripts/accuracy -seed 2) and the tuning
// sources of the real-data benchmark (scripts/realdata -seed 2) weighted
// equally; the weight is the one whose lowest per-family and per-source
// coverage is highest at no more median width. BENCHMARKS.md section 6 has
// the numbers; coverage is reported on draws and sources the calibration
// never saw (accuracy seed 1, the real held-out sources).

// BacktestWeight is κ above. Programs other than the calibration must treat
// it as read-only.
var BacktestWeight = 0.0

// fitErr returns s_fit at multiple m for backtest error bt.
func fitErr(m, bt float64) float64 {
	if !isFinite(bt) || !(m > 1) || BacktestWeight == 0 {
		return 0
	}
	top := totalHorizon
	if k := ModelErrorKnots; len(k) > 0 {
		top = k[len(k)-1].M
	}
	m = math.Min(m, top)
	return BacktestWeight * math.Abs(bt) * math.Log(m) / math.Ln10
}
