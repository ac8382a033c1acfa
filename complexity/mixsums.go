package complexity

// The grid sums of every mixture likelihood at the censoring point in use
// (J = 15): per evaluation, 17 weighted column sums over the grid points
// the weights cover. They are most of the cost of a mixture fit, so on
// amd64 with AVX they run in a vector kernel (mixsums_amd64.s) whose four
// lanes are four columns: each lane does the Go loop's multiply, then
// add, over the rows in the same ascending order, so the sums are the same
// bits (TestMixSums15Kernel compares them on random rows and weights).

// rowPad is how many zeros follow the last row of kernel.rows15 and
// kernel.rowsFree15: the kernel reads five vectors of four from each row
// of 17 values, three past the row.
const rowPad = 3

// mixSums15 sets pj[j] = Σ_i g_i P(j | λ_{lo+i}), j = 1..15, and returns
// the weighted sums of the rows' columns 15 (P(X > 15 | λ) in
// kernel.rows15, P(1 ≤ X ≤ 15 | λ) in kernel.rowsFree15) and 16
// (1 − e^{−λ}), over the rows from lo. rows must hold rowPad values past
// row lo+len(g)−1. Each sum runs over i in ascending order, as in the
// general loop of gridSums (a zero weight adds an exact zero), so the
// results are the same bits on every path.
func mixSums15(rows, g []float64, lo int, pj []float64) (pt, ps float64) {
	var out [row15 + rowPad]float64
	if len(g) > 0 {
		sums15(rows[lo*row15:lo*row15+len(g)*row15+rowPad], g, &out)
	}
	pj = pj[:16]
	pj[0] = 0
	copy(pj[1:16], out[:15])
	return out[15], out[16]
}

// sums15Go adds g[i]·rows[17i + c] to out[c], c = 0..16, rows ascending:
// sums15 without the vector kernel. The float64 conversion keeps each
// product rounded before its sum (the language allows fusing x·y + z
// otherwise, which arm64 and amd64 v3 builds do), so every platform gets
// the kernel's bits.
func sums15Go(rows, g []float64, out *[row15 + rowPad]float64) {
	for i, w := range g {
		r := (*[row15]float64)(rows[i*row15:])
		for c, v := range r {
			out[c] += float64(w * v)
		}
	}
}
