package reads

import "bytes"

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
