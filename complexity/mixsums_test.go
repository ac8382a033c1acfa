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
	vec, ref := make([]float64, 16), make([]float64, 16)
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
		qt, qs := mixSums15Go(rows[lo*row15:], g[:m], ref)
		same := math.Float64bits(pt) == math.Float64bits(qt) && math.Float64bits(ps) == math.Float64bits(qs)
		for j := range vec {
			same = same && math.Float64bits(vec[j]) == math.Float64bits(ref[j])
		}
		if !same {
			t.Fatalf("trial %d (lo %d, %d rows): kernel %v %g %g, Go %v %g %g", trial, lo, m, vec, pt, ps, ref, qt, qs)
		}
	}
}

// TestGridChainsSideBySide: gaussGrid and powerGrid, which advance their
// blocks of products side by side, give the bits of the one-point-after-
// another recurrences, on every stretch of the grid and random parameters
// over the fits' ranges.
func TestGridChainsSideBySide(t *testing.T) {
	r := rand.New(rand.NewPCG(32, 8))
	k := gridKernel(15)
	n := len(k.x)
	got, want := make([]float64, n), make([]float64, n)
	for trial := 0; trial < 4000; trial++ {
		lo := r.IntN(n)
		x := k.x[lo : lo+r.IntN(n-lo+1)]
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
