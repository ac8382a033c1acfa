package complexity

import (
	"fmt"
	"math"
	"sync"
)

// backtestFraction is the share of reads kept by the self-backtest: the
// curve is refitted on a 10% thinning and asked to predict the observed
// depth, a 10x extrapolation, which is the depth multiple users ask about
// most. backtestMinDistinct is the smallest thinned table worth fitting.
const (
	backtestFraction    = 0.1
	backtestMinDistinct = 20
)

// The total is the fitted curve's limit only when the curve comes within
// totalReach of it by totalHorizon times the observed reads: beyond 100x
// the extrapolation's accuracy was not measured (BENCHMARKS.md), and a
// limit that lies further out is a guess about the unseen tail. Otherwise
// the total is Chao1, a lower bound.
const (
	totalHorizon = 100.0
	totalReach   = 0.9
)

// Analyze estimates everything Report holds for one sample. It never
// fails: what cannot be estimated is missing (NaN) and explained in Notes.
func Analyze(c Counts, opt Options) Report {
	level := opt.Level
	if level == 0 {
		level = 0.95
	}
	threads := opt.Threads
	if threads < 1 {
		threads = 1
	}
	n, d := c.Reads(), c.Distinct()
	r := Report{Reads: n, Distinct: d, Singletons: c.Units(1), Doubletons: c.Units(2),
		DupFraction: missing, SampleCoverage: missing, MarginalYield: missing,
		Total: missing, TotalLo: missing, TotalHi: missing, Saturation: missing, BacktestError: missing}
	if n > 0 {
		r.DupFraction = 1 - float64(d)/float64(n)
		r.SampleCoverage = SampleCoverage(c)
		r.MarginalYield = MarginalYield(c)
	}

	maxT := 2 * float64(n)
	for _, t := range opt.Depths {
		maxT = math.Max(maxT, t)
	}
	for _, t := range opt.Curve {
		maxT = math.Max(maxT, t)
	}
	if g := opt.Gates.Target; g > 0 {
		maxT = math.Max(maxT, g)
	}

	cv := Curve{Counts: c}
	switch {
	case n == 0:
		r.Notes = append(r.Notes, "no reads: nothing to estimate")
	case d < 2:
		r.Notes = append(r.Notes, "only one distinct unit: too little to extrapolate from")
	case SingletonsDepleted(c):
		// Singletons removed or absorbed upstream: fit without them.
		if m, err := fitTrunc2(c, nil); err == nil && m.admissible(c, maxT) {
			cv.Model, r.Method = m, m.Name()
			r.Notes = append(r.Notes, "singletons look removed upstream: extrapolation ignores them (nb-trunc2) and predictions include the units they hid")
		} else {
			sm := NewShenModel(c)
			cv.Model, r.Method = sm, sm.Name()
			r.Notes = append(r.Notes, "singletons look removed upstream but no fit without them is admissible; "+sm.Name()+" used, its totals are lower bounds")
		}
	case c.Units(1) == 0:
		r.Notes = append(r.Notes, "no singletons: every unit seen at least twice, the sample looks saturated; extrapolation assumes nothing new remains")
		r.Method = "saturated"
		cv.Model = constantModel(float64(d))
	default:
		m, method, err := extrapolate(c, maxT)
		switch {
		case err != nil:
			r.Notes = append(r.Notes, "no admissible extrapolation: "+err.Error())
		case !Admissible(m, c, maxT):
			// A safety net under every selection rule: a curve that falls,
			// bends upward or outgrows the reads is never reported.
			sm := NewShenModel(c)
			cv.Model, r.Method = sm, sm.Name()
			r.Notes = append(r.Notes, "the fitted "+method+" curve was not admissible; fell back to "+sm.Name())
		default:
			cv.Model = m
			r.Method = method
		}
	}
	r.Model = cv.Model

	// Points at which values (and intervals) are wanted: predictions,
	// curve, the gate target.
	var pts []float64
	pts = append(pts, opt.Depths...)
	pts = append(pts, opt.Curve...)
	target := opt.Gates.Target
	gated := target > 0 && opt.Gates.Any()
	if gated {
		pts = append(pts, target)
	}
	point := make([]float64, len(pts))
	for i, t := range pts {
		point[i] = cv.Distinct(t)
	}

	// The self-backtest (its own stream of the seed) also widens the
	// intervals of a curve that fits the sample badly (adapt.go).
	if _, trunc := cv.Model.(*trunc2Model); cv.Model != nil && r.Method != "saturated" && !trunc {
		r.BacktestError = backtest(c, cv.Model, opt.Seed)
	}

	// Bootstrap: replicate b draws from its own stream of the seed.
	lo := make([]float64, len(pts))
	hi := make([]float64, len(pts))
	for i := range lo {
		lo[i], hi[i] = missing, missing
	}
	totLoHi := [2]float64{missing, missing}
	var limits []float64
	if opt.Bootstrap > 0 && cv.Model != nil && r.Method != "saturated" {
		reps := bootstrap(c, cv.Model, r.Method, maxT, pts, opt.Bootstrap, opt.Seed, threads)
		failed := 0
		col := make([]float64, 0, opt.Bootstrap)
		for i := range pts {
			if pts[i] <= float64(n) {
				lo[i], hi[i] = rarefiedInterval(c, pts[i], level)
				continue
			}
			col = col[:0]
			for b := range reps.vals {
				col = append(col, reps.vals[b][i])
			}
			lo[i], hi[i] = intervalFit(point[i], col, level, c, pts[i], r.BacktestError)
		}
		limits = reps.limits
		for _, ok := range reps.ok {
			if !ok {
				failed++
			}
		}
		if failed > 0 {
			r.Notes = append(r.Notes, fmt.Sprintf("%d of %d bootstrap replicates had no admissible fit", failed, opt.Bootstrap))
		}
	} else {
		for i := range pts {
			if pts[i] <= float64(n) && n > 0 {
				lo[i], hi[i] = rarefiedInterval(c, pts[i], level)
			}
		}
	}

	// Totals: the curve's limit where bounded, else Chao1 with its
	// log-normal interval.
	if d > 0 {
		lim, bounded := math.NaN(), false
		if cv.Model != nil {
			lim, bounded = cv.Model.Limit()
		}
		reached := bounded && isFinite(lim) && lim >= float64(d) &&
			cv.Model.Distinct(totalHorizon*float64(n)) >= totalReach*lim
		if bounded && !reached && isFinite(lim) && lim >= float64(d) {
			r.Notes = append(r.Notes, fmt.Sprintf("the fitted curve is still below %.0f%% of its limit at %.0fx, beyond the depths whose accuracy was measured; total_est is Chao1, a lower bound", 100*totalReach, totalHorizon))
		}
		if reached {
			r.Total, r.TotalMethod = lim, "limit"
			if len(limits) > 1 {
				totLoHi[0], totLoHi[1] = intervalFit(lim, limits, level, c, math.Inf(1), r.BacktestError)
			}
			r.TotalLo, r.TotalHi = totLoHi[0], totLoHi[1]
		} else {
			r.Total, r.TotalLo, r.TotalHi = Chao1(c, level)
			r.TotalMethod = "chao1"
		}
		if r.Total > 0 {
			r.Saturation = float64(d) / r.Total
		}
		if r.Method != "" {
			r.Method += "; total=" + r.TotalMethod
		} else {
			r.Method = "total=" + r.TotalMethod
		}
	}

	for i, t := range opt.Depths {
		p := Prediction{Reads: t, Distinct: point[i], Lo: lo[i], Hi: hi[i], DupFraction: missing, Coverage: missing}
		if t > 0 && isFinite(point[i]) {
			p.DupFraction = 1 - point[i]/t
			p.Coverage = cv.Coverage(t)
		}
		r.Predictions = append(r.Predictions, p)
	}
	for k, t := range opt.Curve {
		i := len(opt.Depths) + k
		kind := KindExtrapolated
		switch {
		case t < float64(n):
			kind = KindRarefied
		case t == float64(n):
			kind = KindObserved
		}
		r.Points = append(r.Points, CurvePoint{Reads: t, Distinct: point[i], Lo: lo[i], Hi: hi[i], Kind: kind})
	}

	if gated {
		i := len(pts) - 1
		p := Prediction{Reads: target, Distinct: point[i], Lo: lo[i], Hi: hi[i], DupFraction: missing, Coverage: cv.Coverage(target)}
		if target > 0 && isFinite(point[i]) {
			p.DupFraction = 1 - point[i]/target
		}
		v, why := opt.Gates.Evaluate(p)
		r.Verdict = v
		r.Notes = append(r.Notes, why...)
	}
	return r
}

