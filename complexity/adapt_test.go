package complexity

import (
	"math"
	"testing"
)

// TestIntervalFitFormula: with identical replicates (no sampling spread)
// the adaptive interval is [D + Δ·exp(−z·s_model(m)), D + Δ·exp(z·s)],
// s² = s_model(m)² + (κ(m)·|b|)² (adapt.go); z = 1.959963984540054 is the standard normal 97.5% quantile
// (Abramowitz & Stegun 1964, table 26.5). A missing backtest counts as
// |b| = backtestMissing; b = 0 gives the fixed interval of interval.go.
func TestIntervalFitFormula(t *testing.T) {
	c, _ := NewCounts([]Class{{1, 600}, {2, 200}, {3, 100}, {10, 100}})
	n, d := float64(c.Reads()), float64(c.Distinct())
	const z = 1.959963984540054
	for i, k := range defaultFitKnots[1:] {
		T := k.M * n
		point := d + 0.3*(T-n)
		reps := []float64{point, point, point}
		sm := defaultKnots[i+1].S
		for _, b := range []float64{0, 0.05, -0.2, math.NaN()} {
			lo, hi := intervalFit(point, reps, 0.95, c, T, defaultKnots, fitErr(defaultFitKnots, k.M, b))
			ab := math.Abs(b)
			if math.IsNaN(b) {
				ab = backtestMissing
			}
			s := math.Hypot(sm, k.S*ab)
			delta := point - d
			wantLo, wantHi := d+delta*math.Exp(-z*sm), math.Min(d+delta*math.Exp(z*s), d+T-n)
			if relDiff(lo, wantLo) > 1e-12 || relDiff(hi, wantHi) > 1e-12 {
				t.Errorf("m=%g b=%g: [%g, %g], want [%g, %g]", k.M, b, lo, hi, wantLo, wantHi)
			}
		}
		lo0, hi0 := intervalFit(point, reps, 0.95, c, T, defaultKnots, fitErr(defaultFitKnots, k.M, 0))
		lo1, hi1 := interval(point, reps, 0.95, c, T, defaultKnots)
		if lo0 != lo1 || hi0 != hi1 {
			t.Errorf("m=%g: b = 0 gives [%g, %g], interval [%g, %g]", k.M, lo0, hi0, lo1, hi1)
		}
	}
}

// TestFitErr: s_fit = κ(m)·|b| with κ interpolated like the model-error
// knots (piecewise linear in log m: at the geometric midpoint of two knots
// the arithmetic mean), 0 at m ≤ 1, the last weight beyond the last knot.
func TestFitErr(t *testing.T) {
	k := []Knot{{1, 0}, {10, 2}, {100, 4}}
	cases := []struct{ m, b, want float64 }{
		{0.5, 0.1, 0}, {1, 0.1, 0}, {math.Sqrt(10), 0.1, 0.1}, {10, -0.1, 0.2}, {math.Sqrt(1000), 0.2, 0.6},
		{1e6, 0.1, 0.4}, {math.Inf(1), 0.1, 0.4}, {10, math.NaN(), 2 * backtestMissing},
	}
	for _, tc := range cases {
		if got := fitErr(k, tc.m, tc.b); math.Abs(got-tc.want) > 1e-12 {
			t.Errorf("fitErr(%g, %g) = %g, want %g", tc.m, tc.b, got, tc.want)
		}
	}
}
