package dedup

import (
	"math/bits"
	"slices"

	"headroom/reads"
)

// Hashed counts input in any order in compact per-library hash tables.
type Hashed struct {
	opt   Options
	shift uint
	tabs  []*table
	libs  []libAcc
	bytes int64 // current table memory, all libraries

	// PeakBytes is the largest table memory reached.
	PeakBytes int64
}

// table is one library's molecules: open addressing with linear probing
// on the 64-bit key hash (0 marks an empty slot), split into segments
// that grow one at a time, so a doubling never holds two copies of the
// whole table (peak memory stays near the steady state). A slot is the
// key (8 bytes) and a saturating 1-byte count; counts from 255 on live in
// over. When read names carry flow-cell spots, spot holds each molecule's
// first spot and more the spots of its later reads, as (key, spot) pairs
// in arrival order in fixed-size chunks (16 bytes a duplicate read, no
// allocation per molecule; Results sorts them by key and spot), so memory for
// spots grows with duplicates, not with molecules.
type table struct {
	segs  [segments]segment
	spots bool
	umis  bool // segments hold each molecule's UMI group and UMI
	seqs  bool // segments hold each FASTQ molecule's Class, SeqA and SeqB
	over  map[uint64]int64
	more  [][]keySpot
	extra int64 // estimated bytes of over and more
}

// keySpot is the spot of a molecule's read after its first.
type keySpot struct {
	key  uint64
	spot reads.Spot
}

// moreChunk is the number of keySpots in one chunk of table.more (64 KiB).
const moreChunk = 4096

// keySpotBytes is the size of a keySpot.
const keySpotBytes = 16

type segment struct {
	keys []uint64
	cnt  []uint8
	spot []reads.Spot
	grp  []uint64 // Fragment.Group, when the table has umis
	umi  []uint64 // Fragment.UMI, likewise
	cls  []uint64 // Fragment.Class, when the table has seqs
	sa   []uint64 // Fragment.SeqA, likewise
	sb   []uint64 // Fragment.SeqB, likewise
	used int
}

const (
	// segments is the number of independently growing parts of a table;
	// the low 8 bits of a key choose its segment and the bits above them
	// its slot. Subsampling looks at the top bits, so it thins every
	// segment alike.
	segments     = 256
	segmentBits  = 8
	initialSlots = 4 // per segment: 9 KiB a table, so thousands of cells fit
	// maxLoadNum/maxLoadDen is the largest fill before a segment doubles:
	// linear probing stays short below 80 %, and the slots per molecule
	// stay between 1.25 and 2.5, i.e. 11 to 23 bytes per molecule (about
	// 15 on average, the segments' fills being staggered).
	maxLoadNum, maxLoadDen = 4, 5
	mapEntryBytes          = 48 // rough Go map cost per entry
)

// NewHashed returns a counter for input in any order.
func NewHashed(opt Options) *Hashed { return &Hashed{opt: opt} }

// SetLeadClip implements Counter (no-op).
func (h *Hashed) SetLeadClip(int64) {}

// Advance implements Counter (no-op).
func (h *Hashed) Advance(int32, int64) {}

// SetDistance sets the optical distance of library lib, in place of
// Options.OpticalDistance (a patterned flow cell: reads.Patterned).
func (h *Hashed) SetDistance(lib int, d int64) {
	h.libs = grow(h.libs, lib)
	h.libs[lib].dist = d
}

// Shift returns the current subsampling shift.
func (h *Hashed) Shift() uint { return h.shift }

func newTable() *table {
	t := &table{over: map[uint64]int64{}}
	for i := range t.segs {
		t.segs[i].keys = make([]uint64, initialSlots)
		t.segs[i].cnt = make([]uint8, initialSlots)
	}
	return t
}

func (t *table) slotBytes() int64 {
	b := int64(9)
	if t.spots {
		b += 8
	}
	if t.umis {
		b += 16
	}
	if t.seqs {
		b += 24
	}
	return b
}

func (t *table) size() int64 {
	var n int64
	for i := range t.segs {
		n += int64(len(t.segs[i].keys))
	}
	return n*t.slotBytes() + t.extra
}

