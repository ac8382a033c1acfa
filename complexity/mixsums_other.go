//go:build !amd64 || purego

package complexity

// Without the amd64 kernel, mixSums15 uses the Go loops.
const useVectorSums = false

func mixSums15Vec(rows, wts *float64, n int, out *[row15 + rowPad]float64) {
	panic("complexity: no vector kernel on this platform")
}
