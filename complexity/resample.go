package complexity

import (
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/stat/distuv"
)

// newRand returns the generator for stream k of a seed. Every bootstrap
// replicate and every thinning draws from its own stream, so results do
// not depend on how work is split across goroutines.
func newRand(seed uint64, k uint64) *rand.Rand {
	return rand.New(rand.NewPCG(seed, k^0x9e3779b97f4a7c15))
}

// binomial draws from Binomial(n, p) for int64 n.
func binomial(src rand.Source, n int64, p float64) int64 {
	switch {
	case n <= 0 || p <= 0:
		return 0
	case p >= 1:
		return n
	}
	// The draw is a float64; above 2^53 it can round past n (and past
	// the int64 range at n near 2^63), so it is cut at n.
	v := distuv.Binomial{N: float64(n), P: p, Src: src}.Rand()
	if !(v < float64(n)) {
		return n
	}
	return int64(v)
}

// resample draws a bootstrap replicate of c: Distinct() units drawn with
// replacement from the observed units, so the class sizes are
// Multinomial(D; n_j/D) (Efron 1979 bootstrap of the units, as used for
// species-richness intervals by Chao et al.). The replicate has the same
// number of distinct units as c but a random number of reads.
//
// A draw whose reads would overflow int64 (possible only for tables within
// a few standard deviations of 2^63 reads, never for real data) is drawn
// again, which conditions the multinomial on a representable total;
// after resampleTries such draws c itself is returned.
func resample(c Counts, rng *rand.Rand) Counts {
	for try := 0; try < resampleTries; try++ {
		if out, ok := resampleOnce(c, rng); ok {
			return out
		}
	}
	return c
}

const resampleTries = 64

func resampleOnce(c Counts, rng *rand.Rand) (Counts, bool) {
	left := c.distinct
	mass := c.distinct
	out := Counts{classes: make([]Class, 0, len(c.classes))}
	for i, cl := range c.classes {
		var k int64
		if i == len(c.classes)-1 {
			k = left
		} else {
			k = binomial(rng, left, float64(cl.Units)/float64(mass))
		}
		left -= k
		mass -= cl.Units
		if k > 0 {
			if k > (math.MaxInt64-out.reads)/cl.Times {
				return Counts{}, false
			}
			out.classes = append(out.classes, Class{Times: cl.Times, Units: k})
			out.reads += k * cl.Times
			out.distinct += k
		}
	}
	return out, true
}

// thin keeps each read independently with probability f (binomial
// thinning): a unit seen j times is seen Binomial(j, f) times afterwards.
// Units thinned to zero vanish. This is exactly a shallower Poisson or
// multinomial sample of the same library (thinning a Poisson process).
func thin(c Counts, f float64, rng *rand.Rand) Counts {
	if f >= 1 {
		return c
	}
	m := make(map[int64]int64)
	if f > 0 {
		for _, cl := range c.classes {
			thinClass(m, cl, f, rng)
		}
	}
	out, err := FromMap(m)
	if err != nil {
		return Counts{} // cannot happen: thinning only lowers counts
	}
	return out
}

// thinSD is the half-width, in standard deviations, of the window of
// thinned counts thinClass draws over: the binomial mass beyond 12 sd is
// below 1e-30 (a Chernoff bound), far below one unit in any table that
// fits in int64.
const thinSD = 12

// thinClass thins n_j units of j reads each. When there are fewer units
// than likely thinned counts, each unit is drawn on its own; otherwise the
// units are split over the window of likely counts k (jf ± thinSD sd) by
// the binomial probabilities with sequential conditional binomials. Either
// way the work is min(n_j, window) draws, at most about 1e7 for any class
// whose reads fit in int64, so input-controlled counts cannot make it hang.
func thinClass(m map[int64]int64, cl Class, f float64, rng *rand.Rand) {
	j, n := cl.Times, cl.Units
	mean := float64(j) * f
	sd := math.Sqrt(mean * (1 - f))
	lo := int64(math.Max(0, math.Floor(mean-thinSD*sd)))
	hi := int64(math.Min(float64(j), math.Ceil(mean+thinSD*sd)))
	if n <= hi-lo+1 {
		for u := int64(0); u < n; u++ {
			if k := binomial(rng, j, f); k > 0 {
				m[k]++
			}
		}
		return
	}
	// P(k) = C(j,k) f^k (1-f)^(j-k), in log space.
	lf, lg := math.Log(f), math.Log1p(-f)
	lj := lgam(float64(j + 1))
	left := n
	rest := 1.0
	for k := lo; k < hi && left > 0; k++ {
		p := math.Exp(lj - lgam(float64(k+1)) - lgam(float64(j-k+1)) + float64(k)*lf + float64(j-k)*lg)
		q := 1.0
		if rest > 0 {
			q = math.Min(1, p/rest)
		}
		x := binomial(rng, left, q)
		if k > 0 && x > 0 {
			m[k] += x
		}
		left -= x
		rest -= p
	}
	if left > 0 && hi > 0 {
		m[hi] += left
	}
}