// kept reports whether the subsample keeps a molecule: by its UMI group
// when it has one, so that a position's UMIs are kept or dropped
// together (their errors must meet their source), else by its key.
func (h *Hashed) kept(key, group uint64) bool {
	if group != 0 {
		key = group
	}
	return h.shift == 0 || key>>(64-h.shift) == 0
}

// Add implements Counter.
func (h *Hashed) Add(f reads.Fragment) {
	for len(h.tabs) <= f.Library {
		t := newTable()
		h.tabs = append(h.tabs, t)
		h.bytes += t.size()
	}
	h.libs = grow(h.libs, f.Library)
	h.libs[f.Library].fragments++
	if !h.kept(f.Key, f.Group) {
		return
	}
	t := h.tabs[f.Library]
	if f.Spot != 0 && !t.spots && h.opt.OpticalDistance > 0 {
		h.bytes -= t.size()
		t.spots = true
		for i := range t.segs {
			t.segs[i].spot = make([]reads.Spot, len(t.segs[i].keys))
		}
		h.bytes += t.size()
	}
	if f.SeqA != 0 && !t.seqs {
		h.bytes -= t.size()
		t.seqs = true
		for i := range t.segs {
			n := len(t.segs[i].keys)
			t.segs[i].cls, t.segs[i].sa, t.segs[i].sb = make([]uint64, n), make([]uint64, n), make([]uint64, n)
		}
		h.bytes += t.size()
	}
	if f.Group != 0 && !t.umis {
		h.bytes -= t.size()
		t.umis = true
		for i := range t.segs {
			t.segs[i].grp = make([]uint64, len(t.segs[i].keys))
			t.segs[i].umi = make([]uint64, len(t.segs[i].keys))
		}
		h.bytes += t.size()
	}
	sg := &t.segs[f.Key&(segments-1)]
	mask := uint64(len(sg.keys) - 1)
	i := (f.Key >> segmentBits) & mask
	for {
		k := sg.keys[i]
		if k == f.Key {
			h.again(t, sg, i, f)
			return
		}
		if k == 0 {
			break
		}
		i = (i + 1) & mask
	}
	sg.keys[i] = f.Key
	sg.cnt[i] = 1
	if sg.spot != nil {
		sg.spot[i] = f.Spot
	}
	if sg.grp != nil {
		sg.grp[i], sg.umi[i] = f.Group, f.UMI
	}
	if sg.cls != nil {
		sg.cls[i], sg.sa[i], sg.sb[i] = f.Class, f.SeqA, f.SeqB
	}
	sg.used++
	if sg.used*maxLoadDen > len(sg.keys)*maxLoadNum {
		h.makeRoom(t, sg)
	}
	if h.bytes > h.PeakBytes {
		h.PeakBytes = h.bytes
	}
}

// again counts another read of the molecule in slot i of sg.
func (h *Hashed) again(t *table, sg *segment, i uint64, f reads.Fragment) {
	switch c := sg.cnt[i]; {
	case c < 254:
		sg.cnt[i]++
	case c == 254:
		sg.cnt[i] = 255
		t.over[f.Key] = 255
		t.extra += mapEntryBytes
		h.bytes += mapEntryBytes
	default:
		t.over[f.Key]++
	}
	if f.Spot != 0 && sg.spot != nil {
		n := len(t.more)
		t.more = appendChunked(t.more, keySpot{f.Key, f.Spot})
		if d := int64(len(t.more)-n) * moreChunk * keySpotBytes; d != 0 {
			t.extra += d
			h.bytes += d
		}
	}
}

// makeRoom doubles segment sg of t, or, when that would pass the memory
// budget, halves the hash range kept until sg is below its maximum load.
func (h *Hashed) makeRoom(t *table, sg *segment) {
	for sg.used*maxLoadDen > len(sg.keys)*maxLoadNum {
		grown := h.bytes + int64(len(sg.keys))*t.slotBytes()
		if h.opt.MemoryBudget <= 0 || grown <= h.opt.MemoryBudget || h.shift >= 63 {
			h.rehash(t, sg, 2*len(sg.keys))
			return
		}
		h.shift++
		for _, u := range h.tabs {
			for i := range u.segs {
				h.rehash(u, &u.segs[i], len(u.segs[i].keys))
			}
			h.dropMore(u)
		}
	}
}

