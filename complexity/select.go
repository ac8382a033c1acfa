package complexity

import (
	"errors"
	"math"
	"sort"
)

// Selection.
//
// The extrapolation is a Poisson-mixture model fitted by maximum likelihood
// to the counts of units seen 1..censorJ times (a free head: units seen
// more often are taken as already found; mixture.go). Five families are
// fitted — Poisson–lognormal, two-component Poisson–lognormal,
// zero-truncated negative binomial (gamma rates), power law above a cutoff
// (Zipf-like) and power law between two cutoffs (a band) — and the one
// with the smallest information criterion
//
//	pen·p − 2ℓ,   pen = criterionPenalty = 6,
//
// (Akaike 1974, IEEE Trans Autom Control 19:716, has pen = 2) is used,
// provided its curve is admissible over the depths asked for (isAdmissible:
// finite, non-decreasing, concave, no more new units than new reads).
// Mixture curves are admissible by construction (1 − L(t) is a Bernstein
// function), so the check guards numerical accidents.
//
// Fallback chain, when no mixture fits (fewer than two units seen 1..J
// times, or no duplicates) or none is admissible: the rational-function
// extrapolation (fitRFA: deepest admissible bounded approximant, then
// fewer terms, then unbounded ones); then the zero-truncated negative
// binomial fitted to every class; then the Chao1-based extrapolation of
// Shen, Chao & Lin (2003).
//
// Why the likelihood chooses and the self-backtest only reports: on the
// accuracy benchmark the backtest was a noisier selector than the
// criterion (BENCHMARKS.md, "Numbers behind the choices").

// candidate is one mixture family: its method name, whether it conditions
// on a free head, its number of parameters (for the criterion's bound
// below) and its fitter (hint: warm-start parameters or nil).
type candidate struct {
	name   string
	free   bool
	params int
	fit    func(hs hist, hint []float64) (Model, []float64, error)
}

func lnCand(hs hist, hint []float64) (Model, []float64, error) {
	m, err := fitLognormalHist(hs, hint)
	if err != nil {
		return nil, nil, err
	}
	return m, m.params, nil
}

func ln2Cand(hs hist, hint []float64) (Model, []float64, error) {
	m, err := fitLognormal2Hist(hs, nil, hint)
	if err != nil {
		return nil, nil, err
	}
	return m, m.params, nil
}

func plCand(hs hist, hint []float64) (Model, []float64, error) {
	m, err := fitParetoHist(hs, hint, false)
	if err != nil {
		return nil, nil, err
	}
	return m, m.params, nil
}

func bandCand(hs hist, hint []float64) (Model, []float64, error) {
	m, err := fitParetoHist(hs, hint, true)
	if err != nil {
		return nil, nil, err
	}
	return m, m.params, nil
}

func nbCand(hs hist, hint []float64) (Model, []float64, error) {
	m, err := fitZTNBHist(hs, hint)
	if err != nil {
		return nil, nil, err
	}
	return m, m.params(), nil
}

// candidates are the fits Baseline offers; extrapolate compares those
// in selected. The censored variants (no free head) are for diagnostics:
// alone, none beat its free-head form on the benchmark.
var candidates = []candidate{
	{"lognormal-h", true, 2, lnCand},
	{"lognormal2-h", true, 5, ln2Cand},
	{"ztnb-h", true, 2, nbCand},
	{"powerlaw-h", true, 2, plCand},
	{"band-h", true, 3, bandCand},
	{"lognormal", false, 2, lnCand},
	{"lognormal2", false, 5, ln2Cand},
	{"ztnb-c", false, 2, nbCand},
}

// selected are the names of the candidates extrapolate compares.
var selected = map[string]bool{"lognormal-h": true, "lognormal2-h": true, "ztnb-h": true, "powerlaw-h": true, "band-h": true}

// fitCost orders the selected candidates cheapest first (CPU per fit on
// the dense benchmark table, BENCHMARKS.md): the cheap fits set the
// criterion that lets the saturation bound skip the dear ones. Families
// not listed come last, in the order of candidates.
var fitCost = map[string]int{"ztnb-h": 0, "lognormal-h": 1, "powerlaw-h": 2, "band-h": 3, "lognormal2-h": 4}

// criterionPenalty is the information criterion's charge per parameter,
// pen·p − 2ℓ (Akaike's is 2): a larger charge keeps the three-parameter
// band from displacing the lognormal and gamma fits on narrow libraries
// (chosen among 2, 6 and 12 on the calibration set; BENCHMARKS.md).
const criterionPenalty = 6.0

// criterion returns the information criterion of a mixture fit (lower is
// better): criterionPenalty per parameter minus twice the log-likelihood.
func criterion(m Model) float64 {
	pen := criterionPenalty
	switch mm := m.(type) {
	case *gridModel:
		return pen*float64(len(mm.params)) - 2*mm.ll
	case *ztnbModel:
		return pen*2 - 2*mm.ll
	}
	return math.Inf(1)
}