// replicates holds bootstrap values: vals[b][i] at pts[i], the limit of
// each replicate's curve, and whether replicate b could be fitted.
type replicates struct {
	vals   [][]float64
	limits []float64
	ok     []bool
}

// bootstrap fits the chosen method on B resampled tables, in parallel over
// threads goroutines. Replicate b always uses stream b of seed, so the
// result is the same for any thread count.
func bootstrap(c Counts, m Model, method string, maxT float64, pts []float64, B int, seed uint64, threads int) replicates {
	reps := replicates{vals: make([][]float64, B), limits: make([]float64, B), ok: make([]bool, B)}
	var wg sync.WaitGroup
	next := make(chan int)
	for w := 0; w < min(threads, B); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for b := range next {
				rng := newRand(seed, uint64(b))
				rc := Resample(c, rng)
				v := make([]float64, len(pts))
				var rm Model
				var err error
				if t2, ok := m.(*trunc2Model); ok {
					rm, err = fitTrunc2(rc, []float64{math.Log(t2.k), math.Log(t2.theta)})
				} else {
					rm, err = refit(method, rc, maxT, m)
				}
				reps.limits[b] = missing
				if err != nil {
					for i := range v {
						v[i] = missing
					}
				} else {
					// The replicate's curve is anchored at its own depth;
					// express depths as the same multiples of the observed.
					scale := float64(rc.Reads()) / float64(c.Reads())
					for i, t := range pts {
						v[i] = missing
						if t > float64(c.Reads()) {
							// Depths at or below N take the rarefaction
							// interval; only extrapolated ones need replicates.
							v[i] = Curve{Counts: rc, Model: rm}.Distinct(t * scale)
						}
					}
					if lim, ok := rm.Limit(); ok {
						reps.limits[b] = lim
					}
					reps.ok[b] = true
				}
				reps.vals[b] = v
			}
		}()
	}
	for b := 0; b < B; b++ {
		next <- b
	}
	close(next)
	wg.Wait()
	return reps
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

// backtest thins c to backtestFraction, refits the family of m (from
// scratch: the thinned table's rates are a tenth), predicts the observed
// depth and returns the signed relative error against the observed
// distinct count. The thinning uses its own stream of seed. Fallback
// curves (no mixture family) rerun the whole selection.
func backtest(c Counts, m Model, seed uint64) float64 {
	tc := Thin(c, backtestFraction, newRand(seed, math.MaxUint64))
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

// constantModel is the curve of a saturated sample: no new units.
type constantModel float64

func (k constantModel) Name() string             { return "saturated" }
func (k constantModel) Distinct(float64) float64 { return float64(k) }
func (k constantModel) Limit() (float64, bool)   { return float64(k), true }

// fitSameFamily fits the mixture family of m to c from scratch, or reruns
// the whole selection when m is not a mixture fit.
func fitSameFamily(m Model, c Counts, maxT float64) (Model, error) {
	name := m.Name()
	for _, cd := range candidates {
		if cd.name == name {
			fm, err := refitCandidate(name, c, name, nil)
			if err == nil && !Admissible(fm, c, maxT) {
				err = ErrNoAdmissible
			}
			return fm, err
		}
	}
	em, _, err := extrapolate(c, maxT)
	return em, err
}
