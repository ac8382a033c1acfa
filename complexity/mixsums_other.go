//go:build !amd64 || purego

package complexity

// Without the amd64 kernel the grid sums are the Go loop.
const useVectorSums = false

func sums15(rows, g []float64, out *[row15 + rowPad]float64) { sums15Go(rows, g, out) }
