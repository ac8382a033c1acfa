package complexity

import (
	"math"
	"sort"
	"sync"

	"gonum.org/v1/gonum/mathext"
)

// This file holds the machinery shared by the Poisson-mixture models
// (lognormal.go, ztnb.go, the grid mixture below): a censored frequency
// histogram, a fixed log-rate grid with its Poisson kernel, a small
// Nelder–Mead minimiser, and the grid-mixture Model.
//
// Notation. A unit with sampling rate λ (expected reads per N reads, N the
// observed depth) is seen X ~ Poisson(λ) times (Poisson sampling). If the
// rates of the library's units follow a distribution G, the expected
// distinct units after t·N reads is
//
//	D(tN) = U · (1 − L(t)),   L(t) = ∫ e^{−tλ} dG(λ),
//
// and since U·(1 − L(1)) = D is what was observed,
//
//	D(tN) = D · (1 − L(t)) / (1 − L(1)).
//
// G is fitted by maximum likelihood to the zero-truncated counts (the unseen
// units leave no row). References: Bunge & Fitzpatrick (1993), Estimating
// the number of species: a review, JASA 88:364; Sanathanan (1972), Ann Math
// Stat 43:142 (conditional likelihood of truncated counts).

// censorJ is the count above which units are lumped into one right-censored
// class ("seen more than censorJ times") in the likelihoods. The rates of
// such units are so high that e^{-tλ} ≈ 0 for every t >= 1, so their exact
// counts say nothing about growth; fitting them exactly lets a heavy upper
// tail (jackpots, Zipf-like heads) distort the low end, which is what
// governs extrapolation. 15 was chosen on the calibration set of the
// accuracy benchmark (scripts/accuracy -seed 2): median |error| at 10× /
// 100× was 0.9/2.9% for 8, 0.9/2.6% for 10, 0.8/2.1% for 15, 0.9/2.3% for
// 20, 0.9/2.4% for 30, 0.9/1.9% for 60, with the smallest 90th percentile
// at 10× (6.6%) for 15.
var censorJ = 15

// hist is a frequency histogram with classes above J lumped: h[j] for
// j = 1..J, tail = units seen more than J times. Counts are float64 so that
// fractional (expected) tables can be fitted too.
type hist struct {
	J    int
	free bool // free head: condition on 1 <= X <= J (see mixLogLik)
	// tight: a warm start descends to nmTol (the backtest's refit, whose
	// start is only near the optimum), not to nmTolRefit (warmTol).
	tight bool
	h     []float64 // len J+1; h[0] unused
	tail  float64
	d     float64 // distinct = sum h + tail
	n     float64 // reads
}

// newHist builds the censored histogram of c.
func newHist(c Counts, J int) hist {
	hs := hist{J: J, h: make([]float64, J+1), n: float64(c.Reads()), d: float64(c.Distinct())}
	for _, cl := range c.classes {
		if cl.Times <= int64(J) {
			hs.h[cl.Times] += float64(cl.Units)
		} else {
			hs.tail += float64(cl.Units)
		}
	}
	return hs
}

func lgam(x float64) float64 {
	v, _ := math.Lgamma(x)
	return v
}

// The log-rate grid: x_k = gridLo + k·gridStep, λ_k = e^{x_k}. Rates are per
// N reads. gridLo = −15 (λ ≈ 3e−7) is far below what any extrapolation to
// 1000× can see (such units add < 3e−4 expected sightings each); gridHi = 10
// (λ ≈ 22000) is far above censorJ. The step 0.1 is about half the width
// of the narrowest Poisson kernel that matters (j = 30: sd of log λ ≈
// 1/√30 ≈ 0.18); sums of such smooth integrands on a uniform grid converge
// much faster than the step suggests (trapezoid rule on near-Gaussian
// integrands), and the tests compare them with scipy quadrature to 1e−5.
const (
	gridLo   = -15.0
	gridHi   = 10.0
	gridStep = 0.1
)

