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
	for _, name := range []string{"lognormal", "lognormal-h", "lognormal2-h", "ztnb-h"} {
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
				rc := Resample(c, rng)
				if _, err := refit(name, rc, maxT, hint); err != nil {
					b.Fatal(err)
				}
			}
		})
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
