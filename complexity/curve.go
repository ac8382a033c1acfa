package complexity

import "math"

// Curve is a sample's expected-distinct curve at every depth: exact
// rarefaction at or below the observed reads N, the fitted Model above.
// Model may be nil (no admissible extrapolation): Curve then answers only
// up to N and returns NaN beyond.
type Curve struct {
	Counts Counts
	Model  Model
}

// Distinct returns the expected distinct units after T reads.
func (cv Curve) Distinct(T float64) float64 {
	n := float64(cv.Counts.Reads())
	switch {
	case !(T >= 0):
		return math.NaN()
	case T <= n:
		// E[distinct] <= T at whole depths; below one read the gamma
		// continuation of rarefaction exceeds T by up to ~1e-4 relative
		// (a duplicate fraction below zero), so it is capped.
		return math.Min(rarefyMeanAt(cv.Counts, T), T)
	case cv.Model == nil:
		return math.NaN()
	}
	// No curve may add more units than reads: every new unit takes a read.
	// Admissible curves already obey this from the observed depth; the
	// singleton-free fit (truncated.go) describes a depth beyond the
	// observed one, and an absurd table can make it overshoot just above N.
	return math.Min(cv.Model.Distinct(T), float64(cv.Counts.Distinct())+(T-n))
}

// DupFraction returns 1 - Distinct(T)/T, the expected share of reads that
// repeat an already-seen unit.
func (cv Curve) DupFraction(T float64) float64 {
	if !(T > 0) {
		return math.NaN()
	}
	return 1 - cv.Distinct(T)/T
}

// Coverage returns the expected sample coverage at depth T (Chao & Jost
// 2012; see CoverageAt).
func (cv Curve) Coverage(T float64) float64 { return CoverageAt(cv.Counts, T) }

// MarginalYield returns dDistinct/dT at T: the expected share of the reads
// just after depth T that are new units. At T = N it is the Chao & Jost
// estimate 1 - coverage; above N it is the model's slope (central
// difference over a relative step of yieldStep).
func (cv Curve) MarginalYield(T float64) float64 {
	n := float64(cv.Counts.Reads())
	if T <= n {
		if T == n {
			return MarginalYield(cv.Counts)
		}
		return 1 - CoverageAt(cv.Counts, T)
	}
	h := yieldStep * T
	a, b := cv.Distinct(T-h), cv.Distinct(T+h)
	if T-h < n {
		a = cv.Distinct(n)
		return (b - a) / (T + h - n)
	}
	return (b - a) / (2 * h)
}

// yieldStep is the relative step of the numerical derivative: large
// enough that float64 round-off in Distinct (relative 1e-12 or so) stays
// below 1e-6 of the slope, small enough for the curvature of a saturation
// curve over ±0.1% of the depth to be negligible.
const yieldStep = 1e-3

// Reach is the answer to an inverse query: the depth in reads, or
// Reachable false when no depth up to the search limit gets there.
type Reach struct {
	Reads     float64
	Reachable bool
}

// searchIter bounds bisection: 200 halvings of a range of at most 1e18
// reads reach below one read.
const searchIter = 200

// solveIncreasing finds the smallest T in [lo, hi] with f(T) >= target for
// a non-decreasing f, by bisection to one read.
func solveIncreasing(f func(float64) float64, target, lo, hi float64) Reach {
	if !(f(hi) >= target) {
		return Reach{Reads: math.NaN()}
	}
	if f(lo) >= target {
		return Reach{Reads: lo, Reachable: true}
	}
	for i := 0; i < searchIter && hi-lo > 0.5; i++ {
		mid := lo + (hi-lo)/2
		if f(mid) >= target {
			hi = mid
		} else {
			lo = mid
		}
	}
	return Reach{Reads: math.Ceil(hi), Reachable: true}
}

// ReadsForDistinct returns the depth at which target distinct units are
// expected, searching up to maxT reads.
func (cv Curve) ReadsForDistinct(target, maxT float64) Reach {
	return solveIncreasing(cv.Distinct, target, 0, maxT)
}

// ReadsForDupFraction returns the depth at which the duplicate fraction
// reaches f (it only grows with depth), searching up to maxT reads.
func (cv Curve) ReadsForDupFraction(f, maxT float64) Reach {
	return solveIncreasing(cv.DupFraction, f, 1, maxT)
}

// ReadsForCoverage returns the depth at which the expected sample coverage
// reaches c, searching up to maxT reads.
func (cv Curve) ReadsForCoverage(c, maxT float64) Reach {
	return solveIncreasing(cv.Coverage, c, 1, maxT)
}

// ReadsForMarginalYield returns the depth at which the share of new units
// among further reads falls to y (more reads stop paying), searching up to
// maxT reads.
func (cv Curve) ReadsForMarginalYield(y, maxT float64) Reach {
	return solveIncreasing(func(T float64) float64 { return -cv.MarginalYield(T) }, -y, 1, maxT)
}
