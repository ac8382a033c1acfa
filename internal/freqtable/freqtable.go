// Package freqtable reads and writes headroom's frequency-count tables:
// tab-separated text with a header line
//
//	sample	times_seen	units
//	LIB-07	1	48213
//	LIB-07	2	9120
//
// one row per sample and frequency, where units is how many distinct units
// were seen exactly times_seen times. Either kind of file may be
// gzip-compressed. Several samples may share a file;
// rows of one sample need not be adjacent, but a (sample, times_seen) pair
// may appear only once. It also reads per-unit files: one non-negative
// count per line, one line per unit.
package freqtable

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"headroom/internal/inerr"
	"io"
	"strconv"
	"strings"

	"headroom/complexity"
	"headroom/internal/gzin"
)

// Header is the exact header line of a frequency-count table.
const Header = "sample\ttimes_seen\tunits"

// maxLine bounds one line (1 MiB): a sample name longer than that is not a
// sample name, and a line without newline that long is not this format.
const maxLine = 1 << 20

// ParseError reports a problem at a line (1-based) and column (1-based
// field; 0 when the whole line is at fault). It is the shape every reader
// of headroom shares (internal/inerr).
type ParseError = inerr.ParseError

// Errors reported inside a ParseError.
var (
	ErrEmpty    = errors.New("freqtable: empty file; expected the header \"sample<TAB>times_seen<TAB>units\"")
	ErrHeader   = errors.New("freqtable: missing header; the first line must be \"sample<TAB>times_seen<TAB>units\"")
	ErrFields   = errors.New("freqtable: expected 3 tab-separated fields: sample, times_seen, units")
	ErrTimes    = errors.New("freqtable: times_seen must be a whole number of at least 1")
	ErrUnits    = errors.New("freqtable: units must be a whole number of 0 or more")
	ErrRepeat   = errors.New("freqtable: this (sample, times_seen) pair was already given")
	ErrOverflow = errors.New("freqtable: number too large (beyond 64-bit integers)")
	ErrTotal    = errors.New("freqtable: total reads of the sample overflow 64-bit integers")
	ErrLineLong = errors.New("freqtable: line longer than 1 MiB")
	ErrNoSample = errors.New("freqtable: empty sample name")
	ErrPerUnit  = errors.New("freqtable: expected one whole number of 0 or more per line (a unit's count)")
	ErrNoRows   = errors.New("freqtable: the table has a header but no rows")
	ErrBinary   = errors.New("freqtable: file looks binary (NUL byte), not a text table")
	ErrGzipCut  = errors.New("freqtable: gzip data ends early; the file was cut short")
	ErrGzipBad  = errors.New("freqtable: gzip data is damaged (bad header or checksum)")
)

// newReader returns a buffered reader of the text of r, inflated when it
// is gzip.
func newReader(r io.Reader) (*bufio.Reader, error) {
	br, _, err := gzin.Reader(r, 64<<10)
	if err != nil {
		return nil, &ParseError{Line: 1, Err: readErr(err)}
	}
	return br, nil
}

// readErr names a failure of reading the (possibly compressed) input.
func readErr(err error) error {
	switch {
	case gzin.Cut(err):
		return ErrGzipCut
	case gzin.Damaged(err):
		return ErrGzipBad
	}
	return err
}

// Sample is one sample's frequency counts, in order of first appearance.
type Sample struct {
	Name   string
	Counts complexity.Counts
}

// Read parses a whole frequency-count table. Samples come back in order
// of first appearance.
func Read(r io.Reader) ([]Sample, error) {
	br, err := newReader(r)
	if err != nil {
		return nil, err
	}
	var (
		line    int64
		order   []string
		classes = map[string]map[int64]int64{}
		reads   = map[string]int64{}
	)
	for {
		b, err := readLine(br)
		if len(b) > 0 || err == nil || err == ErrLineLong {
			line++
		}
		if err == ErrLineLong {
			return nil, &ParseError{Line: line, Err: err}
		}
		if err != nil && err != io.EOF {
			at := line // the line being read when the input failed
			if len(b) == 0 {
				at++
			}
			return nil, &ParseError{Line: at, Err: readErr(err)}
		}
		if len(b) == 0 && err == io.EOF {
			break
		}
		if bytes.IndexByte(b, 0) >= 0 {
			return nil, &ParseError{Line: line, Err: ErrBinary}
		}
		s := strings.TrimRight(string(b), "\r")
		if line == 1 {
			s = strings.TrimPrefix(s, "\ufeff") // a UTF-8 byte-order mark, as spreadsheets write
			if strings.TrimSpace(s) != Header && strings.Join(strings.Fields(s), "\t") != Header {
				return nil, &ParseError{Line: 1, Err: ErrHeader}
			}
			if err == io.EOF {
				break
			}
			continue
		}
		if strings.TrimSpace(s) == "" {
			if err == io.EOF {
				break
			}
			continue // blank lines are harmless
		}
		f := strings.Split(s, "\t")
		if len(f) != 3 {
			return nil, &ParseError{Line: line, Err: ErrFields}
		}
		name := f[0]
		if name == "" {
			return nil, &ParseError{Line: line, Column: 1, Err: ErrNoSample}
		}
		t, perr := parseInt(f[1])
		if perr != nil || t < 1 {
			if perr == ErrOverflow {
				return nil, &ParseError{Line: line, Column: 2, Err: perr}
			}
			return nil, &ParseError{Line: line, Column: 2, Err: ErrTimes}
		}
		u, perr := parseInt(f[2])
		if perr != nil || u < 0 {
			if perr == ErrOverflow {
				return nil, &ParseError{Line: line, Column: 3, Err: perr}
			}
			return nil, &ParseError{Line: line, Column: 3, Err: ErrUnits}
		}
		m, ok := classes[name]
		if !ok {
			m = map[int64]int64{}
			classes[name] = m
			order = append(order, name)
		}
		if _, dup := m[t]; dup {
			return nil, &ParseError{Line: line, Column: 2, Err: ErrRepeat}
		}
		if u > 0 && (u > (1<<63-1)/t || reads[name] > (1<<63-1)-t*u) {
			return nil, &ParseError{Line: line, Column: 3, Err: ErrTotal}
		}
		reads[name] += t * u
		m[t] = u
		if err == io.EOF {
			break
		}
	}
	if line == 0 {
		return nil, &ParseError{Line: 0, Err: ErrEmpty}
	}
	if len(order) == 0 {
		return nil, &ParseError{Line: line, Err: ErrNoRows}
	}
	out := make([]Sample, 0, len(order))
	for _, name := range order {
		c, err := complexity.FromMap(classes[name])
		if err != nil {
			return nil, err // unreachable: validated above
		}
		out = append(out, Sample{Name: name, Counts: c})
	}
	return out, nil
}