// kernel holds Poisson probabilities on the grid for one censoring point J.
type kernel struct {
	J    int
	x    []float64   // log rates
	lam  []float64   // rates
	seen []float64   // 1 − e^{−λ}
	p    [][]float64 // p[k][j] = Poisson(j; λ_k), j = 0..J
	tail []float64   // P(X > J | λ_k)
	// rows15, for J = 15 only: per grid point the 17 values mixLogLik
	// sums, P(1..15 | λ_k), P(X > 15 | λ_k), 1 − e^{−λ_k}, contiguous.
	rows15 []float64
	// pin[k] = P(1 ≤ X ≤ J | λ_k), summed directly (what a free head
	// conditions on); freeHi is one past the last grid point where it is
	// at least freeNegligible. rowsFree15, for J = 15: rows15 with
	// pin[k] in place of the tail (same stride, row15).
	pin        []float64
	freeHi     int
	rowsFree15 []float64
	// cellLo, cellHi: x ∓ step/2, the edges of each grid point's cell;
	// shareIn: the share of a cell inside a power-law band that covers it,
	// min(1, (cellHi − cellLo)/step) (not exactly 1 in float64).
	cellLo, cellHi, shareIn []float64
}

// freeNegligible is the P(1 ≤ X ≤ J | λ) below which a grid point is left
// out of free-head likelihoods (mixLogLik with hist.free) and curves. Such
// a point lies far above J (for J = 15, λ > 130, log λ > 4.9). A left-out
// point changes a class probability P(j) = Σ_k g_k P(j | λ_k) by less
// than g_k·freeNegligible: the weights of every family are at most e^{25}
// times their largest value below the cut (the power law with α = −1 over
// the whole grid; lognormal weights peak at 1), so by less than 1e−29
// absolute per point, while every P(j) of an observed class is at least
// the cutoff cell's P(1 | λ) ≥ 3e−7 (λ at gridLo): 1e−21 relative, five
// orders below float64 rounding.
const freeNegligible = 1e-40

var (
	kernelMu    sync.Mutex
	kernelCache = map[int]*kernel{}
)

// gridKernel returns the (shared, read-only) kernel for censoring point J.
func gridKernel(J int) *kernel {
	kernelMu.Lock()
	defer kernelMu.Unlock()
	if k, ok := kernelCache[J]; ok {
		return k
	}
	n := int(math.Round((gridHi-gridLo)/gridStep)) + 1
	k := &kernel{J: J, x: make([]float64, n), lam: make([]float64, n), seen: make([]float64, n), p: make([][]float64, n), tail: make([]float64, n)}
	for i := 0; i < n; i++ {
		x := gridLo + float64(i)*gridStep
		l := math.Exp(x)
		k.x[i], k.lam[i], k.seen[i] = x, l, -math.Expm1(-l)
		row := make([]float64, J+1)
		for j := 0; j <= J; j++ {
			row[j] = math.Exp(float64(j)*x - l - lgam(float64(j)+1))
		}
		k.p[i] = row
		// P(X > J) = P(J+1, λ), the lower regularised incomplete gamma.
		k.tail[i] = mathext.GammaIncReg(float64(J+1), l)
	}
	k.pin = make([]float64, n)
	for i, row := range k.p {
		var s float64
		for j := 1; j <= J; j++ {
			s += row[j]
		}
		k.pin[i] = s
	}
	k.cellLo, k.cellHi, k.shareIn = make([]float64, n), make([]float64, n), make([]float64, n)
	for i, x := range k.x {
		k.cellLo[i], k.cellHi[i] = x-gridStep/2, x+gridStep/2
		k.shareIn[i] = fmax(0, fmin(1, (k.cellHi[i]-k.cellLo[i])/gridStep))
	}
	k.freeHi = n
	for k.freeHi > 0 && k.pin[k.freeHi-1] < freeNegligible {
		k.freeHi--
	}
	if J == 15 {
		// Each ends in rowPad zeros: the vector kernel of mixSums15 reads
		// whole vectors, past the last row's 17 values.
		k.rows15 = make([]float64, 0, n*row15+rowPad)
		for i := 0; i < n; i++ {
			k.rows15 = append(k.rows15, k.p[i][1:]...)
			k.rows15 = append(k.rows15, k.tail[i], k.seen[i])
		}
		k.rows15 = append(k.rows15, make([]float64, rowPad)...)
		k.rowsFree15 = make([]float64, 0, n*row15+rowPad)
		for i := 0; i < n; i++ {
			k.rowsFree15 = append(k.rowsFree15, k.p[i][1:]...)
			k.rowsFree15 = append(k.rowsFree15, k.pin[i], k.seen[i])
		}
		k.rowsFree15 = append(k.rowsFree15, make([]float64, rowPad)...)
	}
	kernelCache[J] = k
	return k
}

