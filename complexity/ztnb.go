package complexity

import "math"

// Zero-truncated negative binomial (ZTNB) model.
//
// The units' rates λ (per N reads) are gamma distributed with shape k and
// scale θ, so a unit's count is negative binomial:
//
//	P(X = j) = Γ(j+k) / (Γ(k) j!) · (θ/(1+θ))^j · (1+θ)^{−k},   j ≥ 0,
//
// and the unseen units (j = 0) leave no row, so k and θ are fitted by
// maximum likelihood to the zero-truncated counts,
//
//	ℓ(k, θ) = Σ_j n_j log P(j) − D log(1 − (1+θ)^{−k}),
//
// (Nelder–Mead on log k, log θ, several starts). The Laplace transform of the
// gamma distribution gives the extrapolation in closed form:
//
//	D(tN) = D · (1 − (1+tθ)^{−k}) / (1 − (1+θ)^{−k}),
//
// bounded, with limit D / (1 − (1+θ)^{−k}). As k → ∞ with kθ fixed it
// becomes the single-Poisson model. Valid for all t ≥ 0. An error is
// returned when the table has fewer than two distinct units or no
// duplicates.
//
// fitZTNBAll uses every class (the textbook fit). The censored variant used as
// a candidate by extrapolate lumps classes above censorJ (mixture.go).
//
// References: Sampford (1955), The truncated negative binomial distribution,
// Biometrika 42:58; Brass (1958), Biometrika 45:59; Greenwood & Yule (1920)
// for the gamma–Poisson mixture.
type ztnbModel struct {
	name     string
	n, d     float64
	k, theta float64
	ll       float64 // maximised log-likelihood
	a        float64 // units per unit probability: D/(1 − (1+θ)^{−k}), or (D − n_{>J})/P(1≤X≤J) with a free head
}

// ztnb shape range: log k in [ztnbLogKMin, ztnbLogKMax]. Above e^12 the
// gamma is a point mass for every table of realistic size (coefficient of
// variation 0.25%); below e^−7 it is the log-series limit, whose growth the
// data cannot tell from smaller k.
const (
	ztnbLogKMin = -7.0
	ztnbLogKMax = 12.0
)

func (m *ztnbModel) Name() string { return m.name }

// Distinct returns the expected distinct units after t reads,
// D + a·((1+θ)^{−k} − (1+sθ)^{−k}), s = t/N.
func (m *ztnbModel) Distinct(t float64) float64 {
	if !(t >= 0) || math.IsInf(t, 0) || !(m.a > 0) {
		return missing
	}
	s := t / m.n
	p0 := -m.k * math.Log1p(m.theta)
	ps := -m.k * math.Log1p(s*m.theta)
	// e^{p0} − e^{ps} = e^{p0}·(1 − e^{ps−p0}), accurate when s ≈ 1.
	return m.d + m.a*math.Exp(p0)*-math.Expm1(ps-p0)
}

// Limit returns the estimated library size D + a·(1+θ)^{−k}.
func (m *ztnbModel) Limit() (float64, bool) {
	if !(m.a > 0) {
		return missing, false
	}
	return m.d + m.a*math.Exp(-m.k*math.Log1p(m.theta)), true
}

// ztnbData is what the likelihood needs: classes (j, units), ascending, and
// optionally a censored tail "more than J".
type ztnbData struct {
	j     []float64
	u     []float64
	J     int  // censoring point; 0 = none
	free  bool // free head: condition on 1 <= X <= J
	tight bool // warm start to nmTol (hist.tight)
	tail  float64
	d     float64
	lgj1  []float64 // lgamma(j+1)
	maxIn int       // classes below this index have j <= ztnbIncr
}

// ztnbIncr: Γ(j+k)/Γ(k) is computed as a product of (k+i) for j up to this
// (exact, and free of the cancellation lgamma(j+k) − lgamma(k) suffers for
// large k), by log-gamma above.
const ztnbIncr = 64

// lgFact[j] = log j! for j ≤ ztnbIncr, by lgam as the likelihood computed
// it per call (the same bits; the calls were a tenth of a ZTNB fit).
var lgFact = func() (t [ztnbIncr + 1]float64) {
	for j := range t {
		t[j] = lgam(float64(j) + 1)
	}
	return t
}()

