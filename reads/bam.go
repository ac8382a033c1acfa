package reads

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
)

// BAMReader reads BAM records without allocating per record.
type BAMReader struct {
	in   *Input
	h    *Header
	nRef int
	buf  []byte
	n    int64 // records read
	err  error
}

// maxBAMRecord bounds a record's block_size before anything is allocated
// for it: 256 MiB holds a read of tens of megabases with its qualities.
const maxBAMRecord = 1 << 28

// maxBAMHeader bounds the header text and reference list the same way.
const maxBAMHeader = 1 << 30

// NewBAMReader reads the BAM header (magic, text, reference list) from in,
// parses it with github.com/biogo/hts/sam, and returns a reader positioned
// at the first record.
func NewBAMReader(in *Input) (*BAMReader, error) {
	r := in.Reader()
	// The header is gathered here with exact reads and handed to
	// sam.Header.DecodeBinary as one buffer: DecodeBinary reads the text
	// with a single Read call, which a buffered stream may satisfy short.
	var fixed [8]byte
	if _, err := io.ReadFull(r, fixed[:]); err != nil {
		return nil, headerErr(err)
	}
	if !bytes.Equal(fixed[:4], []byte("BAM\x01")) {
		return nil, fmt.Errorf("reads: BAM magic number missing")
	}
	lText := int32(binary.LittleEndian.Uint32(fixed[4:]))
	if lText < 0 || lText > maxBAMHeader {
		return nil, fmt.Errorf("reads: BAM header text length %d is invalid", lText)
	}
	// The text (and n_ref after it) is copied as it arrives, so that a
	// corrupt l_text of a short file costs what the file holds, not l_text.
	var hb bytes.Buffer
	hb.Write(fixed[:])
	if _, err := io.CopyN(&hb, r, int64(lText)+4); err != nil {
		return nil, headerErr(err)
	}
	raw := hb.Bytes()
	nRef := int32(binary.LittleEndian.Uint32(raw[len(raw)-4:]))
	if nRef < 0 || nRef > maxBAMHeader/9 {
		return nil, fmt.Errorf("reads: BAM header reference count %d is invalid", nRef)
	}
	for i := int32(0); i < nRef; i++ {
		var l [4]byte
		if _, err := io.ReadFull(r, l[:]); err != nil {
			return nil, headerErr(err)
		}
		lName := int32(binary.LittleEndian.Uint32(l[:]))
		if lName < 1 || lName > 1<<20 {
			return nil, fmt.Errorf("reads: BAM header reference %d has invalid name length %d", i+1, lName)
		}
		raw = append(raw, l[:]...)
		start := len(raw)
		raw = append(raw, make([]byte, int(lName)+4)...)
		if _, err := io.ReadFull(r, raw[start:]); err != nil {
			return nil, headerErr(err)
		}
		if len(raw) > maxBAMHeader {
			return nil, fmt.Errorf("reads: BAM header is larger than 1 GiB")
		}
	}
	h, err := decodeBinaryHeader(bytes.NewReader(raw))
	if err != nil {
		if n, e, ok := headerTextErr(err); ok {
			return nil, fmt.Errorf("reads: BAM header text, line %d: %w", n, e)
		}
		return nil, fmt.Errorf("reads: BAM header: %v", err)
	}
	return &BAMReader{in: in, h: headerFrom(h), nRef: int(nRef)}, nil
}

func headerErr(err error) error {
	if err == io.EOF || err == io.ErrUnexpectedEOF {
		return fmt.Errorf("%w: in the BAM header", ErrTruncated)
	}
	return err
}

// Header returns the parsed header.
func (b *BAMReader) Header() *Header { return b.h }

// Records returns the number of records read so far.
func (b *BAMReader) Records() int64 { return b.n }

