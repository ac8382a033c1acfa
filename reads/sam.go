package reads

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
)

// SAMReader reads SAM text records (plain or gzip).
type SAMReader struct {
	in   *Input
	r    *bufio.Reader
	h    *Header
	line int64
	long []byte
	err  error
}

// NewSAMReader reads the header lines of a SAM stream, parses them with
// github.com/biogo/hts/sam, and returns a reader at the first record.
func NewSAMReader(in *Input) (*SAMReader, error) {
	s := &SAMReader{in: in, r: in.Reader()}
	var text []byte
	for {
		b, err := s.r.Peek(1)
		if len(b) == 0 || b[0] != '@' {
			if err != nil && err != io.EOF {
				return nil, &ParseError{Line: s.line + 1, Err: err}
			}
			break
		}
		line, err := s.readLine()
		if err != nil && err != io.EOF {
			return nil, &ParseError{Line: s.line, Err: err}
		}
		text = append(text, line...)
		text = append(text, '\n')
		if len(text) > maxBAMHeader {
			return nil, &ParseError{Line: s.line, Err: fmt.Errorf("reads: SAM header is larger than %d MiB", maxBAMHeader>>20)}
		}
		if err == io.EOF {
			break
		}
	}
	h, err := parseHeaderText(text)
	if err != nil {
		// The header is the first lines of the file, so a line of the
		// text is a line of the file.
		if n, e, ok := headerTextErr(err); ok {
			return nil, &ParseError{Line: n, Err: e}
		}
		return nil, fmt.Errorf("reads: SAM header (lines 1-%d): %v", s.line, err)
	}
	s.h = headerFrom(h)
	return s, nil
}

// Header returns the parsed header.
func (s *SAMReader) Header() *Header { return s.h }

// Line returns the number of lines read so far.
func (s *SAMReader) Line() int64 { return s.line }

// maxSAMLine bounds one SAM line like maxBAMRecord bounds a BAM record, so
// that a stream without line ends cannot grow the buffer without limit.
const maxSAMLine = maxBAMRecord

var errSAMLineLong = fmt.Errorf("%w: a line longer than %d MiB (is this SAM?)", ErrBadSAM, maxSAMLine>>20)

// readLine returns the next line without its line ending; the slice is
// valid until the next call.
func (s *SAMReader) readLine() ([]byte, error) {
	line, err := s.r.ReadSlice('\n')
	if err == bufio.ErrBufferFull {
		s.long = append(s.long[:0], line...)
		for err == bufio.ErrBufferFull {
			if len(s.long) > maxSAMLine {
				return nil, errSAMLineLong
			}
			line, err = s.r.ReadSlice('\n')
			s.long = append(s.long, line...)
		}
		line = s.long
	}
	if len(line) == 0 && err != nil {
		return nil, err
	}
	s.line++
	if err == io.EOF {
		err = nil // last line without newline
	} else if err != nil {
		return nil, err
	}
	line = bytes.TrimSuffix(line, []byte{'\n'})
	line = bytes.TrimSuffix(line, []byte{'\r'})
	return line, nil
}

// Read parses the next record into rec (slices valid until the next
// call). It returns io.EOF after the last record.
func (s *SAMReader) Read(rec *Record) error {
	if s.err != nil {
		return s.err
	}
	for {
		line, err := s.readLine()
		if err == io.EOF {
			if err := s.in.CheckEnd(); err != nil {
				s.err = &ParseError{Line: s.line + 1, Err: err}
				return s.err
			}
			s.err = io.EOF
			return s.err
		}
		if err != nil {
			s.err = &ParseError{Line: s.line + 1, Err: err}
			return s.err
		}
		if len(line) == 0 {
			continue // blank lines carry nothing
		}
		if err := ParseSAMLine(line, s.h, rec); err != nil {
			s.err = &ParseError{Line: s.line, Err: err}
			return s.err
		}
		return nil
	}
}

// ErrBadSAM is returned for a SAM alignment line that does not follow the
// SAM specification section 1.4.
var ErrBadSAM = errors.New("reads: malformed SAM line")

