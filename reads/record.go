package reads

import (
	"errors"
	"fmt"
	"headroom/internal/inerr"
)

// Flag bits of the SAM FLAG field (SAM specification section 1.4).
const (
	FlagPaired        = 0x1
	FlagProperPair    = 0x2
	FlagUnmapped      = 0x4
	FlagMateUnmapped  = 0x8
	FlagReverse       = 0x10
	FlagMateReverse   = 0x20
	FlagRead1         = 0x40
	FlagRead2         = 0x80
	FlagSecondary     = 0x100
	FlagQCFail        = 0x200
	FlagDuplicate     = 0x400
	FlagSupplementary = 0x800
)

// Record is one alignment record with the fields duplicate counting needs.
// Byte slices point into the reader's buffer and are overwritten by the
// next Read; Cigar is reused likewise.
type Record struct {
	Name    []byte
	Flags   uint16
	Ref     int32 // reference index, -1 for '*'
	Pos     int32 // 0-based leftmost mapping position, -1 when absent
	MapQ    uint8
	Cigar   []CigarOp
	MateRef int32 // -1 for '*'
	MatePos int32 // 0-based, -1 when absent
	SeqLen  int32

	// Optional fields; nil when the record does not have them. Others are
	// found with Tag.
	RG []byte
	MC []byte // the mate's CIGAR text (MC:Z); "*" counts as absent

	// MateCigar is MC parsed, set by the readers when MC is not nil.
	MateCigar []CigarOp

	bamAux []byte // the optional fields of a BAM record, checked
	samAux []byte // the optional fields of a SAM line
}

// parseMC parses the MC tag the readers stored in rec.MC into
// rec.MateCigar. "MC:Z:*" says the mate's CIGAR is unknown and is treated
// as no tag. A malformed one is an error of the record: the pair's two
// records would otherwise take different rules for which of them counts
// the pair (DESIGN.md), counting it twice or not at all.
func parseMC(rec *Record) error {
	if rec.MC == nil {
		return nil
	}
	if len(rec.MC) == 1 && rec.MC[0] == '*' {
		rec.MC = nil
		return nil
	}
	var err error
	rec.MateCigar, err = ParseCigar(rec.MateCigar, rec.MC)
	if err != nil {
		return fmt.Errorf("MC tag (the mate's CIGAR): %w", err)
	}
	return nil
}

// CigarOp is one CIGAR operation in the BAM encoding: length<<4 | op.
type CigarOp uint32

// CIGAR operation codes, in the order of the SAM specification's
// "MIDNSHP=X" (section 1.4.6 and the BAM encoding of section 4.2).
const (
	CigarMatch     = 0 // M
	CigarIns       = 1 // I
	CigarDel       = 2 // D
	CigarSkip      = 3 // N
	CigarSoftClip  = 4 // S
	CigarHardClip  = 5 // H
	CigarPad       = 6 // P
	CigarEqual     = 7 // =
	CigarMismatch  = 8 // X
	cigarOpLetters = "MIDNSHP=X"
)

// Op returns the operation code.
func (c CigarOp) Op() int { return int(c & 0xf) }

// Len returns the operation length.
func (c CigarOp) Len() int64 { return int64(c >> 4) }

// consumesRef is the "consumes reference" column of the SAM
// specification's CIGAR table (section 1.4.6): M, D, N, = and X do;
// I, S, H and P do not.
var consumesRef = [16]bool{CigarMatch: true, CigarDel: true, CigarSkip: true, CigarEqual: true, CigarMismatch: true}

// consumesQuery is the "consumes query" column of the same table: M, I, S,
// = and X do.
var consumesQuery = [16]bool{CigarMatch: true, CigarIns: true, CigarSoftClip: true, CigarEqual: true, CigarMismatch: true}

// RefLen returns the number of reference bases the CIGAR spans.
func RefLen(cigar []CigarOp) int64 { return opLen(cigar, &consumesRef) }

// QueryLen returns the number of SEQ bases the CIGAR accounts for.
func QueryLen(cigar []CigarOp) int64 { return opLen(cigar, &consumesQuery) }

