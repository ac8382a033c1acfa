package reads

import (
	"bytes"
	"encoding/binary"
	"math/bits"
)

// Fragment is one sequenced fragment as duplicate counting sees it: the
// hash of its molecule key, the library it belongs to, the flow-cell spot
// of the read that represents it, and (for coordinate-sorted streaming)
// the lower end of its key.
type Fragment struct {
	Library int
	Key     uint64 // 64-bit hash of the molecule key; never 0
	// Group is the hash of the key without its UMI, and UMI the UMI packed
	// by UMICode, when UMI errors are to be collapsed (KeyOptions.Collapse)
	// and the UMI packs; both 0 otherwise. Molecules of one Group are the
	// UMIs seen at one position.
	Group uint64
	UMI   uint64
	// Class, SeqA and SeqB are set for a FASTQ key whose leading bases
	// pack (UMICode, KeyBases from 1 to MaxPackedKey): the hash of the
	// library and UMI, and the packed leading bases of the two mates (SeqB
	// 0 for a single read), for merging keys one base apart.
	Class      uint64
	SeqA, SeqB uint64
	Spot       Spot
	// LowRef and LowPos are the reference and unclipped 5' coordinate of
	// the key's lower end (its only end for a single read). The record
	// that counts a copy of the same molecule cannot start after LowPos
	// plus the longest leading clip: it is the mate at the lower raw
	// position, and neither mate starts later than that. A reverse mate
	// starts at or before its 5' end, a forward mate at most a leading
	// clip after it, and the counting mate starts no later than the other.
	// So a sorted stream can let a molecule go once it is past LowPos and
	// a margin, however far away the mate lies (another chromosome, a
	// long insert).
	LowRef int32
	LowPos int64
}

// KeyOptions say how records become molecule keys. The zero value counts
// every primary mapped record, without UMIs or cells.
type KeyOptions struct {
	// MinMapQ skips records with a lower mapping quality.
	MinMapQ int
	// UMITags are the tags a UMI is taken from, the first one a record has
	// (for FASTQ, TAG:Z: words of the header comment, CommentTag).
	UMITags []Tag
	// UMIFromName takes the UMI from the read name (NameUMI) when a record
	// has none of UMITags.
	UMIFromName bool
	// CellTag, when not zero, is the tag of the cell barcode, which is then
	// part of the molecule key.
	CellTag Tag
	// Collapse fills Fragment.Group and Fragment.UMI, for collapsing UMI
	// sequencing errors (package dedup).
	Collapse bool
	// KeyBases is the number of leading bases of each FASTQ mate in the
	// key; 0 means the whole read.
	KeyBases int
	// OpticalNames parses flow-cell spots from read names (ParseSpot).
	OpticalNames bool
}

// Keyer turns alignment records and FASTQ records into fragments,
// applying the counting rules of DESIGN.md "Reads: what counts as one
// molecule". It keeps tallies for the summary and its notes.
type Keyer struct {
	Opt KeyOptions

	// Tallies.
	Skipped     int64   // records not starting a fragment (flags, MAPQ, second mates)
	PairsNoMC   int64   // pairs whose mate end was taken as PNEXT (no MC tag)
	NoMC        []int64 // PairsNoMC by library
	MaxLeadClip int64   // longest leading clip (S+H) of a forward read seen
	Fragments   int64   // fragments returned
	NoUMI       int64   // of them, fragments without a UMI
	NoCell      int64   // of them, fragments without the cell tag (when CellTag is set)
	// OtherUMITags counts, among the first UMISample fragments without a
	// UMI, those that carry one of the tags other pipelines write UMIs in
	// (CommonUMITags), by tag.
	OtherUMITags map[Tag]int64
}

// UMISample is the number of fragments without a UMI that are searched
// for CommonUMITags (OtherUMITags).
const UMISample = 1 << 16

// CommonUMITags are tags in which pipelines commonly write UMIs (common
// practice): RX and OX (SAM optional-fields specification: corrected and
// raw UMI), BX, UB and UR, MI (molecular identifier).
var CommonUMITags = []Tag{{'R', 'X'}, {'O', 'X'}, {'B', 'X'}, {'U', 'B'}, {'U', 'R'}, {'M', 'I'}}

