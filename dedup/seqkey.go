package dedup

import (
	"cmp"
	"math/bits"
	"slices"
	"sync"

	"headroom/reads"
)

// maxKeyErrors is the most mismatches between two FASTQ keys (over the
// leading bases of both mates) for one to be taken as the other's
// sequencing error. Two: at a per-base error rate e over the 2k key bases,
// a read's key has three or more errors with probability about
// C(2k,3)·e³, 0.003% for k = 12 and e = 0.5%, against 0.7% for two
// (BENCHMARKS.md "FASTQ keys and sequencing errors").
const maxKeyErrors = 2

// runLimit bounds the keys compared pairwise within one run of keys that
// share two quarters; a longer run (low-complexity reads) is left as it
// is, its keys matched exactly.
const runLimit = 256

// keyParts splits a key's bases (SeqA then SeqB, as packed by
// reads.UMICode) into four quarters, each packed with its length. Two
// keys within maxKeyErrors = 2 mismatches agree exactly on at least two
// of the four (the pigeonhole principle).
func keyParts(m umiMol) [4]uint64 {
	var p [4]uint64
	for q := uint(0); q < 4; q++ {
		p[q] = keyQuarter(m.umi, m.seqB, q)
	}
	return p
}

// keyQuarter returns quarter q of keyParts for a key's SeqA a and SeqB b.
func keyQuarter(a, b uint64, q uint) uint64 {
	la, lb := uint(a>>56), uint(b>>56)
	n := la + lb
	const bases = 1<<56 - 1
	// The key's 2n bits, SeqA's bases first, as hi:lo (n <= 2·28 bases;
	// Go's shifts by 64 or more give 0, which covers lb = 0).
	a, b = a&bases, b&bases
	lo, hi := b|a<<(2*lb), a>>(64-2*lb)
	from, to := q*n/4, (q+1)*n/4
	s := 2 * (n - to) // bit offset of the quarter's last base
	var c uint64
	switch {
	case s >= 64:
		c = hi >> (s - 64)
	case s == 0:
		c = lo
	default:
		c = lo>>s | hi<<(64-s)
	}
	return c&(1<<(2*(to-from))-1) | uint64(to-from)<<56
}

// quarterKey hashes a class and two key quarters into one sort key.
func quarterKey(class, a, b uint64) uint64 {
	h := (class ^ a*0x9E3779B185EBCA87) * 0xC2B2AE3D27D4EB4F
	h = (h ^ h>>29 ^ b) * 0x165667B19E3779F9
	return h ^ h>>32
}

// swapped returns m with its mates' keys exchanged.
func swapped(m umiMol) umiMol {
	m.umi, m.seqB = m.seqB, m.umi
	return m
}

// keyDistance returns the mismatches between two keys of equal mate
// lengths, or maxKeyErrors+1 when the lengths differ.
func keyDistance(a, b umiMol) int {
	if a.umi>>56 != b.umi>>56 || a.seqB>>56 != b.seqB>>56 {
		return maxKeyErrors + 1
	}
	d := 0
	for _, x := range [2]uint64{a.umi ^ b.umi, a.seqB ^ b.seqB} {
		d += bits.OnesCount64((x | x>>1) & 0x0055555555555555)
	}
	return d
}

