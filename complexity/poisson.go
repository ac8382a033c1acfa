package complexity

import "math"

// Single-Poisson saturation model (Lander & Waterman 1988).
//
// Every one of U units is equally likely to be read, so after t reads a
// unit has been seen with probability 1 − e^{−t/U} and
//
//	D(t) = U · (1 − e^{−t/U}).
//
// U is the root of D(N) = D (N reads gave D distinct units): with x = N/U,
// (1 − e^{−x})/x = D/N, which is decreasing in x, so bisection on
// (0, N/D] finds it. When D = N (no duplicates) U is unbounded and the
// model says D(t) = t, with no finite limit. Valid for t ≥ 0.
//
// Its use here is as a baseline: real libraries are never this uniform, so it
// underestimates growth.
//
// Reference: Lander & Waterman (1988), Genomic mapping by fingerprinting
// random clones: a mathematical analysis, Genomics 2:231.
type poissonModel struct {
	u float64 // library size; +Inf when D = N
}

// fitPoisson fits the single-Poisson saturation model to c. It returns an
// error for an empty table.
func fitPoisson(c Counts) (Model, error) {
	n, d := float64(c.Reads()), float64(c.Distinct())
	if d < 1 {
		return nil, errNoFit
	}
	if d >= n {
		return &poissonModel{u: math.Inf(1)}, nil
	}
	r := d / n
	g := func(x float64) float64 { return -math.Expm1(-x) / x }
	lo, hi := 0.0, n/d // g(n/d) <= d/n since 1−e^{−x} < 1
	// 200 halvings reach the float64 resolution of any bracket.
	for i := 0; i < 200 && hi-lo > 1e-15*hi; i++ {
		mid := 0.5 * (lo + hi)
		if g(mid) > r {
			lo = mid
		} else {
			hi = mid
		}
	}
	x := 0.5 * (lo + hi)
	return &poissonModel{u: n / x}, nil
}

func (m *poissonModel) Name() string { return "poisson" }

// Distinct returns U(1 − e^{−t/U}).
func (m *poissonModel) Distinct(t float64) float64 {
	if !(t >= 0) || math.IsInf(t, 0) {
		return missing
	}
	if math.IsInf(m.u, 1) {
		return t
	}
	return m.u * -math.Expm1(-t/m.u)
}

// Limit returns U.
func (m *poissonModel) Limit() (float64, bool) {
	if math.IsInf(m.u, 1) {
		return math.Inf(1), false
	}
	return m.u, true
}
