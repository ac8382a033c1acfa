package complexity

import (
	"math"
	"testing"
)

// shenTol: the extrapolation is a handful of operations on exact inputs
// (log1p, expm1, products), accurate to a few eps; 1e-14 leaves headroom.
const shenTol = 1e-14

// TestShenHand checks the Shen, Chao & Lin (2003) extrapolation on a table
// worked by hand from the formula.
func TestShenHand(t *testing.T) {
	// Table {1:3, 2:1, 4:1}: n = 9, S_obs = 5, f1 = 3, f2 = 1.
	//   f0 = (n-1)/n * f1(f1-1)/(2(f2+1)) = (8/9)(6/4) = 4/3
	//   x  = f1/(n f0 + f1) = 3/(12 + 3) = 1/5
	//   S(9+2)  = 5 + (4/3)(1 - (4/5)^2)  = 5 + (4/3)(9/25) = 137/25
	//   S(9+10) = 5 + (4/3)(1 - (4/5)^10) = 5 + (4/3)(8717049/9765625)
	//   limit   = 5 + 4/3 = 19/3
	c := numCounts(t, map[int64]int64{1: 3, 2: 1, 4: 1})
	m := newShenModel(c)
	if m.Name() != "chao1-extrapolation" {
		t.Errorf("name %q", m.Name())
	}
	lim, ok := m.Limit()
	checks := []numCheck{
		{"Distinct(9)", m.Distinct(9), 5},
		{"Distinct(11)", m.Distinct(11), 137.0 / 25},
		{"Distinct(19)", m.Distinct(19), 5 + 4.0/3*8717049/9765625},
		{"Distinct(1e12)", m.Distinct(1e12), 19.0 / 3},
		{"Limit", lim, 19.0 / 3},
	}
	if !ok {
		t.Error("Limit not finite")
	}
	// Below n: the rarefaction mean (values of TestRarefyGolden, table
	// "tiny": exact rationals from scipy.special.comb exact=True).
	checks = append(checks,
		numCheck{"Distinct(2)", m.Distinct(2), 1.8055555555555556},
		numCheck{"Distinct(6)", m.Distinct(6), 3.9166666666666665},
	)
	for _, ch := range checks {
		if !numClose(ch.got, ch.want, shenTol, 0) {
			t.Errorf("%s: got %.17g want %.17g", ch.name, ch.got, ch.want)
		}
	}
	for _, x := range []float64{-1, math.NaN()} {
		if !math.IsNaN(m.Distinct(x)) {
			t.Errorf("Distinct(%v) should be NaN", x)
		}
	}
}

// TestShenShape checks continuity at n, monotonicity, the flat case
// f1 <= 1 and the empty table.
func TestShenShape(t *testing.T) {
	for _, tab := range []map[int64]int64{
		{1: 40, 2: 12, 3: 5, 17: 2, 30: 1},
		{1: 500000, 2: 1000, 7: 3},
		{1: 2, 5: 1},
	} {
		c := numCounts(t, tab)
		m := newShenModel(c)
		n := float64(c.Reads())
		prev := -1.0
		for x := 0.0; x < 50*n; x += n / 64 {
			got := m.Distinct(x)
			if !(got >= prev) {
				t.Errorf("%v: Distinct(%v) = %v below %v", tab, x, got, prev)
			}
			prev = got
		}
		if got := m.Distinct(n); got != float64(c.Distinct()) {
			t.Errorf("%v: Distinct(n) = %v want %d", tab, got, c.Distinct())
		}
		lim, _ := m.Limit()
		if got := m.Distinct(1e18); !numClose(got, lim, shenTol, 0) {
			t.Errorf("%v: Distinct(1e18) = %v, Limit %v", tab, got, lim)
		}
	}
	// f1 = 1: f0 = 0, flat at S_obs.
	c := numCounts(t, map[int64]int64{1: 1, 3: 4})
	m := newShenModel(c)
	if got := m.Distinct(1000); got != 5 {
		t.Errorf("f1=1: Distinct(1000) = %v want 5", got)
	}
	e := newShenModel(Counts{})
	if e.Distinct(0) != 0 || !math.IsNaN(e.Distinct(1)) {
		t.Error("empty table: want 0 at 0, NaN beyond")
	}
	if _, ok := e.Limit(); ok {
		t.Error("empty table: Limit should not be finite")
	}
}
