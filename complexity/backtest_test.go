package complexity

import (
	"math"
	"testing"
)

// TestBacktestWarmStart: the backtest's one warm-started descent
// (fitSameFamily, from the full fit's parameters moved by log f) ends at
// the optimum the first fit's three starts reach on the thinned table,
// within 1e−3 of log-likelihood, on lognormal, gamma-like and power-law
// libraries. (On 300 such libraries, with the bootstrap's looser
// nmTolRefit instead, 152 ended lower, by up to 0.09.)
func TestBacktestWarmStart(t *testing.T) {
	var cs []Counts
	for s := 0; s < 60; s++ {
		r := newRand(uint64(s), 7)
		// a lognormal library
		var vals []int64
		for i := 0; i < 20000; i++ {
			lam := math.Exp(r.NormFloat64()*(0.5+float64(s%4)*0.6) - 1 + float64(s%3))
			if s%5 == 4 {
				lam = 0.05 * math.Pow(r.Float64(), -1/(0.6+0.2*float64(s%3)))
			}
			k := poissonDraw(r, lam)
			if k > 0 {
				vals = append(vals, k)
			}
		}
		c, _ := fromUnitCounts(vals)
		cs = append(cs, c)
	}
	worse, better, same := 0, 0, 0
	fam := map[string][3]int{}
	var worst float64
	for _, c := range cs {
		m, _, err := extrapolateKeep(c, 100*float64(c.Reads()), 0)
		if err != nil {
			continue
		}
		tc := thin(c, backtestFraction, newRand(1, math.MaxUint64))
		if tc.Distinct() < backtestMinDistinct || tc.Units(1) == 0 {
			continue
		}
		inner := m.(*selModel).Model
		name := inner.Name()
		a, err1 := refitCandidate(name, tc, name, nil)
		b, err2 := fitSameFamily(inner, tc, 100*float64(tc.Reads()), math.Log(float64(tc.Reads())/float64(c.Reads())))
		if err1 != nil || err2 != nil {
			continue
		}
		d := (criterion(b) - criterion(a)) / 2
		v := fam[name]
		switch {
		case d > 1e-3:
			v[0]++
		case d < -1e-3:
			v[1]++
		default:
			v[2]++
		}
		fam[name] = v
		switch {
		case d > 1e-3:
			worse++
			if d > worst {
				worst = d
			}
			t.Errorf("%s: warm start ends %.4g below the fit from scratch", name, d)
		case d < -1e-3:
			better++
		default:
			same++
		}
	}
	t.Logf("per family [worse better same]: %v; worse %d, better %d, same %d", fam, worse, better, same)
	if same+better < 40 {
		t.Fatalf("only %d libraries compared", same+better+worse)
	}
}
