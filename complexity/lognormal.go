package complexity

import (
	"errors"
	"math"
)

// Poisson–lognormal model.
//
// The units' sampling rates λ (per N reads) are lognormal, log λ ~ N(μ, σ²);
// a unit is seen X ~ Poisson(λ) times, so
//
//	P(X = j) = ∫ e^{−λ} λ^j / j! · φ((log λ − μ)/σ) / σ  d log λ,
//
// evaluated as a sum over the fixed log-rate grid of mixture.go (step 0.1
// in log λ, |z| < lnZMax). μ and σ are fitted by maximum likelihood to the
// zero-truncated counts, classes above censorJ lumped or (free head,
// method "lognormal-h") left out and the rest conditioned on 1 ≤ X ≤ J
// (mixture.go), by Nelder–Mead on (μ, log σ) from three starts. With grid
// weights g_k the extrapolation is (gridModel)
//
//	D(sN) = D + a · Σ_k g_k (e^{−λ_k} − e^{−sλ_k}),
//
// a = D / Σ_k g_k (1 − e^{−λ_k}) for the censored fit, which makes it
// D · Σ g_k (1 − e^{−sλ_k}) / Σ g_k (1 − e^{−λ_k}).
//
// Valid for every t ≥ 0; bounded (Limit is the estimated library size).
// Returns an error when the table has fewer than two distinct units or no
// duplicate at all (the likelihood then has no interior maximum).
//
// References: Bulmer (1974), On fitting the Poisson lognormal distribution to
// species-abundance data, Biometrics 30:101; Preston (1948), Ecology 29:254.

// lnZMax bounds the lognormal weights to |z| < 6 (mass beyond: 2e−9).
const lnZMax = 6.0

// lognormal σ range: below lnSigmaMin the grid (step 0.1) cannot resolve
// the distribution (it is then a Poisson at one grid rate); above
// lnSigmaMax the fitted distribution spans more than the grid.
const (
	lnSigmaMin = 0.03
	lnSigmaMax = 6.0
)

// errNoFit is returned when a table cannot support a model fit.
var errNoFit = errors.New("complexity: too few distinct units or duplicates to fit")

type lnFit struct {
	k   *kernel
	hs  *hist
	g   []float64
	buf []float64
}

func (f *lnFit) weights(mu, sigma float64) (lo, hi int) {
	n := len(f.k.x)
	lo = int(math.Floor((mu - lnZMax*sigma - gridLo) / gridStep))
	hi = int(math.Ceil((mu+lnZMax*sigma-gridLo)/gridStep)) + 1
	if lo < 0 {
		lo = 0
	}
	if hi > n {
		hi = n
	}
	if lo >= hi {
		return 0, 0
	}
	gaussGrid(f.g[:hi-lo], f.k.x[lo:hi], mu, sigma)
	return lo, hi
}

// gaussAnchor is how often gaussGrid recomputes a value directly: the
// recurrence loses a few ulps a step, so 32 steps keep it within 1e-12
// relative of math.Exp at the grid's float64 points (most of which is the
// points' own rounding, amplified by |z|/σ), far below the likelihood's
// tolerance (nmTol).
const gaussAnchor = 32

// gaussGrid sets dst[i] = exp(−z_i²/2), z_i = (x[i] − μ)/σ, for x on the
// uniform grid of step gridStep, by the exact recurrence of a Gaussian on a lattice: with
// d = step/σ, u_{i+1} = u_i r_i, r_{i+1} = r_i e^{−d²}, r_i = e^{−z_i d − d²/2}.
// Two exponentials per gaussAnchor points instead of one per point (chainGrid):
// the weights were most of the cost of a lognormal fit.
func gaussGrid(dst, x []float64, mu, sigma float64) {
	// The nominal step, not x[1]-x[0]: grid points are float64 roundings of
	// a lattice, and their differences are off by up to 4e-15 absolute.
	d := gridStep / sigma
	chainGrid(dst[:len(x)], math.Exp(-d*d), func(i int) (float64, float64) {
		z := (x[i] - mu) / sigma
		return math.Exp(-0.5 * z * z), math.Exp(-z*d - 0.5*d*d)
	})
}