// rehash rebuilds segment sg of t with the given number of slots, dropping
// molecules the current shift no longer keeps.
func (h *Hashed) rehash(t *table, sg *segment, slots int) {
	old := int64(len(sg.keys)) * t.slotBytes()
	keys, cnt, spot, grp, umi, cls, sa, sb := sg.keys, sg.cnt, sg.spot, sg.grp, sg.umi, sg.cls, sg.sa, sg.sb
	sg.keys = make([]uint64, slots)
	sg.cnt = make([]uint8, slots)
	if spot != nil {
		sg.spot = make([]reads.Spot, slots)
	}
	if grp != nil {
		sg.grp = make([]uint64, slots)
		sg.umi = make([]uint64, slots)
	}
	if cls != nil {
		sg.cls, sg.sa, sg.sb = make([]uint64, slots), make([]uint64, slots), make([]uint64, slots)
	}
	sg.used = 0
	mask := uint64(slots - 1)
	for j, k := range keys {
		if k == 0 {
			continue
		}
		var g uint64
		if grp != nil {
			g = grp[j]
		}
		if !h.kept(k, g) {
			if cnt[j] == 255 {
				delete(t.over, k)
				t.extra -= mapEntryBytes
				h.bytes -= mapEntryBytes
			}
			continue // its spots in t.more go in dropMore
		}
		i := (k >> segmentBits) & mask
		for sg.keys[i] != 0 {
			i = (i + 1) & mask
		}
		sg.keys[i], sg.cnt[i] = k, cnt[j]
		if spot != nil {
			sg.spot[i] = spot[j]
		}
		if grp != nil {
			sg.grp[i], sg.umi[i] = grp[j], umi[j]
		}
		if cls != nil {
			sg.cls[i], sg.sa[i], sg.sb[i] = cls[j], sa[j], sb[j]
		}
		sg.used++
	}
	h.bytes += int64(slots)*t.slotBytes() - old
	if h.bytes > h.PeakBytes {
		h.PeakBytes = h.bytes
	}
}

// dropMore removes from t.more the spots of molecules the current shift
// no longer keeps (no longer in t after rehash), compacting the chunks.
func (h *Hashed) dropMore(t *table) {
	var out [][]keySpot
	for _, c := range t.more {
		for _, ks := range c {
			if t.has(ks.key) {
				out = appendChunked(out, ks)
			}
		}
	}
	d := int64(len(out)-len(t.more)) * moreChunk * keySpotBytes
	t.more = out
	t.extra += d
	h.bytes += d
}

// has reports whether key is in t.
func (t *table) has(key uint64) bool {
	_, _, ok := t.slot(key)
	return ok
}

// slot returns the segment and slot of key in t, or false.
func (t *table) slot(key uint64) (int, int, bool) {
	s := int(key & (segments - 1))
	sg := &t.segs[s]
	mask := uint64(len(sg.keys) - 1)
	for i := (key >> segmentBits) & mask; sg.keys[i] != 0; i = (i + 1) & mask {
		if sg.keys[i] == key {
			return s, int(i), true
		}
	}
	return 0, 0, false
}

