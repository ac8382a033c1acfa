package complexity

import (
	"fmt"
	"math"
)

// qd computes the coefficients of the corresponding continued fraction
// (C-fraction) of a power series by the quotient–difference algorithm:
//
//	a_0 + a_1 z + a_2 z^2 + ... = c_0 / (1 - c_1 z / (1 - c_2 z / (1 - ...)))
//
// with c_0 = a_0, c_{2m-1} = q_m^(0), c_{2m} = e_m^(0), where the rhombus
// rules are
//
//	q_1^(k)     = a_{k+1} / a_k,            e_0^(k) = 0,
//	e_m^(k)     = q_m^(k+1) - q_m^(k) + e_{m-1}^(k+1),
//	q_{m+1}^(k) = q_m^(k+1) e_m^(k+1) / e_m^(k).
//
// Truncating the fraction after c_d gives the Padé approximant
// [floor(d/2) / ceil(d/2)] of the series. qd returns as many coefficients
// as the series determines (len(a) at most) and stops early, returning
// what it has, when a division by zero or a non-finite value shows that the
// table breaks down (the series is then not "normal" at that order).
//
// References:
//   - Rutishauser H (1954) Der Quotienten-Differenzen-Algorithmus. ZAMP 5:233.
//   - Henrici P (1974) Applied and Computational Complex Analysis, vol 1, §7.6.
//   - Baker GA, Graves-Morris P (1996) Padé Approximants, 2nd ed., §4.
func qd(a []float64) []float64 {
	n := len(a)
	if n == 0 || a[0] == 0 || !isFinite(a[0]) {
		return nil
	}
	c := []float64{a[0]}
	// q[k] holds q_m^(k), e[k] holds e_{m-1}^(k) for the current m.
	q := make([]float64, 0, n)
	for k := 0; k+1 < n; k++ {
		if a[k] == 0 {
			break
		}
		v := a[k+1] / a[k]
		if !isFinite(v) {
			break
		}
		q = append(q, v)
	}
	if len(q) == 0 {
		return c
	}
	c = append(c, q[0])
	e := make([]float64, len(q)) // e_0^(k) = 0
	for len(c) < n {
		// e_m^(k) for k = 0 .. len(q)-2
		ne := make([]float64, 0, len(q))
		for k := 0; k+1 < len(q); k++ {
			var prev float64
			if k+1 < len(e) {
				prev = e[k+1]
			}
			v := q[k+1] - q[k] + prev
			if !isFinite(v) {
				break
			}
			ne = append(ne, v)
		}
		if len(ne) == 0 || ne[0] == 0 {
			break
		}
		c = append(c, ne[0])
		if len(c) >= n {
			break
		}
		// q_{m+1}^(k) for k = 0 .. len(ne)-2
		nq := make([]float64, 0, len(ne))
		for k := 0; k+1 < len(ne); k++ {
			if ne[k] == 0 {
				break
			}
			v := q[k+1] * ne[k+1] / ne[k]
			if !isFinite(v) {
				break
			}
			nq = append(nq, v)
		}
		if len(nq) == 0 || nq[0] == 0 {
			break
		}
		c = append(c, nq[0])
		q, e = nq, ne
	}
	return c
}

func isFinite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// cfValue evaluates the C-fraction c_0/(1 - c_1 z/(1 - c_2 z/(1 - ...)))
// truncated after c_{len(c)-1}, by the forward (Wallis) recurrence with
// rescaling. It returns NaN where the denominator vanishes.
func cfValue(c []float64, z float64) float64 {
	v, _ := evalCF(c, z)
	return v
}

