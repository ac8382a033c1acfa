package complexity

import (
	"math"
	"sort"
)

// SplitBudget splits budget further reads among the samples of one pool so
// that the pool's expected distinct units after both runs are as many as
// possible. curves[i] is sample i's curve in the reads it speaks of (usable
// reads); usable[i] (in (0, 1]) is how many of those one read bought for
// the sample delivers (what survives unmapped, QC-failed, secondary and
// optical reads). Sample i then gets x_i of the budget, and
//
//	maximise  Σ_i D_i(N_i + u_i·x_i)  subject to  Σ_i x_i = budget, x_i ≥ 0
//
// where D_i is the curve and N_i its observed reads. Each D_i is concave
// (admissible curves are, by construction), so the Karush–Kuhn–Tucker
// conditions are sufficient: there is one level λ with
// u_i·D_i'(N_i + u_i·x_i) = λ wherever x_i > 0 and u_i·D_i'(N_i) ≤ λ
// wherever x_i = 0 (equal marginal yield per purchased read among the
// samples that get reads). SplitBudget finds λ by bisection on the
// (decreasing) total that each level asks for, each sample's share by
// bisection on its own marginal yield (the model's slope), and rounds the
// shares to whole reads summing exactly to budget by the largest-remainder
// rule (Hamilton's method). A sample without a curve beyond its observed
// depth (no admissible extrapolation) gets no reads.
//
// It returns the whole reads of each sample and λ, the common marginal
// yield per purchased read at the optimum (NaN when budget is 0).
//
// References: Boyd S, Vandenberghe L (2004) Convex Optimization,
// Cambridge, §5.5.3 (KKT conditions) and the water-filling example of
// §5.5.3; Balinski ML, Young HP (1982) Fair Representation, Yale (the
// largest-remainder rule).
//
// maxReads, when not nil, caps what each sample may get (in reads bought;
// e.g. what takes it to the deepest depth its curve is trusted at). When
// the caps leave part of the budget, the rest is not given (the sum is
// then below budget) and level is the lowest slope among the capped.
func SplitBudget(curves []Curve, usable []float64, budget int64, maxReads []float64) (reads []int64, level float64) {
	reads = make([]int64, len(curves))
	if budget <= 0 || len(curves) == 0 {
		return reads, math.NaN()
	}
	B := float64(budget)
	capOf := func(i int) float64 {
		if maxReads == nil {
			return B
		}
		return math.Max(0, math.Min(B, maxReads[i]))
	}
	// slope(i, x): marginal yield per purchased read of sample i after x
	// further reads; decreasing in x.
	slope := func(i int, x float64) float64 {
		n := float64(curves[i].Counts.Reads())
		y := modelSlope(curves[i].Model, n+usable[i]*x)
		if !(y >= 0) {
			return 0
		}
		return usable[i] * y
	}
	ok := make([]bool, len(curves))
	top := 0.0
	for i, cv := range curves {
		n := float64(cv.Counts.Reads())
		ok[i] = cv.Model != nil && n > 0 && usable[i] > 0 && !math.IsNaN(modelSlope(cv.Model, n+usable[i]*B))
		if ok[i] {
			top = math.Max(top, slope(i, 0))
		}
	}
	// share(i, λ): the x_i at which sample i's slope falls to λ, within
	// [0, cap_i].
	share := func(i int, lam float64) float64 {
		c := capOf(i)
		if !ok[i] || c == 0 || slope(i, 0) <= lam {
			return 0
		}
		if slope(i, c) >= lam {
			return c
		}
		lo, hi := 0.0, c
		for k := 0; k < searchIter && hi-lo > planResolution*B; k++ {
			mid := lo + (hi-lo)/2
			if slope(i, mid) > lam {
				lo = mid
			} else {
				hi = mid
			}
		}
		return lo + (hi-lo)/2
	}
	total := func(lam float64) float64 {
		t := 0.0
		for i := range curves {
			t += share(i, lam)
		}
		return t
	}
	if !(top > 0) {
		// Every sample is exhausted (or none can be extrapolated): nothing
		// buys new units, so split evenly among those with a curve as the
		// least harmful choice, the caller says so.
		x := make([]float64, len(curves))
		m := 0
		for i := range curves {
			if ok[i] {
				m++
			}
		}
		for i := range curves {
			if ok[i] {
				x[i] = math.Min(B/float64(m), capOf(i))
			}
		}
		if m == 0 {
			return reads, math.NaN()
		}
		return Apportion(x, roundedSum(x, budget)), 0
	}
	if total(0) <= B {
		// The caps bind before the budget runs out: everyone gets the cap.
		x := make([]float64, len(curves))
		low := math.Inf(1)
		for i := range curves {
			x[i] = share(i, 0)
			if x[i] > 0 {
				low = math.Min(low, slope(i, x[i]))
			}
		}
		return Apportion(x, roundedSum(x, budget)), low
	}
	// total(λ) decreases from ≥ B near 0 to 0 at top.
	lo, hi := 0.0, top
	for k := 0; k < searchIter && hi-lo > planResolution*top; k++ {
		mid := lo + (hi-lo)/2
		if total(mid) > B {
			lo = mid
		} else {
			hi = mid
		}
	}
	level = lo + (hi-lo)/2
	x := make([]float64, len(curves))
	sum := 0.0
	for i := range curves {
		x[i] = share(i, level)
		sum += x[i]
	}
	if sum > 0 {
		for i := range x {
			x[i] *= B / sum // close the bisection's last 1e-12
		}
	}
	return Apportion(x, budget), level
}

// roundedSum is the whole reads a set of shares comes to (at most budget).
func roundedSum(x []float64, budget int64) int64 {
	s := 0.0
	for _, v := range x {
		s += v
	}
	return min(budget, int64(math.Floor(s+0.5)))
}

// planResolution is the relative width at which the bisections of
// SplitBudget stop: 1e-12 of the budget is far below one read for any
// budget under 1e12 reads, and the rounding to whole reads then decides.
const planResolution = 1e-12

// Apportion rounds non-negative shares summing to total to whole numbers
// summing exactly to total: each gets its floor, and the reads left go one
// each to the largest remainders (ties to the earlier sample, so the result
// is deterministic).
func Apportion(x []float64, total int64) []int64 {
	out := make([]int64, len(x))
	var given int64
	type rem struct {
		i int
		r float64
	}
	rems := make([]rem, 0, len(x))
	for i, v := range x {
		f := math.Floor(v)
		out[i] = int64(f)
		given += out[i]
		if v > 0 {
			rems = append(rems, rem{i, v - f})
		}
	}
	sort.SliceStable(rems, func(a, b int) bool { return rems[a].r > rems[b].r })
	for k := 0; given < total && len(rems) > 0; k++ {
		out[rems[k%len(rems)].i]++
		given++
	}
	for i := len(out) - 1; given > total && i >= 0; i-- {
		if out[i] > 0 {
			d := min(out[i], given-total)
			out[i] -= d
			given -= d
		}
	}
	return out
}

// modelSlope is dD/dT of the fitted model at T by a central difference of
// relative step yieldStep. It differentiates the model alone, not
// Curve.Distinct: the curve joins the observed distinct count at N, and a
// model that passes a unit or two off it would make a one-sided
// difference at N (and so the shares) jump.
func modelSlope(m Model, T float64) float64 {
	h := yieldStep * T
	return (m.Distinct(T+h) - m.Distinct(T-h)) / (2 * h)
}
