package complexity

import "fmt"

// Options controls Analyze. The zero value predicts nowhere, computes no
// intervals, answers no reach targets and applies no gates.
type Options struct {
	// Depths are the depths (absolute reads) to predict at, in output order.
	Depths []float64
	// Bootstrap is the number of bootstrap replicates (0: no intervals).
	Bootstrap int
	// Seed makes the bootstrap reproducible; the same seed gives the same
	// intervals whatever Threads is.
	Seed uint64
	// Level is the confidence level of intervals (0 means 0.95).
	Level float64
	// Threads bounds the goroutines used for the bootstrap (0 means 1).
	Threads int
	// Gates are the QC thresholds; see Gates. A Target of 0 (the zero
	// value) applies no gates.
	Gates Gates
	// Curve are depths (absolute reads, ascending) at which to report the
	// curve with intervals (Report.Points); nil for none.
	Curve []float64
	// Reach are the targets whose depths Report.Reach answers, in order.
	// When set, the extrapolation is checked admissible up to the reach
	// horizon (100 times the observed reads) as well.
	Reach []Target
	// Progress, when not nil, is called after each bootstrap replicate,
	// from any of the Threads goroutines (for a progress bar; it must not
	// block). It does not change any result.
	Progress func()
	// ModelError are the knots of the model-error term of extrapolation
	// intervals (see Knot). nil means the calibrated defaults; a single
	// knot {1, 0} gives bootstrap-only intervals (used to calibrate).
	ModelError []Knot
	// FitError are the knots (M, weight κ as S) of the adaptive term that
	// widens the intervals of a sample by its self-backtest error (see
	// adapt.go). nil means the calibrated defaults; a single knot {1, 0}
	// gives none (used to calibrate).
	FitError []Knot
}

// Knot is one point of the model-error curve of extrapolation intervals:
// at depth multiple M (depth / observed reads) the model-error standard
// deviation of log Δ, Δ the new units, is S. Between knots s_model is
// linear in log M; below the first it is 0 and beyond the last it is the
// last S. The calibrated knots and their derivation are in interval.go
// and BENCHMARKS.md.
type Knot struct{ M, S float64 }

// Curve kinds: where a depth lies relative to the observed reads N.
const (
	KindRarefied     = "rarefied"     // below N: exact rarefaction
	KindObserved     = "observed"     // at N
	KindExtrapolated = "extrapolated" // above N: the fitted curve
)

// Prediction is the expectation at one depth.
type Prediction struct {
	Reads       float64 // depth, reads
	Distinct    float64 // expected distinct units
	Lo, Hi      float64 // interval at Options.Level (missing without bootstrap above N)
	DupFraction float64 // 1 - Distinct/Reads
	Coverage    float64 // expected sample coverage at that depth
	Kind        string  // KindRarefied, KindObserved or KindExtrapolated
}

// TargetKind is what a reach target asks for.
type TargetKind uint8

// Target kinds. Each names the quantity whose expectation at total depth
// T (reads, counting those already sequenced) is set to Target.Value:
const (
	// TargetDistinct: expected distinct units D(T) reach Value (absolute).
	TargetDistinct TargetKind = iota + 1
	// TargetDup: the duplicate fraction of the whole run, 1 − D(T)/T,
	// reaches Value in [0, 1).
	TargetDup
	// TargetCoverage: the sample coverage reaches Value in (0, 1]. Above
	// N the coverage is the one the curve implies, 1 − dD/dT (the
	// coverage deficit is the curve's slope; Chao & Jost 2012), so it is
	// the yield target 1 − Value; without a curve, the Chao–Jost
	// extrapolation (Curve.Coverage).
	TargetCoverage
	// TargetYield: the marginal yield dD/dT, the share of new units among
	// the next reads, falls to Value in (0, 1].
	TargetYield
)

var targetNames = [...]string{TargetDistinct: "distinct", TargetDup: "dup", TargetCoverage: "coverage", TargetYield: "yield"}

// String returns the kind's short name: distinct, dup, coverage or yield.
func (k TargetKind) String() string {
	if int(k) < len(targetNames) && targetNames[k] != "" {
		return targetNames[k]
	}
	return fmt.Sprintf("TargetKind(%d)", uint8(k))
}

// Target is one reach target: the depth at which the expectation of Kind
// reaches Value. Distinct values are absolute units (a caller resolves
// multiples of the observed distinct units itself).
type Target struct {
	Kind  TargetKind
	Value float64
}

// String writes the target as KIND:VALUE, e.g. "dup:0.3".
func (t Target) String() string { return fmt.Sprintf("%v:%.6g", t.Kind, t.Value) }

// Reached is the answer to one Target: the total depth in reads at which
// the expectation reaches it and its interval at Options.Level.
//
// Below the observed reads N the answer comes from exact rarefaction (a
// target already met at N is answered by the smallest depth ≤ N that meets
// it), above N from the fitted curve, searched up to 100·N (the depths
// whose accuracy the benchmark measured). Reads is missing when the target
// cannot be reached there, and Note says why and what the limit is. Lo and
// Hi are missing without bootstrap above N; Hi is +Inf when the upper
// bound lies beyond the search horizon (the interval is [Lo, ∞)). The
// interval of a distinct or dup target inverts the distinct interval, so
// the two agree at every depth; a yield or coverage target inverts the
// same kind of interval on the yield (reach.go).
type Reached struct {
	Target        Target
	Reads, Lo, Hi float64
	Note          string
}

// Report is everything Analyze says about one sample. Missing values are
// NaN.
type Report struct {
	Reads, Distinct         int64
	DupFraction             float64 // 1 - D/N
	Singletons, Doubletons  int64
	SampleCoverage          float64 // Chao & Jost (2012) estimate at N
	MarginalYield           float64 // expected share of the next reads that are new units
	Total, TotalLo, TotalHi float64
	TotalMethod             string  // which estimator Total is: "limit" (the curve's) or "chao1"
	Saturation              float64 // Distinct / Total
	Method                  string  // the curve above N, e.g. "lognormal-h", "saturated"; "" for none
	BacktestError           float64 // signed relative error of the self-backtest
	Predictions             []Prediction
	Verdict                 Verdict
	Notes                   []string
	// Points holds the points asked for by Options.Curve.
	Points []Prediction
	// Reach answers Options.Reach, in the same order.
	Reach []Reached
	// Curve is the sample's expected-distinct curve: D(T) for any depth
	// (Curve.Distinct), its slope, the marginal yield (Curve.MarginalYield),
	// and the depth at which any Target is reached (Curve.ReadsFor). Its
	// Model is nil when no extrapolation could be fitted.
	Curve Curve
}
