package dedup

import (
	"headroom/reads"
)

// Options configure a counter and Count. The zero value links no optical
// duplicates, sets no memory budget, counts by library in ModeAuto with
// the zero reads.KeyOptions, and reports no progress.
type Options struct {
	// OpticalDistance is the largest |dx| and |dy|, in flow-cell pixels,
	// of two reads of one molecule counted as one optical cluster; 0 turns
	// optical-duplicate detection off.
	OpticalDistance int64
	// MemoryBudget bounds the bytes of the hashed counter's tables; 0 means
	// no bound. Past it the counter subsamples by key hash.
	MemoryBudget int64
	// BudgetName is how the budget was given, for the note that says it
	// was reached (e.g. "--max-memory 4G"); "" names it in bytes.
	BudgetName string

	// By, Mode and Key are used by Count: what a summary row is, how
	// molecules are counted, and how records become molecule keys
	// (Key.OpticalNames is set from OpticalDistance).
	By   By
	Mode Mode
	Key  reads.KeyOptions
	// PatternedDistance, when not 0, is the optical distance of the
	// libraries of an input whose first read name says a patterned flow
	// cell (reads.Patterned), in place of OpticalDistance (Count).
	PatternedDistance int64
	// UMIAsked says the UMI source was chosen by the user, so that its
	// absence from most records is noted even when no other UMI tag is
	// there.
	UMIAsked bool
	// Threads bounds the goroutines that decompress one input (reads.Open).
	Threads int
	// Progress, when not nil, is called by Count as input number in (an
	// index of its inputs) starts (records 0), every 65,536 records or
	// pairs, and when it is done.
	Progress func(in int, records int64, done bool)
}

// Result is one library's outcome.
type Result struct {
	// Freq maps times seen to the number of molecules seen that many
	// times (after optical collapse), already multiplied by 2^Shift.
	Freq map[int64]int64
	// Fragments counted (before optical collapse and subsampling).
	Fragments int64
	// OpticalDups is the reads removed as optical duplicates (times 2^Shift).
	OpticalDups int64
	// Shift is the subsampling: only molecules whose key hash falls in the
	// lowest 2^-Shift of the range were kept.
	Shift uint
	// Molecules is the number of molecules actually held (before scaling).
	Molecules int64
	// UMIMerged is the number of UMIs merged into a more abundant UMI at
	// the same position as its sequencing errors (directional; times
	// 2^Shift).
	UMIMerged int64
	// KeyMerged is the number of FASTQ keys merged into a more abundant
	// key one base away (times 2^Shift).
	KeyMerged int64
}

// Counter collapses fragments into molecules.
type Counter interface {
	// Add counts one fragment.
	Add(f reads.Fragment)
	// Advance tells a sorted counter that the stream reached (ref, pos);
	// molecules that can get no more reads are counted and forgotten.
	Advance(ref int32, pos int64)
	// SetLeadClip raises the longest leading clip seen, which widens the
	// window of a sorted counter.
	SetLeadClip(c int64)
	// SetDistance sets the optical distance of one library.
	SetDistance(lib int, d int64)
	// Results finishes counting and returns one Result per library index
	// 0..n-1.
	Results(n int) []Result
}

type libAcc struct {
	freq      map[int64]int64
	fragments int64
	optical   int64
	molecules int64
	umiMerged int64
	keyMerged int64
	dist      int64 // optical distance of this library when > 0 (SetDistance)
}

func grow(libs []libAcc, lib int) []libAcc {
	for len(libs) <= lib {
		libs = append(libs, libAcc{freq: map[int64]int64{}})
	}
	return libs
}

func results(libs []libAcc, n int, shift uint) []Result {
	libs = grow(libs, n-1)
	out := make([]Result, n)
	for i := 0; i < n; i++ {
		l := libs[i]
		f := make(map[int64]int64, len(l.freq))
		for t, u := range l.freq {
			f[t] = u << shift
		}
		out[i] = Result{Freq: f, Fragments: l.fragments, OpticalDups: l.optical << shift, Shift: shift, Molecules: l.molecules, UMIMerged: l.umiMerged << shift, KeyMerged: l.keyMerged << shift}
	}
	return out
}

// count records one finished molecule of n reads with the given spots
// (reads without a spot are not in spots).
func (l *libAcc) count(n int64, spots []reads.Spot, dist int64) {
	if l.dist > 0 {
		dist = l.dist
	}
	times := n
	if len(spots) > 1 && dist > 0 {
		times = clusters(spots, dist) + n - int64(len(spots))
	}
	l.freq[times]++
	l.optical += n - times
	l.molecules++
}

// SetDistance sets the optical distance of library lib, in place of
// Options.OpticalDistance (a patterned flow cell: reads.Patterned).
func (s *Sorted) SetDistance(lib int, d int64) {
	s.libs = grow(s.libs, lib)
	s.libs[lib].dist = d
}

// MinSlack is the smallest window margin of the sorted counter, in
// reference bases beyond a key's lower end: twice the longest
// leading clip seen, but never less than this (longer than the reads of
// short-read platforms, so the window is right from the first record).
const MinSlack = 1024