// row15 is the stride of kernel.rows15.
const row15 = 17

// mixLogLik is the zero-truncated, censored log-likelihood of hs under the
// grid mixture with (unnormalised) weights g on grid indices lo..hi-1:
//
//	ℓ = Σ_{j≤J} h_j log P(j) + tail·log P(X>J) − D·log(1 − P(0)).
//
// With hs.free (a free head) the units seen more than J times are left out
// and the counts are conditioned on 1 ≤ X ≤ J instead:
//
//	ℓ = Σ_{j≤J} h_j log P(j) − (D − tail)·log P(1 ≤ X ≤ J).
//
// It is invariant to the scale of g. Returns −Inf when a class with units
// has zero probability.
//
// The sums over the grid are the cost of every mixture fit; for the
// censoring point in use (J = 15, censorJ) mixSums15 does them with the
// accumulators in registers, same operations in the same order.
func mixLogLik(k *kernel, hs *hist, g []float64, lo, hi int, buf []float64) float64 {
	pj := buf[:hs.J+1]
	if hs.free {
		// Only the points below freeHi, and P(1 ≤ X ≤ J) summed directly
		// (kernel.pin) rather than as P(X ≥ 1) − P(X > J), which would
		// cancel where much weight lies above J.
		hi = min(hi, k.freeHi)
		if lo >= hi {
			return math.Inf(-1)
		}
		pin, _ := gridSums(k, k.rowsFree15, k.pin, g, lo, hi, pj)
		ll, ok := classLogLik(hs, pj)
		if !ok || !(pin > 0) {
			return math.Inf(-1)
		}
		return ll - (hs.d-hs.tail)*math.Log(pin)
	}
	pt, ps := gridSums(k, k.rows15, k.tail, g, lo, hi, pj)
	ll, ok := classLogLik(hs, pj)
	if !ok || !(ps > 0) {
		return math.Inf(-1)
	}
	if hs.tail > 0 {
		if pt <= 0 {
			return math.Inf(-1)
		}
		ll += hs.tail * math.Log(pt)
	}
	return ll - hs.d*math.Log(ps)
}

// gridSums sets pj[j] = Σ_i g_i P(j | λ_i), j = 1..J, over grid points
// lo..hi-1 and returns Σ_i g_i x_i and Σ_i g_i (1 − e^{−λ_i}); rows are
// the kernel's contiguous J = 15 rows holding x in column 15 (mixSums15),
// used when J = 15.
func gridSums(k *kernel, rows, x, g []float64, lo, hi int, pj []float64) (sx, ps float64) {
	if k.J == 15 && rows != nil {
		return mixSums15(rows, g[:hi-lo], lo, pj)
	}
	for j := range pj {
		pj[j] = 0
	}
	for i := lo; i < hi; i++ {
		w := g[i-lo]
		if w == 0 {
			continue
		}
		row := k.p[i]
		for j := 1; j <= k.J; j++ {
			pj[j] += float64(w * row[j]) // rounded, not fused: as mixSums15
		}
		sx += float64(w * x[i])
		ps += float64(w * k.seen[i])
	}
	return sx, ps
}

// classLogLik is Σ_{j≤J} h_j log pj[j]; false when a class with units
// has zero probability.
func classLogLik(hs *hist, pj []float64) (float64, bool) {
	ll := 0.0
	for j := 1; j <= hs.J; j++ {
		if hs.h[j] > 0 {
			if pj[j] <= 0 {
				return 0, false
			}
			ll += hs.h[j] * math.Log(pj[j])
		}
	}
	return ll, true
}

