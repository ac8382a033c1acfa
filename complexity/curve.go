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
// reads); NaN when f(hi) < target. See solveNear.
func solveIncreasing(f func(float64) float64, target, lo, hi float64) float64 {
	return solveNear(f, target, lo, hi, hi, f(hi))
}

// bisectIncreasing is plain bisection, solveIncreasing's definition: halve
// [lo, hi], keep the half whose ends straddle the target, stop below half
// a read, answer the upper end rounded up.
func bisectIncreasing(f func(float64) float64, target, lo, hi float64) float64 {
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

// solveNear is solveIncreasing given one value already known, f0 = f(x0)
// at x0 in [lo, hi] (a guess at the answer, or an end), and gives
// bisectIncreasing's answer for a non-decreasing f with far fewer
// evaluations. The curves here cost a bootstrap's worth of replicates per
// evaluation (reach intervals), and bisection to one read over a 100-fold
// range takes 25 to 30 of them. Instead:
//
//  1. bracket: from x0, steps growing geometrically in u = log(1+T) go
//     towards the target until a value on its other side (or the end of
//     the range) is met, so a root a < root ≤ b with f(a) < target ≤
//     f(b) is known; an end is evaluated only when the steps reach it;
//  2. narrow that bracket to half a read by Brent's method (narrowRoot);
//  3. replay bisection's halvings of [lo, hi], evaluating f only at
//     midpoints strictly inside (a, b): for a non-decreasing f, every
//     midpoint at or below a is below the target and every one at or
//     above b reaches it, so each halving goes the way bisection's would
//     and the answer is the same to the bit.
//
// A NaN counts as below the target, as in bisection.
func solveNear(f func(float64) float64, target, lo, hi, x0, f0 float64) float64 {
	if hi-lo <= 0.5 || !(x0 >= lo && x0 <= hi) {
		return bisectIncreasing(f, target, lo, hi)
	}
	a, fa, b, fb := lo, math.NaN(), hi, math.NaN()
	if f0 >= target {
		b, fb = x0, f0
		if x0 == lo {
			return lo
		}
		for du, u := bracketStep, math.Log1p(x0); ; du *= 2 {
			x := math.Expm1(u - du)
			if !(x > lo) {
				if fl := f(lo); fl >= target {
					return lo
				} else {
					fa = fl
				}
				break
			}
			if fx := f(x); fx >= target {
				b, fb = x, fx
			} else {
				a, fa = x, fx
				break
			}
		}
	} else {
		a, fa = x0, f0
		if x0 == hi {
			return math.NaN()
		}
		for du, u := bracketStep, math.Log1p(x0); ; du *= 2 {
			x := math.Expm1(u + du)
			if !(x < hi) {
				fh := f(hi)
				if !(fh >= target) {
					return math.NaN()
				}
				fb = fh
				break
			}
			if fx := f(x); fx >= target {
				b, fb = x, fx
				break
			} else {
				a, fa = x, fx
			}
		}
	}
	a, b = narrowRoot(f, target, a, fa, b, fb)
	return replayBisection(f, target, lo, hi, a, b)
}

// replayBisection is bisectIncreasing's halvings of [lo, hi] given a
// bracket a ≤ root ≤ b of the answer: a midpoint at or below a counts as
// short of the target and one at or above b as reaching it, unevaluated,
// so f is evaluated only at the midpoints strictly inside (a, b).
func replayBisection(f func(float64) float64, target, lo, hi, a, b float64) float64 {
	for i := 0; i < searchIter && hi-lo > 0.5; i++ {
		mid := lo + (hi-lo)/2
		var reached bool
		switch {
		case mid <= a:
		case mid >= b:
			reached = true
		default:
			reached = f(mid) >= target
			if reached {
				b = mid
			} else {
				a = mid
			}
		}
		if reached {
			hi = mid
		} else {
			lo = mid
		}
	}
	return math.Ceil(hi)
}

// solveFirst finds the first depth at or after start, in [lo, hi], at
// which f reaches the target, for an f that need not be monotone: an end
// of an interval band, where the replicates' spread can grow faster than
// the curve and turn the band back (a yield's upper end rising again far
// out, a distinct lower end falling). The quantity the band bounds is
// monotone in depth (distinct units never fall, the marginal yield never
// rises), so once the band has reached the target at T it holds there for
// every later depth too: the valid and tightest answer is the first
// crossing, not whichever one bisection happens to land on. Found by
// steps of scanStep in u = log(1+T) from start (a crossing that is
// undone within one step can be missed: the answer is the first
// crossing on that grid), then narrowRoot and replayBisection inside the
// step that crosses, so for a non-decreasing f with start at or below its
// root the answer is bisectIncreasing's to the bit. A start at which f
// already reaches the target is the answer (rounded up to whole reads);
// NaN when f stays short up to hi.
func solveFirst(f func(float64) float64, target, lo, hi, start float64) float64 {
	if hi-lo <= 0.5 {
		return bisectIncreasing(f, target, lo, hi)
	}
	if !(start > lo) {
		start = lo
	}
	if start >= hi {
		if f(hi) >= target {
			return math.Ceil(hi)
		}
		return math.NaN()
	}
	x, fx := start, f(start)
	if fx >= target {
		return replayBisection(f, target, lo, hi, x, x)
	}
	for u := math.Log1p(x); ; {
		u += scanStep
		y := math.Expm1(u)
		if !(y < hi) {
			y = hi
		}
		fy := f(y)
		if fy >= target {
			a, b := narrowRoot(f, target, x, fx, y, fy)
			return replayBisection(f, target, lo, hi, a, b)
		}
		if y == hi {
			return math.NaN()
		}
		x, fx = y, fy
	}
}

// scanStep is solveFirst's step, in u = log(1+T): 5% of the depth, finer
// than the spacing of the depths a reach interval is read at and a tenth
// of the distance of a typical interval end from the point answer.
const scanStep = 0.05

// solveJoinedFirst is solveFirst on a joined curve (see solveJoined): the
// first crossing at or after start, searched on the rarefied side up to N
// and then, if none is there, on the extrapolated side from N.
func (cv Curve) solveJoinedFirst(f func(float64) float64, target, lo, scale, maxT, start float64) float64 {
	n := float64(cv.Counts.Reads()) / scale
	if cv.Model == nil {
		return solveFirst(f, target, lo, math.Min(maxT, n), start)
	}
	if !(n > lo && n < maxT) {
		return solveFirst(f, target, lo, maxT, start)
	}
	if !(start >= n) {
		if r := solveFirst(f, target, lo, n, start); !math.IsNaN(r) {
			return r
		}
		start = n
	}
	return solveFirst(f, target, n, maxT, start)
}

// solveGuess is solveIncreasing searched from a guess x0 (solveNear), with
// f0 = f(x0) when known (NaN when not); a guess outside [lo, hi], NaN
// included, is no guess.
func solveGuess(f func(float64) float64, target, lo, hi, x0, f0 float64) float64 {
	if !(x0 >= lo && x0 <= hi) {
		return solveIncreasing(f, target, lo, hi)
	}
	if math.IsNaN(f0) {
		f0 = f(x0)
	}
	return solveNear(f, target, lo, hi, x0, f0)
}

// mirrorGuess guesses an interval's second end from its point answer r and
// first end e: as far from r on the other side, in u = log(1+T).
func mirrorGuess(r, e float64) float64 {
	return math.Expm1(2*math.Log1p(r) - math.Log1p(e))
}

// bracketStep is solveNear's first step from its guess, in u = log(1+T):
// about 5% of the depth, the usual distance of a reach interval's end from
// the point answer being a few times that.
const bracketStep = 0.05

// narrowRoot narrows the bracket a < root ≤ b of solveIncreasing (f(a) =
// fa < target ≤ f(b) = fb) to at most half a read by Brent's method
// (Brent 1973, ch. 4: inverse quadratic or secant steps, a halving when
// they would not shrink the bracket fast enough), on the scale
// u = log(1+T), where the curves' depth dependence is close to a power
// law. A value at or above the target counts as the upper side (so the
// bracket keeps solveIncreasing's meaning), and a NaN stops the
// narrowing: bisection then evaluates every midpoint inside what is left,
// as plain bisection would.
func narrowRoot(f func(float64) float64, target, a, fa, b, fb float64) (float64, float64) {
	// Brent's names: b the best estimate, c the other end of the bracket,
	// a the previous b.
	lo, hi := a, b
	ua, ub := math.Log1p(a), math.Log1p(b)
	ga, gb := fa-target, fb-target
	uc, gc := ua, ga
	d := ub - ua
	e := d
	if math.IsNaN(ga) || math.IsNaN(gb) {
		return a, b
	}
	for i := 0; i < searchIter; i++ {
		if (gb >= 0) == (gc >= 0) {
			uc, gc = ua, ga
			d = ub - ua
			e = d
		}
		if math.Abs(gc) < math.Abs(gb) {
			ua, ub, uc = ub, uc, ub
			ga, gb, gc = gb, gc, gb
		}
		tb, tc := math.Expm1(ub), math.Expm1(uc)
		if gb >= 0 {
			lo, hi = tc, tb
		} else {
			lo, hi = tb, tc
		}
		if hi-lo <= 0.5 || gb == 0 {
			break
		}
		// The smallest step: a tenth of a read at b, in u.
		tol := 2*epsU*math.Abs(ub) + 0.1/(1+tb)
		xm := (uc - ub) / 2
		if math.Abs(e) >= tol && math.Abs(ga) > math.Abs(gb) && isFinite(ga) && isFinite(gb) && isFinite(gc) {
			var p, q float64
			s := gb / ga
			if ua == uc {
				p, q = 2*xm*s, 1-s
			} else {
				qq, r := ga/gc, gb/gc
				p = s * (2*xm*qq*(qq-r) - (ub-ua)*(r-1))
				q = (qq - 1) * (r - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			}
			p = math.Abs(p)
			if 2*p < math.Min(3*xm*q-math.Abs(tol*q), math.Abs(e*q)) {
				e, d = d, p/q
			} else {
				d, e = xm, xm
			}
		} else {
			d, e = xm, xm
		}
		ua, ga = ub, gb
		if math.Abs(d) > tol {
			ub += d
		} else {
			ub += math.Copysign(tol, xm)
		}
		x := math.Expm1(ub)
		if !(x > lo && x < hi) { // round-off at the ends: halve in T
			x = lo + (hi-lo)/2
			ub = math.Log1p(x)
		}
		gb = f(x) - target
		if math.IsNaN(gb) {
			break
		}
	}
	return lo, hi
}

// epsU is float64's relative precision, Brent's round-off term in u.
const epsU = 0x1p-52

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
	return cv.solveJoinedNear(f, target, lo, scale, maxT, math.NaN())
}

// solveJoinedNear is solveJoined with a guess at the answer (NaN for
// none), searched from there (solveNear); the answer does not depend on
// the guess. Each side of N being monotone, a guess on one side can settle
// which side holds the answer without f(N): at or below N and reaching
// the target, the target is reached at N too; above N and short of it,
// so is N.
func (cv Curve) solveJoinedNear(f func(float64) float64, target, lo, scale, maxT, guess float64) float64 {
	n := float64(cv.Counts.Reads()) / scale
	near := func(lo, hi, x0, f0 float64) float64 { return solveGuess(f, target, lo, hi, x0, f0) }
	if cv.Model == nil {
		// Only rarefaction is known: search up to N, not into NaN.
		return near(lo, math.Min(maxT, n), guess, math.NaN())
	}
	if !(n > lo && n < maxT) {
		return near(lo, maxT, guess, math.NaN())
	}
	fg := math.NaN()
	if guess >= lo && guess <= maxT {
		fg = f(guess)
		switch {
		case guess <= n && fg >= target:
			return near(lo, n, guess, fg)
		case guess >= n && !(fg >= target):
			return near(n, maxT, guess, fg)
		}
	}
	fn := f(n)
	if fn >= target {
		if guess >= lo && guess <= n {
			return near(lo, n, guess, fg)
		}
		return near(lo, n, n, fn)
	}
	if guess >= n && guess <= maxT {
		return near(n, maxT, guess, fg)
	}
	return near(n, maxT, n, fn)
}