// chainGrid fills dst by blocks of gaussAnchor points: the block from
// point i starts at (u, r) = start(i) and goes on by u ← u·r, r ← r·q
// (gaussGrid's recurrence; powerGrid's with q = 1, where r·1 = r exactly).
// The blocks are independent chains of products, so four advance side by
// side in named variables, which the compiler keeps in registers: a step
// of one block is two multiplications, the second waiting on the first of
// the step before, so four blocks fill the multipliers. Each block's
// values are the one-at-a-time recurrence's, bit for bit
// (TestGridChainsSideBySide); the blocks that pad to four run into buf
// and are not copied.
func chainGrid(dst []float64, q float64, start func(i int) (u, r float64)) {
	const span = 4 * gaussAnchor
	n := len(dst)
	from := func(i int) (float64, float64) {
		if i < n {
			return start(i)
		}
		return 0, 0
	}
	var buf [span]float64
	for g := 0; g < n; g += span {
		u0, r0 := from(g)
		u1, r1 := from(g + gaussAnchor)
		u2, r2 := from(g + 2*gaussAnchor)
		u3, r3 := from(g + 3*gaussAnchor)
		buf[0], buf[gaussAnchor], buf[2*gaussAnchor], buf[3*gaussAnchor] = u0, u1, u2, u3
		for s := 1; s < gaussAnchor; s++ {
			u0 *= r0
			r0 *= q
			u1 *= r1
			r1 *= q
			u2 *= r2
			r2 *= q
			u3 *= r3
			r3 *= q
			buf[s], buf[gaussAnchor+s], buf[2*gaussAnchor+s], buf[3*gaussAnchor+s] = u0, u1, u2, u3
		}
		copy(dst[g:], buf[:])
	}
}

func (f *lnFit) nll(p []float64) float64 {
	mu, ls := p[0], p[1]
	sigma := math.Exp(ls)
	if !(sigma >= lnSigmaMin && sigma <= lnSigmaMax) || mu < gridLo || mu > gridHi {
		return math.Inf(1)
	}
	lo, hi := f.weights(mu, sigma)
	return gridNLL(f, lo, hi, lo < hi)
}

// fitLognormal fits the Poisson–lognormal model to c.
func fitLognormal(c Counts) (Model, error) {
	m, err := fitLognormalHist(newHist(c, censorJ), nil)
	if err != nil {
		return nil, err
	}
	return m, nil
}

// fitLognormalHist fits hs and returns a model that extrapolates from hs's
// depth. hint, when non-nil,
// gives starting parameters (μ, log σ) and a smaller initial simplex.
func fitLognormalHist(hs hist, hint []float64) (*gridModel, error) {
	if hs.d < 2 || hs.h[1] >= hs.d || (hs.free && hs.d-hs.tail < 2) {
		return nil, errNoFit
	}
	k := gridKernel(hs.J)
	f := &lnFit{k: k, hs: &hs, g: make([]float64, len(k.x)), buf: make([]float64, hs.J+1)}
	var best []float64
	bestV := math.Inf(1)
	if hint != nil {
		tol, ev := warmTol(hs.tight, 100)
		best, bestV = nelderMead(f.nll, hint, []float64{0.1, 0.05}, tol, ev)
	} else {
		// Starts: the mean count of seen units gives the scale; try a low,
		// middle and high spread, keep the best.
		mbar := math.Log(hs.n / hs.d)
		for _, s := range []float64{0.3, 1.0, 2.0} {
			x, v := nelderMead(f.nll, []float64{mbar - s*s/2 - 0.5, math.Log(s)}, []float64{0.5, 0.3}, nmTol, 400)
			if v < bestV {
				best, bestV = x, v
			}
		}
	}
	if math.IsInf(bestV, 1) || math.IsNaN(bestV) {
		return nil, errNoFit
	}
	mu, sigma := best[0], math.Exp(best[1])
	lo, hi := f.weights(mu, sigma)
	g := append([]float64(nil), f.g[:hi-lo]...)
	// The model extrapolates from hs's own depth and distinct count.
	name := "lognormal"
	if hs.free {
		name = "lognormal-h"
	}
	m := newGridModel(name, &hs, k, lo, hi, g, []float64{mu, best[1]})
	m.ll = -bestV * hs.d
	return m, nil
}

// ln2ExploreEvals and ln2ExploreTol bound the exploration from each start
// of the two-lognormal fit before the best is polished to nmTol; chosen
// on the accuracy benchmark's calibration seed (the reporting table was
// unchanged, BENCHMARKS.md).
const (
	ln2ExploreEvals = 300
	ln2ExploreTol   = 1e-6
)

// nmTol is the Nelder–Mead stopping tolerance on the per-unit negative
// log-likelihood: 1e−9 per unit is far below the change a 1% shift of any
// parameter makes for tables of 100+ units.
const nmTol = 1e-9

// Two-component Poisson–lognormal mixture.
//
// log λ follows w·N(μ1, σ1²) + (1−w)·N(μ2, σ2²): two populations of
// molecules or taxa (a rare subpopulation, early-amplified jackpots), and a
// flexible shape for skewed single populations. Fitted like the single
// lognormal (same grid, censoring and extrapolation), by Nelder–Mead on
// (μ1, log σ1, μ2, log σ2, logit w) from starts derived from the single
// fit. Reference: as for the single lognormal; finite Poisson mixtures in
// species estimation: Bunge & Fitzpatrick (1993), JASA 88:364.
type ln2Fit struct {
	lnFit
	g2 []float64
}

