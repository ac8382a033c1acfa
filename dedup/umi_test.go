package dedup

import (
	"slices"
	"testing"

	"headroom/reads"
)

func code(s string) uint64 { return reads.UMICode([]byte(s)) }

// TestDirectional works the rule of Smith, Heger & Sudbery 2017 (an edge
// a -> b when a and b differ at one base and count(a) >= 2·count(b) − 1)
// by hand on one position:
//
//	AAAA 10 -> AAAT 3  (10 >= 5)         AAAT 3 -> AATT 1  (3 >= 1)
//	AAAA 10 -/> AAAC 6 (10 < 11)         AAAC 6 -> AACC 2  (6 >= 3)
//	GGGG 1 has no neighbour
//
// so the molecules are {AAAA, AAAT, AATT} (14 reads), {AAAC, AACC} (8)
// and {GGGG} (1), with three UMIs merged.
func TestDirectional(t *testing.T) {
	in := map[string]int64{"AAAA": 10, "AAAT": 3, "AATT": 1, "AAAC": 6, "AACC": 2, "GGGG": 1}
	for _, many := range []bool{false, true} {
		var ms []umiMol
		for u, n := range in {
			ms = append(ms, umiMol{group: 1, umi: code(u), n: n})
		}
		if many {
			// Past directLimit, neighbours come from a map: pad the
			// position with 40 UMIs w+w (two words differ at a base or
			// more, so their doubles at two or more) of another length.
			for i := 0; i < 40; i++ {
				w := string([]byte{"ACGT"[i%4], "ACGT"[i/4%4], "ACGT"[i/16%4], 'A'})
				ms = append(ms, umiMol{group: 1, umi: code(w + w), n: 1})
			}
		}
		libs := []libAcc{{freq: map[int64]int64{}}}
		collapseGroups(ms, libs, 0)
		l := libs[0]
		got := l.freq
		if got[14] != 1 || got[8] != 1 || l.umiMerged != 3 {
			t.Errorf("many=%v: freq %v, merged %d; want one molecule of 14 reads, one of 8, 3 merged at position 1", many, got, l.umiMerged)
		}
	}
}

// TestCollapseKeys: FASTQ keys within two mismatches of a more abundant
// key, in either mate order, merge into it; keys three apart, or in
// another class (UMI), stay apart.
func TestCollapseKeys(t *testing.T) {
	a, b := "ACGTACGTACGTACGT", "TTGCAGGCATCCAGTA"
	mut := func(s string, pos ...int) string {
		x := []byte(s)
		for _, p := range pos {
			x[p] = "CATG"[slices.Index([]byte("ACGT"), x[p])]
		}
		return string(x)
	}
	key := func(cls uint64, s1, s2 string, n int64) umiMol {
		return umiMol{group: cls, umi: code(s1), seqB: code(s2), n: n}
	}
	ms := []umiMol{
		key(1, a, b, 20),
		key(1, mut(a, 3), b, 1),          // one error in mate 1
		key(1, mut(a, 15), mut(b, 0), 1), // one in each mate
		key(1, b, mut(a, 2), 1),          // mates exchanged, one error
		key(1, mut(a, 1, 5, 9), b, 1),    // three errors: another molecule
		key(2, mut(a, 3), b, 1),          // another UMI: another molecule
	}
	for _, threads := range []int{1, 3} {
		l := libAcc{freq: map[int64]int64{}}
		collapseKeys(slices.Clone(ms), &l, 0, threads)
		if l.freq[23] != 1 || l.freq[1] != 2 || l.keyMerged != 3 {
			t.Errorf("%d threads: freq %v, merged %d; want {23: 1, 1: 2}, 3 merged", threads, l.freq, l.keyMerged)
		}
	}
}
