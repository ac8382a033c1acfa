package complexity

import (
	"math"
	"testing"
)

// TestNPMLEPoissonClosedForm: frequency counts that are the expectation of
// a library of S units sampled at rate λ0 (or a two-rate library), f_k =
// Σ S_i e^{−λ_i} λ_i^k / k!, rounded. The NPMLE must reproduce the closed
// form of the expected distinct units, D(rN) = Σ S_i (1 − e^{−r λ_i})
// (the Poisson expectation, e.g. Lander & Waterman 1988 for one rate).
// Tolerance: 1% for one rate (the true rate lies between grid points about
// 10% apart; the rounding of f_k to whole units is negligible at S = 1e8).
// For two rates EM leaves some weight on the rare end of the grid within
// its iteration budget (the likelihood is flat there: Norris & Pollock
// 1998), so the check is 1% at 2x and 5% at 10x and 100x; measured 0.1%,
// 2.4% and 3%.
func TestNPMLEPoissonClosedForm(t *testing.T) {
	cases := []struct {
		name string
		s    []float64
		lam  []float64
		tol  [3]float64
	}{
		{"one rate", []float64{1e8}, []float64{2}, [3]float64{0.01, 0.01, 0.01}},
		{"two rates", []float64{6e7, 4e7}, []float64{0.5, 5}, [3]float64{0.01, 0.05, 0.05}},
	}
	for _, tc := range cases {
		m := map[int64]int64{}
		for k := 1; k < 200; k++ {
			f := 0.0
			for i, l := range tc.lam {
				lg, _ := math.Lgamma(float64(k) + 1)
				f += tc.s[i] * math.Exp(-l+float64(k)*math.Log(l)-lg)
			}
			if u := int64(math.Round(f)); u > 0 {
				m[int64(k)] = u
			}
		}
		c, err := FromMap(m)
		if err != nil {
			t.Fatal(err)
		}
		n := float64(c.Reads())
		fit, err := fitNPMLE(c, 100*n)
		if err != nil {
			t.Fatal(err)
		}
		if got := fit.Distinct(n); math.Abs(got/float64(c.Distinct())-1) > 1e-6 {
			t.Errorf("%s: D(N) = %g, want the observed %d", tc.name, got, c.Distinct())
		}
		for ri, r := range []float64{2, 10, 100} {
			want := 0.0
			for i, l := range tc.lam {
				want += tc.s[i] * -math.Expm1(-r*l)
			}
			if got := fit.Distinct(r * n); math.Abs(got/want-1) > tc.tol[ri] {
				t.Errorf("%s: D(%gN) = %g, closed form %g", tc.name, r, got, want)
			}
		}
	}
}
