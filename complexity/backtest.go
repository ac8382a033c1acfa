package complexity

import "math"

// backtestFraction is the share of reads kept by the self-backtest: the
// curve is refitted on a 10% thinning and asked to predict the observed
// depth, a 10x extrapolation, which is the depth multiple users ask about
// most. backtestMinDistinct is the smallest thinned table worth fitting.
const (
	backtestFraction    = 0.1
	backtestMinDistinct = 20
)

// backtest thins c to backtestFraction, refits the family of m (from
// scratch: the thinned table's rates are a tenth), predicts the observed
// depth and returns the signed relative error against the observed
// distinct count. The thinning uses its own stream of seed. Fallback
// curves (no mixture family) rerun the whole selection.
func backtest(c Counts, m Model, seed uint64) float64 {
	tc := thin(c, backtestFraction, newRand(seed, math.MaxUint64))
	if tc.Distinct() < backtestMinDistinct || tc.Units(1) == 0 {
		return missing
	}
	tm, err := fitSameFamily(m, tc, float64(c.Reads()), math.Log(float64(tc.Reads())/float64(c.Reads())))
	if err != nil {
		return missing
	}
	pred := tm.Distinct(float64(c.Reads()))
	if !isFinite(pred) {
		return missing
	}
	return pred/float64(c.Distinct()) - 1
}

// fitSameFamily fits the mixture family of m to c, warm-started from m's
// parameters moved by shift on the log-rate scale, or reruns the whole
// selection when m is not a mixture fit.
//
// Thinning to a fraction f scales every rate by f (rates are per the
// table's own reads), so the parameters that place the rates on the log
// scale (μ of a lognormal, the lower cutoff of a power law or band, the
// gamma scale θ) move by shift = log f and the shapes stay: the refit
// starts where the full fit puts the thinned table's optimum instead of
// from the three starts of a first fit (which were most of the backtest's
// cost).
func fitSameFamily(m Model, c Counts, maxT, shift float64) (Model, error) {
	if sm, ok := m.(*selModel); ok {
		m = sm.Model
	}
	name := m.Name()
	for _, cd := range candidates {
		if cd.name == name {
			fm, err := fitCandidate(cd, c, shiftedParams(m, shift), true)
			if err == nil && !isAdmissible(fm, c, maxT) {
				err = errNoAdmissible
			}
			return fm, err
		}
	}
	em, _, err := extrapolateKeep(c, maxT, 0) // nothing is refitted from it
	return em, err
}

// shiftedParams returns the fitted parameters of mixture fit m with its
// rates scaled by e^shift (nil, a fit from scratch, for other models).
// Layouts: lognormal (μ, log σ); two lognormals (μ1, log σ1, μ2, log σ2,
// logit w); power law (log λ_min, α) and band (log λ_min, α, log width);
// gamma (log k, log θ).
func shiftedParams(m Model, shift float64) []float64 {
	var p []float64
	switch mm := m.(type) {
	case *gridModel:
		p = append(p, mm.params...)
		switch {
		case len(p) == 5:
			p[0] += shift
			p[2] += shift
		case len(p) >= 2:
			p[0] += shift
		}
	case *ztnbModel:
		p = mm.params()
		p[1] += shift
	}
	return p
}