// The saturation bound. With a free head every family's likelihood is
// that of a multinomial over the classes 1..J with cell probabilities
// q_j = P(j)/P(1 ≤ X ≤ J) (mixLogLik), and no choice of q beats the
// observed shares h_j/H, H = Σ_{j≤J} h_j (Gibbs' inequality):
//
//	ℓ ≤ ℓ_sat = Σ_j h_j log(h_j/H).
//
// So a family with p parameters has criterion at least pen·p − 2ℓ_sat,
// and when that exceeds what the selection can still use — the best
// admissible criterion so far plus reselectGap — the family need not be
// fitted: it could neither be chosen nor be kept for the bootstrap's
// reselection. Reference: the saturated model of McCullagh & Nelder
// (1989), Generalized Linear Models, §2.3 (deviance = 2(ℓ_sat − ℓ) ≥ 0).
// Censored fits (no free head) get no bound (−Inf: always fitted).

// satSlack absorbs float64 rounding in a fitted ℓ that is within a few
// ulps of ℓ_sat (a fit that reproduces the shares exactly): 1e−9
// relative is 1e6 ulps, far below any criterion difference that decides.
const satSlack = 1e-9

// critBound is the lowest criterion a p-parameter fit of hs can have.
func critBound(hs *hist, p int) float64 {
	if !hs.free {
		return math.Inf(-1)
	}
	H := hs.d - hs.tail
	var l float64
	for j := 1; j <= hs.J; j++ {
		if h := hs.h[j]; h > 0 {
			l += h * math.Log(h/H)
		}
	}
	b := criterionPenalty*float64(p) - 2*l
	return b - satSlack*(math.Abs(b)+1)
}

// selCands returns the selected candidates, cheapest fit first.
func selCands() []candidate {
	var out []candidate
	for _, cd := range candidates {
		if selected[cd.name] {
			out = append(out, cd)
		}
	}
	sort.SliceStable(out, func(a, b int) bool { return cost(out[a].name) < cost(out[b].name) })
	return out
}

func cost(name string) int {
	if v, ok := fitCost[name]; ok {
		return v
	}
	return len(fitCost)
}

// candIndex is name's position in candidates: ties of the criterion go to
// the earlier one, whatever order the fits ran in.
func candIndex(name string) int {
	for i, cd := range candidates {
		if cd.name == name {
			return i
		}
	}
	return len(candidates)
}

// better reports whether criterion a of candidate ia beats b of ib: lower
// criterion, ties to the earlier candidate.
func better(a float64, ia int, b float64, ib int) bool {
	return a < b || (a == b && ia < ib)
}

// extrapolate fits the extrapolation used for depths up to maxT and names
// it for the method column (see Selection above).
//
// The families are fitted cheapest first, and one whose saturation bound
// exceeds the best admissible criterion so far plus reselectGap is not
// fitted. Admissibility is checked lazily, in criterion order: the best
// admissible fit and, for the bootstrap, every admissible fit within
// reselectGap of it are what the selection returns, exactly as if every
// family had been fitted and checked. (With keep, below, the bound can use
// the best criterion alone.)
func extrapolate(c Counts, maxT float64) (m Model, method string, err error) {
	return extrapolateKeep(c, maxT, reselectGap)
}

// extrapolateKeep is extrapolate keeping for the bootstrap's reselection
// the families within keep of the chosen one's criterion. The chosen curve
// does not depend on keep; keep = 0, for a fit no bootstrap will refit,
// lets the saturation bound skip every family that cannot be chosen.
func extrapolateKeep(c Counts, maxT, keep float64) (m Model, method string, err error) {
	base := newHist(c, censorJ)
	var fits []candFit
	// bestAdm returns the best admissible criterion among fits (+Inf when
	// none), checking admissibility in criterion order as far as needed.
	bestAdm := func() float64 {
		for {
			bi := -1
			for i := range fits {
				f := &fits[i]
				if f.adm == admNo {
					continue
				}
				if bi < 0 || better(f.crit, f.idx, fits[bi].crit, fits[bi].idx) {
					bi = i
				}
			}
			if bi < 0 {
				return math.Inf(1)
			}
			f := &fits[bi]
			if f.adm == admYes {
				return f.crit
			}
			f.adm = admNo
			if isAdmissible(f.m, c, maxT) {
				f.adm = admYes
			}
		}
	}
	var lnParams []float64
	for _, cd := range selCands() {
		hs := base
		hs.free = cd.free
		if len(fits) > 0 && critBound(&hs, cd.params) > bestAdm()+keep {
			continue
		}
		var cm Model
		var p []float64
		var err error
		if cd.name == "lognormal2-h" && lnParams != nil {
			// Start from the single lognormal already fitted to the same
			// histogram: what fitLognormal2Hist would otherwise refit.
			var gm *gridModel
			if gm, err = fitLognormal2Hist(hs, lnParams, nil); err == nil {
				cm, p = gm, gm.params
			}
		} else {
			cm, p, err = cd.fit(hs, nil)
		}
		if err != nil {
			continue
		}
		if cd.name == "lognormal-h" {
			lnParams = p
		}
		fits = append(fits, candFit{m: cm, famFit: famFit{cd.name, p}, crit: criterion(cm), idx: candIndex(cd.name)})
	}
	if bestA := bestAdm(); !math.IsInf(bestA, 1) {
		sort.Slice(fits, func(a, b int) bool { return fits[a].idx < fits[b].idx })
		sm := &selModel{}
		for i := range fits {
			f := &fits[i]
			if f.adm == admYes && f.crit == bestA && sm.Model == nil {
				sm.Model = f.m
			}
			if f.crit-bestA <= keep && f.adm != admNo {
				if f.adm == admUnknown && !isAdmissible(f.m, c, maxT) {
					continue
				}
				sm.fits = append(sm.fits, f.famFit)
			}
		}
		return sm, sm.Model.Name(), nil
	}
	if r, err := fitRFA(c, maxT); err == nil {
		return r, r.Name(), nil
	}
	if z, err := fitZTNBAll(c); err == nil && isAdmissible(z, c, maxT) {
		return z, z.Name(), nil
	}
	if c.Distinct() > 0 {
		s := newShenModel(c)
		if isAdmissible(s, c, maxT) {
			return s, s.Name(), nil
		}
	}
	return nil, "", errNoAdmissible
}

