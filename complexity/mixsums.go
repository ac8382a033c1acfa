package complexity

// The grid sums of every mixture likelihood at the censoring point in use
// (J = 15): per evaluation, 17 weighted column sums over the grid points
// the weights cover. They are most of the cost of a mixture fit, so on
// amd64 with AVX they run in a vector kernel (mixsums_amd64.s) whose four
// lanes are four columns: each lane does the scalar code's multiply, then
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
	rows = rows[lo*row15:]
	if useVectorSums && len(g) > 0 {
		_ = rows[len(g)*row15+rowPad-1] // the kernel reads this far
		var out [row15 + rowPad]float64
		mixSums15Vec(&rows[0], &g[0], len(g), &out)
		pj = pj[:16]
		pj[0] = 0
		copy(pj[1:16], out[:15])
		return out[15], out[16]
	}
	return mixSums15Go(rows, g, pj)
}

// mixSums15Go is mixSums15 in Go, from row 0 of rows: two passes of eight
// and nine accumulators fit the registers. The float64 conversions keep
// each product rounded before its sum (the language allows fusing x·y + z
// otherwise, which arm64 and amd64 v3 builds do), so every platform gets
// the vector kernel's bits.
func mixSums15Go(rows, g []float64, pj []float64) (pt, ps float64) {
	var p1, p2, p3, p4, p5, p6, p7, p8 float64
	for i, w := range g {
		r := (*[row15]float64)(rows[i*row15:])
		p1 += float64(w * r[0])
		p2 += float64(w * r[1])
		p3 += float64(w * r[2])
		p4 += float64(w * r[3])
		p5 += float64(w * r[4])
		p6 += float64(w * r[5])
		p7 += float64(w * r[6])
		p8 += float64(w * r[7])
	}
	var p9, p10, p11, p12, p13, p14, p15 float64
	for i, w := range g {
		r := (*[row15]float64)(rows[i*row15:])
		p9 += float64(w * r[8])
		p10 += float64(w * r[9])
		p11 += float64(w * r[10])
		p12 += float64(w * r[11])
		p13 += float64(w * r[12])
		p14 += float64(w * r[13])
		p15 += float64(w * r[14])
		pt += float64(w * r[15])
		ps += float64(w * r[16])
	}
	pj = pj[:16]
	pj[0], pj[1], pj[2], pj[3], pj[4], pj[5], pj[6], pj[7] = 0, p1, p2, p3, p4, p5, p6, p7
	pj[8], pj[9], pj[10], pj[11], pj[12], pj[13], pj[14], pj[15] = p8, p9, p10, p11, p12, p13, p14, p15
	return pt, ps
}
