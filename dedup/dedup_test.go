package dedup

import (
	"math"
	"math/rand/v2"
	"testing"

	"headroom/reads"
)

func spot(lane, tile, x, y uint64) reads.Spot {
	return reads.Spot((lane+1)<<56 | tile<<40 | x<<20 | y)
}

// TestClusters checks single-linkage optical clustering on hand-worked
// cases (DESIGN.md: reads within --optical-distance in both x and y on the
// same lane and tile are linked; each linked cluster counts as one read).
func TestClusters(t *testing.T) {
	cases := []struct {
		name  string
		spots []reads.Spot
		dist  int64
		want  int64
	}{
		{"one read", []reads.Spot{spot(1, 1101, 5, 5)}, 100, 1},
		{"two close", []reads.Spot{spot(1, 1101, 1000, 1000), spot(1, 1101, 1100, 900)}, 100, 1},
		{"dx 101", []reads.Spot{spot(1, 1101, 1000, 1000), spot(1, 1101, 1101, 1000)}, 100, 2},
		{"chain links through the middle read", []reads.Spot{spot(1, 1101, 1000, 1000), spot(1, 1101, 1090, 1000), spot(1, 1101, 1180, 1000)}, 100, 1},
		{"other tile", []reads.Spot{spot(1, 1101, 1000, 1000), spot(1, 1102, 1000, 1000)}, 100, 2},
		{"other lane", []reads.Spot{spot(1, 1101, 1000, 1000), spot(2, 1101, 1000, 1000)}, 100, 2},
		{"close in x, far in y", []reads.Spot{spot(1, 1101, 1000, 1000), spot(1, 1101, 1000, 5000)}, 100, 2},
		{"distance off", []reads.Spot{spot(1, 1101, 1000, 1000), spot(1, 1101, 1000, 1000)}, 0, 2},
		{"two pairs", []reads.Spot{spot(1, 1101, 10, 10), spot(1, 1101, 5000, 10), spot(1, 1101, 60, 40), spot(1, 1101, 5050, 90)}, 100, 2},
	}
	for _, c := range cases {
		if got := clusters(append([]reads.Spot(nil), c.spots...), c.dist); got != c.want {
			t.Errorf("%s: clusters = %d, want %d", c.name, got, c.want)
		}
	}
}

// randomFragments returns fragments in coordinate order: molecules with
// geometric copy numbers, positions increasing, some optical neighbours.
func randomFragments(n int, seed uint64) []reads.Fragment {
	r := rand.New(rand.NewPCG(seed, 1))
	var out []reads.Fragment
	pos := int64(0)
	for len(out) < n {
		pos += int64(r.IntN(50))
		key := r.Uint64() | 1
		lib := r.IntN(3)
		copies := 1
		for r.Float64() < 0.5 {
			copies++
		}
		base := spot(uint64(r.IntN(2)), 1101, uint64(r.IntN(30000)), uint64(r.IntN(30000)))
		for c := 0; c < copies; c++ {
			s := spot(uint64(r.IntN(2)), 1101, uint64(r.IntN(30000)), uint64(r.IntN(30000)))
			if r.IntN(3) == 0 {
				s = base + reads.Spot(r.IntN(50))
			}
			out = append(out, reads.Fragment{Library: lib, Key: key, Spot: s, LowRef: 0, LowPos: pos})
		}
	}
	return out
}

// TestSortedEqualsHashed: the two counters are two ways of computing the
// same thing; on sorted input they must agree exactly.
func TestSortedEqualsHashed(t *testing.T) {
	fr := randomFragments(200000, 3)
	opt := Options{OpticalDistance: 100}
	s, h := NewSorted(opt), NewHashed(opt)
	for _, f := range fr {
		s.Advance(f.LowRef, f.LowPos)
		s.Add(f)
		h.Add(f)
	}
	rs, rh := s.Results(3), h.Results(3)
	for i := range rs {
		if rs[i].Fragments != rh[i].Fragments || rs[i].OpticalDups != rh[i].OpticalDups || len(rs[i].Freq) != len(rh[i].Freq) {
			t.Fatalf("library %d: sorted %+v, hashed %+v", i, rs[i], rh[i])
		}
		for k, v := range rs[i].Freq {
			if rh[i].Freq[k] != v {
				t.Errorf("library %d, times %d: sorted %d, hashed %d", i, k, v, rh[i].Freq[k])
			}
		}
	}
	if s.Peak > 1000 {
		t.Errorf("sorted window held %d molecules at once; the window should stay small", s.Peak)
	}
}

