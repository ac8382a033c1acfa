package complexity

import (
	"math"
	"testing"
)

// TestIntervalFormula: with identical replicates (no sampling spread) the
// interval is D + Δ·exp(∓z·s_model(m)); z = 1.959963984540054 is the
// standard normal 97.5% quantile (Abramowitz & Stegun 1964, table 26.5).
func TestIntervalFormula(t *testing.T) {
	c, _ := NewCounts([]Class{{1, 600}, {2, 200}, {3, 100}, {10, 100}})
	n, d := float64(c.Reads()), float64(c.Distinct())
	const z = 1.959963984540054
	for _, k := range defaultKnots[1:] {
		T := k.M * n
		point := d + 0.3*(T-n)
		reps := []float64{point, point, point}
		lo, hi := interval(point, reps, 0.95, c, T, defaultKnots)
		delta := point - d
		wantLo, wantHi := d+delta*math.Exp(-z*k.S), math.Min(d+delta*math.Exp(z*k.S), d+T-n)
		if relDiff(lo, wantLo) > 1e-12 || relDiff(hi, wantHi) > 1e-12 {
			t.Errorf("m=%g: [%g, %g], want [%g, %g]", k.M, lo, hi, wantLo, wantHi)
		}
	}
}

// TestIntervalProperties: the interval contains the point, widens with the
// level and with the replicates' spread, never goes below D and never
// promises more new units than new reads.
func TestIntervalProperties(t *testing.T) {
	c, _ := NewCounts([]Class{{1, 6000}, {2, 2000}, {3, 1000}, {10, 1000}})
	n, d := float64(c.Reads()), float64(c.Distinct())
	T := 30 * n
	point := d + 0.2*(T-n)
	narrow := []float64{point * 0.99, point, point * 1.01, point * 0.995, point * 1.005}
	wide := []float64{point * 0.9, point, point * 1.1, point * 0.95, point * 1.05}
	lo1, hi1 := interval(point, narrow, 0.95, c, T, defaultKnots)
	lo2, hi2 := interval(point, wide, 0.95, c, T, defaultKnots)
	lo3, hi3 := interval(point, narrow, 0.99, c, T, defaultKnots)
	for _, p := range [][2]float64{{lo1, hi1}, {lo2, hi2}, {lo3, hi3}} {
		if !(p[0] <= point && point <= p[1] && p[0] >= d && p[1] <= d+T-n) {
			t.Errorf("interval %v does not hold point %g within [D, D+T−N] = [%g, %g]", p, point, d, d+T-n)
		}
	}
	if !(lo2 < lo1 && hi2 > hi1) {
		t.Errorf("wider replicates gave [%g, %g], narrower [%g, %g]", lo2, hi2, lo1, hi1)
	}
	if !(lo3 < lo1 && hi3 > hi1) {
		t.Errorf("level 0.99 gave [%g, %g], 0.95 [%g, %g]", lo3, hi3, lo1, hi1)
	}
	if lo, hi := interval(math.NaN(), narrow, 0.95, c, T, defaultKnots); !isMissing(lo) || !isMissing(hi) {
		t.Errorf("missing point gave [%g, %g]", lo, hi)
	}
	if lo, hi := interval(d, nil, 0.95, c, T, defaultKnots); lo != d || hi != d {
		t.Errorf("no new units gave [%g, %g], want [%g, %g]", lo, hi, d, d)
	}
	// Totals (t = +Inf) use the last knot and no cap.
	if lo, hi := interval(2*d, nil, 0.95, c, math.Inf(1), defaultKnots); !(lo > d && lo < 2*d && hi > 2*d && isFinite(hi)) {
		t.Errorf("total interval [%g, %g]", lo, hi)
	}
}

func TestModelErr(t *testing.T) {
	if modelErr(defaultKnots, 1) != 0 || modelErr(defaultKnots, 0.5) != 0 {
		t.Error("model error must vanish without extrapolation")
	}
	last := defaultKnots[len(defaultKnots)-1]
	if modelErr(defaultKnots, 1e6) != last.S || modelErr(defaultKnots, math.Inf(1)) != last.S {
		t.Error("model error beyond the last knot must be the last knot's")
	}
	prev := 0.0
	for m := 1.0; m < 200; m *= 1.1 {
		v := modelErr(defaultKnots, m)
		if v < prev {
			t.Errorf("modelErr decreases at %g", m)
		}
		prev = v
	}
}