// gridModel is a fitted rate distribution on the log-rate grid:
//
//	D(sN) = D + a · Σ_k g_k (e^{−λ_k} − e^{−sλ_k}),
//
// where a scales the weights to units: a = D / Σ g_k(1−e^{−λ_k}) for the
// censored fit, a = (D − n_{>J}) / Σ g_k P(1≤X≤J | λ_k) for a free head
// (new units all come from the fitted part; the head is seen already).
type gridModel struct {
	name   string
	n, d   float64 // reads and distinct the curve starts from
	lam    []float64
	g      []float64 // weights, same length as lam
	ge     []float64 // g_k e^{−λ_k}, what Distinct and Limit sum (nil: computed there)
	a      float64   // units per unit weight
	params []float64 // fitted parameters (for warm starts), model-specific
	ll     float64   // maximised log-likelihood
}

func newGridModel(name string, hs *hist, k *kernel, lo, hi int, g []float64, params []float64) *gridModel {
	m := &gridModel{name: name, n: hs.n, d: hs.d, params: params}
	var ps, pt, pin float64
	if hs.free {
		hi = min(hi, k.freeHi) // as mixLogLik with a free head
	}
	for i := lo; i < hi; i++ {
		if g[i-lo] > 0 {
			m.lam = append(m.lam, k.lam[i])
			m.g = append(m.g, g[i-lo])
			ps += g[i-lo] * k.seen[i]
			pt += g[i-lo] * k.tail[i]
			pin += g[i-lo] * k.pin[i]
		}
	}
	m.ge = make([]float64, len(m.g))
	for i, w := range m.g {
		m.ge[i] = w * math.Exp(-m.lam[i])
	}
	if hs.free {
		m.a = (hs.d - hs.tail) / pin
	} else {
		m.a = hs.d / ps
	}
	if !(m.a > 0) || math.IsInf(m.a, 0) {
		m.a = missing
	}
	return m
}

func (m *gridModel) Name() string { return m.name }

// Distinct returns the expected distinct units after t reads.
func (m *gridModel) Distinct(t float64) float64 {
	if !(t >= 0) || math.IsInf(t, 0) || math.IsNaN(m.a) {
		return missing
	}
	s1 := t/m.n - 1
	var v float64
	if len(m.ge) == len(m.lam) {
		ge := m.ge[:len(m.lam)]
		for i, l := range m.lam {
			switch x := s1 * l; {
			case ge[i] == 0: // adds +0
			case x >= expm1Saturated:
				v += ge[i] // × −Expm1(−x) = 1 exactly
			default:
				v += ge[i] * -math.Expm1(-x)
			}
		}
	} else {
		for i, l := range m.lam {
			v += m.g[i] * math.Exp(-l) * -math.Expm1(-s1*l)
		}
	}
	return m.d + m.a*v
}

// mixtureCurve reports whether m's curve is a Poisson mixture with
// weights and rates that are finite and non-negative (and a finite
// non-negative scale): D(t) = d + a Σ w_k (1 − e^{−(t/n − 1) λ_k}), a sum
// of increasing concave functions of t, finite everywhere.
func (m *gridModel) mixtureCurve() bool {
	if !(m.a >= 0 && m.a <= math.MaxFloat64) || !isFinite(m.d) || !(m.n > 0 && m.n <= math.MaxFloat64) {
		return false
	}
	w := m.ge
	if len(w) != len(m.lam) {
		w = m.g
	}
	for i, l := range m.lam {
		if !(l >= 0 && l <= math.MaxFloat64) || !(w[i] >= 0 && w[i] <= math.MaxFloat64) {
			return false
		}
	}
	return true
}