// laterSpots groups t.more by molecule: numbering the table's molecules
// in slot order (segment by segment, slot by slot, as Results visits
// them), the later spots of molecule m are spots[off[m]:off[m+1]],
// ascending (as a sort of t.more by key and spot would give them). A
// counting sort on the molecule, each key's slot found by one probe of
// the table and its number by a bitmap of the used slots: cheaper than
// sorting t.more and searching it once per molecule. It releases t.more
// (Results runs once).
func (t *table) laterSpots() (off []int, spots []reads.Spot) {
	n := 0
	for _, c := range t.more {
		n += len(c)
	}
	if n == 0 {
		return nil, nil
	}
	var base [segments + 1]int
	for s := range t.segs {
		base[s+1] = base[s] + len(t.segs[s].keys)
	}
	// used: a bit per slot; before[w]: the used slots before word w.
	words := (base[segments] + 63) / 64
	used := make([]uint64, words)
	for s := range t.segs {
		for i, k := range t.segs[s].keys {
			if k != 0 {
				g := base[s] + i
				used[g>>6] |= 1 << (g & 63)
			}
		}
	}
	before := make([]int, words+1)
	for w, u := range used {
		before[w+1] = before[w] + bits.OnesCount64(u)
	}
	// molecule is the number of the molecule key belongs to (−1: not in
	// the table). Called twice per spot, to count and then to place it:
	// a probe costs less than keeping each spot's molecule in between.
	molecule := func(key uint64) int {
		s, i, found := t.slot(key)
		if !found {
			return -1
		}
		g := base[s] + i
		return before[g>>6] + bits.OnesCount64(used[g>>6]&(1<<(g&63)-1))
	}
	off = make([]int, before[words]+1)
	for _, c := range t.more {
		for _, ks := range c {
			if m := molecule(ks.key); m >= 0 {
				off[m+1]++
			}
		}
	}
	for m := 1; m < len(off); m++ {
		off[m] += off[m-1]
	}
	next := slices.Clone(off[:len(off)-1])
	spots = make([]reads.Spot, off[len(off)-1])
	for ci, c := range t.more {
		for _, ks := range c {
			if m := molecule(ks.key); m >= 0 {
				spots[next[m]] = ks.spot
				next[m]++
			}
		}
		t.more[ci] = nil
	}
	t.more = nil
	for m := 0; m+1 < len(off); m++ {
		if r := spots[off[m]:off[m+1]]; len(r) > 1 {
			for a := 1; a < len(r); a++ { // a molecule's few spots: insertion sort
				for b := a; b > 0 && r[b] < r[b-1]; b-- {
					r[b], r[b-1] = r[b-1], r[b]
				}
			}
		}
	}
	return off, spots
}

// appendChunked appends ks to the last chunk, starting a new one of
// moreChunk records when it is full.
func appendChunked(chunks [][]keySpot, ks keySpot) [][]keySpot {
	if n := len(chunks); n == 0 || len(chunks[n-1]) == moreChunk {
		chunks = append(chunks, make([]keySpot, 0, moreChunk))
	}
	last := &chunks[len(chunks)-1]
	*last = append(*last, ks)
	return chunks
}

// Results implements Counter.
func (h *Hashed) Results(n int) []Result {
	h.libs = grow(h.libs, n-1)
	var spots []reads.Spot
	for li, t := range h.tabs {
		l := &h.libs[li]
		off, later := t.laterSpots() // the spots of each molecule's later reads
		mol := 0                     // the molecule's number in slot order (laterSpots)
		var group []umiMol           // molecules with a UMI group, collapsed below
		var keys []umiMol            // FASTQ molecules with packed keys, likewise
		var keySpots []reads.Spot
		if t.seqs {
			// Sized once: the molecules and their spots are held until
			// collapseKeys, and doubling slices would hold up to twice that.
			used, nspots := 0, len(later)
			for s := range t.segs {
				used += t.segs[s].used
				for _, sp := range t.segs[s].spot {
					if sp != 0 {
						nspots++
					}
				}
			}
			keys = make([]umiMol, 0, used)
			keySpots = make([]reads.Spot, 0, nspots)
		}
		for s := range t.segs {
			sg := &t.segs[s]
			for i, k := range sg.keys {
				if k == 0 {
					continue
				}
				m := mol
				mol++
				c := int64(sg.cnt[i])
				if c == 255 {
					c = t.over[k]
				}
				spots = spots[:0]
				if sg.spot != nil {
					if sg.spot[i] != 0 {
						spots = append(spots, sg.spot[i])
					}
					if c > 1 && len(later) > 0 { // a molecule of one read has no later spots
						spots = append(spots, later[off[m]:off[m+1]]...)
					}
				}
				if sg.cls != nil && sg.sa[i] != 0 {
					at := len(keySpots)
					keySpots = append(keySpots, spots...)
					keys = append(keys, umiMol{group: sg.cls[i], umi: sg.sa[i], seqB: sg.sb[i], lib: int32(li), n: c, spots: keySpots[at:len(keySpots):len(keySpots)]})
					continue
				}
				if sg.grp != nil && sg.grp[i] != 0 {
					group = append(group, umiMol{group: sg.grp[i], umi: sg.umi[i], lib: int32(li), n: c, spots: slices.Clone(spots)})
					continue
				}
				l.count(c, spots, h.opt.OpticalDistance)
			}
		}
		collapseGroups(group, h.libs, h.opt.OpticalDistance)
		collapseKeys(keys, l, h.opt.OpticalDistance, h.opt.Threads)
	}
	return results(h.libs, n, h.shift)
}
