package complexity

import (
	"fmt"
	"math"
	"testing"
)

// numCheck is one named comparison.
type numCheck struct {
	name      string
	got, want float64
}

// TestCoverageHand checks Chao & Jost (2012) coverage on small tables
// worked by hand from the formulas of the paper.
func TestCoverageHand(t *testing.T) {
	// Table {1:3, 2:1, 4:1}: n = 3*1 + 1*2 + 1*4 = 9, f1 = 3, f2 = 1.
	//   bracket = (n-1) f1 / ((n-1) f1 + 2 f2) = 24 / 26 = 12/13
	//   C_9 = 1 - (3/9)(12/13) = 1 - 4/13 = 9/13; marginal yield 4/13.
	// Rarefied at t = 2, C(n-1, 2) = C(8,2) = 28:
	//   j=1: (1*3/9) C(8,2)/28 = 1/3
	//   j=2: (2*1/9) C(7,2)/28 = (2/9)(21/28) = 1/6
	//   j=4: (4*1/9) C(5,2)/28 = (4/9)(10/28) = 10/63
	//   C_2 = 1 - (1/3 + 1/6 + 10/63) = 1 - 83/126 = 43/126.
	// Extrapolated at t = 12 (3 reads beyond n, exponent t-n+1 = 4):
	//   C_12 = 1 - (1/3)(12/13)^4 = 1 - 20736/85683 = 64947/85683.
	// At t = n-1 = 8 only singletons can be missed: C_8 = 1 - f1/n = 2/3.
	c := numCounts(t, map[int64]int64{1: 3, 2: 1, 4: 1})
	checks := []numCheck{
		{"SampleCoverage", sampleCoverage(c), 9.0 / 13},
		{"MarginalYield", marginalYield(c), 4.0 / 13},
		{"coverageAt(9)", coverageAt(c, 9), 9.0 / 13},
		{"coverageAt(2)", coverageAt(c, 2), 43.0 / 126},
		{"coverageAt(8)", coverageAt(c, 8), 2.0 / 3},
		{"coverageAt(12)", coverageAt(c, 12), 64947.0 / 85683},
		{"coverageAt(8.5)", coverageAt(c, 8.5), (2.0/3 + 9.0/13) / 2}, // linear on (n-1, n)
		{"coverageAt(0)", coverageAt(c, 0), 0},
	}
	// Table {1:2, 3:1}: n = 5, f1 = 2, f2 = 0, so the f2 = 0 bracket
	//   (n-1)(f1-1) / ((n-1)(f1-1) + 2) = 4/6 = 2/3 applies:
	//   C_5 = 1 - (2/5)(2/3) = 11/15; C_7 = 1 - (2/5)(2/3)^3 = 1 - 16/135 = 119/135.
	d := numCounts(t, map[int64]int64{1: 2, 3: 1})
	checks = append(checks,
		numCheck{"f2=0 SampleCoverage", sampleCoverage(d), 11.0 / 15},
		numCheck{"f2=0 coverageAt(7)", coverageAt(d, 7), 119.0 / 135},
	)
	// No singletons: coverage 1, yield 0 (the formula with f1 = 0).
	e := numCounts(t, map[int64]int64{2: 4, 5: 1})
	checks = append(checks,
		numCheck{"f1=0 SampleCoverage", sampleCoverage(e), 1},
		numCheck{"f1=0 coverageAt(100)", coverageAt(e, 100), 1},
	)
	for _, ch := range checks {
		if !numClose(ch.got, ch.want, coverageTol, 1e-15) {
			t.Errorf("%s: got %.17g want %.17g", ch.name, ch.got, ch.want)
		}
	}
	for _, x := range []float64{-1, math.NaN()} {
		if !math.IsNaN(coverageAt(c, x)) {
			t.Errorf("coverageAt(%v) should be NaN", x)
		}
	}
	if !math.IsNaN(sampleCoverage(Counts{})) || !math.IsNaN(marginalYield(Counts{})) || !math.IsNaN(coverageAt(Counts{}, 1)) {
		t.Error("empty table should give NaN")
	}
}

// TestCoverageGolden compares the rarefied coverage (t < n) with exact
// rationals from scripts/ref_scipy_rarefaction.py (scipy.special.comb
// exact=True, python3-scipy 1.10.1; mpmath 1.2.1 for the largest table).
func TestCoverageGolden(t *testing.T) {
	for _, g := range readRarefyGolden(t) {
		if math.IsNaN(g.coverage) {
			continue
		}
		got := coverageAt(g.c, float64(g.m))
		if !numClose(got, g.coverage, coverageTol, 1e-300) {
			t.Errorf("%s m=%d: got %.17g want %.17g", g.table, g.m, got, g.coverage)
		}
	}
}

// TestCoverageConsistency checks coverageAt(n) == SampleCoverage, that
// coverageAt is non-decreasing in t (real t included) and that for t < n
// the rarefied coverage is the slope of the rarefaction curve,
// 1 - C_m = E[S_{m+1}] - E[S_m] (Chao & Jost 2012), using rarefy.
func TestCoverageConsistency(t *testing.T) {
	tabs := []map[int64]int64{
		{1: 3, 2: 1, 4: 1},
		{1: 40, 2: 12, 3: 5, 17: 2, 30: 1},
		{1: 1, 5: 3},
		{1: 7},
		{1: 5000, 2: 800, 3: 120, 10: 30, 200: 2},
	}
	for _, tab := range tabs {
		c := numCounts(t, tab)
		n := c.Reads()
		if got, want := coverageAt(c, float64(n)), sampleCoverage(c); got != want {
			t.Errorf("%v: coverageAt(n) = %v, SampleCoverage = %v", tab, got, want)
		}
		step := math.Max(1, float64(n)/500)
		prev := math.Inf(-1)
		for x := 0.0; x <= 3*float64(n); x += step / 3 {
			got := coverageAt(c, x)
			if got < prev-1e-15 || got < 0 || got > 1 {
				t.Errorf("%v: coverageAt(%v) = %v after %v", tab, x, got, prev)
			}
			prev = got
		}
		for m := int64(0); m < n; m += max(1, n/200) {
			a, _ := rarefy(c, m)
			b, _ := rarefy(c, m+1)
			if got := 1 - coverageAt(c, float64(m)); !numClose(got, b-a, 1e-10, 1e-12) {
				t.Errorf("%v m=%d: 1-C_m = %.15g, E[S_m+1]-E[S_m] = %.15g", tab, m, got, b-a)
			}
		}
	}
}

// ExampleCurve_Coverage shows the coverage of the table {1:3, 2:1, 4:1}
// (9 reads) rarefied, at the sample and extrapolated (see TestCoverageHand
// for the arithmetic).
func ExampleCurve_Coverage() {
	c, _ := FromMap(map[int64]int64{1: 3, 2: 1, 4: 1})
	cv := Curve{Counts: c}
	for _, t := range []float64{2, 9, 12} {
		fmt.Printf("C(%v) = %.4f\n", t, cv.Coverage(t))
	}
	fmt.Printf("next read new: %.4f\n", cv.MarginalYield(9))
	// Output:
	// C(2) = 0.3413
	// C(9) = 0.6923
	// C(12) = 0.7580
	// next read new: 0.3077
}
