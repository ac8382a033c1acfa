package complexity

import (
	"fmt"
	"math"
)

// totalReach: the total is the fitted curve's limit only when the curve
// comes within totalReach of it by horizon times the observed reads
// (beyond that the extrapolation's accuracy was not measured, and a limit
// further out is a guess about the unseen tail); otherwise it is Chao1, a
// lower bound.
const totalReach = 0.9

// total estimates the number of units in the library: the curve's limit
// where it is bounded and reached (see totalReach), with the bootstrap
// limits' interval, else Chao1 with its log-normal interval.
func (a *analysis) total(r *Report) {
	c, m := a.c, a.cv.Model
	n, d := float64(c.Reads()), float64(c.Distinct())
	if d == 0 {
		return
	}
	lim, bounded := math.NaN(), false
	if m != nil {
		lim, bounded = m.Limit()
	}
	reached := bounded && isFinite(lim) && lim >= d && m.Distinct(horizon*n) >= totalReach*lim
	if bounded && !reached && isFinite(lim) && lim >= d {
		r.Notes = append(r.Notes, fmt.Sprintf("the fitted curve is still below %.0f%% of its limit at %.0fx, beyond the depths whose accuracy was measured; total_est is Chao1, a lower bound", 100*totalReach, horizon))
	}
	if !reached {
		r.Total, r.TotalLo, r.TotalHi = Chao1(c, a.level)
		r.TotalMethod = "chao1"
	} else {
		r.Total, r.TotalMethod = lim, "limit"
		if a.reps != nil && len(a.reps.limits) > 1 {
			r.TotalLo, r.TotalHi = intervalFit(lim, a.reps.limits, a.level, c, math.Inf(1), a.knots, fitErr(a.fitKnots, math.Inf(1), a.bt))
		}
	}
	if r.Total > 0 {
		r.Saturation = d / r.Total
	}
}