// candFit is one family's fit during the selection, with its criterion,
// its position in candidates and whether its curve is admissible (checked
// lazily).
type candFit struct {
	famFit
	m    Model
	crit float64
	idx  int
	adm  uint8
}

const (
	admUnknown uint8 = iota
	admYes
	admNo
)

// selModel is the fit extrapolate chose, carrying the parameters of every
// family it was compared with, so that a bootstrap refit can repeat the
// selection from warm starts: model-selection uncertainty then enters the
// bootstrap spread (which narrowed the calibrated intervals; BENCHMARKS.md).
type selModel struct {
	Model
	fits []famFit
}

// reselectGap: families whose criterion is worse than the chosen one's by
// more than this (a likelihood ratio of e^5) are not refitted on bootstrap
// replicates, which keeps refits fast at no measured cost in coverage.
const reselectGap = 10.0

type famFit struct {
	name   string
	params []float64
}

// refit refits the curve hint, the model fitted on the original counts
// (method is its name), on a bootstrap replicate c, warm-started from
// hint's parameters: extrapolate's choice repeats the selection among the
// families it compared; other curves refit their own family.
func refit(method string, c Counts, maxT float64, hint Model) (Model, error) {
	switch h := hint.(type) {
	case *selModel:
		// The families in fitting-cost order; one whose saturation bound
		// exceeds the best criterion so far cannot win and is not refitted.
		// Ties go to the earlier candidate, as in extrapolate.
		fits := append([]famFit(nil), h.fits...)
		sort.SliceStable(fits, func(a, b int) bool { return cost(fits[a].name) < cost(fits[b].name) })
		base := newHist(c, censorJ)
		var best Model
		bestA, bestI := math.Inf(1), len(candidates)
		for _, f := range fits {
			i := candIndex(f.name)
			if i < len(candidates) {
				hs := base
				hs.free = candidates[i].free
				if critBound(&hs, candidates[i].params) > bestA {
					continue
				}
			}
			m, err := refitCandidate(method, c, f.name, f.params)
			if err != nil {
				continue
			}
			if a := criterion(m); better(a, i, bestA, bestI) {
				best, bestA, bestI = m, a, i
			}
		}
		if best == nil {
			return nil, errors.New("complexity: cannot refit " + method)
		}
		return best, nil
	case *rfaModel:
		for _, r := range rfaApproximants(c) {
			if r.depth <= h.depth && isAdmissible(r, c, maxT) {
				return r, nil
			}
		}
		return nil, errNoAdmissible
	case *ztnbModel:
		if h.name == "ztnb" {
			return fitZTNBAll(c)
		}
		return refitCandidate(method, c, h.name, h.params())
	case *gridModel:
		return refitCandidate(method, c, h.name, h.params)
	case shenModel:
		return newShenModel(c), nil
	case *trunc2Model:
		m, err := fitTrunc2(c, []float64{math.Log(h.k), math.Log(h.theta)})
		if err != nil {
			return nil, err
		}
		return m, nil
	}
	return nil, errors.New("complexity: cannot refit " + method)
}

// refitCandidate refits the candidate called name, warm-started at p.
func refitCandidate(method string, c Counts, name string, p []float64) (Model, error) {
	for _, cd := range candidates {
		if cd.name != name {
			continue
		}
		return fitCandidate(cd, c, p, false)
	}
	return nil, errors.New("complexity: cannot refit " + method)
}

// fitCandidate fits candidate cd to c, warm-started at p (nil: from
// scratch); tight sets hist.tight.
func fitCandidate(cd candidate, c Counts, p []float64, tight bool) (Model, error) {
	hs := newHist(c, censorJ)
	hs.free, hs.tight = cd.free, tight
	m, _, err := cd.fit(hs, p)
	return m, err
}
