// Package sim holds random draws shared by the accuracy benchmark and the
// statistical tests: simulated populations must be drawn the same way in
// both.
package sim

import (
	"math"
	"math/rand/v2"
)

// Gamma draws Gamma(shape, 1) by Marsaglia & Tsang (2000), A simple method
// for generating gamma variables, ACM TOMS 26:363; shape < 1 by the
// U^(1/shape) boost given there.
func Gamma(rng *rand.Rand, shape float64) float64 {
	if shape < 1 {
		return Gamma(rng, shape+1) * math.Pow(rng.Float64(), 1/shape)
	}
	d := shape - 1.0/3
	c := 1 / math.Sqrt(9*d)
	for {
		x := rng.NormFloat64()
		v := 1 + c*x
		if v <= 0 {
			continue
		}
		v = v * v * v
		u := rng.Float64()
		if math.Log(u) < 0.5*x*x+d-d*v+d*math.Log(v) {
			return d * v
		}
	}
}
