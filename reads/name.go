package reads

import (
	"bytes"
	"strconv"
	"strings"
)

// Spot is the flow-cell position of a read packed into 64 bits, parsed
// from an Illumina-style read name: lane+1 (8 bits), tile (16), x (20),
// y (20). Zero means the name carries no position.
type Spot uint64

// SameTile reports whether two spots are on the same lane and tile.
func (s Spot) SameTile(t Spot) bool { return s>>40 == t>>40 }

// X returns the x coordinate.
func (s Spot) X() int64 { return int64(s>>20) & (1<<20 - 1) }

// Y returns the y coordinate.
func (s Spot) Y() int64 { return int64(s) & (1<<20 - 1) }

// MateNumber returns 1 or 2 when a FASTQ record says which mate it is,
// by a name ending in "/1" or "/2" (the older Illumina convention) or a
// comment starting "1:" or "2:" followed by Y or N (the CASAVA 1.8 layout
// "read:filtered:control:index"), else 0. Both conventions are common
// practice; the FASTQ format itself (Cock et al. 2010, Nucleic Acids
// Research 38:1767) leaves the title line free.
func MateNumber(name, comment []byte) int {
	if n := len(name); n >= 2 && name[n-2] == '/' && (name[n-1] == '1' || name[n-1] == '2') {
		return int(name[n-1] - '0')
	}
	if len(comment) >= 3 && (comment[0] == '1' || comment[0] == '2') && comment[1] == ':' && (comment[2] == 'Y' || comment[2] == 'N') {
		return int(comment[0] - '0')
	}
	return 0
}

// FASTQName is what an instrument's file name says about its reads
// (NAME_S1_L001_R1_001.fastq.gz, the layout of Illumina's converters;
// common practice).
type FASTQName struct {
	Sample string // NAME
	Lane   int    // 1 for L001; 0 when the name has no lane
	Read   int    // 1 or 2 for R1, R2
}

// ParseFASTQName parses a file's base name as NAME_S#[_L00#]_R#_001.f(ast)q[.gz].
func ParseFASTQName(base string) (FASTQName, bool) {
	var n FASTQName
	b := base
	for _, ext := range []string{".gz", ".bgz"} {
		b = strings.TrimSuffix(b, ext)
	}
	switch {
	case strings.HasSuffix(b, ".fastq"):
		b = strings.TrimSuffix(b, ".fastq")
	case strings.HasSuffix(b, ".fq"):
		b = strings.TrimSuffix(b, ".fq")
	default:
		return n, false
	}
	f := strings.Split(b, "_")
	k := len(f)
	if k < 4 || f[k-1] != "001" || len(f[k-2]) != 2 || f[k-2][0] != 'R' || (f[k-2][1] != '1' && f[k-2][1] != '2') {
		return n, false
	}
	n.Read = int(f[k-2][1] - '0')
	k -= 2
	if l := f[k-1]; len(l) == 4 && l[0] == 'L' {
		v, err := strconv.Atoi(l[1:])
		if err != nil || v < 1 {
			return n, false
		}
		n.Lane = v
		k--
	}
	if k < 2 || len(f[k-1]) < 2 || f[k-1][0] != 'S' {
		return n, false
	}
	if _, err := strconv.Atoi(f[k-1][1:]); err != nil {
		return n, false
	}
	n.Sample = strings.Join(f[:k-1], "_")
	return n, n.Sample != ""
}

// Patterned reports whether a read name of the form
// instrument:run:flowcell:lane:tile:x:y[:UMI] (CASAVA 1.8 and later) says
// the read comes from a patterned flow cell, whose wells are packed so
// that optical and pad-hopping duplicates lie thousands of pixels apart.
// The signals, both common practice (from the instruments' naming, not a
// published specification): a flow cell ID ending in the suffix of a
// patterned type (CCXX, BBXX, ALXX: HiSeq X/3000/4000; DRXX, DSXX, DMXX:
// NovaSeq; and their ...XY variants), or a four-digit tile
// (surface, swath, tile) numbering more than 19 tiles in a swath, which
// only patterned flow cells have (MiSeq numbers up to 19, HiSeq 2500 up to
// 16). It returns false for other names.
func Patterned(name []byte) (patterned bool, flowcell, tile string) {
	f := bytes.Split(MateName(name), colon)
	if len(f) != 7 && len(f) != 8 {
		return false, "", ""
	}
	fc, t := f[2], f[4]
	if n := len(fc); n >= 4 {
		switch string(fc[n-4 : n-2]) {
		case "CC", "BB", "AL", "DR", "DS", "DM":
			if sfx := string(fc[n-2:]); sfx == "XX" || sfx == "XY" {
				return true, string(fc), string(t)
			}
		}
	}
	if v, ok := atoi(t, 9999); ok && len(t) == 4 && v%100 > 19 {
		return true, string(fc), string(t)
	}
	return false, "", ""
}

// MateName returns name without a trailing "/1" or "/2".
func MateName(name []byte) []byte {
	if n := len(name); n >= 2 && name[n-2] == '/' && (name[n-1] == '1' || name[n-1] == '2') {
		return name[:n-2]
	}
	return name
}

// ParseSpot finds lane, tile, x and y in a read name of the form
// ...:lane:tile:x:y (Illumina, CASAVA 1.8 and later:
// instrument:run:flowcell:lane:tile:x:y, optionally followed by :UMI, or
// the older instrument:lane:tile:x:y). It returns 0 when the name has no
// such fields or a value does not fit the packing of Spot.
func ParseSpot(name []byte) Spot {
	name = MateName(name)
	n := bytes.Count(name, colon) + 1 // vectorised: rejects other names fast
	skip := 0                         // trailing fields after y
	switch n {
	case 5, 7:
	case 8: // ...:lane:tile:x:y:UMI
		skip = 1
	default:
		return 0
	}
	var v [4]int64
	end := len(name)
	for f := 0; f < 4+skip; f++ {
		i := bytes.LastIndexByte(name[:end], ':')
		field := name[i+1 : end]
		end = i
		if f < skip {
			continue
		}
		x, ok := atoi(field, 1<<40)
		if !ok {
			return 0
		}
		v[3-(f-skip)] = x
	}
	if v[0] > 254 || v[1] > 0xffff || v[2] >= 1<<20 || v[3] >= 1<<20 {
		return 0
	}
	return Spot(uint64(v[0]+1)<<56 | uint64(v[1])<<40 | uint64(v[2])<<20 | uint64(v[3]))
}

var colon = []byte{':'}

// NameUMI returns the UMI carried in a read name: the eighth
// colon-separated field of an Illumina name (bcl2fastq/BCL Convert put it
// there), otherwise the text after the last '_' (the convention of UMI
// extraction tools that append it to the name). A '+' joining dual UMIs is
// kept. It returns nil when neither is present.
func NameUMI(name []byte) []byte {
	name = MateName(name)
	if bytes.Count(name, []byte{':'}) == 7 {
		return name[bytes.LastIndexByte(name, ':')+1:]
	}
	if i := bytes.LastIndexByte(name, '_'); i >= 0 && i+1 < len(name) {
		return name[i+1:]
	}
	return nil
}