// umi returns a record's UMI by the options, and tallies it.
func (k *Keyer) umi(tag func(Tag) []byte, name []byte) []byte {
	for _, t := range k.Opt.UMITags {
		if v := tag(t); v != nil {
			return v
		}
	}
	if k.Opt.UMIFromName {
		if v := NameUMI(name); v != nil {
			return v
		}
	}
	k.NoUMI++
	if k.NoUMI <= UMISample { // a sample is enough for a note
		for _, t := range CommonUMITags {
			if tag(t) != nil {
				if k.OtherUMITags == nil {
					k.OtherUMITags = map[Tag]int64{}
				}
				k.OtherUMITags[t]++
			}
		}
	}
	return nil
}

// group sets f.Key from h and the UMI, and f.Group and f.UMI when UMI
// errors are collapsed.
func (k *Keyer) group(f *Fragment, h uint64, umi []byte) {
	f.Key = finish(h, umi)
	k.Fragments++
	if k.Opt.Collapse && umi != nil {
		if c := UMICode(umi); c != 0 {
			f.Group, f.UMI = finish(h, nil), c
		}
	}
}

// Skip flags: unmapped, secondary, QC-failed, supplementary (DESIGN.md).
// The duplicate flag 0x400 is deliberately not among them.
const skipFlags = FlagUnmapped | FlagSecondary | FlagQCFail | FlagSupplementary

// Alignment returns the fragment rec starts, if any: rec must be primary,
// mapped, not QC-failed, with MAPQ at least MinMapQ; of a pair with both
// mates mapped only one record starts the fragment (the mate at the lower
// raw position; first-in-pair on a tie), whose key holds both
// unclipped ends as an unordered pair; a record whose mate is unmapped is
// a single-end fragment. rec.MateCigar must hold rec.MC parsed (the
// readers do this).
func (k *Keyer) Alignment(rec *Record, lib int) (Fragment, bool) {
	if rec.Flags&skipFlags != 0 || int(rec.MapQ) < k.Opt.MinMapQ || rec.Ref < 0 || rec.Pos < 0 {
		k.Skipped++
		return Fragment{}, false
	}
	rev := rec.Flags&FlagReverse != 0
	end := Unclipped5(rec.Pos, rec.Cigar, rev)
	if !rev {
		if c := int64(rec.Pos) - end; c > k.MaxLeadClip {
			k.MaxLeadClip = c
		}
	}
	f := Fragment{Library: lib}
	// The spot is parsed only for a record that is counted (k.spot, after
	// the mate decision): half the records of pairs are not.
	paired := rec.Flags&FlagPaired != 0 && rec.Flags&FlagMateUnmapped == 0 && rec.MateRef >= 0 && rec.MatePos >= 0
	if !paired {
		h := k.cell(mix(mix(mix(mix(seed1, uint64(lib)), uint64(rec.Ref)), uint64(end)), strand(rev)), rec.Tag)
		k.group(&f, h, k.umi(rec.Tag, rec.Name))
		f.Spot = k.spot(rec.Name)
		f.LowRef, f.LowPos = rec.Ref, end
		return f, true
	}
	mrev := rec.Flags&FlagMateReverse != 0
	mend := int64(rec.MatePos)
	exact := rec.MC != nil // the readers parsed it into MateCigar
	if exact {
		mend = Unclipped5(rec.MatePos, rec.MateCigar, mrev)
	}
	a := end5{rec.Ref, end, rev}
	b := end5{rec.MateRef, mend, mrev}
	// Count the pair once, on the mate at the lower raw position (RNAME
	// index and POS against RNEXT and PNEXT; countsTie on a tie). Both
	// records of a pair carry both positions, so they agree on which one
	// counts whatever optional tags either has (deciding on the exact ends
	// would not be safe: one mate with MC and one without could both
	// count the pair, or neither). Every copy of a molecule has its mates
	// on the same two chromosomes, so all copies are counted on the one of
	// lower index, a scatter by chromosome sends them to one shard, and
	// merged shards equal the whole. The key holds the exact unclipped
	// ends when MC gives the mate's CIGAR, else the mate's raw position.
	own, mate := end5{rec.Ref, int64(rec.Pos), false}, end5{rec.MateRef, int64(rec.MatePos), false}
	if !(own.less(mate) || (own == mate && countsTie(rec.Flags, rev, mrev))) {
		k.Skipped++
		return Fragment{}, false
	}
	if !exact {
		k.noMC(lib)
	}
	if b.less(a) {
		a, b = b, a
	}
	h := mix(mix(seed2, uint64(lib)), uint64(a.ref))
	h = mix(mix(mix(h, uint64(a.pos)), strand(a.rev)), uint64(b.ref))
	h = k.cell(mix(mix(h, uint64(b.pos)), strand(b.rev)), rec.Tag)
	k.group(&f, h, k.umi(rec.Tag, rec.Name))
	f.Spot = k.spot(rec.Name)
	f.LowRef, f.LowPos = a.ref, a.pos
	return f, true
}