// collapseKeys merges FASTQ molecule keys within maxKeyErrors mismatches
// (sequencing errors in the leading bases of the mates) by the
// directional rule, among keys of one Class (library and UMI), and counts
// the molecules in l. ms holds one library's keys; it is reordered.
//
// Candidates are found by sorting on each pair of the four quarters of
// the key (keyParts) and comparing keys within each run of equal quarters:
// six sorts, O(n log n) for n keys instead of the n² of all pairs. A pair
// key holds its mates in lexicographic order (reads.Keyer.FASTQ), which an
// error in the first bases can reverse, so each pair key also takes part
// with its mates exchanged.
func collapseKeys(ms []umiMol, l *libAcc, dist int64, threads int) {
	if len(ms) == 0 {
		return
	}
	// The passes find edges between keys in the order given; meanwhile
	// this goroutine sorts the keys for directional (by class, then
	// abundance), and the edges are renumbered into that order below.
	// Entry e < len(ms) is key e as it is, entry len(ms)+e key e with its
	// mates exchanged (pairs only).
	n := int32(len(ms))
	entry := func(e int32) (int32, umiMol) {
		if e >= n {
			return e - n, swapped(ms[e-n])
		}
		return e, ms[e]
	}
	// One sort key per entry and quarter pair: a hash of the class and the
	// two quarters, so that each of the six sorts compares single words
	// (a hash collision only adds a candidate, which the distance and class
	// checks then drop). The six passes run on up to threads goroutines,
	// each with its own edge list, joined in pass order (and sorted below),
	// so the result does not depend on threads.
	// Entries are grouped by sort key with a counting sort on its top
	// bits and then a sort of each (small) bucket, cheaper than sorting
	// all 2n records by comparison; the runs of equal sort keys, and so
	// the edges found, are the same in any order of a run's entries.
	entries := 0
	for i := range ms {
		entries++
		if ms[i].seqB != 0 {
			entries++
		}
	}
	// 2^11 buckets: their write positions stay in cache during the scatter.
	shift := 64 - uint(min(11, max(1, bits.Len(uint(entries))-4)))
	pass := func(x, y int, recs []rec) (edges []uint64) {
		each := func(f func(k uint64, e int32)) {
			qx, qy := uint(x), uint(y)
			for i := range ms {
				m := &ms[i]
				f(quarterKey(m.group, keyQuarter(m.umi, m.seqB, qx), keyQuarter(m.umi, m.seqB, qy)), int32(i))
				if m.seqB != 0 {
					f(quarterKey(m.group, keyQuarter(m.seqB, m.umi, qx), keyQuarter(m.seqB, m.umi, qy)), n+int32(i))
				}
			}
		}
		start := make([]int32, 1<<(64-shift)+1)
		each(func(k uint64, _ int32) { start[k>>shift+1]++ })
		for b := 1; b < len(start); b++ {
			start[b] += start[b-1]
		}
		// recs (entries long, one per worker, reused by its passes) is
		// overwritten whole by the scatter.
		at := slices.Clone(start[:len(start)-1])
		each(func(k uint64, e int32) {
			b := k >> shift
			recs[at[b]] = rec{k, e}
			at[b]++
		})
		var scratch []rec
		for b := 0; b+1 < len(start); b++ {
			if bucket := recs[start[b]:start[b+1]]; len(bucket) > 1 {
				scratch = sortRecs(bucket, shift, scratch)
			}
		}
		for i := 0; i < len(recs); {
			j := i + 1
			for j < len(recs) && recs[j].k == recs[i].k {
				j++
			}
			if run := recs[i:j]; len(run) > 1 && len(run) <= runLimit {
				for p := range run {
					a, ma := entry(run[p].e)
					for q := p + 1; q < len(run); q++ {
						b, mb := entry(run[q].e)
						if a == b || ma.group != mb.group {
							continue
						}
						if d := keyDistance(ma, mb); d >= 1 && d <= maxKeyErrors {
							edges = append(edges, edge(a, b), edge(b, a))
						}
					}
				}
			}
			i = j
		}
		return edges
	}
	pairs := [6][2]int{{0, 1}, {0, 2}, {0, 3}, {1, 2}, {1, 3}, {2, 3}}
	var found [6][]uint64
	var wg sync.WaitGroup
	next := make(chan int, len(pairs))
	for k := range pairs {
		next <- k
	}
	close(next)
	workers := max(1, min(threads, len(pairs)))
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			recs := make([]rec, entries)
			for k := range next {
				found[k] = pass(pairs[k][0], pairs[k][1], recs)
			}
		}()
	}
	wg.Wait()
	// A key without an edge is a molecule of its own, whatever the order,
	// and l.count does not depend on the order of its calls: count those
	// now and sort only the keys with an edge (a few percent of them, the
	// error copies and their sources). rank maps an old index to its
	// position among the keys kept, then in sorted order.
	rank := make([]int32, len(ms))
	for _, f := range found {
		for _, e := range f {
			rank[e>>32] = 1
		}
	}
	kept := 0
	for i := range ms {
		if rank[i] == 0 {
			l.count(ms[i].n, ms[i].spots, dist)
			continue
		}
		rank[i] = int32(kept)
		ms[kept] = ms[i]
		kept++
	}
	clear(ms[kept:]) // release the spots of the keys counted
	ms = ms[:kept]
	if kept == 0 {
		return
	}
	sorted := permute(ms, sortOrder(ms))
	for i, r := range rank {
		rank[i] = sorted[r]
	}
	var edges []uint64 // both directions, as edge(a, b) in sorted order
	for _, f := range found {
		for _, e := range f {
			edges = append(edges, edge(rank[e>>32], rank[uint32(e)]))
		}
	}
	found, rank, sorted = [6][]uint64{}, nil, nil
	// Adjacency lists (compressed rows; a pair found by several quarter
	// pairs is listed several times, which the directional pass ignores).
	slices.Sort(edges)
	start := make([]int32, len(ms)+1)
	for _, e := range edges {
		start[e>>32+1]++
	}
	for i := 1; i < len(start); i++ {
		start[i] += start[i-1]
	}
	l.keyMerged += directional(ms, func(a int, f func(b int)) {
		for _, e := range edges[start[a]:start[a+1]] {
			f(int(uint32(e)))
		}
	}, func(n int64, spots []reads.Spot) {
		l.count(n, spots, dist)
	})
}

