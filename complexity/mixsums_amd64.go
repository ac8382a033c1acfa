//go:build amd64 && !purego

package complexity

import "golang.org/x/sys/cpu"

// useVectorSums: the AVX kernel runs where the processor and the
// operating system support it (cpu.X86.HasAVX checks both).
var useVectorSums = cpu.X86.HasAVX

// mixSums15Vec sets out[c] = Σ_{i<n} wts[i]·rows[17i + c] for c = 0..16
// (out[17..19] are sums of the next row's values, unused), one vector
// multiply and one vector add per four columns and row, rows ascending.
// It reads rows up to index 17(n−1) + 19.
//
//go:noescape
func mixSums15Vec(rows, wts *float64, n int, out *[row15 + rowPad]float64)