// opLen sums the lengths of the operations that consume.
func opLen(cigar []CigarOp, consumes *[16]bool) int64 {
	var n int64
	for _, c := range cigar {
		if consumes[c.Op()] {
			n += c.Len()
		}
	}
	return n
}

func isClip(op int) bool { return op == CigarSoftClip || op == CigarHardClip }

// LeadingClip returns the total length of the S and H operations at the
// start of the CIGAR.
func LeadingClip(cigar []CigarOp) int64 {
	var n int64
	for _, c := range cigar {
		if !isClip(c.Op()) {
			break
		}
		n += c.Len()
	}
	return n
}

// TrailingClip returns the total length of the S and H operations at the
// end of the CIGAR.
func TrailingClip(cigar []CigarOp) int64 {
	var n int64
	for i := len(cigar) - 1; i >= 0; i-- {
		if !isClip(cigar[i].Op()) {
			break
		}
		n += cigar[i].Len()
	}
	return n
}

// Unclipped5 returns the 0-based reference coordinate of a read's 5' end
// as if no base had been clipped:
//
//	forward strand:  pos - leading S/H
//	reverse strand:  pos + reference-consumed length - 1 + trailing S/H
//
// pos is the 0-based leftmost mapping position. Copies of one molecule
// share this coordinate even when aligners clip them differently.
func Unclipped5(pos int32, cigar []CigarOp, reverse bool) int64 {
	if !reverse {
		return int64(pos) - LeadingClip(cigar)
	}
	rl := RefLen(cigar)
	if rl == 0 {
		// A CIGAR without reference-consuming operations (or '*'): the
		// read covers its position only.
		rl = 1
	}
	return int64(pos) + rl - 1 + TrailingClip(cigar)
}

// ErrBadCigar is returned for a CIGAR string that does not follow the SAM
// specification (`\*|([0-9]+[MIDNSHPX=])+`).
var ErrBadCigar = errors.New("reads: bad CIGAR")

// maxCigarOpLen is the largest operation length the BAM encoding holds
// (28 bits).
const maxCigarOpLen = 1<<28 - 1

// ParseCigar appends the operations of a text CIGAR to dst[:0] and returns
// it. "*" gives no operations.
func ParseCigar(dst []CigarOp, s []byte) ([]CigarOp, error) {
	dst = dst[:0]
	if len(s) == 1 && s[0] == '*' {
		return dst, nil
	}
	if len(s) == 0 {
		return dst, fmt.Errorf("%w: empty", ErrBadCigar)
	}
	var n int64
	digits := 0
	for _, b := range s {
		if b >= '0' && b <= '9' {
			n = n*10 + int64(b-'0')
			digits++
			if n > maxCigarOpLen {
				return dst, fmt.Errorf("%w %q: operation longer than 2^28-1", ErrBadCigar, s)
			}
			continue
		}
		op := -1
		for i := 0; i < len(cigarOpLetters); i++ {
			if cigarOpLetters[i] == b {
				op = i
				break
			}
		}
		if op < 0 || digits == 0 {
			return dst, fmt.Errorf("%w %q: expected a length followed by one of MIDNSHP=X", ErrBadCigar, s)
		}
		dst = append(dst, CigarOp(n<<4|int64(op)))
		n, digits = 0, 0
	}
	if digits != 0 {
		return dst, fmt.Errorf("%w %q: ends in a number", ErrBadCigar, s)
	}
	return dst, nil
}

// ParseError is bad input at a position of a file, the shape every reader
// of the project returns (internal/inerr, as encoding/csv's ParseError):
// Line for text formats (1-based), Column within it (1-based field; 0 when
// the whole line or record is at fault), Record for binary formats
// (1-based record number). Any of them may be zero. Match it with
// errors.As and the cause with errors.Is (Err is one of the package's
// sentinel errors, wrapped).
type ParseError = inerr.ParseError

// FileError is an error of one named input: File is the name the caller
// gave it (a path, or "stdin"), Err the cause, usually a *ParseError.
type FileError struct {
	File string
	Err  error
}

func (e *FileError) Error() string { return e.File + ": " + e.Err.Error() }

func (e *FileError) Unwrap() error { return e.Err }