// Read decodes the next record into rec, whose slices then point into the
// reader's buffer until the next call. It returns io.EOF after the last
// record, having checked that the file was not truncated.
func (b *BAMReader) Read(rec *Record) error {
	if b.err != nil {
		return b.err
	}
	r := b.in.Reader()
	var l [4]byte
	n, err := io.ReadFull(r, l[:])
	if err != nil {
		switch {
		case n == 0 && err == io.EOF:
			if err := b.in.CheckEnd(); err != nil {
				b.err = &ParseError{Record: b.n + 1, Err: err}
			} else {
				b.err = io.EOF
			}
		case err == io.ErrUnexpectedEOF || err == io.EOF:
			b.err = &ParseError{Record: b.n + 1, Err: ErrTruncated}
		default:
			b.err = &ParseError{Record: b.n + 1, Err: err}
		}
		return b.err
	}
	size := int32(binary.LittleEndian.Uint32(l[:]))
	if size < 32 || size > maxBAMRecord {
		b.err = &ParseError{Record: b.n + 1, Err: fmt.Errorf("%w: block_size %d", ErrBadRecord, size)}
		return b.err
	}
	// A record that fits the stream's buffer is decoded in place (the
	// slices of rec then point into that buffer until the next Read);
	// a larger one is copied out.
	var block []byte
	if int(size) <= r.Size() {
		block, err = r.Peek(int(size))
		if err == nil {
			r.Discard(int(size))
		}
	} else {
		if cap(b.buf) < int(size) {
			b.buf = make([]byte, size)
		}
		block = b.buf[:size]
		_, err = io.ReadFull(r, block)
	}
	if err != nil {
		if err == io.EOF || err == io.ErrUnexpectedEOF {
			err = ErrTruncated
		}
		b.err = &ParseError{Record: b.n + 1, Err: err}
		return b.err
	}
	b.n++
	if err := DecodeBAM(block, b.nRef, rec); err != nil {
		b.err = &ParseError{Record: b.n, Err: err}
		return b.err
	}
	return nil
}

// ErrBadRecord is returned for a BAM record whose fields are inconsistent.
var ErrBadRecord = errors.New("reads: malformed BAM record")

// DecodeBAM decodes one BAM alignment record (SAM specification section
// 4.2, without the leading block_size) into rec. nRef is the number of
// references in the header. Slices of rec point into b.
func DecodeBAM(b []byte, nRef int, rec *Record) error {
	if len(b) < 32 {
		return fmt.Errorf("%w: %d bytes, fewer than the 32 of the fixed fields", ErrBadRecord, len(b))
	}
	le := binary.LittleEndian
	rec.Ref = int32(le.Uint32(b[0:]))
	rec.Pos = int32(le.Uint32(b[4:]))
	lName := int(b[8])
	rec.MapQ = b[9]
	nCigar := int(le.Uint16(b[12:]))
	rec.Flags = le.Uint16(b[14:])
	lSeq := int32(le.Uint32(b[16:]))
	rec.MateRef = int32(le.Uint32(b[20:]))
	rec.MatePos = int32(le.Uint32(b[24:]))
	if rec.Ref < -1 || int(rec.Ref) >= nRef || rec.MateRef < -1 || int(rec.MateRef) >= nRef {
		return fmt.Errorf("%w: reference index %d or mate reference index %d outside the %d references of the header", ErrBadRecord, rec.Ref, rec.MateRef, nRef)
	}
	if rec.Pos < -1 || rec.MatePos < -1 {
		return fmt.Errorf("%w: negative position", ErrBadRecord)
	}
	if lName < 1 || lSeq < 0 || lSeq > maxBAMRecord {
		return fmt.Errorf("%w: read name length %d or sequence length %d", ErrBadRecord, lName, lSeq)
	}
	rec.SeqLen = lSeq
	p := 32
	need := int64(p) + int64(lName) + 4*int64(nCigar) + (int64(lSeq)+1)/2 + int64(lSeq)
	if need > int64(len(b)) {
		return fmt.Errorf("%w: fields need %d bytes, block has %d", ErrBadRecord, need, len(b))
	}
	rec.Name = b[p : p+lName-1] // without the NUL
	if b[p+lName-1] != 0 {
		return fmt.Errorf("%w: read name not NUL-terminated", ErrBadRecord)
	}
	p += lName
	rec.Cigar = rec.Cigar[:0]
	for i := 0; i < nCigar; i++ {
		c := CigarOp(le.Uint32(b[p:]))
		if c.Op() > CigarMismatch {
			return fmt.Errorf("%w: CIGAR operation code %d", ErrBadRecord, c.Op())
		}
		rec.Cigar = append(rec.Cigar, c)
		p += 4
	}
	p += int(lSeq+1)/2 + int(lSeq)
	rec.RG, rec.MC, rec.samAux = nil, nil, nil
	rec.bamAux = b[p:len(b):len(b)]
	cg, err := scanAux(b[p:], rec)
	if err != nil {
		return err
	}
	if err := parseMC(rec); err != nil {
		return fmt.Errorf("%w: %v", ErrBadRecord, err)
	}
	// A CIGAR of more than 65535 operations is stored in the CG tag, with
	// the placeholder "<l_seq>S<reference length>N" in the CIGAR field
	// (SAM specification section 4.2.2).
	if cg != nil && len(rec.Cigar) == 2 && rec.Cigar[0].Op() == CigarSoftClip && rec.Cigar[0].Len() == int64(lSeq) && rec.Cigar[1].Op() == CigarSkip {
		rec.Cigar = rec.Cigar[:0]
		for i := 0; i+4 <= len(cg); i += 4 {
			c := CigarOp(le.Uint32(cg[i:]))
			if c.Op() > CigarMismatch {
				return fmt.Errorf("%w: CG operation code %d", ErrBadRecord, c.Op())
			}
			rec.Cigar = append(rec.Cigar, c)
		}
	}
	return nil
}

