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
	tm, err := fitSameFamily(m, tc, float64(c.Reads()))
	if err != nil {
		return missing
	}
	pred := tm.Distinct(float64(c.Reads()))
	if !isFinite(pred) {
		return missing
	}
	return pred/float64(c.Distinct()) - 1
}

// fitSameFamily fits the mixture family of m to c from scratch, or reruns
// the whole selection when m is not a mixture fit.
func fitSameFamily(m Model, c Counts, maxT float64) (Model, error) {
	name := m.Name()
	for _, cd := range candidates {
		if cd.name == name {
			fm, err := refitCandidate(name, c, name, nil)
			if err == nil && !isAdmissible(fm, c, maxT) {
				err = errNoAdmissible
			}
			return fm, err
		}
	}
	em, _, err := extrapolate(c, maxT)
	return em, err
}
