package complexity

import "math"

// newShenModel returns the Chao1-based richness extrapolation of Shen,
// Chao & Lin (2003) as a Model named "chao1-extrapolation". With n reads,
// S_obs distinct units, f1 singletons and f2 doubletons, the undetected
// units are estimated by the bias-corrected Chao1 term (Chao 1984, in
// its common bias-corrected form with the sample-size factor (n-1)/n)
//
//	f0 = (n-1)/n * f1 (f1-1) / (2 (f2+1))
//
// and the expected distinct units after n + m reads, m >= 0, is
//
//	S(n+m) = S_obs + f0 [ 1 - (1 - f1/(n f0 + f1))^m ]
//
// computed as S_obs - f0 expm1(m log1p(-f1/(n f0 + f1))). Below the
// observed depth (t < n) Distinct returns the rarefaction expectation
// (rarefy; real t by its gamma-function continuation). The limit is
// S_obs + f0, the bias-corrected Chao1 estimate. When f1 <= 1 the estimate
// f0 is 0 and the curve is flat at S_obs beyond n.
//
// Distinct returns NaN for t < 0 or NaN t; for an empty table it returns
// 0 at t = 0 and NaN elsewhere, and Limit returns (NaN, false).
//
// References:
//
//	Shen, T.-J., Chao, A. & Lin, C.-F. (2003). Predicting the number of
//	new species in further taxonomic sampling. Ecology 84:798-804.
//	Chao, A. (1984). Nonparametric estimation of the number of classes in
//	a population. Scandinavian Journal of Statistics 11:265-270.
func newShenModel(c Counts) Model {
	m := shenModel{c: c, n: float64(c.Reads()), sobs: float64(c.Distinct())}
	if m.n > 0 {
		f1, f2 := float64(c.Units(1)), float64(c.Units(2))
		m.f0 = (m.n - 1) / m.n * f1 * (f1 - 1) / (2 * (f2 + 1))
		if m.f0 > 0 {
			m.l1p = math.Log1p(-f1 / (m.n*m.f0 + f1))
		}
	}
	return m
}

// shenModel is the Model returned by newShenModel.
type shenModel struct {
	c       Counts
	n, sobs float64
	f0      float64 // bias-corrected Chao1 undetected units
	l1p     float64 // log(1 - f1/(n f0 + f1))
}

// Name returns "chao1-extrapolation".
func (shenModel) Name() string { return "chao1-extrapolation" }

// Distinct returns the expected distinct units after t reads.
func (s shenModel) Distinct(t float64) float64 {
	switch {
	case !(t >= 0):
		return math.NaN()
	case s.n == 0:
		if t == 0 {
			return 0
		}
		return math.NaN()
	case t < s.n:
		return rarefyMeanAt(s.c, t)
	case s.f0 == 0:
		return s.sobs
	}
	return s.sobs - s.f0*math.Expm1((t-s.n)*s.l1p)
}

// Limit returns S_obs + f0, the bias-corrected Chao1 estimate.
func (s shenModel) Limit() (float64, bool) {
	if s.n == 0 {
		return math.NaN(), false
	}
	return s.sobs + s.f0, true
}
