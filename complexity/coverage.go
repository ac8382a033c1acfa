package complexity

import "math"

// sampleCoverage returns the Chao–Jost estimate of sample coverage: the
// share of the library's reads (the population's total abundance) that
// belongs to units already observed,
//
//	C_n = 1 - (f1/n) [ (n-1) f1 / ((n-1) f1 + 2 f2) ]
//
// with n reads, f1 singletons and f2 doubletons; when f2 = 0 the bracket
// is (n-1)(f1-1) / ((n-1)(f1-1) + 2) (Chao & Jost 2012, the estimator
// and its f2 = 0 form). C_n = 1 when f1 = 0, and also, by the f2 = 0 form,
// when f1 = 1 and f2 = 0. It returns NaN for an empty table.
//
// References:
//
//	Chao, A. & Jost, L. (2012). Coverage-based rarefaction and
//	extrapolation: standardizing samples by completeness rather than size.
//	Ecology 93:2533-2547.
func sampleCoverage(c Counts) float64 {
	if c.Reads() == 0 {
		return math.NaN()
	}
	return 1 - marginalYield(c)
}

// marginalYield returns the estimated probability that the next read is
// of a unit not yet observed, the coverage deficit of Chao & Jost (2012):
//
//	1 - C_n = (f1/n) [ (n-1) f1 / ((n-1) f1 + 2 f2) ]
//
// (f2 = 0: the bracket of SampleCoverage), computed directly rather than
// as 1 - SampleCoverage so it keeps its relative accuracy when small.
// Chao & Jost note that 1 - C_m is the slope of the expected distinct
// curve at m (for t < n exactly: E[S_{m+1}] - E[S_m] = 1 - C_m, with C_m of
// coverageAt), so this is the expected share of the next reads that are new
// units. It returns 0 when f1 = 0 and NaN for an empty table.
//
// References:
//
//	Chao, A. & Jost, L. (2012). Ecology 93:2533-2547.
func marginalYield(c Counts) float64 {
	n := float64(c.Reads())
	if n == 0 {
		return math.NaN()
	}
	f1 := float64(c.Units(1))
	if f1 == 0 {
		return 0
	}
	return f1 / n * coverageRatio(c)
}

// coverageRatio is the bracket of SampleCoverage,
// (n-1)f1/((n-1)f1 + 2f2), or (n-1)(f1-1)/((n-1)(f1-1)+2) when f2 = 0;
// in [0, 1). It is the estimated factor by which the undetected share
// shrinks with each further read.
func coverageRatio(c Counts) float64 {
	n, f1, f2 := float64(c.Reads()), float64(c.Units(1)), float64(c.Units(2))
	if f2 > 0 {
		a := (n - 1) * f1
		return a / (a + 2*f2)
	}
	a := (n - 1) * (f1 - 1)
	return a / (a + 2)
}

// coverageAt returns the expected sample coverage after t reads of the
// same library (Chao & Jost 2012), with n the observed
// reads and f_j the units seen j times:
//
//	t < n:  C_t = 1 - sum_j (j f_j / n) C(n-j, t) / C(n-1, t)
//	t = n:  C_n  (SampleCoverage)
//	t > n:  C_t = 1 - (f1/n) [ (n-1) f1 / ((n-1) f1 + 2 f2) ]^(t-n+1)
//
// (f2 = 0: the bracket of SampleCoverage). The rarefied form is summed as
// sum_j (j f_j/n)(1 - ratio_j) with 1 - ratio from expm1 of a log-gamma
// ratio (see rarefy), so small coverages keep their relative accuracy; the
// power is exp((t-n+1) log(bracket)). For real t in [0, n-1] the binomial
// ratio is the gamma-function continuation used by rarefy; for t in
// (n-1, n) C_t is interpolated linearly between C_{n-1} = 1 - f1/n and
// C_n, since the rarefied formula stops at t = n-1. C_t is continuous at
// t = n and non-decreasing in t.
//
// It returns NaN for t < 0, NaN t, or an empty table; +Inf gives the limit
// (1 unless the bracket is 1, which cannot happen with f1 > 0).
//
// References:
//
//	Chao, A. & Jost, L. (2012). Coverage-based rarefaction and
//	extrapolation: standardizing samples by completeness rather than size.
//	Ecology 93:2533-2547.
func coverageAt(c Counts, t float64) float64 {
	n := float64(c.Reads())
	if n == 0 || !(t >= 0) {
		return math.NaN()
	}
	switch {
	case t == n:
		return sampleCoverage(c)
	case t > n:
		f1 := float64(c.Units(1))
		if f1 == 0 {
			return 1
		}
		r := coverageRatio(c)
		if r == 0 {
			return 1
		}
		return 1 - f1/n*math.Exp((t-n+1)*math.Log(r))
	case t > n-1:
		lo := coverageRarefied(c, n-1)
		return lo + (t-(n-1))*(sampleCoverage(c)-lo)
	}
	return coverageRarefied(c, t)
}

// coverageRarefied is the t < n branch of coverageAt for t in [0, n-1]:
// sum_j (j f_j / n)(1 - C(n-j,t)/C(n-1,t)), the ratio being the
// probability that a unit with j-1 of n-1 reads is missed (hgLogAbsent).
//
// A class whose miss probability is below e^{−40} is not evaluated:
// log C(n−1−k,t)/C(n−1,t) = Σ_{i<k} log(1 − t/(n−1−i)) ≤ k·log1p(−t/(n−1)),
// k = j−1, and when that bound is below −40 the exact value is too, so
// math.Expm1 of it returns exactly −1 (it does so for every x below
// −56·ln 2 ≈ −38.8; the margin of 1.2 is far above the rounding of either
// side): the term is j f_j/n, bit for bit what the full evaluation gives.
// Below the observed depth most classes of a deep library are such, and
// the reach targets' bootstrap bisection evaluates this many times.
func coverageRarefied(c Counts, t float64) float64 {
	n := float64(c.Reads())
	lmiss := math.Log1p(-t / (n - 1))
	var s, comp float64
	var run runningAbsent
	for _, cl := range c.classes {
		j := float64(cl.Times)
		var v float64
		if (j-1)*lmiss < coverageSureLog {
			v = j * float64(cl.Units) / n // × −Expm1(…) = 1
		} else {
			v = j * float64(cl.Units) / n * -math.Expm1(run.logAbsent(n-1, j-1, t))
		}
		s, comp = neumaierAdd(s, comp, v)
	}
	return s + comp
}

// runningAbsent is hgLogAbsent(N, k, t) for one N and t and k ascending
// over calls, bit for bit: where hgLogAbsent sums the k factors
// log1p(−t/(N−i)), i = 0…k−1, directly (k ≤ hgDirect), the sum so far is
// kept and extended by the new factors, in the same order from the same
// zero, so each class costs its own new factors instead of all k of them.
type runningAbsent struct {
	sum   float64
	terms float64 // factors in sum
}

func (r *runningAbsent) logAbsent(N, k, t float64) float64 {
	if t <= 0 || k <= 0 || t >= N-k+1 || k > hgDirect {
		return hgLogAbsent(N, k, t)
	}
	for ; r.terms < k; r.terms++ {
		r.sum += math.Log1p(-t / (N - r.terms))
	}
	return r.sum
}

// coverageSureLog is the log miss-probability bound below which
// coverageRarefied takes a class as surely seen (see there).
const coverageSureLog = -40.0
