package dedup

import (
	"cmp"
	"slices"

	"headroom/reads"
)

// umiMol is one UMI seen at one position (one Group): its packed UMI
// (reads.UMICode), its reads and their spots.
type umiMol struct {
	group uint64
	umi   uint64
	lib   int32
	n     int64
	spots []reads.Spot
}

// directional collapses the UMIs of one position by the directional
// adjacency rule of Smith, Heger & Sudbery 2017 (UMI-tools, Genome
// Research 27:491, "directional" method): UMI a has an edge to UMI b when
// they differ at one base and
//
//	count(a) >= 2·count(b) − 1,
//
// so an error copy, seen far less often than its source, hangs off it.
// Taking the UMIs from the most reads to the fewest (ties by UMI, for a
// deterministic order), each UMI not yet taken starts a molecule that
// gathers every UMI reachable from it along edges and not yet taken; the
// molecule's reads are the sum of theirs. (The paper's components may
// share a UMI reachable from two starts; here it goes to the first, the
// more abundant start, so that the molecules partition the reads.)
//
// ms is reordered. emit is called once per molecule with its reads and
// spots (valid during the call); directional returns the number of UMIs
// merged into another.
func directional(ms []umiMol, emit func(n int64, spots []reads.Spot)) (merged int64) {
	if len(ms) == 1 {
		emit(ms[0].n, ms[0].spots)
		return 0
	}
	slices.SortFunc(ms, func(a, b umiMol) int {
		if c := cmp.Compare(b.n, a.n); c != 0 {
			return c
		}
		return cmp.Compare(a.umi, b.umi)
	})
	taken := make([]bool, len(ms))
	// Neighbours by lookup of the 3 substitutions of each base when there
	// are many UMIs (linear in them), by comparing all pairs when few.
	var index map[uint64]int
	if len(ms) > directLimit {
		index = make(map[uint64]int, len(ms))
		for i, m := range ms {
			index[m.umi] = i
		}
	}
	var queue []int
	var spots []reads.Spot
	for i := range ms {
		if taken[i] {
			continue
		}
		taken[i] = true
		queue = append(queue[:0], i)
		n := int64(0)
		spots = spots[:0]
		for len(queue) > 0 {
			a := queue[0]
			queue = queue[1:]
			n += ms[a].n
			spots = append(spots, ms[a].spots...)
			edge := func(b int) {
				if !taken[b] && ms[a].n >= 2*ms[b].n-1 {
					taken[b] = true
					merged++
					queue = append(queue, b)
				}
			}
			if index == nil {
				for b := range ms {
					if !taken[b] && reads.UMIDistance1(ms[a].umi, ms[b].umi) {
						edge(b)
					}
				}
				continue
			}
			u := ms[a].umi
			for p := uint64(0); p < u>>56; p++ {
				for v := uint64(1); v < 4; v++ {
					if b, ok := index[u^v<<(2*p)]; ok {
						edge(b)
					}
				}
			}
		}
		emit(n, spots)
	}
	return merged
}

// directLimit is the number of UMIs at one position up to which all pairs
// are compared (at most 32·31/2 comparisons, cheaper than a map).
const directLimit = 32

// collapseGroups sorts ms by group and collapses each group's UMIs into
// molecules, counting them in their libraries (the library is part of the
// group's key, so one group has one library).
func collapseGroups(ms []umiMol, libs []libAcc, dist int64) {
	slices.SortFunc(ms, func(a, b umiMol) int { return cmp.Compare(a.group, b.group) })
	for i := 0; i < len(ms); {
		j := i + 1
		for j < len(ms) && ms[j].group == ms[i].group {
			j++
		}
		l := &libs[ms[i].lib]
		l.umiMerged += directional(ms[i:j], func(n int64, spots []reads.Spot) {
			l.count(n, spots, dist)
		})
		i = j
	}
}
