package main

import (
	"bufio"
	"math"
	"os"
	"strconv"
	"strings"
)

// readPool reads --pool: a TSV with a header naming the columns sample
// and share, one row per sample of this run, shares positive numbers
// (volumes at equal molarity, in any unit: they are normalised). Without
// a file every sample has an equal share.
func readPool(path string, samples []sampleInput) ([]float64, error) {
	shares := make([]float64, len(samples))
	if path == "" {
		for i := range shares {
			shares[i] = 1 / float64(len(samples))
		}
		return shares, nil
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, inputf(path, 0, "cannot open the pool table: %v", unwrapPath(err))
	}
	defer f.Close()
	idx := map[string]int{}
	for i, in := range samples {
		idx[in.name] = i
	}
	got := make([]bool, len(samples))
	sc := bufio.NewScanner(f)
	sc.Buffer(make([]byte, 64<<10), 1<<20)
	var line int64
	col := map[string]int{}
	for sc.Scan() {
		line++
		t := strings.TrimRight(sc.Text(), "\r")
		if strings.TrimSpace(t) == "" || strings.HasPrefix(t, "#") {
			continue
		}
		fields := strings.Split(t, "\t")
		if len(col) == 0 {
			for k, h := range fields {
				col[strings.TrimSpace(h)] = k
			}
			_, okS := col["sample"]
			_, okH := col["share"]
			if !okS || !okH {
				return nil, inputf(path, line, "the pool table needs a header with the columns sample and share (tab-separated)")
			}
			continue
		}
		if len(fields) != len(col) {
			return nil, inputf(path, line, "%d fields where the header has %d", len(fields), len(col))
		}
		name := fields[col["sample"]]
		i, ok := idx[name]
		if !ok {
			return nil, inputf(path, line, "sample %q is not in this run; give the shares of this run's samples", name)
		}
		if got[i] {
			return nil, inputf(path, line, "sample %q given twice", name)
		}
		v, err := strconv.ParseFloat(strings.TrimSpace(fields[col["share"]]), 64)
		if err != nil || !(v > 0) || math.IsInf(v, 0) {
			return nil, inputf(path, line, "column %d: share %q is not a positive number", col["share"]+1, fields[col["share"]])
		}
		shares[i], got[i] = v, true
	}
	if err := sc.Err(); err != nil {
		return nil, inputf(path, line+1, "cannot read the pool table: %v", err)
	}
	if len(col) == 0 {
		return nil, inputf(path, 0, "the pool table is empty; it needs a header (sample, share) and one row per sample")
	}
	var missing []string
	var sum float64
	for i, ok := range got {
		if !ok {
			missing = append(missing, samples[i].name)
		}
		sum += shares[i]
	}
	if len(missing) > 0 {
		return nil, inputf(path, 0, "no share for %s; give every sample of this run a share", quoteList(missing))
	}
	for i := range shares {
		shares[i] /= sum
	}
	return shares, nil
}