// evalCF also returns the final denominator B_d (scaled), whose sign change
// between two points reveals a pole between them.
func evalCF(c []float64, z float64) (value, denom float64) {
	if len(c) == 0 {
		return math.NaN(), math.NaN()
	}
	// b_0 = 0, partial numerators p_1 = c_0, p_k = -c_{k-1} z; partial
	// denominators 1.
	aPrev, a := 1.0, 0.0 // A_{-1}, A_0
	bPrev, b := 0.0, 1.0 // B_{-1}, B_0
	for k := 0; k < len(c); k++ {
		p := c[0]
		if k > 0 {
			p = -c[k] * z
		}
		aPrev, a = a, a+p*aPrev
		bPrev, b = b, b+p*bPrev
		if s := math.Max(math.Abs(a), math.Abs(b)); s > 1e150 || (s < 1e-150 && s > 0) {
			aPrev, a, bPrev, b = aPrev/s, a/s, bPrev/s, b/s
		}
	}
	if b == 0 {
		return math.NaN(), 0
	}
	return a / b, b
}

// rfaMaxTerms bounds the Good–Toulmin terms fed to the qd table. Beyond a
// few dozen terms the qd recurrences lose every significant digit in
// float64 (the table is a ratio of Hankel determinants), and the high-j
// counts are sparse noise anyway.
const rfaMaxTerms = 40

// rfaModel is a rational-function (Padé) stabilisation of the Good–Toulmin
// series. With t = T/N - 1 the extra reads as a multiple of the observed N,
// Good & Toulmin (1956) give the expected new units as
//
//	Δ(t) = sum_{j>=1} (-1)^(j+1) n_j t^j = t g(t),  g(t) = sum_{k>=0} (-1)^k n_{k+1} t^k,
//
// unbiased under Poisson sampling for t <= 1 but divergent beyond. RFA
// replaces g by its continued fraction truncated at depth d (a Padé
// approximant [floor(d/2)/ceil(d/2)]), so that
//
//	Distinct(T) = D + t CF_d(t).
//
// For odd d, numerator and denominator of t CF_d(t) have equal degree and
// the curve tends to a finite limit; even depths grow without bound.
// Below the observed depth Distinct uses exact rarefaction when available.
type rfaModel struct {
	c     Counts
	cf    []float64 // c_0 .. c_d
	depth int
}

// Name returns "rfa-d" with the truncation depth.
func (r *rfaModel) Name() string { return fmt.Sprintf("rfa-%d", r.depth) }

// Depth returns the continued-fraction truncation depth d.
func (r *rfaModel) Depth() int { return r.depth }

// Distinct returns D + t CF_d(t), t = T/N - 1, for T >= N.
func (r *rfaModel) Distinct(T float64) float64 {
	n := float64(r.c.Reads())
	if !(T >= n) || n == 0 {
		if T >= 0 && T < n {
			return rarefyMeanAt(r.c, T)
		}
		return math.NaN()
	}
	t := T/n - 1
	return float64(r.c.Distinct()) + t*cfValue(r.cf, t)
}

// Limit returns the t -> infinity limit for odd depths: the ratio of the
// leading coefficients, obtained by evaluating the fraction at a very
// large t. Even depths are unbounded.
func (r *rfaModel) Limit() (float64, bool) {
	if r.depth%2 == 0 {
		return math.Inf(1), false
	}
	// t CF(t) for odd d tends to a constant; evaluate the fraction in 1/t.
	const far = 1e12
	v := float64(r.c.Distinct()) + far*cfValue(r.cf, far)
	if !isFinite(v) || v < float64(r.c.Distinct()) {
		return math.NaN(), false
	}
	return v, true
}

// goodToulminSeries returns the coefficients of g(t) (see RFA):
// (-1)^k n_{k+1} for k = 0 .. terms-1.
func goodToulminSeries(c Counts, terms int) []float64 {
	a := make([]float64, terms)
	for k := range a {
		v := float64(c.Units(int64(k + 1)))
		if k%2 == 1 {
			v = -v
		}
		a[k] = v
	}
	return a
}