// ParseSAMLine parses one SAM alignment line (without line ending) into
// rec; its slices then point into line. References are looked up in h.
func ParseSAMLine(line []byte, h *Header, rec *Record) error {
	var f [11][]byte
	rest := line
	for i := 0; i < 11; i++ {
		j := bytes.IndexByte(rest, '\t')
		if j < 0 {
			if i < 10 {
				return fmt.Errorf("%w: %d tab-separated fields, the SAM specification requires 11", ErrBadSAM, i+1)
			}
			f[i], rest = rest, nil
			break
		}
		f[i], rest = rest[:j], rest[j+1:]
	}
	rec.Name = f[0]
	flag, ok := atoi(f[1], 0xffff)
	if !ok {
		return fmt.Errorf("%w: FLAG %q is not a number from 0 to 65535", ErrBadSAM, f[1])
	}
	rec.Flags = uint16(flag)
	var err error
	if rec.Ref, err = refField(f[2], h, -1); err != nil {
		return err
	}
	pos, ok := atoi(f[3], 1<<31-1)
	if !ok {
		return fmt.Errorf("%w: POS %q is not a number from 0 to 2^31-1", ErrBadSAM, f[3])
	}
	rec.Pos = int32(pos) - 1
	mapq, ok := atoi(f[4], 255)
	if !ok {
		return fmt.Errorf("%w: MAPQ %q is not a number from 0 to 255", ErrBadSAM, f[4])
	}
	rec.MapQ = uint8(mapq)
	if rec.Cigar, err = ParseCigar(rec.Cigar, f[5]); err != nil {
		return err
	}
	if rec.MateRef, err = refField(f[6], h, rec.Ref); err != nil {
		return err
	}
	pnext, ok := atoi(f[7], 1<<31-1)
	if !ok {
		return fmt.Errorf("%w: PNEXT %q is not a number from 0 to 2^31-1", ErrBadSAM, f[7])
	}
	rec.MatePos = int32(pnext) - 1
	if len(f[9]) == 1 && f[9][0] == '*' {
		rec.SeqLen = 0
	} else {
		rec.SeqLen = int32(len(f[9]))
	}
	if len(f[10]) != 1 || f[10][0] != '*' {
		if int32(len(f[10])) != rec.SeqLen {
			return fmt.Errorf("%w: QUAL has %d characters, SEQ %d", ErrBadSAM, len(f[10]), rec.SeqLen)
		}
	}
	if len(rec.Cigar) > 0 && rec.SeqLen > 0 && QueryLen(rec.Cigar) != int64(rec.SeqLen) {
		return fmt.Errorf("%w: CIGAR %q accounts for %d bases, SEQ has %d", ErrBadCigar, f[5], QueryLen(rec.Cigar), rec.SeqLen)
	}
	rec.RG, rec.MC, rec.bamAux = nil, nil, nil
	rec.samAux = rest
	for len(rest) > 0 {
		var t []byte
		if j := bytes.IndexByte(rest, '\t'); j >= 0 {
			t, rest = rest[:j], rest[j+1:]
		} else {
			t, rest = rest, nil
		}
		if len(t) < 5 || t[2] != ':' || t[4] != ':' {
			return fmt.Errorf("%w: optional field %q is not TAG:TYPE:VALUE", ErrBadSAM, t)
		}
		if t[3] != 'Z' {
			continue
		}
		switch {
		case t[0] == 'R' && t[1] == 'G':
			rec.RG = t[5:]
		case t[0] == 'M' && t[1] == 'C':
			rec.MC = t[5:]
		}
	}
	if err := parseMC(rec); err != nil {
		return fmt.Errorf("%w: %v", ErrBadSAM, err)
	}
	return nil
}

// refField resolves RNAME or RNEXT ("=" means same as RNAME).
func refField(b []byte, h *Header, same int32) (int32, error) {
	if len(b) == 1 && b[0] == '*' {
		return -1, nil
	}
	if len(b) == 1 && b[0] == '=' {
		return same, nil // RNEXT "=": the same as RNAME (which may be '*')
	}
	if len(b) == 0 {
		return -1, fmt.Errorf("%w: empty reference name", ErrBadSAM)
	}
	i, ok := h.RefIndex(b)
	if !ok {
		return -1, fmt.Errorf("%w: reference %q is not in the header's @SQ lines (add the header, e.g. samtools view -h)", ErrBadSAM, b)
	}
	return i, nil
}

// atoi parses a non-negative decimal no larger than max.
func atoi(b []byte, max int64) (int64, bool) {
	if len(b) == 0 || len(b) > 19 {
		return 0, false
	}
	var n int64
	for _, c := range b {
		if c < '0' || c > '9' {
			return 0, false
		}
		n = n*10 + int64(c-'0')
		if n > max {
			return 0, false
		}
	}
	return n, true
}