// TestHashedBudget: past the memory budget the counter keeps a hash-chosen
// subset and scales it. Each molecule is kept independently with
// probability f = 2^-shift (its key hash is uniform), so the scaled count
// of class j has standard error sqrt(n_j (1-f)/f); allow 5 of them.
func TestHashedBudget(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 2))
	full, small := NewHashed(Options{}), NewHashed(Options{MemoryBudget: 1 << 20})
	for i := 0; i < 400000; i++ {
		key := r.Uint64() | 1
		for c := 1 + r.IntN(3); c > 0; c-- {
			f := reads.Fragment{Key: key}
			full.Add(f)
			small.Add(f)
		}
	}
	rf, rs := full.Results(1)[0], small.Results(1)[0]
	if rs.Shift == 0 {
		t.Fatalf("budget of 1 MiB not reached (peak %d bytes)", small.PeakBytes)
	}
	if small.PeakBytes > 1<<20+64<<10 {
		t.Errorf("peak %d bytes, budget %d", small.PeakBytes, 1<<20)
	}
	f := math.Ldexp(1, -int(rs.Shift))
	for j, n := range rf.Freq {
		se := math.Sqrt(float64(n) * (1 - f) / f)
		if d := math.Abs(float64(rs.Freq[j] - n)); d > 5*se {
			t.Errorf("times %d: scaled %d, full %d, |diff| %.0f > 5 SE (%.0f)", j, rs.Freq[j], n, d, 5*se)
		}
	}
	// Without a budget: at most 23 bytes per molecule (9-byte slots, at
	// least 40 % full after a doubling).
	if per := float64(full.PeakBytes) / float64(rf.Molecules); per > 23 {
		t.Errorf("%.1f bytes per molecule", per)
	}
}

func BenchmarkHashedAdd(b *testing.B) {
	r := rand.New(rand.NewPCG(1, 1))
	h := NewHashed(Options{})
	keys := make([]uint64, 1<<20)
	for i := range keys {
		keys[i] = r.Uint64() | 1
	}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		h.Add(reads.Fragment{Key: keys[i&(1<<20-1)]})
	}
	res := h.Results(1)[0]
	b.ReportMetric(float64(h.PeakBytes)/float64(res.Molecules), "bytes/molecule")
}

// bruteClusters is the definition of optical clustering written as
// plainly as possible: every pair compared, single linkage by relabelling.
func bruteClusters(spots []reads.Spot, dist int64) int64 {
	n := len(spots)
	label := make([]int, n)
	for i := range label {
		label[i] = i
	}
	for i := 0; i < n; i++ {
		for j := i + 1; j < n; j++ {
			a, b := spots[i], spots[j]
			if dist <= 0 || a == 0 || b == 0 || !a.SameTile(b) || absDiff(a.X(), b.X()) > dist || absDiff(a.Y(), b.Y()) > dist {
				continue
			}
			if la, lb := label[i], label[j]; la != lb {
				for k := range label {
					if label[k] == lb {
						label[k] = la
					}
				}
			}
		}
	}
	seen := map[int]bool{}
	for _, l := range label {
		seen[l] = true
	}
	return int64(len(seen))
}

