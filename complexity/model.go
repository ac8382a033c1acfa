package complexity

import "math"

// Model is a fitted curve of expected distinct units against depth.
//
// Distinct(t) is the expected number of distinct units observed after t
// reads of the same library, t in reads (not a multiple). Implementations
// are valid at least for t >= the observed reads N, and must return NaN
// where they cannot answer (never panic).
type Model interface {
	// Name is the short identifier used in the method column.
	Name() string
	// Distinct returns the expected distinct units after t reads.
	Distinct(t float64) float64
	// Limit returns the model's total (t -> infinity) and whether it is
	// finite.
	Limit() (float64, bool)
}

// missing is how this package marks a value it cannot give. Writers turn
// it into an empty cell or null; it never reaches output as "NaN".
var missing = math.NaN()

// isMissing reports whether v is a missing value.
func isMissing(v float64) bool { return math.IsNaN(v) }
