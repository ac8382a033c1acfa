package dedup

import (
	"cmp"
	"slices"

	"headroom/reads"
)

// umiMol is one UMI seen at one position (one Group), or one FASTQ key
// (Class, SeqA, SeqB): its packed bases, its reads and their spots.
type umiMol struct {
	group uint64 // Fragment.Group, or Fragment.Class for a FASTQ key
	umi   uint64 // Fragment.UMI, or Fragment.SeqA
	seqB  uint64 // Fragment.SeqB (FASTQ keys only)
	lib   int32
	n     int64
	spots []reads.Spot
}

// directional merges sequencing-error copies into their source by the
// directional adjacency rule of Smith, Heger & Sudbery 2017 (UMI-tools,
// Genome Research 27:491, "directional" method): node a has an edge to
// node b when their sequences differ at one base and
//
//	count(a) >= 2·count(b) − 1,
//
// so an error copy, seen far less often than its source, hangs off it.
// Taking the nodes from the most reads to the fewest (ties by sequence,
// for a deterministic order), each node not yet taken starts a molecule
// that gathers every node reachable from it along edges and not yet
// taken; the molecule's reads are the sum of theirs. (The paper's
// components may share a node reachable from two starts; here it goes to
// the first, the more abundant start, so that the molecules partition the
// reads.)
//
// ms must be in that order (byAbundance); neighbours(a, f) calls f with
// every node one base from node a. emit is called once per molecule with
// its reads and spots (valid during the call). directional returns the
// number of nodes merged into another.
func directional(ms []umiMol, neighbours func(a int, f func(b int)), emit func(n int64, spots []reads.Spot)) (merged int64) {
	if len(ms) == 1 {
		emit(ms[0].n, ms[0].spots)
		return 0
	}
	taken := make([]bool, len(ms))
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
			neighbours(a, func(b int) {
				if !taken[b] && ms[a].n >= 2*ms[b].n-1 {
					taken[b] = true
					merged++
					queue = append(queue, b)
				}
			})
		}
		emit(n, spots)
	}
	return merged
}

// byAbundance orders nodes for directional: most reads first, then by
// sequence.
func byAbundance(a, b umiMol) int {
	if c := cmp.Compare(b.n, a.n); c != 0 {
		return c
	}
	if c := cmp.Compare(a.umi, b.umi); c != 0 {
		return c
	}
	return cmp.Compare(a.seqB, b.seqB)
}

// directLimit is the number of sequences up to which all pairs are
// compared (at most 32·31/2 comparisons, cheaper than a map).
const directLimit = 32

// substitutions calls f with each sequence one base from code (a
// reads.UMICode).
func substitutions(code uint64, f func(uint64)) {
	for p := uint64(0); p < code>>56; p++ {
		for v := uint64(1); v < 4; v++ {
			f(code ^ v<<(2*p))
		}
	}
}

// umiNeighbours returns the neighbours function of directional over the
// UMIs of one position.
func umiNeighbours(ms []umiMol) func(a int, f func(b int)) {
	if len(ms) <= directLimit {
		return func(a int, f func(b int)) {
			for b := range ms {
				if reads.UMIDistance1(ms[a].umi, ms[b].umi) {
					f(b)
				}
			}
		}
	}
	index := make(map[uint64]int, len(ms))
	for i, m := range ms {
		index[m.umi] = i
	}
	return func(a int, f func(b int)) {
		substitutions(ms[a].umi, func(c uint64) {
			if b, ok := index[c]; ok {
				f(b)
			}
		})
	}
}

// collapseGroups sorts ms by group and collapses each group's UMIs into
// molecules, counting them in their libraries (the library is part of the
// group's key, so one group has one library).
func collapseGroups(ms []umiMol, libs []libAcc, dist int64) {
	slices.SortFunc(ms, func(a, b umiMol) int {
		if c := cmp.Compare(a.group, b.group); c != 0 {
			return c
		}
		return byAbundance(a, b)
	})
	for i := 0; i < len(ms); {
		j := i + 1
		for j < len(ms) && ms[j].group == ms[i].group {
			j++
		}
		g := ms[i:j]
		l := &libs[ms[i].lib]
		l.umiMerged += directional(g, umiNeighbours(g), func(n int64, spots []reads.Spot) {
			l.count(n, spots, dist)
		})
		i = j
	}
}