func (f *ln2Fit) weights2(p []float64) (lo, hi int, ok bool) {
	mu1, s1, mu2, s2 := p[0], math.Exp(p[1]), p[2], math.Exp(p[3])
	w := 1 / (1 + math.Exp(-p[4]))
	for _, s := range []float64{s1, s2} {
		if !(s >= lnSigmaMin && s <= lnSigmaMax) {
			return 0, 0, false
		}
	}
	if mu1 < gridLo || mu1 > gridHi || mu2 < gridLo || mu2 > gridHi || !(w > 1e-6 && w < 1-1e-6) {
		return 0, 0, false
	}
	n := len(f.k.x)
	clamp := func(v int) int { return max(0, min(n, v)) }
	lo = clamp(int(math.Floor((math.Min(mu1-lnZMax*s1, mu2-lnZMax*s2) - gridLo) / gridStep)))
	hi = clamp(int(math.Ceil((math.Max(mu1+lnZMax*s1, mu2+lnZMax*s2)-gridLo)/gridStep)) + 1)
	if lo >= hi {
		return 0, 0, false
	}
	g := f.g[:hi-lo]
	gaussGrid(g, f.k.x[lo:hi], mu1, s1)
	gaussGrid(f.g2[:hi-lo], f.k.x[lo:hi], mu2, s2)
	var a, b float64
	for i := range g {
		a += g[i]
		b += f.g2[i]
	}
	if !(a > 0 && b > 0) {
		return 0, 0, false
	}
	for i := range g {
		g[i] = w*g[i]/a + (1-w)*f.g2[i]/b
	}
	return lo, hi, true
}

func (f *ln2Fit) nll(p []float64) float64 {
	lo, hi, ok := f.weights2(p)
	return gridNLL(&f.lnFit, lo, hi, ok)
}

// fitLognormal2Hist fits the two-component mixture to hs; single, when
// non-nil, is the single-lognormal fit (μ, log σ) used for starts; hint,
// when non-nil, is a previous five-parameter fit (warm start).
func fitLognormal2Hist(hs hist, single, hint []float64) (*gridModel, error) {
	if hs.d < 2 || hs.h[1] >= hs.d || (hs.free && hs.d-hs.tail < 2) {
		return nil, errNoFit
	}
	k := gridKernel(hs.J)
	f := &ln2Fit{lnFit: lnFit{k: k, hs: &hs, g: make([]float64, len(k.x)), buf: make([]float64, hs.J+1)}, g2: make([]float64, len(k.x))}
	var best []float64
	bestV := math.Inf(1)
	if hint != nil {
		tol, ev := warmTol(hs.tight, 300)
		best, bestV = nelderMead(f.nll, hint, []float64{0.1, 0.05, 0.1, 0.05, 0.2}, tol, ev)
	} else {
		if single == nil {
			m, err := fitLognormalHist(hs, nil)
			if err != nil {
				return nil, err
			}
			single = m.params
		}
		mu, ls := single[0], single[1]
		s := math.Exp(ls)
		starts := [][]float64{
			{mu + 0.1, ls, mu - 0.1, ls, 0},
			{mu + s, ls - 0.7, mu - s, ls - 0.7, 0},
			{mu, ls, mu - 2*s - 1, ls, 2},
			{mu, ls - 0.3, mu + 2*s + 1, ls - 0.3, 2},
		}
		// Explore every start briefly, then polish the best: the starts
		// only have to find the right basin, and a full descent from each
		// was most of the cost of the whole estimate.
		for _, x0 := range starts {
			x, v := nelderMead(f.nll, x0, []float64{0.5, 0.3, 0.5, 0.3, 1}, ln2ExploreTol, ln2ExploreEvals)
			if v < bestV {
				best, bestV = x, v
			}
		}
		if best != nil {
			best, bestV = nelderMead(f.nll, best, []float64{0.1, 0.06, 0.1, 0.06, 0.2}, nmTol, 2000)
		}
	}
	if math.IsInf(bestV, 1) || math.IsNaN(bestV) {
		return nil, errNoFit
	}
	lo, hi, _ := f.weights2(best)
	g := append([]float64(nil), f.g[:hi-lo]...)
	name := "lognormal2"
	if hs.free {
		name = "lognormal2-h"
	}
	m := newGridModel(name, &hs, k, lo, hi, g, append([]float64(nil), best...))
	m.ll = -bestV * hs.d
	return m, nil
}

// nmTolRefit is the looser tolerance of warm-started bootstrap refits: a
// replicate's sampling spread is orders of magnitude larger than the
// parameter error 1e−6 per unit leaves.
const nmTolRefit = 1e-6

// warmTol returns the tolerance and evaluation cap of a warm-started
// descent whose bootstrap refit is capped at evals: with tight (the
// backtest, hist.tight) the first fit's nmTol and four times the cap, so
// that one descent from a start near the optimum ends where the first
// fit's three starts would.
func warmTol(tight bool, evals int) (float64, int) {
	if tight {
		return nmTol, 4 * evals
	}
	return nmTolRefit, evals
}
