package complexity

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestMixSums15Kernel: the vector kernel (where this platform has one) and
// the Go loops give the same bits, on the kernel's own rows and on random
// rows and weights of every magnitude the fits meet (zeros, subnormals,
// values near 1, tiny weights), for every length and start on the grid.
func TestMixSums15Kernel(t *testing.T) {
	if !useVectorSums {
		t.Skip("no vector kernel on this platform or build")
	}
	r := rand.New(rand.NewPCG(15, 17))
	k := gridKernel(15)
	n := len(k.x)
	random := make([]float64, n*row15+rowPad)
	for i := range random {
		switch r.IntN(6) {
		case 0:
			random[i] = 0
		case 1:
			random[i] = math.Float64frombits(r.Uint64N(1 << 52)) // subnormal
		default:
			random[i] = math.Exp(-60 * r.Float64())
		}
	}
	g := make([]float64, n)
	vec := make([]float64, 16)
	for trial := 0; trial < 3000; trial++ {
		for i := range g {
			switch r.IntN(8) {
			case 0:
				g[i] = 0
			default:
				g[i] = math.Exp(-30*r.Float64()) * (1 + r.Float64())
			}
		}
		rows := k.rows15
		switch trial % 3 {
		case 1:
			rows = k.rowsFree15
		case 2:
			rows = random
		}
		lo := r.IntN(n)
		m := r.IntN(n - lo + 1)
		pt, ps := mixSums15(rows, g[:m], lo, vec)
		var ref [row15 + rowPad]float64
		sums15Go(rows[lo*row15:], g[:m], &ref)
		same := math.Float64bits(pt) == math.Float64bits(ref[15]) && math.Float64bits(ps) == math.Float64bits(ref[16]) && vec[0] == 0
		for j := 1; j < 16; j++ {
			same = same && math.Float64bits(vec[j]) == math.Float64bits(ref[j-1])
		}
		if !same {
			t.Fatalf("trial %d (lo %d, %d rows): kernel %v %g %g, Go %v", trial, lo, m, vec, pt, ps, ref[:row15])
		}
	}
}

// gaussGridSeq and powerGridSeq are gaussGrid and powerGrid one point
// after another, as they were before chainGrid: the references of the
// tests below.
func gaussGridSeq(dst, x []float64, mu, sigma float64) {
	if len(x) == 0 {
		return
	}
	if len(x) == 1 {
		z := (x[0] - mu) / sigma
		dst[0] = math.Exp(-0.5 * z * z)
		return
	}
	d := gridStep / sigma
	q := math.Exp(-d * d)
	var u, r float64
	for i := range x {
		if i%gaussAnchor == 0 {
			z := (x[i] - mu) / sigma
			u = math.Exp(-0.5 * z * z)
			r = math.Exp(-z*d - 0.5*d*d)
		} else {
			u *= r
			r *= q
		}
		dst[i] = u
	}
}

func powerGridSeq(dst, x []float64, alpha, a float64) {
	r := math.Exp(-alpha * gridStep)
	var w float64
	for i := range x {
		if i%gaussAnchor == 0 {
			w = math.Exp(-alpha * (x[i] - a))
		} else {
			w *= r
		}
		dst[i] = w
	}
}

// TestGridChainsSideBySide: gaussGrid and powerGrid, which advance their
// blocks of products side by side (chainGrid), give the bits of the
// one-point-after-another recurrences, on every stretch of the grid and
// random parameters over the fits' ranges, and on stretches longer than
// the grid (more than one group of four blocks).
func TestGridChainsSideBySide(t *testing.T) {
	r := rand.New(rand.NewPCG(32, 8))
	k := gridKernel(15)
	n := len(k.x)
	long := make([]float64, 3*n)
	for i := range long {
		long[i] = gridLo + float64(i)*gridStep
	}
	got, want := make([]float64, len(long)), make([]float64, len(long))
	for trial := 0; trial < 4000; trial++ {
		lo := r.IntN(n)
		x := k.x[lo : lo+r.IntN(n-lo+1)]
		if trial%5 == 0 { // both families (trial%2)
			x = long[:r.IntN(len(long)+1)]
		}
		if trial%2 == 0 {
			mu := gridLo + (gridHi-gridLo)*r.Float64()
			sigma := lnSigmaMin + (lnSigmaMax-lnSigmaMin)*r.Float64()
			gaussGrid(got, x, mu, sigma)
			gaussGridSeq(want, x, mu, sigma)
		} else {
			alpha := paretoAlphaMin + (paretoAlphaMax-paretoAlphaMin)*r.Float64()
			a := gridLo + (gridHi-gridLo)*r.Float64()
			powerGrid(got, x, alpha, a)
			powerGridSeq(want, x, alpha, a)
		}
		for i := range x {
			if math.Float64bits(got[i]) != math.Float64bits(want[i]) {
				t.Fatalf("trial %d, point %d of %d: %v, one at a time %v", trial, i, len(x), got[i], want[i])
			}
		}
	}
}

// TestPowerLawWeights: the power-law and band weights (paretoFit.weights,
// inner cells from a table, the chain four blocks at a time) are, bit for
// bit, the direct formula e^{−α(x−a)} by the one-at-a-time recurrence
// times the share of each cell inside [a, b], on random cutoffs, widths and
// exponents, censored and free head.
func TestPowerLawWeights(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 7))
	k := gridKernel(15)
	for trial := 0; trial < 3000; trial++ {
		hs := hist{J: 15, free: trial%2 == 1}
		f := &paretoFit{lnFit{k: k, hs: &hs, g: make([]float64, len(k.x))}}
		p := []float64{gridLo + (gridHi-1-gridLo)*r.Float64(), paretoAlphaMin + (paretoAlphaMax-paretoAlphaMin)*r.Float64()}
		b := gridHi + gridStep
		if trial%3 != 0 {
			p = append(p, -3+7*r.Float64())
			b = p[0] + math.Exp(p[2])
		}
		lo, hi, ok := f.weights(p)
		if !ok {
			continue
		}
		want := make([]float64, hi-lo)
		powerGridSeq(want, k.x[lo:hi], p[1], p[0])
		for i := lo; i < hi; i++ {
			x := k.x[i]
			share := (fmin(x+gridStep/2, b) - fmax(x-gridStep/2, p[0])) / gridStep
			want[i-lo] *= fmax(0, fmin(1, share))
			if math.Float64bits(f.g[i-lo]) != math.Float64bits(want[i-lo]) {
				t.Fatalf("trial %d %v, cell %d of [%d, %d): %v, direct %v", trial, p, i, lo, hi, f.g[i-lo], want[i-lo])
			}
		}
	}
}
