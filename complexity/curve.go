package complexity

import "math"

// Curve is a sample's expected-distinct curve D(T) at every depth T in
// reads: exact rarefaction at or below the observed reads N (Heck et al.
// 1975, in its gamma-function continuation between whole depths), the
// fitted Model above. Model may be nil (no admissible extrapolation):
// Curve then answers only up to N and returns NaN beyond. Report.Curve is
// the one Analyze chose; Curve{Counts: c} alone is the rarefaction curve.
//
// Its methods are the expectations at depth T: Distinct (D), DupFraction
// (1 − D/T), Coverage (sample coverage), MarginalYield (dD/dT, the share
// of new units among the next reads) and the inverse, ReadsFor.
type Curve struct {
	Counts Counts
	Model  Model
}

// Distinct returns D(T), the expected distinct units after T reads: at
// or below N the rarefied mean E[S_T] = Σ_j f_j [1 − C(N−j, T)/C(N, T)]
// (Hurlbert 1971; Heck, van Belle & Simberloff 1975), above it the Model,
// at most D + (T − N) (each new unit takes a read). NaN for T < 0, and
// above N without a Model.
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

// Coverage returns the expected sample coverage at depth T, the share of
// the library's reads that belong to units seen by then (Chao & Jost 2012,
// Ecology 93:2533), with f_j the units seen j times in the N reads:
//
//	T < N:  C_T = 1 − Σ_j (j f_j / N) C(N−j, T) / C(N−1, T)
//	T = N:  C_N = 1 − (f1/N) [ (N−1) f1 / ((N−1) f1 + 2 f2) ]
//	T > N:  C_T = 1 − (f1/N) [ (N−1) f1 / ((N−1) f1 + 2 f2) ]^(T−N+1)
//
// (f2 = 0: the bracket is (N−1)(f1−1)/((N−1)(f1−1)+2)). Above N this is
// Chao & Jost's extrapolation from the counts alone; it does not use the
// Model (the coverage the Model implies is 1 − MarginalYield). NaN for
// T < 0 or an empty table.
func (cv Curve) Coverage(T float64) float64 { return coverageAt(cv.Counts, T) }

// MarginalYield returns dD/dT at T: the expected share of the reads just
// after depth T that are new units. Below N it is 1 − C_T (for rarefaction
// exactly E[S_{T+1}] − E[S_T]; Chao & Jost 2012), at T = N the Chao & Jost
// estimate 1 − C_N, above N the Model's slope (central difference over a
// relative step of yieldStep). It falls from 1 towards 0 with depth.
func (cv Curve) MarginalYield(T float64) float64 {
	n := float64(cv.Counts.Reads())
	if T <= n {
		if T == n {
			return marginalYield(cv.Counts)
		}
		return 1 - coverageAt(cv.Counts, T)
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

// searchIter bounds bisection: 200 halvings of a range of at most 1e18
// reads reach below one read.
const searchIter = 200

// solveIncreasing finds the smallest T in [lo, hi] with f(T) >= target for
// a non-decreasing f, by bisection to one read (rounded up to whole
// reads); NaN when f(hi) < target.
func solveIncreasing(f func(float64) float64, target, lo, hi float64) float64 {
	if !(f(hi) >= target) {
		return math.NaN()
	}
	if f(lo) >= target {
		return lo
	}
	for i := 0; i < searchIter && hi-lo > 0.5; i++ {
		mid := lo + (hi-lo)/2
		if f(mid) >= target {
			hi = mid
		} else {
			lo = mid
		}
	}
	return math.Ceil(hi)
}

// ReadsFor returns the smallest depth T in reads, at most maxT, at which
// the curve's expectation reaches t (see TargetKind), NaN when it does not
// get there by maxT:
//
//	TargetDistinct  Distinct(T) >= t.Value
//	TargetDup       DupFraction(T) >= t.Value
//	TargetCoverage  Coverage(T) >= t.Value without a Model; with one,
//	                MarginalYield(T) <= 1 − t.Value (see TargetCoverage)
//	TargetYield     MarginalYield(T) <= t.Value
//
// Each quantity is monotone in T (the curve is concave and increasing), so
// the answer is found by bisection to one read. At or below the observed
// reads N it is exact rarefaction, so a target already met at N gets the
// smallest depth ≤ N that meets it.
func (cv Curve) ReadsFor(t Target, maxT float64) float64 { return cv.solve(t, 1, maxT) }

// solve is ReadsFor on the curve read at depth multiples of scale: depth T
// of the caller is depth T·scale of cv (a bootstrap replicate, anchored at
// its own reads, answers in the observed sample's depths; see bootstrap).
func (cv Curve) solve(t Target, scale, maxT float64) float64 {
	v := t.Value
	switch t.Kind {
	case TargetDistinct:
		return cv.solveJoined(func(T float64) float64 { return cv.Distinct(T * scale) }, v, 0, scale, maxT)
	case TargetDup:
		return cv.solveJoined(func(T float64) float64 { return 1 - cv.Distinct(T*scale)/T }, v, 1, scale, maxT)
	case TargetCoverage:
		if cv.Model != nil {
			// The coverage the curve implies is 1 − its slope; Coverage's
			// curve-free extrapolation above N ignores the fitted curve.
			return cv.solve(Target{TargetYield, 1 - v}, scale, maxT)
		}
		return solveIncreasing(func(T float64) float64 { return cv.Coverage(T * scale) }, v, 1, maxT)
	case TargetYield:
		return cv.solveJoined(func(T float64) float64 { return -scale * cv.MarginalYield(T*scale) }, -v, 1, scale, maxT)
	}
	return math.NaN()
}

// solveJoined is solveIncreasing on the curve; with a Model it is searched on
// each side of the observed depth apart: rarefaction and the fitted curve
// meet at N, but their slopes need not (the model's is fitted, the
// rarefied one exact), so a slope target could be crossed twice near N.
// A target met at N is answered at or below it, from rarefaction.
func (cv Curve) solveJoined(f func(float64) float64, target, lo, scale, maxT float64) float64 {
	n := float64(cv.Counts.Reads()) / scale
	if cv.Model == nil {
		// Only rarefaction is known: search up to N, not into NaN.
		return solveIncreasing(f, target, lo, math.Min(maxT, n))
	}
	if !(n > lo && n < maxT) {
		return solveIncreasing(f, target, lo, maxT)
	}
	if f(n) >= target {
		return solveIncreasing(f, target, lo, n)
	}
	return solveIncreasing(f, target, n, maxT)
}