func (z *ztnbData) nll(p []float64) float64 {
	lk, lt := p[0], p[1]
	if !(lk >= ztnbLogKMin && lk <= ztnbLogKMax) || !(lt > -40 && lt < 40) {
		return math.Inf(1)
	}
	k, th := math.Exp(lk), math.Exp(lt)
	l1t := math.Log1p(th)
	lr := lt - l1t // log(θ/(1+θ))
	norm := -math.Expm1(-k * l1t)
	if !(norm > 0) {
		return math.Inf(1)
	}
	lgk := lgam(k)
	ll := 0.0
	a, aj := 0.0, 0 // a = log Γ(aj+k)/Γ(k)
	var sumP float64
	if z.J > 0 {
		sumP = math.Exp(-k * l1t)
	}
	next := 0
	for j := 1; j <= ztnbIncr && (next < len(z.j) || (z.J > 0 && j <= z.J)); j++ {
		a += math.Log(k + float64(aj))
		aj++
		lp := a - lgFact[j] + float64(j)*lr - k*l1t
		if z.J > 0 && j <= z.J {
			sumP += math.Exp(lp)
		}
		if next < len(z.j) && int(z.j[next]) == j {
			ll += z.u[next] * lp
			next++
		}
	}
	for ; next < len(z.j); next++ {
		j := z.j[next]
		lp := lgam(j+k) - lgk - z.lgj1[next] + j*lr - k*l1t
		ll += z.u[next] * lp
	}
	if z.free {
		pin := sumP - math.Exp(-k*l1t)
		if !(pin > 0) {
			return math.Inf(1)
		}
		ll -= (z.d - z.tail) * math.Log(pin)
		return -ll / z.d
	}
	if z.J > 0 && z.tail > 0 {
		pt := 1 - sumP
		if !(pt > 0) {
			return math.Inf(1)
		}
		ll += z.tail * math.Log(pt)
	}
	ll -= z.d * math.Log(norm)
	if math.IsNaN(ll) {
		return math.Inf(1)
	}
	return -ll / z.d
}

// fitZTNBAll fits the zero-truncated negative binomial to every class of c.
func fitZTNBAll(c Counts) (Model, error) {
	z := ztnbData{d: float64(c.Distinct())}
	for _, cl := range c.classes {
		z.j = append(z.j, float64(cl.Times))
		z.u = append(z.u, float64(cl.Units))
		z.lgj1 = append(z.lgj1, lgam(float64(cl.Times)+1))
	}
	m, err := fitZTNB(&z, float64(c.Reads()), c.Units(1), nil)
	if err != nil {
		return nil, err
	}
	m.name = "ztnb"
	return m, nil
}

// fitZTNBHist fits the censored histogram hs.
func fitZTNBHist(hs hist, hint []float64) (*ztnbModel, error) {
	z := ztnbData{J: hs.J, free: hs.free, tight: hs.tight, tail: hs.tail, d: hs.d}
	for j := 1; j <= hs.J; j++ {
		if hs.h[j] > 0 {
			z.j = append(z.j, float64(j))
			z.u = append(z.u, hs.h[j])
			z.lgj1 = append(z.lgj1, lgam(float64(j)+1))
		}
	}
	m, err := fitZTNB(&z, hs.n, int64(math.Round(hs.h[1])), hint)
	if err != nil {
		return nil, err
	}
	m.name = "ztnb-c"
	if hs.free {
		m.name = "ztnb-h"
	}
	return m, nil
}

func fitZTNB(z *ztnbData, n float64, f1 int64, hint []float64) (*ztnbModel, error) {
	if z.d < 2 || float64(f1) >= z.d {
		return nil, errNoFit
	}
	var best []float64
	bestV := math.Inf(1)
	if hint != nil {
		tol, ev := warmTol(z.tight, 100)
		best, bestV = nelderMead(z.nll, hint, []float64{0.1, 0.1}, tol, ev)
	} else {
		mbar := n / z.d
		for _, lk := range []float64{-1, 0.5, 3} {
			x, v := nelderMead(z.nll, []float64{lk, math.Log(mbar) - lk}, []float64{0.5, 0.5}, nmTol, 400)
			if v < bestV {
				best, bestV = x, v
			}
		}
	}
	if math.IsInf(bestV, 1) || math.IsNaN(bestV) {
		return nil, errNoFit
	}
	k, th := math.Exp(best[0]), math.Exp(best[1])
	m := &ztnbModel{n: n, d: z.d, k: k, theta: th, ll: -bestV * z.d}
	l1t := math.Log1p(th)
	if z.free {
		// P(1 ≤ X ≤ J) = Σ_{j=1..J} P(j).
		pin, a := 0.0, 0.0
		for j := 1; j <= z.J; j++ {
			a += math.Log(k + float64(j-1))
			pin += math.Exp(a - lgam(float64(j)+1) + float64(j)*(best[1]-l1t) - k*l1t)
		}
		m.a = (z.d - z.tail) / pin
	} else {
		m.a = z.d / -math.Expm1(-k*l1t)
	}
	return m, nil
}

// params returns the fitted (log k, log θ), for warm starts.
func (m *ztnbModel) params() []float64 { return []float64{math.Log(m.k), math.Log(m.theta)} }