// passesBeyond says whether admissibleFrom, having passed its first grid
// point T1 with value v1, is sure to pass every later one, for a curve
// with mixtureCurve true, so the rest need not be evaluated: the answer is
// admissibleFrom's own.
//
// Such a curve is finite everywhere, never decreases and is concave, so of
// admissibleFrom's checks only "more new units than new reads" (g(T) =
// D(T) − d − (T − n) > tol) can fail beyond T1: a computed value is within
// about 1e−14 of D relative (a sum of at most a few hundred terms, each to
// an ulp), the decrease check allows 1e−9 relative and the convexity check
// 1e−9 absolute in slope, against a slope round-off of at most 2e−14·v/ΔT
// ≤ 4e−12 (v ≤ T; grid steps ΔT ≥ 0.0058·T, admissGrid points over at
// least a doubling). And if g(T1) < 0 and D's slope beyond T1 is at most
// 1, g only falls beyond T1: by concavity that slope is at most the chord's
// (D(T1) − D(m.n))/(T1 − m.n), D(m.n) = m.d. Both are asked with margins of
// 1e−9 (relative, and in slope) over that round-off.
func (m *gridModel) passesBeyond(t1, v1, n, d float64) bool {
	const margin = 1e-9
	if !(t1 > m.n) {
		return false
	}
	chord := (v1 - m.d) / (t1 - m.n)
	return chord <= 1-margin && v1-d-(t1-n) <= -margin*math.Max(1, v1)
}

// expm1Saturated is where math.Expm1(−x) is −1 exactly: Go's expm1
// returns −1 for x ≥ 56·ln 2 (its Ln2X56; the true value is −1 + e^{−x},
// below half an ulp of 1), so a term weighted by −Expm1(−x) is its weight,
// bit for bit, and the call can be skipped.
const expm1Saturated = 3.88162421113569373274e+01 // Ln2X56 of math/expm1.go

// Limit returns the estimated number of units in the library (seen or not).
func (m *gridModel) Limit() (float64, bool) {
	if math.IsNaN(m.a) {
		return missing, false
	}
	var s float64
	for i, w := range m.g {
		if len(m.ge) == len(m.g) {
			s += m.ge[i]
		} else {
			s += w * math.Exp(-m.lam[i])
		}
	}
	return m.d + m.a*s, true
}

// nelderMead minimises f from x0 with initial steps step, stopping when the
// simplex's function values agree within ftol (absolute) or after maxEval
// evaluations. It never panics; f may return +Inf for infeasible points.
// Reference: Nelder & Mead (1965), Computer Journal 7:308; coefficients
// (1, 2, 0.5, 0.5) as there.
func nelderMead(f func([]float64) float64, x0, step []float64, ftol float64, maxEval int) ([]float64, float64) {
	n := len(x0)
	pts := make([][]float64, n+1)
	fv := make([]float64, n+1)
	for i := range pts {
		p := append([]float64(nil), x0...)
		if i > 0 {
			p[i-1] += step[i-1]
		}
		pts[i] = p
		fv[i] = f(p)
	}
	evals := n + 1
	idx := make([]int, n+1)
	cen := make([]float64, n)
	xr := make([]float64, n)
	xe := make([]float64, n)
	xc := make([]float64, n)
	for evals < maxEval {
		for i := range idx {
			idx[i] = i
		}
		sort.Slice(idx, func(a, b int) bool { return fv[idx[a]] < fv[idx[b]] })
		best, worst, second := idx[0], idx[n], idx[n-1]
		if math.Abs(fv[worst]-fv[best]) <= ftol && !math.IsInf(fv[worst], 1) {
			break
		}
		for d := 0; d < n; d++ {
			cen[d] = 0
			for _, i := range idx[:n] {
				cen[d] += pts[i][d]
			}
			cen[d] /= float64(n)
		}
		for d := 0; d < n; d++ {
			xr[d] = cen[d] + (cen[d] - pts[worst][d])
		}
		fr := f(xr)
		evals++
		switch {
		case fr < fv[best]:
			for d := 0; d < n; d++ {
				xe[d] = cen[d] + 2*(cen[d]-pts[worst][d])
			}
			fe := f(xe)
			evals++
			if fe < fr {
				copy(pts[worst], xe)
				fv[worst] = fe
			} else {
				copy(pts[worst], xr)
				fv[worst] = fr
			}
		case fr < fv[second]:
			copy(pts[worst], xr)
			fv[worst] = fr
		default:
			if fr < fv[worst] {
				for d := 0; d < n; d++ {
					xc[d] = cen[d] + 0.5*(xr[d]-cen[d])
				}
			} else {
				for d := 0; d < n; d++ {
					xc[d] = cen[d] + 0.5*(pts[worst][d]-cen[d])
				}
			}
			fc := f(xc)
			evals++
			if fc < math.Min(fr, fv[worst]) {
				copy(pts[worst], xc)
				fv[worst] = fc
			} else {
				for _, i := range idx[1:] {
					for d := 0; d < n; d++ {
						pts[i][d] = pts[best][d] + 0.5*(pts[i][d]-pts[best][d])
					}
					fv[i] = f(pts[i])
					evals++
				}
			}
		}
	}
	bi := 0
	for i := range fv {
		if fv[i] < fv[bi] {
			bi = i
		}
	}
	return pts[bi], fv[bi]
}

