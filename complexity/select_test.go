package complexity

import (
	"math"
	"math/rand/v2"
	"testing"
)

// simCounts draws a Poisson sample of depth ratio·S from S units whose
// abundances are lognormal(0, sigma) (seeded).
func simCounts(t testing.TB, seed uint64, S int, sigma, ratio float64) Counts {
	rng := rand.New(rand.NewPCG(seed, 7))
	a := make([]float64, S)
	sum := 0.0
	for i := range a {
		a[i] = math.Exp(sigma * rng.NormFloat64())
		sum += a[i]
	}
	var b Builder
	for _, x := range a {
		lam := ratio * float64(S) * x / sum
		// Inversion (lam is small here).
		k, p, l := int64(0), rng.Float64(), math.Exp(-lam)
		for p > l {
			k++
			p *= rng.Float64()
		}
		b.AddUnit(k)
	}
	c, err := b.Counts()
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func BenchmarkRefit(b *testing.B) {
	c := simCounts(b, 1, 100000, 1, 0.5)
	maxT := 100 * float64(c.Reads())
	for _, name := range []string{"lognormal-h", "lognormal2-h", "ztnb-h", "powerlaw-h", "band-h"} {
		var hint Model
		for _, cd := range candidates {
			if cd.name == name {
				hs := newHist(c, censorJ)
				hs.free = cd.free
				hint, _, _ = cd.fit(hs, nil)
			}
		}
		b.Run(name, func(b *testing.B) {
			b.ReportAllocs()
			rng := rand.New(rand.NewPCG(2, 3))
			for i := 0; i < b.N; i++ {
				rc := resample(c, rng)
				if _, err := refit(name, rc, maxT, hint); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkRefitSelected(b *testing.B) {
	c := simCounts(b, 1, 100000, 1, 0.5)
	maxT := 100 * float64(c.Reads())
	m, method, err := extrapolate(c, maxT)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	rng := rand.New(rand.NewPCG(2, 3))
	for i := 0; i < b.N; i++ {
		if _, err := refit(method, resample(c, rng), maxT, m); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkExtrapolate(b *testing.B) {
	c := simCounts(b, 1, 100000, 1, 0.5)
	maxT := 100 * float64(c.Reads())
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, _, err := extrapolate(c, maxT); err != nil {
			b.Fatal(err)
		}
	}
}

// TestExtrapolateNeverBreaks: on many small and odd seeded tables,
// extrapolate either returns an error or an admissible curve with finite
// values through 1000×, and bootstrap refits never panic.
func TestExtrapolateNeverBreaks(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	odd := []map[int64]int64{
		{1: 1, 2: 1}, {1: 2, 1000000000: 1}, {1: 100}, {2: 5, 3: 1}, {1: 1, 50: 3},
		{1: 5000, 2: 1}, {1: 1, 2: 1000}, {1: 3, 7: 1, 9000: 2},
	}
	for i := 0; i < 120; i++ {
		m := map[int64]int64{}
		k := 1 + rng.IntN(8)
		for j := 0; j < k; j++ {
			m[1+rng.Int64N(int64(1+rng.IntN(100)))] += 1 + rng.Int64N(int64(1+rng.IntN(5000)))
		}
		odd = append(odd, m)
	}
	methods := map[string]int{}
	defer func() { t.Logf("methods: %v", methods) }()
	for _, m := range odd {
		c, err := FromMap(m)
		if err != nil {
			t.Fatal(err)
		}
		n := float64(c.Reads())
		mod, method, err := extrapolate(c, 1000*n)
		if err != nil {
			methods["error"]++
			continue
		}
		methods[method]++
		for _, f := range []float64{1, 2, 10, 100, 1000} {
			if v := mod.Distinct(f * n); !isFinite(v) || v < float64(c.Distinct())*(1-1e-9) {
				t.Errorf("%v (%s): Distinct(%gN) = %g", m, method, f, v)
			}
		}
		if !isAdmissible(mod, c, 1000*n) {
			t.Errorf("%v (%s): not admissible", m, method)
		}
		for b := 0; b < 3; b++ {
			rc := resample(c, rng)
			if rm, err := refit(method, rc, 1000*float64(rc.Reads()), mod); err == nil {
				_ = rm.Distinct(10 * float64(rc.Reads()))
			}
		}
	}
}