// sortKey is the part of a key that orders it for directional.
type sortKey struct {
	group, umi, seqB uint64
	n                int64
	i                int32
}

// sortOrder returns the order of ms by class, then byAbundance: the old
// index of each key in sorted order. It sorts compact copies of the
// fields compared, so the comparisons, and so the order (ties included),
// are those of sorting ms itself; ms is only read.
func sortOrder(ms []umiMol) []int32 {
	ord := make([]sortKey, len(ms))
	for i := range ms {
		m := &ms[i]
		ord[i] = sortKey{m.group, m.umi, m.seqB, m.n, int32(i)}
	}
	slices.SortFunc(ord, func(a, b sortKey) int {
		if c := cmp.Compare(a.group, b.group); c != 0 {
			return c
		}
		if c := cmp.Compare(b.n, a.n); c != 0 { // as byAbundance
			return c
		}
		if c := cmp.Compare(a.umi, b.umi); c != 0 {
			return c
		}
		return cmp.Compare(a.seqB, b.seqB)
	})
	order := make([]int32, len(ms))
	for i, o := range ord {
		order[i] = o.i
	}
	return order
}

// permute moves ms into the given order (order[i] is the old index of the
// key that goes to i), following its cycles in place, and returns each
// old index's new position.
func permute(ms []umiMol, order []int32) (rank []int32) {
	rank = make([]int32, len(ms))
	for i, o := range order {
		rank[o] = int32(i)
	}
	for i := range order {
		if order[i] < 0 || order[i] == int32(i) {
			continue
		}
		tmp := ms[i]
		j := int32(i)
		for {
			k := order[j]
			order[j] = -1
			if k == int32(i) {
				ms[j] = tmp
				break
			}
			ms[j] = ms[k]
			j = k
		}
	}
	return rank
}

// rec is one entry of a quarter-pair pass: its sort key and entry.
type rec struct {
	k uint64
	e int32
}

// sortRecs sorts a bucket of records, whose sort keys agree above bit
// shift, by sort key: a counting sort on the next 8 bits (through
// scratch, which it returns for reuse) and then insertion sorts of the
// few records left with equal bits.
func sortRecs(r []rec, shift uint, scratch []rec) []rec {
	switch {
	case len(r) <= 16:
		insertionSortRecs(r)
		return scratch
	case shift < 8:
		slices.SortFunc(r, func(a, b rec) int { return cmp.Compare(a.k, b.k) })
		return scratch
	}
	shift -= 8
	var start [257]int32 // sub-bucket bounds
	for _, x := range r {
		start[(x.k>>shift)&255+1]++
	}
	for d := 1; d < len(start); d++ {
		start[d] += start[d-1]
	}
	scratch = slices.Grow(scratch[:0], len(r))[:len(r)]
	at := start
	for _, x := range r {
		d := (x.k >> shift) & 255
		scratch[at[d]] = x
		at[d]++
	}
	copy(r, scratch)
	for d := 0; d < 256; d++ {
		if sub := r[start[d]:start[d+1]]; len(sub) > 1 {
			scratch = sortRecs(sub, shift, scratch) // r is back from scratch: reuse it
		}
	}
	return scratch
}

func insertionSortRecs(r []rec) {
	for i := 1; i < len(r); i++ {
		for j := i; j > 0 && r[j].k < r[j-1].k; j-- {
			r[j], r[j-1] = r[j-1], r[j]
		}
	}
}

// edge packs a directed edge between entries a and b into one word that
// sorts as the pair (a, b).
func edge(a, b int32) uint64 { return uint64(a)<<32 | uint64(uint32(b)) }