// spot returns the flow-cell spot in a read name when OpticalNames is set.
func (k *Keyer) spot(name []byte) Spot {
	if !k.Opt.OpticalNames {
		return 0
	}
	return ParseSpot(name)
}

// cell mixes the cell barcode into h when CellTag is set.
func (k *Keyer) cell(h uint64, tag func(Tag) []byte) uint64 {
	if k.Opt.CellTag == (Tag{}) {
		return h
	}
	c := tag(k.Opt.CellTag)
	if c == nil {
		k.NoCell++
	}
	return hashBytes(mix(h, seed5), c)
}

func (k *Keyer) noMC(lib int) {
	k.PairsNoMC++
	for len(k.NoMC) <= lib {
		k.NoMC = append(k.NoMC, 0)
	}
	k.NoMC[lib]++
}

type end5 struct {
	ref int32
	pos int64
	rev bool
}

func (e end5) less(o end5) bool {
	if e.ref != o.ref {
		return e.ref < o.ref
	}
	if e.pos != o.pos {
		return e.pos < o.pos
	}
	return !e.rev && o.rev
}

// MaxPackedKey is the most leading bases per mate that a FASTQ key packs
// into Fragment.SeqA and SeqB (UMICode).
const MaxPackedKey = 28

// FASTQ returns the fragment of a single read (r2 nil) or a read pair:
// the key is the leading KeyBases bases of each mate, the mates taken as
// an unordered pair (a copy read from the other strand swaps R1 and R2,
// as an alignment key's unordered ends do), plus the UMI. With KeyBases
// from 1 to MaxPackedKey it also sets Class, SeqA and SeqB.
func (k *Keyer) FASTQ(r1, r2 *FASTQRecord, lib int) Fragment {
	f := Fragment{Library: lib}
	if k.Opt.OpticalNames {
		f.Spot = ParseSpot(r1.Name)
	}
	umi := k.umi(func(t Tag) []byte { return CommentTag(r1.Comment, t) }, r1.Name)
	s1 := prefix(r1.Seq, k.Opt.KeyBases)
	var s2 []byte
	if r2 == nil {
		k.group(&f, hashBytes(mix(seed3, uint64(lib)), s1), umi)
	} else {
		s2 = prefix(r2.Seq, k.Opt.KeyBases)
		if bytes.Compare(s2, s1) < 0 {
			s1, s2 = s2, s1
		}
		h := hashBytes(mix(seed4, uint64(lib)), s1)
		k.group(&f, hashBytes(h, s2), umi)
	}
	f.Group, f.UMI = 0, 0 // FASTQ UMIs are matched exactly
	if k.Opt.KeyBases > 0 && k.Opt.KeyBases <= MaxPackedKey {
		a, b := UMICode(s1), uint64(0)
		if r2 != nil {
			b = UMICode(s2)
		}
		if a != 0 && (r2 == nil || b != 0) {
			f.Class, f.SeqA, f.SeqB = finish(mix(seed6, uint64(lib)), umi), a, b
		}
	}
	return f
}

func prefix(s []byte, n int) []byte {
	if n > 0 && len(s) > n {
		return s[:n]
	}
	return s
}

