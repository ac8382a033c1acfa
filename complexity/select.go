package complexity

import (
	"errors"
	"math"
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
// on a free head, and its fitter (hint: warm-start parameters or nil).
type candidate struct {
	name string
	free bool
	fit  func(hs hist, hint []float64) (Model, []float64, error)
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
	{"lognormal-h", true, lnCand},
	{"lognormal2-h", true, ln2Cand},
	{"ztnb-h", true, nbCand},
	{"powerlaw-h", true, plCand},
	{"band-h", true, bandCand},
	{"lognormal", false, lnCand},
	{"lognormal2", false, ln2Cand},
	{"ztnb-c", false, nbCand},
}

// selected are the names of the candidates extrapolate compares.
var selected = map[string]bool{"lognormal-h": true, "lognormal2-h": true, "ztnb-h": true, "powerlaw-h": true, "band-h": true}

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

// extrapolate fits the extrapolation used for depths up to maxT and names
// it for the method column (see Selection above).
func extrapolate(c Counts, maxT float64) (m Model, method string, err error) {
	var best Model
	bestA := math.Inf(1)
	var fits []famFit
	var crits []float64
	for _, cd := range candidates {
		if !selected[cd.name] {
			continue
		}
		hs := newHist(c, censorJ)
		hs.free = cd.free
		cm, p, err := cd.fit(hs, nil)
		if err != nil || !isAdmissible(cm, c, maxT) {
			continue
		}
		a := criterion(cm)
		fits = append(fits, famFit{cd.name, p})
		crits = append(crits, a)
		if a < bestA {
			best, bestA = cm, a
		}
	}
	if best != nil {
		sm := &selModel{Model: best}
		for i, f := range fits {
			if crits[i]-bestA <= reselectGap {
				sm.fits = append(sm.fits, f)
			}
		}
		return sm, best.Name(), nil
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
		var best Model
		bestA := math.Inf(1)
		for _, f := range h.fits {
			m, err := refitCandidate(method, c, f.name, f.params)
			if err != nil {
				continue
			}
			if a := criterion(m); a < bestA {
				best, bestA = m, a
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
		hs := newHist(c, censorJ)
		hs.free = cd.free
		m, _, err := cd.fit(hs, p)
		return m, err
	}
	return nil, errors.New("complexity: cannot refit " + method)
}
