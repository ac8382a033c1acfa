package complexity

import (
	"math"
	"sort"
)

// Intervals for extrapolated values.
//
// A bootstrap replicate refits the same model to resampled counts, so its
// spread measures sampling error only. For large libraries that spread is
// tiny (thousands of units pin the fitted parameters) while the error of
// the model itself — the true abundance distribution is not exactly
// lognormal, gamma or a two-lognormal mixture — does not shrink with N.
// The interval therefore combines both on the log scale of the new units
// Δ(t) = Distinct(t) − D:
//
//	s² = s_boot² + s_model(t/N)²,
//	[lo, hi] = D + Δ · exp(∓ z_{(1+level)/2} · s),
//
// where s_boot is a robust standard deviation of log Δ over the replicates
// (half the distance between their 15.87% and 84.13% quantiles) and
// s_model is the model-error term for the depth multiple m = t/N,
// piecewise linear in log m through defaultKnots, zero at m = 1 (no
// extrapolation, no model error), constant beyond the last knot (totals
// use the last knot). hi is capped at D + (t − N): no more new units than
// new reads.
//
// The knots are calibrated together with the adaptive term of adapt.go
// (which adds s_fit² to s²), on simulated seeds 2 and 3 of scripts/accuracy
// (disjoint from the reporting seed 1) and the tuning sources of the
// real-data benchmark; the derivation is in adapt.go, its numbers in
// BENCHMARKS.md.

// defaultKnots are the calibrated knots of the model-error term
// (Options.ModelError nil). Reproduced by scripts/realdata/calibrate.py
// (FIT=1), see adapt.go.
var defaultKnots = []Knot{{1, 0}, {2, 0.009}, {10, 0.052}, {30, 0.090}, {100, 0.175}}

// modelErr returns s_model at multiple m through knots k.
func modelErr(k []Knot, m float64) float64 {
	if !(m > 1) || len(k) == 0 {
		return 0
	}
	if m >= k[len(k)-1].M {
		return k[len(k)-1].S
	}
	for i := 1; i < len(k); i++ {
		if m <= k[i].M {
			a, b := k[i-1], k[i]
			f := (math.Log(m) - math.Log(a.M)) / (math.Log(b.M) - math.Log(a.M))
			return a.S + f*(b.S-a.S)
		}
	}
	return k[len(k)-1].S
}

// interval turns bootstrap replicate values at depth t into an interval at
// level around point (see above). Replicates that are missing or not above
// D are ignored; with fewer than two usable replicates the interval
// reflects model error only.
func interval(point float64, reps []float64, level float64, c Counts, t float64, knots []Knot) (lo, hi float64) {
	return intervalFit(point, reps, level, c, t, knots, 0)
}

// intervalFit is interval with the adaptive term sfit (adapt.go) added to
// the model error in quadrature on the upper side only; interval is
// intervalFit with sfit = 0.
func intervalFit(point float64, reps []float64, level float64, c Counts, t float64, knots []Knot, sfit float64) (lo, hi float64) {
	n, d := float64(c.Reads()), float64(c.Distinct())
	delta := point - d
	if !isFinite(point) || !(level > 0 && level < 1) {
		return missing, missing
	}
	if !(delta > 0) {
		return point, point
	}
	me := modelErr(knots, t/n)
	zlo, zhi := logSpread(reps, d, level, me), logSpread(reps, d, level, math.Hypot(me, sfit))
	lo, hi = d+delta*math.Exp(-zlo), d+delta*math.Exp(zhi)
	if isFinite(t) && hi > d+(t-n) {
		hi = d + (t - n)
	}
	return lo, hi
}

// logSpread returns the half-width z·s of a log-scale interval, z the
// normal quantile of level, s² = s_boot² + me², where s_boot is the
// robust standard deviation (half the distance between the 15.87% and
// 84.13% quantiles) of log(x − off) over the replicates x above off
// (0 with fewer than two).
func logSpread(reps []float64, off, level, me float64) float64 {
	lv := make([]float64, 0, len(reps))
	for _, x := range reps {
		if isFinite(x) && x > off {
			lv = append(lv, math.Log(x-off))
		}
	}
	sb := 0.0
	if len(lv) >= 2 {
		sort.Float64s(lv)
		sb = (quantileSorted(lv, 0.8413447460685429) - quantileSorted(lv, 0.15865525393145707)) / 2
	}
	s := math.Sqrt(sb*sb + me*me)
	z := normalQuantile(1 - (1-level)/2)
	return z * s
}

// quantileSorted is the linear-interpolation quantile (type 7 of Hyndman &
// Fan 1996) of sorted values.
func quantileSorted(v []float64, p float64) float64 {
	if len(v) == 0 {
		return missing
	}
	h := p * float64(len(v)-1)
	i := int(h)
	if i >= len(v)-1 {
		return v[len(v)-1]
	}
	return v[i] + (h-float64(i))*(v[i+1]-v[i])
}

// intervals returns the curve's values at pts and their intervals: exact
// rarefaction's at or below the observed reads, the bootstrap and model
// error's above (see band).
func (a *analysis) intervals(pts []float64) (point, lo, hi []float64) {
	point = make([]float64, len(pts))
	lo = make([]float64, len(pts))
	hi = make([]float64, len(pts))
	var buf []float64
	for i, t := range pts {
		point[i] = a.cv.Distinct(t)
		lo[i], hi[i], buf = a.band(t, point[i], buf)
	}
	return point, lo, hi
}

// band returns the interval of the expected distinct units at depth t,
// whose point value is point: the rarefaction interval at or below the
// observed reads N, the bootstrap interval combined with model error
// (interval) above N, missing above N without bootstrap. buf is scratch
// space, returned for reuse.
func (a *analysis) band(t, point float64, buf []float64) (lo, hi float64, _ []float64) {
	n := a.c.Reads()
	switch {
	case t <= float64(n) && n > 0:
		lo, hi = rarefiedInterval(a.c, t, a.level)
	case a.reps != nil:
		buf = a.reps.distinctAt(t, buf)
		lo, hi = intervalFit(point, buf, a.level, a.c, t, a.knots, fitErr(a.fitKnots, t/float64(n), a.bt))
	default:
		lo, hi = missing, missing
	}
	return lo, hi, buf
}

// rarefiedInterval is the normal-approximation interval of the rarefied
// expectation, mean ± z sd with the Heck et al. (1975) variance,
// conditional on the observed sample, at the real depth t (the same
// continuation as the point estimate, so the interval always holds it),
// cut to what is possible: at least 0, at most t and the observed D.
func rarefiedInterval(c Counts, t float64, level float64) (lo, hi float64) {
	if !(t >= 0 && t <= float64(c.Reads())) {
		return missing, missing
	}
	mean, v := rarefyAt(c, t, true)
	if !isFinite(mean) || !isFinite(v) || v < 0 {
		return missing, missing
	}
	mean = math.Min(mean, t) // as Curve.Distinct
	z := normalQuantile(1 - (1-level)/2)
	s := math.Sqrt(v)
	return math.Max(0, mean-z*s), math.Min(mean+z*s, math.Min(t, float64(c.Distinct())))
}

// normalQuantile is the standard normal quantile.
func normalQuantile(p float64) float64 { return -math.Sqrt2 * math.Erfcinv(2*p) }
