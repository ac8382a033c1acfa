package complexity

import (
	"errors"
	"math"
)

// Negative binomial truncated below 2, for tables whose singletons were
// removed or absorbed (see SingletonsDepleted). Every estimator that leans
// on f1 is biased for such tables; this one ignores f1 altogether.
//
// The units' rates per N reads are gamma(k, θ), so a unit's count X is
// negative binomial (see ztnb.go), and only the classes j >= 2 are used:
//
//	ℓ(k, θ) = Σ_{j>=2} n_j log P(X = j) − D₂ log(1 − P(0) − P(1)),
//	P(0) = (1+θ)^{-k},  P(1) = kθ (1+θ)^{-k-1},  D₂ = Σ_{j>=2} n_j,
//
// maximised by Nelder–Mead on (log k, log θ). The library then holds
// U = D₂ / (1 − P(0) − P(1)) units, and after tN reads
//
//	Distinct(tN) = U (1 − (1+tθ)^{-k}),
//
// bounded, with limit U. The reads of the removed singletons were
// sequenced too, so the depth the fit describes is the observed reads plus
// the U P(1) − f1 singletons missing from the table; t is measured from
// that depth. At the observed depth the curve exceeds the observed
// distinct count by the singletons the table is missing.
//
// Reference: Sampford (1955), Biometrika 42:58 (the truncated negative
// binomial; truncating below 2 instead of below 1 is our use of it).
type trunc2Model struct {
	n        float64 // the depth the fit describes (observed + missing singletons)
	u        float64 // units in the library
	k, theta float64
}

func (m *trunc2Model) Name() string { return "nb-trunc2" }

func (m *trunc2Model) Distinct(t float64) float64 {
	if !(t >= 0) || m.n == 0 {
		return math.NaN()
	}
	s := t / m.n
	return m.u * -math.Expm1(-m.k*math.Log1p(s*m.theta))
}

func (m *trunc2Model) Limit() (float64, bool) { return m.u, true }

// errTrunc2 is returned when fewer than two classes at j >= 2 exist.
var errTrunc2 = errors.New("complexity: too few classes seen twice or more to fit without singletons")

// fitTrunc2 fits the model to the classes j >= 2 of c, starting from hint
// (log k, log θ) when it is not nil.
func fitTrunc2(c Counts, hint []float64) (*trunc2Model, error) {
	var d2, r2 float64
	var cls []Class
	for _, cl := range c.classes {
		if cl.Times >= 2 {
			cls = append(cls, cl)
			d2 += float64(cl.Units)
			r2 += float64(cl.Units * cl.Times)
		}
	}
	if len(cls) < 2 {
		return nil, errTrunc2
	}
	lgj := make([]float64, len(cls))
	for i, cl := range cls {
		lgj[i] = lgam(float64(cl.Times) + 1)
	}
	nll := func(p []float64) float64 {
		lk, lt := p[0], p[1]
		if !(lk >= ztnbLogKMin && lk <= ztnbLogKMax) || !(lt > -30 && lt < 30) {
			return math.Inf(1)
		}
		k, th := math.Exp(lk), math.Exp(lt)
		l1t := math.Log1p(th)
		lr := lt - l1t
		p0 := math.Exp(-k * l1t)
		p1 := k * th * math.Exp(-(k+1)*l1t)
		norm := 1 - p0 - p1
		if !(norm > 0) {
			return math.Inf(1)
		}
		lgk := lgam(k)
		ll := 0.0
		for i, cl := range cls {
			j := float64(cl.Times)
			ll += float64(cl.Units) * (lgam(j+k) - lgk - lgj[i] + j*lr - k*l1t)
		}
		ll -= d2 * math.Log(norm)
		if math.IsNaN(ll) {
			return math.Inf(1)
		}
		return -ll / d2
	}
	// Start: the mean count among j >= 2 suggests θ; k = 1.
	starts := [][]float64{{0, math.Log(math.Max(r2/d2-1, 0.1))}, {-2, math.Log(math.Max(r2/d2, 0.1)) + 1}, {2, 0}}
	if hint != nil {
		starts = append([][]float64{hint}, starts...)
	}
	best, bestF := []float64(nil), math.Inf(1)
	for _, x0 := range starts {
		x, f := nelderMead(nll, x0, []float64{0.5, 0.5}, 1e-10, 2000)
		if f < bestF {
			best, bestF = x, f
		}
	}
	if best == nil || math.IsInf(bestF, 1) {
		return nil, errTrunc2
	}
	k, th := math.Exp(best[0]), math.Exp(best[1])
	l1t := math.Log1p(th)
	norm := 1 - math.Exp(-k*l1t) - k*th*math.Exp(-(k+1)*l1t)
	u := d2 / norm
	p1 := k * th * math.Exp(-(k+1)*l1t)
	missingOnes := math.Max(0, u*p1-float64(c.Units(1)))
	return &trunc2Model{n: float64(c.Reads()) + missingOnes, u: u, k: k, theta: th}, nil
}

// admissible checks the curve from the depth it describes (observed reads
// plus the missing singletons), where it must hold at least the observed
// distinct units.
func (m *trunc2Model) admissible(c Counts, maxT float64) bool {
	d0 := m.Distinct(m.n)
	return d0 >= float64(c.Distinct()) && admissibleFrom(m, m.n, d0, math.Max(maxT, 2*m.n))
}