// ReadPerUnit parses a per-unit file: one count per line. Blank lines are
// skipped; zero counts are allowed (units not seen) and ignored.
func ReadPerUnit(r io.Reader) (complexity.Counts, error) {
	br, err := newReader(r)
	if err != nil {
		return complexity.Counts{}, err
	}
	var (
		line  int64
		b     complexity.Builder
		reads int64
	)
	for {
		s, err := readLine(br)
		if len(s) > 0 || err == nil || err == ErrLineLong {
			line++
		}
		if err == ErrLineLong {
			return complexity.Counts{}, &ParseError{Line: line, Err: err}
		}
		if err != nil && err != io.EOF {
			at := line // the line being read when the input failed
			if len(s) == 0 {
				at++
			}
			return complexity.Counts{}, &ParseError{Line: at, Err: readErr(err)}
		}
		if len(s) == 0 && err == io.EOF {
			break
		}
		t := strings.TrimSpace(string(s))
		if t != "" {
			v, perr := parseInt(t)
			if perr == ErrOverflow {
				return complexity.Counts{}, &ParseError{Line: line, Column: 1, Err: perr}
			}
			if perr != nil || v < 0 {
				return complexity.Counts{}, &ParseError{Line: line, Column: 1, Err: ErrPerUnit}
			}
			if reads > (1<<63-1)-v {
				return complexity.Counts{}, &ParseError{Line: line, Column: 1, Err: ErrTotal}
			}
			reads += v
			b.AddUnit(v)
		}
		if err == io.EOF {
			break
		}
	}
	if line == 0 {
		return complexity.Counts{}, &ParseError{Line: 0, Err: errors.New("freqtable: empty file; expected one count per line")}
	}
	return b.Counts()
}

// readLine returns the next line without its newline; io.EOF with the
// last, unterminated line (possibly empty). The slice is valid until the
// next call.
func readLine(br *bufio.Reader) ([]byte, error) {
	var long []byte
	for {
		b, err := br.ReadSlice('\n')
		if err == bufio.ErrBufferFull {
			long = append(long, b...)
			if len(long) > maxLine {
				return nil, ErrLineLong
			}
			continue
		}
		if long != nil {
			b = append(long, b...)
		}
		if len(b) > maxLine {
			return nil, ErrLineLong
		}
		if err == nil {
			return b[:len(b)-1], nil
		}
		return b, err
	}
}

// parseInt accepts a plain decimal integer (optional leading +/-).
func parseInt(s string) (int64, error) {
	v, err := strconv.ParseInt(s, 10, 64)
	if err != nil {
		var ne *strconv.NumError
		if errors.As(err, &ne) && ne.Err == strconv.ErrRange {
			return 0, ErrOverflow
		}
		return 0, err
	}
	return v, nil
}

// Write writes samples as one frequency-count table. A sample without
// reads is written as the single row "name 1 0" so that it survives.
func Write(w io.Writer, samples []Sample) error {
	bw := bufio.NewWriter(w)
	bw.WriteString(Header + "\n")
	for _, s := range samples {
		name := CleanName(s.Name)
		if s.Counts.Distinct() == 0 {
			// A sample with no reads stays in the table as one empty class.
			fmt.Fprintf(bw, "%s\t1\t0\n", name)
			continue
		}
		for _, c := range s.Counts.Classes() {
			fmt.Fprintf(bw, "%s\t%d\t%d\n", name, c.Times, c.Units)
		}
	}
	return bw.Flush()
}

// CleanName keeps a name on one field of one line of a tab-separated
// file: tabs and line breaks become spaces. It works on bytes, so bytes
// that are not UTF-8 pass unchanged (mapping runes would turn every such
// byte into U+FFFD, and two different names into one; found by FuzzRead).
func CleanName(s string) string {
	if !strings.ContainsAny(s, "\t\n\r") {
		return s
	}
	b := []byte(s)
	for i, c := range b {
		if c == '\t' || c == '\n' || c == '\r' {
			b[i] = ' '
		}
	}
	return string(b)
}
