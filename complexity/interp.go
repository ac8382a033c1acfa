package complexity

import "math"

// rarefyMean is the expected distinct units at a depth T < N by exact
// rarefaction. Temporary: replaced by Rarefy (rarefy.go) once it lands.
func rarefyMean(c Counts, T float64) float64 {
	m := int64(math.Round(T))
	n := c.Reads()
	if m < 0 || m > n {
		return math.NaN()
	}
	lc := func(a, b int64) float64 { // log C(a, b)
		x, _ := math.Lgamma(float64(a + 1))
		y, _ := math.Lgamma(float64(b + 1))
		z, _ := math.Lgamma(float64(a - b + 1))
		return x - y - z
	}
	base := lc(n, m)
	var s float64
	for _, cl := range c.classes {
		if n-cl.Times < m {
			s += float64(cl.Units)
			continue
		}
		s += float64(cl.Units) * -math.Expm1(lc(n-cl.Times, m)-base)
	}
	return s
}
