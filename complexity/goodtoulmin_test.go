package complexity

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// TestGoodToulminHand checks the series on a small table by hand.
func TestGoodToulminHand(t *testing.T) {
	// Table {1:3, 2:1, 4:1}:
	//   U(1/2) = 3(1/2) - 1(1/4) - 1(1/16) = 19/16
	//   U(1)   = 3 - 1 - 1 = 1
	c := numCounts(t, map[int64]int64{1: 3, 2: 1, 4: 1})
	for _, ch := range []numCheck{
		{"U(0.5)", goodToulmin(c, 0.5), 19.0 / 16},
		{"U(1)", goodToulmin(c, 1), 1},
		{"U(0)", goodToulmin(c, 0), 0},
		{"empty U(0.5)", goodToulmin(Counts{}, 0.5), 0},
	} {
		if !numClose(ch.got, ch.want, 1e-15, 0) {
			t.Errorf("%s: got %.17g want %.17g", ch.name, ch.got, ch.want)
		}
	}
	for _, x := range []float64{-0.1, 1.0000001, 2, math.NaN(), math.Inf(1)} {
		if !math.IsNaN(goodToulmin(c, x)) {
			t.Errorf("U(%v) should be NaN", x)
		}
	}
	// Cancellation: n_j = 10^6 for j = 1..40 at t = 1 sums exactly to 0;
	// at t = 0.99 the closed form is 1e6 * sum_{j=1}^{40} (-1)^(j+1) t^j
	// = 1e6 * t (1 - t^40) / (1 + t) (geometric series).
	m := map[int64]int64{}
	for j := int64(1); j <= 40; j++ {
		m[j] = 1e6
	}
	d := numCounts(t, m)
	if got := goodToulmin(d, 1); got != 0 {
		t.Errorf("alternating 1e6 at t=1: got %v want 0", got)
	}
	x := 0.99
	want := 1e6 * x * (1 - math.Pow(x, 40)) / (1 + x)
	if got := goodToulmin(d, x); !numClose(got, want, 0, 4e6*0x1p-52) {
		t.Errorf("alternating 1e6 at t=0.99: got %.17g want %.17g", got, want)
	}
}

// TestGoodToulminUnbiased checks unbiasedness under Poisson sampling (Good
// & Toulmin 1956) by seeded simulation: a fixed population of 2000 units
// with gamma-distributed rates λ_i (shape 0.6, scale 3: expected reads per
// unit at depth N), Poisson counts drawn afresh in each replicate. The
// truth is the expected number of units unseen at depth N and seen in the
// next t*N reads,
//
//	sum_i e^{-λ_i} (1 - e^{-t λ_i})
//
// and the mean of the estimate over the replicates must lie within 4
// standard errors (replicate SD / sqrt(replicates)) of it.
func TestGoodToulminUnbiased(t *testing.T) {
	const (
		units      = 2000
		replicates = 3000
	)
	src := rand.NewPCG(20261201, 1956)
	rates := make([]float64, units)
	g := distuv.Gamma{Alpha: 0.6, Beta: 1.0 / 3, Src: src}
	for i := range rates {
		rates[i] = g.Rand()
	}
	ts := []float64{0.25, 0.5, 1}
	var sum, sum2 [3]float64
	per := make([]int64, units)
	for r := 0; r < replicates; r++ {
		for i, l := range rates {
			per[i] = int64(distuv.Poisson{Lambda: l, Src: src}.Rand())
		}
		c, err := fromUnitCounts(per)
		if err != nil {
			t.Fatal(err)
		}
		for k, x := range ts {
			u := goodToulmin(c, x)
			sum[k] += u
			sum2[k] += u * u
		}
	}
	for k, x := range ts {
		var truth float64
		for _, l := range rates {
			truth += math.Exp(-l) * -math.Expm1(-x*l)
		}
		mean := sum[k] / replicates
		sd := math.Sqrt((sum2[k] - replicates*mean*mean) / (replicates - 1))
		se := sd / math.Sqrt(replicates)
		t.Logf("t=%v: mean %.3f truth %.3f SE %.3f (%.2f SE)", x, mean, truth, se, (mean-truth)/se)
		if math.Abs(mean-truth) > 4*se {
			t.Errorf("t=%v: mean estimate %.4f, truth %.4f, beyond 4 SE = %.4f", x, mean, truth, 4*se)
		}
	}
}
