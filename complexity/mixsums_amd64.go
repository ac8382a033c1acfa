//go:build amd64 && !purego

package complexity

import "golang.org/x/sys/cpu"

// useVectorSums: the AVX kernel runs where the processor and the
// operating system support it (cpu.X86.HasAVX checks both).
var useVectorSums = cpu.X86.HasAVX

// sums15 is sums15Go, by the AVX kernel where there is one; rows holds
// len(g) rows and rowPad values more.
func sums15(rows, g []float64, out *[row15 + rowPad]float64) {
	if useVectorSums {
		mixSums15Vec(&rows[0], &g[0], len(g), out)
		return
	}
	sums15Go(rows, g, out)
}

// mixSums15Vec sets out[c] = Σ_{i<n} wts[i]·rows[17i + c] for c = 0..16
// (out[17..19] are sums of the next row's values, unused), one vector
// multiply and one vector add per four columns and row, rows ascending.
// It reads rows up to index 17(n−1) + 19.
//
//go:noescape
func mixSums15Vec(rows, wts *float64, n int, out *[row15 + rowPad]float64)