// scanAux walks the optional fields (SAM specification section 4.2.4),
// keeping RG and MC and checking every length on the way. It returns
// the elements of a CG:B:I array (the real CIGAR of a long alignment).
func scanAux(a []byte, rec *Record) (cg []byte, err error) {
	for len(a) > 0 {
		var f auxField
		if f, a, err = nextAux(a); err != nil {
			return nil, err
		}
		switch {
		case f.typ == 'Z' && f.tag == Tag{'R', 'G'}:
			rec.RG = f.val
		case f.typ == 'Z' && f.tag == Tag{'M', 'C'}:
			rec.MC = f.val
		case f.typ == 'B' && f.tag == Tag{'C', 'G'} && (f.val[0] == 'I' || f.val[0] == 'i'):
			cg = f.val[5:]
		}
	}
	return cg, nil
}

// auxField is one BAM optional field: val is a Z or H string without its
// NUL, a B array with its subtype and count, or the bytes of a number or
// character.
type auxField struct {
	tag Tag
	typ byte
	val []byte
}

// nextAux splits the first optional field off a, checking its length.
func nextAux(a []byte) (auxField, []byte, error) {
	if len(a) < 3 {
		return auxField{}, nil, fmt.Errorf("%w: optional field cut short", ErrBadRecord)
	}
	f := auxField{tag: Tag{a[0], a[1]}, typ: a[2]}
	a = a[3:]
	var size int
	switch f.typ {
	case 'A', 'c', 'C':
		size = 1
	case 's', 'S':
		size = 2
	case 'i', 'I', 'f':
		size = 4
	case 'Z', 'H':
		i := bytes.IndexByte(a, 0)
		if i < 0 {
			return f, nil, fmt.Errorf("%w: optional field %s not NUL-terminated", ErrBadRecord, f.tag)
		}
		f.val = a[:i]
		return f, a[i+1:], nil
	case 'B':
		if len(a) < 5 {
			return f, nil, fmt.Errorf("%w: array field %s cut short", ErrBadRecord, f.tag)
		}
		var es int
		switch a[0] {
		case 'c', 'C':
			es = 1
		case 's', 'S':
			es = 2
		case 'i', 'I', 'f':
			es = 4
		default:
			return f, nil, fmt.Errorf("%w: array field %s has element type %q", ErrBadRecord, f.tag, a[0])
		}
		total := 5 + int64(binary.LittleEndian.Uint32(a[1:]))*int64(es)
		if total > int64(len(a)) {
			return f, nil, fmt.Errorf("%w: array field %s longer than the record", ErrBadRecord, f.tag)
		}
		f.val = a[:total]
		return f, a[total:], nil
	default:
		return f, nil, fmt.Errorf("%w: optional field %s has unknown type %q", ErrBadRecord, f.tag, f.typ)
	}
	if len(a) < size {
		return f, nil, fmt.Errorf("%w: optional field %s cut short", ErrBadRecord, f.tag)
	}
	f.val = a[:size]
	return f, a[size:], nil
}