// Sorted counts coordinate-sorted input in a moving window.
type Sorted struct {
	opt      Options
	leadClip int64
	index    map[uint64]int32
	mols     []mol
	free     []int32
	heap     []hent
	libs     []libAcc
	frontRef int32
	frontPos int64
	pending  []int32  // molecules with a UMI group, flushed, to be collapsed
	group    []umiMol // scratch of collapse

	// Late counts fragments whose key ends before molecules already
	// counted: a leading clip longer than the window had allowed for. Such
	// a fragment may have split a molecule in two.
	Late int64
	// Peak is the largest number of molecules held at once.
	Peak int
}

type mol struct {
	key   uint64
	group uint64
	umi   uint64
	lib   int32
	n     int64
	spots []reads.Spot
}

type hent struct {
	ref int32
	pos int64
	idx int32
}

// NewSorted returns a counter for coordinate-sorted input.
func NewSorted(opt Options) *Sorted {
	return &Sorted{opt: opt, index: map[uint64]int32{}, frontRef: -1}
}

func (s *Sorted) slack() int64 {
	if 2*s.leadClip > MinSlack {
		return 2 * s.leadClip
	}
	return MinSlack
}

// SetLeadClip implements Counter.
func (s *Sorted) SetLeadClip(c int64) {
	if c > s.leadClip {
		s.leadClip = c
	}
}

// Add implements Counter.
func (s *Sorted) Add(f reads.Fragment) {
	s.libs = grow(s.libs, f.Library)
	s.libs[f.Library].fragments++
	if i, ok := s.index[f.Key]; ok {
		m := &s.mols[i]
		m.n++
		if f.Spot != 0 && s.opt.OpticalDistance > 0 {
			m.spots = append(m.spots, f.Spot)
		}
		return
	}
	if f.LowRef < s.frontRef || f.LowRef == s.frontRef && f.LowPos < s.frontPos {
		s.Late++
	}
	var idx int32
	if n := len(s.free); n > 0 {
		idx = s.free[n-1]
		s.free = s.free[:n-1]
	} else {
		s.mols = append(s.mols, mol{})
		idx = int32(len(s.mols) - 1)
	}
	m := &s.mols[idx]
	m.key, m.group, m.umi, m.lib, m.n, m.spots = f.Key, f.Group, f.UMI, int32(f.Library), 1, m.spots[:0]
	if f.Spot != 0 && s.opt.OpticalDistance > 0 {
		m.spots = append(m.spots, f.Spot)
	}
	s.index[f.Key] = idx
	s.push(hent{f.LowRef, f.LowPos, idx})
	if len(s.index) > s.Peak {
		s.Peak = len(s.index)
	}
}

// Advance implements Counter.
func (s *Sorted) Advance(ref int32, pos int64) {
	sl := s.slack()
	for len(s.heap) > 0 {
		t := s.heap[0]
		if t.ref > ref || t.ref == ref && t.pos+sl >= pos {
			break
		}
		s.pop()
		s.flush(t)
	}
	s.collapse()
}

// flush counts a molecule the window has passed, or, when it has a UMI
// group, holds it for collapse: every molecule of its group (the same
// key but for the UMI, so the same lower end) is flushed by the same
// Advance.
func (s *Sorted) flush(t hent) {
	m := &s.mols[t.idx]
	delete(s.index, m.key)
	if m.group != 0 {
		s.pending = append(s.pending, t.idx)
	} else {
		s.libs[m.lib].count(m.n, m.spots, s.opt.OpticalDistance)
		s.free = append(s.free, t.idx)
	}
	if t.ref > s.frontRef || t.ref == s.frontRef && t.pos > s.frontPos {
		s.frontRef, s.frontPos = t.ref, t.pos
	}
}

// collapse counts the pending molecules, collapsing UMI errors within
// each group. A group's molecules share a library (it is in the key).
func (s *Sorted) collapse() {
	if len(s.pending) == 0 {
		return
	}
	g := s.group[:0]
	for _, i := range s.pending {
		m := &s.mols[i]
		g = append(g, umiMol{group: m.group, umi: m.umi, lib: m.lib, n: m.n, spots: m.spots})
	}
	collapseGroups(g, s.libs, s.opt.OpticalDistance)
	s.free = append(s.free, s.pending...)
	s.pending = s.pending[:0]
	s.group = g[:0]
}

// Results implements Counter.
func (s *Sorted) Results(n int) []Result {
	for len(s.heap) > 0 {
		t := s.pop()
		s.flush(t)
	}
	s.collapse()
	return results(s.libs, n, 0)
}

func (a hent) less(b hent) bool {
	if a.ref != b.ref {
		return a.ref < b.ref
	}
	return a.pos < b.pos
}

func (s *Sorted) push(e hent) {
	h := append(s.heap, e)
	i := len(h) - 1
	for i > 0 {
		p := (i - 1) / 2
		if !h[i].less(h[p]) {
			break
		}
		h[i], h[p] = h[p], h[i]
		i = p
	}
	s.heap = h
}

func (s *Sorted) pop() hent {
	h := s.heap
	top := h[0]
	last := len(h) - 1
	h[0] = h[last]
	h = h[:last]
	i := 0
	for {
		l := 2*i + 1
		if l >= len(h) {
			break
		}
		m := l
		if r := l + 1; r < len(h) && h[r].less(h[l]) {
			m = r
		}
		if !h[m].less(h[i]) {
			break
		}
		h[i], h[m] = h[m], h[i]
		i = m
	}
	s.heap = h
	return top
}
