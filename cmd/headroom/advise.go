package main

import (
	"bytes"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"headroom/amplicon"
	"headroom/complexity"
)

// The rarefaction-depth advisor of headroom taxa (--advise-depth).

// adviceRow is one candidate rarefaction depth.
type adviceRow struct {
	depth int64
	basis []string
}

// depthCandidates returns the candidate depths: the smallest sample depth,
// the 5%, 10%, 25% and 50% quantiles of the sample depths (each an actual
// sample's depth, so that sample is kept), and the round numbers
// 1, 2, 5 x 10^k between a tenth of the smallest depth and the largest.
func depthCandidates(depths []int64) []adviceRow {
	var d []int64
	for _, v := range depths {
		if v > 0 {
			d = append(d, v)
		}
	}
	if len(d) == 0 {
		return nil
	}
	sort.Slice(d, func(i, j int) bool { return d[i] < d[j] })
	byDepth := map[int64][]string{}
	add := func(v int64, why string) { byDepth[v] = append(byDepth[v], why) }
	add(d[0], "min")
	for _, q := range []struct {
		p    float64
		name string
	}{{0.05, "q05"}, {0.10, "q10"}, {0.25, "q25"}, {0.50, "median"}} {
		k := int(math.Ceil(q.p*float64(len(d)))) - 1
		if k < 0 {
			k = 0
		}
		add(d[k], q.name)
	}
	lo, hi := d[0]/10, d[len(d)-1]
	for p := int64(1); p <= hi && p < math.MaxInt64/10; p *= 10 {
		for _, m := range []int64{1, 2, 5} {
			if v := m * p; v >= lo && v >= 100 && v <= hi {
				add(v, "round")
			}
		}
	}
	var rows []adviceRow
	for v, why := range byDepth {
		rows = append(rows, adviceRow{depth: v, basis: why})
	}
	sort.Slice(rows, func(i, j int) bool { return rows[i].depth < rows[j].depth })
	return rows
}

// depthAdvice renders the rarefaction-depth table: for each candidate
// depth, the samples kept (reads >= depth) and dropped, and over the kept
// samples the minimum and median expected coverage (Chao & Jost 2012) and
// share of observed taxa retained (Hurlbert 1971) after rarefying to it.
func depthAdvice(tab *amplicon.Table) []byte {
	depths := make([]int64, len(tab.Samples))
	for i, sm := range tab.Samples {
		depths[i] = sm.Counts.Reads()
	}
	var b bytes.Buffer
	b.WriteString("depth\tbasis\tsamples_kept\tsamples_dropped\tmin_coverage\tmedian_coverage\tmin_taxa_retained\tmedian_taxa_retained\tdropped\n")
	for _, row := range depthCandidates(depths) {
		var cov, share []float64
		var dropped []string
		for _, sm := range tab.Samples {
			c := sm.Counts
			if c.Reads() < row.depth {
				dropped = append(dropped, sm.Name)
				continue
			}
			m := float64(row.depth)
			cv := complexity.Curve{Counts: c}
			cov = append(cov, cv.Coverage(m))
			share = append(share, cv.Distinct(m)/float64(c.Distinct()))
		}
		fmt.Fprintf(&b, "%d\t%s\t%d\t%d\t%s\t%s\t%s\t%s\t%s\n", row.depth, strings.Join(row.basis, ","),
			len(cov), len(dropped), fracCell(minOf(cov)).tsv, fracCell(median(cov)).tsv,
			fracCell(minOf(share)).tsv, fracCell(median(share)).tsv, listNames(dropped, 5))
	}
	return b.Bytes()
}

func minOf(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	m := v[0]
	for _, x := range v[1:] {
		m = math.Min(m, x)
	}
	return m
}

func median(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	s := append([]float64(nil), v...)
	sort.Float64s(s)
	k := len(s) / 2
	if len(s)%2 == 1 {
		return s[k]
	}
	return (s[k-1] + s[k]) / 2
}

// listNames lists up to max names, then how many more.
func listNames(names []string, max int) string {
	if len(names) <= max {
		return strCell(strings.Join(names, ",")).tsv
	}
	return strCell(strings.Join(names[:max], ",")).tsv + ",+" + strconv.Itoa(len(names)-max) + " more"
}
