package sim

import (
	"math"
	"math/rand/v2"
)

// Family generates the relative abundances of S units.
type Family struct {
	Name string
	Gen  func(rng *rand.Rand, S int) []float64
}

func lognormal(sigma float64) func(*rand.Rand, int) []float64 {
	return func(rng *rand.Rand, S int) []float64 {
		a := make([]float64, S)
		for i := range a {
			a[i] = math.Exp(sigma * rng.NormFloat64())
		}
		return a
	}
}

func gammaFam(shape float64) func(*rand.Rand, int) []float64 {
	return func(rng *rand.Rand, S int) []float64 {
		a := make([]float64, S)
		for i := range a {
			a[i] = Gamma(rng, shape)
		}
		return a
	}
}

// pcr: each molecule starts as one copy and is amplified over cycles; in
// each cycle each copy is duplicated with the molecule's efficiency e ~
// Uniform(eLo, eHi) (a Galton–Watson branching process). From 30 copies
// on, the binomial step is replaced by its normal approximation (the
// early cycles, where the randomness that matters arises, are exact).
func pcr(cycles int, eLo, eHi float64) func(*rand.Rand, int) []float64 {
	return func(rng *rand.Rand, S int) []float64 {
		a := make([]float64, S)
		for i := range a {
			e := eLo + (eHi-eLo)*rng.Float64()
			c := 1.0
			for k := 0; k < cycles; k++ {
				if c < 30 {
					n := 0.0
					for j := 0; j < int(c); j++ {
						if rng.Float64() < e {
							n++
						}
					}
					c += n
				} else {
					c += math.Max(0, math.Round(c*e+math.Sqrt(c*e*(1-e))*rng.NormFloat64()))
				}
			}
			a[i] = c
		}
		return a
	}
}

// zipf: p_i ∝ i^(−s) (ranks shuffled do not matter).
func zipf(s float64) func(*rand.Rand, int) []float64 {
	return func(rng *rand.Rand, S int) []float64 {
		a := make([]float64, S)
		for i := range a {
			a[i] = math.Pow(float64(i+1), -s)
		}
		return a
	}
}

// jackpot: a lognormal(σ=0.5) library in which a share of the molecules
// were amplified early and are mult times more abundant.
func jackpot(share, mult float64) func(*rand.Rand, int) []float64 {
	return func(rng *rand.Rand, S int) []float64 {
		a := lognormal(0.5)(rng, S)
		for i := range a {
			if rng.Float64() < share {
				a[i] *= mult
			}
		}
		return a
	}
}

// twoPop: a share of the units come from a second, rarer population.
func twoPop(share, rel float64, g1, g2 func(*rand.Rand, int) []float64) func(*rand.Rand, int) []float64 {
	return func(rng *rand.Rand, S int) []float64 {
		a := g1(rng, S)
		b := g2(rng, S)
		for i := range a {
			if rng.Float64() < share {
				a[i] = rel * b[i]
			}
		}
		return a
	}
}

// Families are the abundance families of the accuracy benchmark and the
// plan benchmark: every simulated library is drawn from one of them.
var Families = []Family{
	{"lognormal-0.5", lognormal(0.5)},
	{"lognormal-1", lognormal(1)},
	{"lognormal-1.5", lognormal(1.5)},
	{"lognormal-2", lognormal(2)},
	{"gamma-0.5", gammaFam(0.5)},
	{"gamma-1", gammaFam(1)},
	{"gamma-4", gammaFam(4)},
	{"pcr-narrow", pcr(10, 0.85, 0.95)},
	{"pcr-wide", pcr(14, 0.4, 0.95)},
	{"zipf-0.7", zipf(0.7)},
	{"zipf-1", zipf(1)},
	{"jackpot", jackpot(0.005, 200)},
	{"twopop-gamma", twoPop(0.3, 0.05, gammaFam(2), lognormal(1))},
	{"twopop-ln", twoPop(0.5, 0.1, lognormal(0.3), lognormal(0.3))},
}

// Poisson draws Poisson(lam): inversion below 10, PTRS transformed
// rejection above (Hörmann 1993, Insurance Math Econ 12:39).
func Poisson(rng *rand.Rand, lam float64) int64 {
	if lam <= 0 {
		return 0
	}
	if lam < 10 {
		l := math.Exp(-lam)
		k := int64(0)
		p := rng.Float64()
		for p > l {
			k++
			p *= rng.Float64()
		}
		return k
	}
	slam := math.Sqrt(lam)
	loglam := math.Log(lam)
	b := 0.931 + 2.53*slam
	a := -0.059 + 0.02483*b
	invalpha := 1.1239 + 1.1328/(b-3.4)
	vr := 0.9277 - 3.6224/(b-2)
	for {
		u := rng.Float64() - 0.5
		v := rng.Float64()
		us := 0.5 - math.Abs(u)
		k := math.Floor((2*a/us+b)*u + lam + 0.43)
		if us >= 0.07 && v <= vr {
			return int64(k)
		}
		if k < 0 || (us < 0.013 && v > us) {
			continue
		}
		lg, _ := math.Lgamma(k + 1)
		if math.Log(v)+math.Log(invalpha)-math.Log(a/(us*us)+b) <= -lam+k*loglam-lg {
			return int64(k)
		}
	}
}
