package complexity

import (
	"math"
	"testing"
)

// padeTol is the agreement required between the continued fraction and the
// closed-form Padé approximants: they are the same rational function, so
// only float64 round-off of a few operations separates them.
const padeTol = 1e-13

func closeRel(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Max(1, math.Abs(want))
}

// TestQDPade checks qd + cfValue against Padé approximants given in closed
// form by Baker & Graves-Morris, Padé Approximants, 2nd ed. (1996): for
// ln(1+x), [1/1] = 2x/(2+x) and [2/2] = (6x+3x²)/(6+6x+x²); for e^x,
// [2/2] = (1 + x/2 + x²/12)/(1 - x/2 + x²/12).
func TestQDPade(t *testing.T) {
	// ln(1+x) = x g(x), g(x) = sum_k (-1)^k x^k/(k+1). Depth d of the
	// C-fraction of g is g's [floor(d/2)/ceil(d/2)], so x times depth 1 is
	// ln's [1/1] and x times depth 3 is ln's [2/2].
	g := make([]float64, 8)
	for k := range g {
		g[k] = math.Pow(-1, float64(k)) / float64(k+1)
	}
	cg := qd(g)
	// e^x = sum x^k/k!; depth 4 is [2/2].
	e := make([]float64, 8)
	f := 1.0
	for k := range e {
		if k > 0 {
			f *= float64(k)
		}
		e[k] = 1 / f
	}
	ce := qd(e)
	for _, x := range []float64{0.01, 0.3, 1, 2.5, 7} {
		cases := []struct {
			name      string
			got, want float64
		}{
			{"ln(1+x) [1/1]", x * cfValue(cg[:2], x), 2 * x / (2 + x)},
			{"ln(1+x) [2/2]", x * cfValue(cg[:4], x), (6*x + 3*x*x) / (6 + 6*x + x*x)},
			{"exp(x) [2/2]", cfValue(ce[:5], x), (1 + x/2 + x*x/12) / (1 - x/2 + x*x/12)},
		}
		for _, c := range cases {
			if !closeRel(c.got, c.want, padeTol) {
				t.Errorf("%s at x=%v: got %.17g, want %.17g", c.name, x, c.got, c.want)
			}
		}
	}
}

// TestQDBreakdown: a series with a zero leading term or a degenerate table
// stops instead of producing non-finite coefficients.
func TestQDBreakdown(t *testing.T) {
	if c := qd([]float64{0, 1, 2}); c != nil {
		t.Errorf("zero a0: got %v, want nil", c)
	}
	// 1 + x + x² + ... = 1/(1-x): the table is exactly [0/1], e_1 = 0.
	c := qd([]float64{1, 1, 1, 1, 1})
	if len(c) != 2 || c[0] != 1 || c[1] != 1 {
		t.Errorf("geometric series: got %v, want [1 1]", c)
	}
	for _, v := range c {
		if !isFinite(v) {
			t.Errorf("non-finite coefficient in %v", c)
		}
	}
}

// TestRFAGoodToulminAgreement: for small t the rational approximant and
// the Good–Toulmin series agree to the order of the first neglected term
// (Padé approximants match the series through degree d, Baker &
// Graves-Morris 1996, §1.1).
func TestRFAGoodToulminAgreement(t *testing.T) {
	c, err := FromMap(map[int64]int64{1: 5000, 2: 1500, 3: 600, 4: 250, 5: 120, 6: 50, 7: 30, 8: 10})
	if err != nil {
		t.Fatal(err)
	}
	n := float64(c.Reads())
	for _, r := range rfaApproximants(c) {
		tt := 0.01
		series := 0.0
		for j := int64(1); j <= 8; j++ {
			series += math.Pow(-1, float64(j+1)) * math.Pow(tt, float64(j)) * float64(c.Units(j))
		}
		got := r.Distinct(n*(1+tt)) - float64(c.Distinct())
		// Next term bound: n_1 t^(d+2) scaled generously.
		tol := 10 * float64(c.Units(1)) * math.Pow(tt, float64(r.Depth()+2))
		if math.Abs(got-series) > tol+1e-9*series {
			t.Errorf("depth %d: got %v, series %v (tol %g)", r.Depth(), got, series, tol)
		}
	}
}
