// Package benchstat holds the summary statistics the benchmark programs in
// scripts/ share.
package benchstat

import (
	"math"
	"sort"
)

// Quantile is the linear-interpolation quantile of v at p (type 7 of
// Hyndman & Fan 1996, Am. Stat. 50:361; R's default), NaN for no values.
// v is not modified.
func Quantile(v []float64, p float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	s := append([]float64(nil), v...)
	sort.Float64s(s)
	h := p * float64(len(s)-1)
	i := int(h)
	if i >= len(s)-1 {
		return s[len(s)-1]
	}
	return s[i] + (h-float64(i))*(s[i+1]-s[i])
}