// TestClustersMatchesDefinition compares the sweep and the grid with the
// pairwise definition on random molecules: dense and sparse, one or a few
// tiles, spots without a position, distances from 1 to wider than a tile.
func TestClustersMatchesDefinition(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	for trial := 0; trial < 3000; trial++ {
		n := 2 + r.IntN(300)
		span := uint64(1 + r.IntN(3000))
		dist := int64(1 + r.IntN(250)) // 0 (off) is a TestClusters case
		if trial%50 == 0 {
			dist = 1 << 21
		}
		tiles := 1 + r.IntN(3)
		spots := make([]reads.Spot, n)
		for i := range spots {
			if r.IntN(20) == 0 {
				continue // no position
			}
			spots[i] = spot(0, uint64(1101+r.IntN(tiles)), 500+uint64(r.Uint64N(span)), 500+uint64(r.Uint64N(span)))
		}
		want := bruteClusters(spots, dist)
		for _, f := range []struct {
			name string
			fn   func([]reads.Spot, int64) int64
		}{{"clusters", clusters}, {"sweep", clustersSweep}, {"grid", clustersGrid}} {
			if got := f.fn(append([]reads.Spot(nil), spots...), dist); got != want {
				t.Fatalf("trial %d (n %d, span %d, dist %d): %s = %d, want %d", trial, n, span, dist, f.name, got, want)
			}
		}
	}
}

// TestClustersLargeMolecule: a molecule of 300,000 reads at one spot, or
// spread along one line in x, is counted without comparing every pair
// (the direct sweep would take ~4.5e10 comparisons; a hang here means the
// grid path was lost).
func TestClustersLargeMolecule(t *testing.T) {
	const n = 300000
	same := make([]reads.Spot, n)
	line := make([]reads.Spot, n)
	for i := range same {
		same[i] = spot(0, 1101, 7000, 7000)
		line[i] = spot(0, 1101, 7000, uint64(i%1000)*150) // y 150 apart: no links
	}
	if got := clusters(same, 100); got != 1 {
		t.Errorf("one spot: %d clusters, want 1", got)
	}
	if got := clusters(line, 100); got != 1000 {
		t.Errorf("a line of 1000 spots: %d clusters, want 1000", got)
	}
	if got := clusters(line, math.MaxInt64); got != 1 {
		t.Errorf("distance 2^63-1: %d clusters, want 1 (one tile)", got)
	}
}

// TestHashedBudgetWithSpots: past the budget with optical detection on,
// the subsampled counter equals an unbudgeted one fed only the molecules
// its final shift keeps (hash-threshold subsampling is a filter on the
// key), spots of the dropped molecules included; the result is then the
// same frequency counts and optical duplicates, scaled by 2^shift.
func TestHashedBudgetWithSpots(t *testing.T) {
	r := rand.New(rand.NewPCG(12, 3))
	opt := Options{OpticalDistance: 100}
	small := NewHashed(Options{OpticalDistance: 100, MemoryBudget: 1 << 20})
	var frags []reads.Fragment
	for i := 0; i < 150000; i++ {
		key := r.Uint64() | 1
		base := spot(0, 1101, uint64(r.IntN(30000)), uint64(r.IntN(30000)))
		for c := 1 + r.IntN(4); c > 0; c-- {
			s := spot(0, 1101, uint64(r.IntN(30000)), uint64(r.IntN(30000)))
			if r.IntN(2) == 0 {
				s = base + reads.Spot(r.IntN(40))
			}
			frags = append(frags, reads.Fragment{Key: key, Spot: s})
		}
	}
	for _, f := range frags {
		small.Add(f)
	}
	rs := small.Results(1)[0]
	if rs.Shift == 0 {
		t.Fatalf("budget not reached (peak %d bytes)", small.PeakBytes)
	}
	ref := NewHashed(opt)
	for _, f := range frags {
		if f.Key>>(64-rs.Shift) == 0 {
			ref.Add(f)
		}
	}
	rr := ref.Results(1)[0]
	if rr.OpticalDups<<rs.Shift != rs.OpticalDups || len(rr.Freq) != len(rs.Freq) {
		t.Fatalf("optical %d<<%d vs %d; classes %d vs %d", rr.OpticalDups, rs.Shift, rs.OpticalDups, len(rr.Freq), len(rs.Freq))
	}
	for j := range rr.Freq {
		if rr.Freq[j]<<rs.Shift != rs.Freq[j] {
			t.Errorf("times %d: %d<<%d, subsampled %d", j, rr.Freq[j], rs.Shift, rs.Freq[j])
		}
	}
}