// rfaApproximants returns the RFA curves of every available depth,
// deepest first. Depths whose continued fraction broke down are absent.
func rfaApproximants(c Counts) []*rfaModel {
	if c.Units(1) == 0 || c.Distinct() < 2 {
		return nil
	}
	terms := int(c.MaxTimes())
	if terms > rfaMaxTerms {
		terms = rfaMaxTerms
	}
	cf := qd(goodToulminSeries(c, terms))
	var out []*rfaModel
	for d := len(cf) - 1; d >= 1; d-- {
		out = append(out, &rfaModel{c: c, cf: cf[:d+1], depth: d})
	}
	return out
}

// isAdmissible reports whether m is a plausible saturation curve from the
// observed depth N to maxT: finite, at least the observed distinct count,
// non-decreasing, concave, never more new units than new reads, with no
// pole in between (a sign change of the continued fraction's denominator).
// The curve is checked on a log-spaced grid of admissGrid points.
func isAdmissible(m Model, c Counts, maxT float64) bool {
	return admissibleFrom(m, float64(c.Reads()), float64(c.Distinct()), maxT)
}

// admissibleFrom checks m as isAdmissible does, from the point (n, d).
func admissibleFrom(m Model, n, d, maxT float64) bool {
	if !(n > 0) {
		return false
	}
	if !(maxT > n) {
		maxT = 2 * n
	}
	prevT, prevV := n, d
	prevSlope := math.Inf(1)
	var prevDen float64
	if s, ok := m.(*selModel); ok {
		m = s.Model // the same curve; unwrapped, a grid curve can stop early
	}
	rfa, _ := m.(*rfaModel)
	grid, _ := m.(*gridModel)
	if grid != nil && (!grid.mixtureCurve() || maxT < 2*n) { // see passesBeyond
		grid = nil
	}
	for i := 1; i <= admissGrid; i++ {
		T := n * math.Pow(maxT/n, float64(i)/admissGrid)
		v := m.Distinct(T)
		if !isFinite(v) {
			return false
		}
		if rfa != nil {
			_, den := evalCF(rfa.cf, T/n-1)
			if i > 1 && (den == 0 || math.Signbit(den) != math.Signbit(prevDen)) {
				return false
			}
			prevDen = den
		}
		tol := admissTol * math.Max(1, v)
		if v < prevV-tol {
			return false // decreasing
		}
		if v-d > T-n+tol {
			return false // more new units than new reads
		}
		slope := (v - prevV) / (T - prevT)
		if slope > prevSlope*(1+admissSlopeTol)+admissTol {
			return false // convex
		}
		prevT, prevV, prevSlope = T, v, slope
		if i == 1 && grid != nil && grid.passesBeyond(T, v, n, d) {
			return true
		}
	}
	// The initial slope cannot exceed the chance that the next read is new,
	// which is at most 1.
	return true
}

// Admissibility grid and tolerances. admissGrid points on a log scale
// resolve curvature changes of a low-degree rational function (a pole or
// an inflection spans many grid cells) at negligible cost. admissTol is a
// relative tolerance for float64 round-off in the continued-fraction
// evaluation (about 1e4 ulps of the value). admissSlopeTol allows slope
// increases of 0.1% from round-off between close grid points.
const (
	admissGrid     = 120
	admissTol      = 1e-9
	admissSlopeTol = 1e-3
)

// fitRFA returns the deepest admissible odd-depth (bounded) RFA curve for
// depths up to maxT, then the deepest admissible even one, or an error
// when no approximant is admissible. This is the textbook choice; the
// selection used by Analyze lives in select.go.
func fitRFA(c Counts, maxT float64) (*rfaModel, error) {
	all := rfaApproximants(c)
	for _, odd := range []bool{true, false} {
		for _, r := range all {
			if (r.depth%2 == 1) == odd && isAdmissible(r, c, maxT) {
				return r, nil
			}
		}
	}
	return nil, errNoAdmissible
}

// errNoAdmissible is returned when no rational approximant is admissible.
var errNoAdmissible = fmt.Errorf("complexity: no admissible rational approximant")