// Poisson–power-law (Pareto) model.
//
// Zipf-like libraries — abundance of the r-th most common unit ∝ r^{−s} —
// have rates with a power-law density above a cutoff, g(λ) ∝ λ^{−1−α} for
// λ ≥ λ_min (α = 1/s; Zipf 1949, Human Behavior and the Principle of Least
// Effort; the rate distribution of a Zipf ranking by the continuous
// approximation). On the log-rate grid the weight of log λ is ∝ e^{−αx} for
// x ≥ log λ_min, the cell holding the cutoff weighted by the share of it
// above the cutoff (so the likelihood is continuous in λ_min). Fitted and
// extrapolated like the lognormal (censoring, free head), by Nelder–Mead on
// (log λ_min, α), α in [paretoAlphaMin, paretoAlphaMax].
//
// Reference: Sichel (1975), On a distribution law for word frequencies,
// JASA 70:542 (Poisson mixtures for Zipf-like counts).
const (
	paretoAlphaMin = -1.0
	paretoAlphaMax = 6.0
)

// With a third parameter (log of the width log λ_max − log λ_min) the power
// law also has an upper cutoff: a band of rates, as left by amplification
// whose per-molecule efficiency varies (rates ∝ (1+e)^cycles).
type paretoFit struct{ lnFit }

func (f *paretoFit) weights(p []float64) (lo, hi int, ok bool) {
	a, alpha := p[0], p[1]
	b := gridHi + gridStep
	if len(p) > 2 {
		b = a + math.Exp(p[2])
		if !(p[2] > -3 && p[2] < 4) {
			return 0, 0, false
		}
	}
	if !(a > gridLo && a < gridHi-1) || !(alpha >= paretoAlphaMin && alpha <= paretoAlphaMax) {
		return 0, 0, false
	}
	n := len(f.k.x)
	// Cell i covers [x_i − step/2, x_i + step/2).
	lo = int(math.Floor((a-gridLo)/gridStep + 0.5))
	hi = int(math.Floor((b-gridLo)/gridStep+0.5)) + 1
	if lo < 0 {
		lo = 0
	}
	if hi > n {
		hi = n
	}
	if f.hs.free {
		hi = min(hi, f.k.freeHi) // the rest is not summed (mixLogLik)
	}
	if lo >= hi {
		return 0, 0, false
	}
	g := f.g[:hi-lo]
	// The weight e^{−α(x − a)} (scaled by e^{−α a} so weights stay near 1
	// at the cutoff) by the lattice recurrence w_{i+1} = w_i e^{−α·step},
	// recomputed directly every gaussAnchor points as in gaussGrid (the
	// per-point exponential was most of the cost of a power-law fit),
	// then times the share of the cell inside [a, b].
	powerGrid(g, f.k.x[lo:hi], alpha, a)
	// Share of a cell inside [a, b] (fmin and fmax: the values are
	// finite, a, b and the grid checked above). A cell inside has its
	// share precomputed (the same operations); as cellLo and cellHi
	// increase with i, the cells that a or b cut are the first ones
	// (a > cellLo) and the last ones (b < cellHi).
	k := f.k
	edge := func(i int) {
		share := (fmin(k.cellHi[i], b) - fmax(k.cellLo[i], a)) / gridStep
		g[i-lo] *= fmax(0, fmin(1, share))
	}
	i1 := lo
	for ; i1 < hi && a > k.cellLo[i1]; i1++ {
		edge(i1)
	}
	i2 := hi
	for i2 > i1 && b < k.cellHi[i2-1] {
		i2--
		edge(i2)
	}
	in := k.shareIn[i1:i2]
	for i, c := range in {
		g[i1-lo+i] *= c
	}
	return lo, hi, true
}

