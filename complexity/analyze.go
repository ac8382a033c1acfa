package complexity

// Options controls Analyze. The zero value predicts nowhere, computes no
// intervals and applies no gates.
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
	// curve with intervals; nil for none.
	Curve []float64
}

// Curve kinds.
const (
	KindRarefied     = "rarefied"
	KindObserved     = "observed"
	KindExtrapolated = "extrapolated"
)

// CurvePoint is one point of a saturation curve.
type CurvePoint struct {
	Reads, Distinct, Lo, Hi float64
	Kind                    string // KindRarefied, KindObserved or KindExtrapolated
}

// Prediction is the expectation at one depth.
type Prediction struct {
	Reads       float64 // depth, reads
	Distinct    float64 // expected distinct units
	Lo, Hi      float64 // interval at Options.Level (missing without bootstrap)
	DupFraction float64 // 1 - Distinct/Reads
	Coverage    float64 // expected sample coverage at that depth
}

// Report is everything Analyze says about one sample. Missing values are NaN
// (see IsMissing).
type Report struct {
	Reads, Distinct         int64
	DupFraction             float64 // 1 - D/N
	Singletons, Doubletons  int64
	SampleCoverage          float64 // Chao & Jost (2012) estimate at N
	MarginalYield           float64 // expected share of the next reads that are new units
	Total, TotalLo, TotalHi float64
	TotalMethod             string  // which estimator Total is
	Saturation              float64 // Distinct / Total
	Method                  string  // what produced the extrapolation
	BacktestError           float64 // signed relative error of the self-backtest
	Predictions             []Prediction
	Verdict                 Verdict
	Notes                   []string
	// Points holds the points asked for by Options.Curve.
	Points []CurvePoint
	// Model is the fitted extrapolation (nil when none could be fitted).
	Model Model
}
