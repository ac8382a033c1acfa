package complexity

import "math"

// goodToulmin returns the Good–Toulmin estimate of the expected number of
// units not yet observed that t*N further reads would find, N being the
// observed reads:
//
//	U(t) = sum_j (-1)^(j+1) t^j n_j,   0 <= t <= 1
//
// Under Poisson sampling (each unit's reads Poisson with a fixed rate) it
// is unbiased for every t. For t <= 1 its terms shrink with j; for t > 1
// they grow like t^j and the series diverges (its variance explodes), so
// goodToulmin returns NaN outside [0, 1], as for NaN t. Larger t needs a
// stabilised form of the series (Padé/continued fraction), not this
// function.
//
// The alternating sum is accumulated with Neumaier's compensated summation
// over the classes in ascending j, t^j by math.Pow, so the absolute error
// is at most a few eps times sum_j t^j n_j <= D (the number of distinct
// units) whatever the cancellation between terms; it is exact at t = 1
// while partial sums stay below 2^53.
//
// References:
//
//	Good, I. J. & Toulmin, G. H. (1956). The number of new species, and
//	the increase in population coverage, when a sample is increased.
//	Biometrika 43:45-63.
//	Neumaier, A. (1974). Rundungsfehleranalyse einiger Verfahren zur
//	Summation endlicher Summen. ZAMM 54:39-51.
func goodToulmin(c Counts, t float64) float64 {
	if !(t >= 0 && t <= 1) {
		return math.NaN()
	}
	if t == 0 {
		return 0
	}
	var s, comp float64
	for _, cl := range c.classes {
		p := math.Pow(t, float64(cl.Times))
		if p == 0 {
			break // t^j only shrinks with j
		}
		term := float64(cl.Units) * p
		if cl.Times%2 == 0 {
			term = -term
		}
		s, comp = neumaierAdd(s, comp, term)
	}
	return s + comp
}
