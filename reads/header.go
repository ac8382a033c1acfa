package reads

import (
	"errors"
	"fmt"
	"io"
	"regexp"
	"strconv"

	"github.com/biogo/hts/sam"
)

// ErrBadHeader is a SAM header line (SAM or BAM header text) that does
// not follow the SAM specification, section 1.3.
var ErrBadHeader = errors.New("reads: malformed SAM header line")

// headerLineRe finds the header line that github.com/biogo/hts/sam names
// in its error ("...: line 2: \"@SQ\tSN:chr1\tLN:zero\"").
var headerLineRe = regexp.MustCompile(`line ([0-9]+): ("(?:[^"\\]|\\.)*")$`)

// headerTextErr restates an error of parsing header text as ErrBadHeader
// with the line within the text and its content, when the parser names
// them; ok is false otherwise.
func headerTextErr(err error) (line int64, e error, ok bool) {
	m := headerLineRe.FindStringSubmatch(err.Error())
	if m == nil {
		return 0, err, false
	}
	n, perr := strconv.ParseInt(m[1], 10, 64)
	if perr != nil {
		return 0, err, false
	}
	return n, fmt.Errorf("%w %s", ErrBadHeader, m[2]), true
}

// Header is what duplicate counting needs from a SAM/BAM header.
type Header struct {
	// Refs are the reference names in @SQ order (their index is a record's Ref).
	Refs []string
	// Coordinate reports @HD SO:coordinate: records claim to be sorted by
	// (Ref, Pos), with unmapped records without position last.
	Coordinate bool
	// Library maps each @RG ID to its LB ("" when the read group has none).
	Library map[string]string
	// ReadGroups lists the @RG IDs in header order.
	ReadGroups []string

	refIndex map[string]int32
}

func headerFrom(h *sam.Header) *Header {
	out := &Header{Coordinate: h.SortOrder == sam.Coordinate, Library: map[string]string{}, refIndex: map[string]int32{}}
	for i, r := range h.Refs() {
		out.Refs = append(out.Refs, r.Name())
		out.refIndex[r.Name()] = int32(i)
	}
	for _, rg := range h.RGs() {
		out.ReadGroups = append(out.ReadGroups, rg.Name())
		out.Library[rg.Name()] = rg.Library()
	}
	return out
}

// RefIndex returns the index of reference name, or false.
func (h *Header) RefIndex(name []byte) (int32, bool) {
	i, ok := h.refIndex[string(name)]
	return i, ok
}

// parseHeaderText parses SAM header text with github.com/biogo/hts/sam,
// turning a panic of that parser on malformed lines (found by FuzzOpen,
// e.g. "@HD\t" with no fields) into an error.
func parseHeaderText(text []byte) (h *sam.Header, err error) {
	defer func() {
		if r := recover(); r != nil {
			h, err = nil, fmt.Errorf("malformed header line (%v)", r)
		}
	}()
	return sam.NewHeader(text, nil)
}

// decodeBinaryHeader is sam.Header.DecodeBinary with the same guard.
func decodeBinaryHeader(r io.Reader) (h *sam.Header, err error) {
	defer func() {
		if r := recover(); r != nil {
			h, err = nil, fmt.Errorf("malformed header text (%v)", r)
		}
	}()
	h, _ = sam.NewHeader(nil, nil)
	if err := h.DecodeBinary(r); err != nil {
		return nil, err
	}
	return h, nil
}