// powerGrid sets dst[i] = e^{−α(x[i] − a)} on the grid, a direct value
// every gaussAnchor points and w_{i+1} = w_i e^{−α·step} between them
// (chainGrid with a constant ratio).
func powerGrid(dst, x []float64, alpha, a float64) {
	r := math.Exp(-alpha * gridStep)
	chainGrid(dst[:len(x)], 1, func(i int) (float64, float64) {
		return math.Exp(-alpha * (x[i] - a)), r
	})
}

func (f *paretoFit) nll(p []float64) float64 {
	lo, hi, ok := f.weights(p)
	return gridNLL(&f.lnFit, lo, hi, ok)
}

// gridNLL is the per-unit negative log-likelihood of a grid mixture whose
// weights are in f.g[0:hi-lo] (+Inf when the weights are infeasible, !ok,
// or the likelihood is undefined): what Nelder–Mead minimises.
func gridNLL(f *lnFit, lo, hi int, ok bool) float64 {
	if !ok {
		return math.Inf(1)
	}
	ll := mixLogLik(f.k, f.hs, f.g, lo, hi, f.buf)
	if math.IsNaN(ll) {
		return math.Inf(1)
	}
	return -ll / f.hs.d
}

// fitParetoHist fits the power-law model to hs (hint: warm start); band
// adds the upper cutoff.
func fitParetoHist(hs hist, hint []float64, band bool) (*gridModel, error) {
	if hs.d < 2 || hs.h[1] >= hs.d || (hs.free && hs.d-hs.tail < 2) {
		return nil, errNoFit
	}
	k := gridKernel(hs.J)
	f := &paretoFit{lnFit{k: k, hs: &hs, g: make([]float64, len(k.x)), buf: make([]float64, hs.J+1)}}
	var best []float64
	bestV := math.Inf(1)
	if hint != nil {
		step := []float64{0.1, 0.05, 0.05}[:len(hint)]
		tol, ev := warmTol(hs.tight, 150)
		best, bestV = nelderMead(f.nll, hint, step, tol, ev)
	} else {
		mbar := math.Log(hs.n / hs.d)
		for _, st := range [][]float64{{mbar - 2, 1}, {mbar - 4, 0.5}, {mbar - 1, 2}} {
			step := []float64{0.5, 0.3}
			if band {
				st = append(st, math.Log(4))
				step = append(step, 0.5)
			}
			x, v := nelderMead(f.nll, st, step, nmTol, 800)
			if v < bestV {
				best, bestV = x, v
			}
		}
	}
	if math.IsInf(bestV, 1) || math.IsNaN(bestV) {
		return nil, errNoFit
	}
	lo, hi, _ := f.weights(best)
	g := append([]float64(nil), f.g[:hi-lo]...)
	name := "powerlaw"
	if band {
		name = "band"
	}
	if hs.free {
		name += "-h"
	}
	m := newGridModel(name, &hs, k, lo, hi, g, append([]float64(nil), best...))
	m.ll = -bestV * hs.d
	return m, nil
}

// fmin and fmax are math.Min and math.Max for finite operands that are
// not both zeros of opposite sign, where those give the same bits; unlike
// them they inline (math.Max is a call into assembly on amd64, 7% of a
// power-law fit).
func fmin(x, y float64) float64 {
	if y < x {
		return y
	}
	return x
}

func fmax(x, y float64) float64 {
	if y > x {
		return y
	}
	return x
}