// The key hash: a multiply-rotate mix per 64-bit word (constants of
// xxHash64, Collet 2012) and the MurmurHash3 64-bit finaliser (Appleby
// 2011) for avalanche. Deterministic across runs and platforms, which
// hash subsampling needs; maphash is randomly seeded per process.
const (
	prime1 = 0x9E3779B185EBCA87
	prime2 = 0xC2B2AE3D27D4EB4F
	seed1  = 0x243F6A8885A308D3 // single-end alignment keys
	seed2  = 0x13198A2E03707344 // paired alignment keys
	seed3  = 0xA4093822299F31D0 // single FASTQ keys
	seed4  = 0x082EFA98EC4E6C89 // paired FASTQ keys
	seed5  = 0x452821E638D01377 // cell barcodes
	seed6  = 0xBE5466CF34E90C6C // FASTQ key classes
)

func mix(h, v uint64) uint64 {
	h ^= bits.RotateLeft64(v*prime2, 31) * prime1
	return bits.RotateLeft64(h, 27)*prime1 + 0x85EBCA77C2B2AE63
}

func strand(rev bool) uint64 {
	if rev {
		return 1
	}
	return 0
}

func hashBytes(h uint64, b []byte) uint64 {
	h = mix(h, uint64(len(b)))
	for len(b) >= 8 {
		h = mix(h, binary.LittleEndian.Uint64(b))
		b = b[8:]
	}
	if len(b) > 0 {
		var t [8]byte
		copy(t[:], b)
		h = mix(h, binary.LittleEndian.Uint64(t[:]))
	}
	return h
}

func finish(h uint64, umi []byte) uint64 {
	h = hashBytes(h, umi)
	h ^= h >> 33
	h *= 0xff51afd7ed558ccd
	h ^= h >> 33
	h *= 0xc4ceb9fe1a85ec53
	h ^= h >> 33
	if h == 0 {
		h = 1
	}
	return h
}

// countsTie says whether a record whose mate starts at the same position
// counts the pair: the first-in-pair one, or, when the flags do not say
// which is first (0x40 and 0x80 both set or both clear, as some tools
// write them), the forward one of a pair on opposite strands. Both records
// see the same flags and strands mirrored, so exactly one of them counts;
// only a pair whose flags do not say and whose mates share a strand is
// counted on both records.
func countsTie(flags uint16, rev, mrev bool) bool {
	r1, r2 := flags&FlagRead1 != 0, flags&FlagRead2 != 0
	if r1 != r2 {
		return r1
	}
	if rev != mrev {
		return !rev
	}
	return true
}

// UMICode packs a UMI of A, C, G and T (upper or lower case; '-' and '+'
// joining dual UMIs are skipped) into 64 bits: two bits a base in the low
// 56 bits, the first base highest, and the number of bases above them, so
// that codes compare as (length, then the bases in alphabetical order). It returns 0 for a UMI that
// does not pack (another letter such as N, more than 28 bases, or none):
// such a UMI is matched exactly and never collapsed.
func UMICode(umi []byte) uint64 {
	var c, n uint64
	for _, b := range umi {
		v := umiBase[b] // a table, not a switch: bases are random, branches mispredict
		if v == umiSkip {
			continue
		}
		if v == umiBad || n == 28 {
			return 0
		}
		c = c<<2 | uint64(v)
		n++
	}
	if n == 0 {
		return 0
	}
	return c | n<<56
}

// umiBase maps a UMI byte to its two-bit base, umiSkip ('-', '+') or
// umiBad (any other byte).
var umiBase = func() (t [256]uint8) {
	for i := range t {
		t[i] = umiBad
	}
	for i, b := range "ACGT" {
		t[b], t[b+'a'-'A'] = uint8(i), uint8(i)
	}
	t['-'], t['+'] = umiSkip, umiSkip
	return t
}()

const (
	umiSkip = 4
	umiBad  = 5
)

// UMIDistance1 reports whether two UMICodes differ at exactly one base
// (Hamming distance 1; UMIs of different lengths are never neighbours).
func UMIDistance1(a, b uint64) bool {
	if a>>56 != b>>56 {
		return false
	}
	x := a ^ b
	return bits.OnesCount64((x|x>>1)&0x0055555555555555) == 1
}
