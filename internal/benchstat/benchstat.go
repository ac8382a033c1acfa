// Package benchstat holds the summary statistics the benchmark programs in
// scripts/ share.
package benchstat

import (
	"fmt"
	"math"
	"sort"
)

// Pct formats a share as a percentage for the benchmark tables: "–" for
// missing (NaN), "fail" for +Inf (a failed estimate), no decimals from
// whole (a share, e.g. 0.1 for 10%) on, one decimal below.
func Pct(v, whole float64) string {
	switch {
	case math.IsNaN(v):
		return "–"
	case math.IsInf(v, 1):
		return "fail"
	case v >= whole:
		return fmt.Sprintf("%.0f%%", 100*v)
	}
	return fmt.Sprintf("%.1f%%", 100*v)
}

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
