package amplicon

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
)

// maxBIOMIndex bounds row and column indices of a BIOM document whose
// shape has not been read yet (they are checked against the shape at the
// end). Sparse accumulators live in maps, so a large index costs no more
// memory than a small one.
const maxBIOMIndex = math.MaxInt32

// posReader counts bytes and remembers where lines start, so that a JSON
// decoder's byte offset can be reported as line and column. Offsets of
// newlines behind the decoder are folded into a count (prune), keeping
// memory bounded.
type posReader struct {
	r         io.Reader
	off       int64   // bytes delivered
	nl        []int64 // offsets of newlines not yet pruned
	baseLines int64   // newlines pruned
	baseLast  int64   // offset of the last pruned newline (-1: none)
}

func (p *posReader) Read(b []byte) (int, error) {
	n, err := p.r.Read(b)
	for i := 0; i < n; {
		k := bytes.IndexByte(b[i:n], '\n')
		if k < 0 {
			break
		}
		p.nl = append(p.nl, p.off+int64(i+k))
		i += k + 1
	}
	p.off += int64(n)
	return n, err
}

// prune forgets newlines before off (off must not decrease).
func (p *posReader) prune(off int64) {
	i := sort.Search(len(p.nl), func(i int) bool { return p.nl[i] >= off })
	if i == 0 {
		return
	}
	p.baseLines += int64(i)
	p.baseLast = p.nl[i-1]
	p.nl = p.nl[:copy(p.nl, p.nl[i:])]
}

// pos returns the 1-based line and column of byte offset off.
func (p *posReader) pos(off int64) (line, col int64) {
	i := sort.Search(len(p.nl), func(i int) bool { return p.nl[i] >= off })
	last := p.baseLast
	if i > 0 {
		last = p.nl[i-1]
	}
	return p.baseLines + int64(i) + 1, off - last
}

// biomReader reads one BIOM 1.0 JSON document.
type biomReader struct {
	dec *json.Decoder
	pos func(off int64) (line, col int64)
	pr  *posReader

	shape      []int64
	matrixType string
	elemType   string
	rowIDs     []string
	colIDs     []string
	seenKeys   map[string]bool

	// Accumulated from data.
	accs      []accum // dense: per column (sample)
	rowTotals []int64 // dense: per row (taxon)
	dataRows  int64   // dense: rows read
	cols      map[int64]*sparseCol
	rows      map[int64]int64 // sparse: row (taxon) totals
	maxRow    int64           // sparse: largest index seen (-1: none)
	maxCol    int64
	haveData  bool
	raw       []byte // "data" read before "matrix_type", kept whole
	rawLine   int64  // where it starts
	rawCol    int64
	entry     json.RawMessage // the data entry being read
	spans     [][2]int        // its numbers' byte ranges
}

func readBIOM(br *bufio.Reader) (*Table, error) {
	pr := &posReader{r: br, baseLast: -1}
	b := &biomReader{pr: pr, pos: pr.pos, seenKeys: map[string]bool{}}
	b.dec = json.NewDecoder(pr)
	b.dec.UseNumber()
	if err := b.document(); err != nil {
		return nil, err
	}
	return b.table()
}

func (b *biomReader) errAt(off int64, kind error, format string, args ...any) *ParseError {
	line, col := b.pos(off)
	return perr(line, col, kind, format, args...)
}

// tokErr turns a decoder error into a ParseError.
func (b *biomReader) tokErr(err error) error {
	var se *json.SyntaxError
	switch {
	case errors.As(err, &se):
		return b.errAt(se.Offset, ErrSyntax, "BIOM JSON syntax error: %v", se)
	case err == io.EOF || errors.Is(err, io.ErrUnexpectedEOF):
		return b.errAt(b.dec.InputOffset(), ErrTruncated, "truncated BIOM JSON: the document ends early; was the file cut short?")
	}
	var ue *json.UnmarshalTypeError
	if errors.As(err, &ue) {
		return b.errAt(ue.Offset, ErrSyntax, "BIOM JSON: %s should be %v, not %s", ue.Field, ue.Type, ue.Value)
	}
	return err
}

// decodeErr turns an error of Decode, for a value that starts at or after
// byte offset start (just past the preceding ',', ':' or '['), into a
// ParseError. The decoder's syntax-error offsets are not absolute for
// Decode, so a syntax error is reported where the value starts.
func (b *biomReader) decodeErr(err error, start int64) error {
	var se *json.SyntaxError
	if errors.As(err, &se) {
		return b.errAt(start, ErrSyntax, "BIOM JSON syntax error in the value that starts here: %v", se)
	}
	return b.tokErr(err)
}

func (b *biomReader) token() (json.Token, error) {
	t, err := b.dec.Token()
	if err != nil {
		return nil, b.tokErr(err)
	}
	return t, nil
}

func (b *biomReader) expect(d json.Delim, what string) error {
	off := b.dec.InputOffset()
	t, err := b.token()
	if err != nil {
		return err
	}
	if t != d {
		return b.errAt(off+1, ErrSyntax, "BIOM JSON: %s must start with %q", what, string(d))
	}
	return nil
}

func (b *biomReader) document() error {
	if err := b.expect('{', "a BIOM document"); err != nil {
		return err
	}
	for b.dec.More() {
		off := b.dec.InputOffset()
		t, err := b.token()
		if err != nil {
			return err
		}
		key, _ := t.(string)
		if b.seenKeys[key] {
			return b.errAt(off+1, ErrSyntax, "BIOM JSON: field %q repeated", key)
		}
		b.seenKeys[key] = true
		vOff := b.dec.InputOffset() // just past the key
		switch key {
		case "shape":
			var s []int64
			if err := b.dec.Decode(&s); err != nil {
				return b.decodeErr(err, vOff+1)
			}
			if len(s) != 2 || s[0] < 0 || s[1] < 0 {
				return b.errAt(off+1, ErrSyntax, "BIOM shape must be [rows, columns], got %v", s)
			}
			b.shape = s
		case "matrix_type", "matrix_element_type", "format":
			var s string
			if err := b.dec.Decode(&s); err != nil {
				return b.decodeErr(err, vOff+1)
			}
			switch key {
			case "matrix_type":
				if s != "dense" && s != "sparse" {
					return b.errAt(off+1, ErrSyntax, "BIOM matrix_type must be \"dense\" or \"sparse\", not %s", quote(s))
				}
				b.matrixType = s
			case "matrix_element_type":
				if s == "unicode" || s == "str" {
					return b.errAt(off+1, ErrNotCount, "BIOM matrix_element_type %s: a table of text, not counts", quote(s))
				}
				b.elemType = s
			case "format":
				if strings.HasPrefix(s, "Biological Observation Matrix 2") {
					return b.errAt(off+1, ErrHDF5, "BIOM format %s is not BIOM 1.0 JSON; convert it with `biom convert --to-json` or `--to-tsv`", quote(s))
				}
			}
		case "rows", "columns":
			ids, err := b.ids(key)
			if err != nil {
				return err
			}
			if key == "rows" {
				b.rowIDs = ids
			} else {
				b.colIDs = ids
			}
		case "data":
			if b.matrixType == "" {
				// The matrix type comes later: keep the data and read it
				// when the type is known.
				var raw json.RawMessage
				if err := b.dec.Decode(&raw); err != nil {
					return b.decodeErr(err, vOff+1)
				}
				b.raw = raw
				b.rawLine, b.rawCol = b.pr.pos(b.dec.InputOffset() - int64(len(raw)))
				continue
			}
			if err := b.data(); err != nil {
				return err
			}
		default:
			var skip json.RawMessage
			if err := b.dec.Decode(&skip); err != nil {
				return b.decodeErr(err, vOff+1)
			}
		}
	}
	if err := b.end(); err != nil {
		return err
	}
	if b.raw != nil {
		return b.dataLater(b.raw)
	}
	return nil
}

// end reads the closing brace and makes sure nothing follows it.
func (b *biomReader) end() error {
	if _, err := b.token(); err != nil { // '}'
		return err
	}
	off := b.dec.InputOffset()
	if _, err := b.dec.Token(); err != io.EOF {
		return b.errAt(off+1, ErrSyntax, "text after the end of the BIOM document")
	}
	return nil
}

// dataLater reads a buffered "data" value, which began at line rawLine,
// column rawCol; offsets of its decoder count from the value's start.
func (b *biomReader) dataLater(raw []byte) error {
	if b.matrixType == "" {
		return perr(0, 0, ErrSyntax, "BIOM document without matrix_type (\"dense\" or \"sparse\")")
	}
	sl, sc := b.rawLine, b.rawCol
	b.pos = func(rel int64) (int64, int64) {
		if rel < 0 || rel > int64(len(raw)) {
			return sl, 0
		}
		seg := raw[:rel]
		n := int64(bytes.Count(seg, []byte{'\n'}))
		if n == 0 {
			return sl, sc + rel
		}
		return sl + n, rel - int64(bytes.LastIndexByte(seg, '\n'))
	}
	outer := b.dec
	b.dec = json.NewDecoder(bytes.NewReader(raw))
	b.dec.UseNumber()
	b.pr = nil
	err := b.data()
	b.dec = outer
	return err
}

// ids reads the "rows" or "columns" array of objects with an "id".
func (b *biomReader) ids(key string) ([]string, error) {
	if err := b.expect('[', key); err != nil {
		return nil, err
	}
	what := "taxon"
	if key == "columns" {
		what = "sample"
	}
	ids := []string{}
	seen := map[string]int{}
	for b.dec.More() {
		off := b.dec.InputOffset()
		var o struct {
			ID *string `json:"id"`
		}
		if err := b.dec.Decode(&o); err != nil {
			return nil, b.decodeErr(err, off+1)
		}
		if o.ID == nil {
			return nil, b.errAt(off+1, ErrSyntax, "BIOM %s entry %d has no \"id\"", key, len(ids))
		}
		if k, dup := seen[*o.ID]; dup {
			return nil, b.errAt(off+1, ErrDuplicate, "%s ID %s repeated in %s (entries %d and %d); IDs must be unique",
				what, quote(*o.ID), key, k, len(ids))
		}
		seen[*o.ID] = len(ids)
		ids = append(ids, *o.ID)
		if b.pr != nil {
			b.pr.prune(b.dec.InputOffset())
		}
	}
	_, err := b.token()
	return ids, err
}

// scanArray finds the elements of a JSON array that the decoder has
// already validated, appending their [start, end) byte ranges to dst. Every
// element must be a number; otherwise it returns the offset of the
// offending byte (else -1) and what is wrong.
func scanArray(raw []byte, dst [][2]int) ([][2]int, int, string) {
	i := skipWS(raw, 0)
	if i >= len(raw) || raw[i] != '[' {
		return dst, i, "each data entry must be an array"
	}
	i = skipWS(raw, i+1)
	if i < len(raw) && raw[i] == ']' {
		return dst, -1, ""
	}
	for i < len(raw) {
		c := raw[i]
		if !(c == '-' || c >= '0' && c <= '9') {
			return dst, i, "matrix element is not a number; the table must hold counts"
		}
		j := i
		for j < len(raw) && raw[j] != ',' && raw[j] != ']' && raw[j] != ' ' && raw[j] != '\t' && raw[j] != '\n' && raw[j] != '\r' {
			j++
		}
		dst = append(dst, [2]int{i, j})
		j = skipWS(raw, j)
		if j >= len(raw) {
			break
		}
		if raw[j] == ']' {
			return dst, -1, ""
		}
		i = skipWS(raw, j+1) // past ','
	}
	return dst, len(raw), "unterminated array"
}

func skipWS(b []byte, i int) int {
	for i < len(b) && (b[i] == ' ' || b[i] == '\t' || b[i] == '\n' || b[i] == '\r') {
		i++
	}
	return i
}

// sparseCol is one sample of a sparse matrix.
type sparseCol struct {
	acc     accum
	lastRow int64 // last row index seen in this column
}

func (b *biomReader) grow(col int64) {
	if n := col + 1; n > int64(len(b.accs)) {
		b.accs = append(b.accs, make([]accum, n-int64(len(b.accs)))...)
	}
}

func (b *biomReader) data() error {
	b.haveData = true
	rows, cols := int64(maxBIOMIndex), int64(maxBIOMIndex)
	if b.shape != nil {
		rows, cols = b.shape[0], b.shape[1]
	}
	b.cols, b.rows, b.maxRow, b.maxCol = map[int64]*sparseCol{}, map[int64]int64{}, -1, -1
	if err := b.expect('[', "data"); err != nil {
		return err
	}
	for b.dec.More() {
		// Each entry (a dense row or a sparse triple) is read whole and its
		// numbers scanned here: much faster than a token per number.
		before := b.dec.InputOffset()
		if err := b.dec.Decode(&b.entry); err != nil {
			return b.decodeErr(err, before+1)
		}
		off := b.dec.InputOffset() - int64(len(b.entry))
		var bad int
		var msg string
		b.spans, bad, msg = scanArray(b.entry, b.spans[:0])
		if bad >= 0 {
			kind := ErrSyntax
			if strings.HasPrefix(msg, "matrix element") {
				kind = ErrNotCount
			}
			return b.errAt(off+int64(bad), kind, "BIOM data: %s", msg)
		}
		cell := func(k int) []byte { return b.entry[b.spans[k][0]:b.spans[k][1]] }
		at := func(k int) int64 { return off + int64(b.spans[k][0]) }
		value := func(k int) (int64, error) {
			v, ce := parseCount(cell(k))
			if ce != nil {
				return 0, b.errAt(at(k), ce.kind, "%s", ce.msg)
			}
			return v, nil
		}
		if b.matrixType == "dense" {
			if b.dataRows >= rows {
				return b.errAt(off, ErrShape, "BIOM dense data has more rows than shape says (%d)", rows)
			}
			n := int64(len(b.spans))
			if b.shape == nil && b.dataRows == 0 {
				cols = n // the first row fixes the width
			}
			if n != cols {
				return b.errAt(off, ErrShape, "BIOM dense row %d has %d values, want %d (one per column)", b.dataRows, n, cols)
			}
			var total int64
			for j := range b.spans {
				v, err := value(j)
				if err != nil {
					return err
				}
				if v == 0 {
					continue
				}
				b.grow(int64(j))
				if !b.accs[j].add(v) || total > math.MaxInt64-v {
					return b.errAt(at(j), ErrTooLarge, "counts add up to more than %d reads", int64(math.MaxInt64))
				}
				total += v
			}
			b.rowTotals = append(b.rowTotals, total)
			b.dataRows++
		} else {
			if len(b.spans) != 3 {
				return b.errAt(off, ErrSyntax, "BIOM sparse entry must be [row, column, value], not %d values", len(b.spans))
			}
			index := func(k int, what string, limit int64) (int64, error) {
				v, err := strconv.ParseInt(string(cell(k)), 10, 64)
				if err != nil || v < 0 || v >= limit {
					return 0, b.errAt(at(k), ErrSyntax, "BIOM sparse %s index %s is not an integer in [0, %d)", what, quote(string(cell(k))), limit)
				}
				return v, nil
			}
			r, err := index(0, "row", rows)
			if err != nil {
				return err
			}
			c, err := index(1, "column", cols)
			if err != nil {
				return err
			}
			v, err := value(2)
			if err != nil {
				return err
			}
			sc := b.cols[c]
			if sc == nil {
				sc = &sparseCol{lastRow: -1}
				b.cols[c] = sc
			}
			if r <= sc.lastRow {
				return b.errAt(off, ErrDuplicate, "BIOM sparse entry [%d, %d] repeats or comes after row %d of the same column; "+
					"entries of a column must come in increasing row order, as BIOM writers emit them", r, c, sc.lastRow)
			}
			sc.lastRow = r
			b.maxRow, b.maxCol = max(b.maxRow, r), max(b.maxCol, c)
			if v > 0 {
				if !sc.acc.add(v) || b.rows[r] > math.MaxInt64-v {
					return b.errAt(at(2), ErrTooLarge, "counts add up to more than %d reads", int64(math.MaxInt64))
				}
				b.rows[r] += v
			}
		}
		if b.pr != nil {
			b.pr.prune(b.dec.InputOffset())
		}
	}
	_, err := b.token()
	return err
}

func (b *biomReader) table() (*Table, error) {
	missing := func(what string) error {
		return perr(0, 0, ErrSyntax, "BIOM document without %s (required by the BIOM 1.0 format)", what)
	}
	switch {
	case b.shape == nil:
		return nil, missing("\"shape\"")
	case b.matrixType == "":
		return nil, missing("\"matrix_type\"")
	case !b.haveData:
		return nil, missing("\"data\"")
	case b.rowIDs == nil:
		return nil, missing("\"rows\"")
	case b.colIDs == nil:
		return nil, missing("\"columns\"")
	}
	if int64(len(b.rowIDs)) != b.shape[0] || int64(len(b.colIDs)) != b.shape[1] {
		return nil, perr(0, 0, ErrShape, "BIOM shape %v does not match %d rows and %d columns", b.shape, len(b.rowIDs), len(b.colIDs))
	}
	if int64(len(b.accs)) > b.shape[1] || int64(len(b.rowTotals)) > b.shape[0] || b.maxRow >= b.shape[0] || b.maxCol >= b.shape[1] {
		return nil, perr(0, 0, ErrShape, "BIOM data reaches beyond shape %v", b.shape)
	}
	if b.matrixType == "dense" && b.dataRows != b.shape[0] {
		return nil, perr(0, 0, ErrShape, "BIOM dense data has %d rows, shape says %d", b.dataRows, b.shape[0])
	}
	if len(b.colIDs) == 0 {
		return nil, perr(0, 0, ErrEmpty, "empty table: the BIOM document has no samples (columns)")
	}
	if len(b.rowIDs) == 0 {
		return nil, perr(0, 0, ErrEmpty, "empty table: the BIOM document has no taxa (rows)")
	}
	t := &Table{Format: "biom-" + b.matrixType, Layout: TaxaAsRows, Taxa: b.shape[0]}
	var tot accum
	for j, id := range b.colIDs {
		var a *accum
		if b.matrixType == "dense" {
			b.grow(int64(j)) // within the shape: no more than the IDs read
			a = &b.accs[j]
		} else if sc := b.cols[int64(j)]; sc != nil {
			a = &sc.acc
		} else {
			a = &accum{}
		}
		c, err := a.counts()
		if err != nil {
			return nil, perr(0, 0, ErrTooLarge, "sample %s: %v", quote(id), err)
		}
		t.Samples = append(t.Samples, Sample{Name: id, Counts: c})
	}
	for _, v := range b.rowTotals {
		if v > 0 {
			tot.add(v)
		}
	}
	for _, v := range b.rows {
		if v > 0 {
			tot.add(v)
		}
	}
	var err error
	if t.TaxonTotals, err = tot.counts(); err != nil {
		return nil, perr(0, 0, ErrTooLarge, "%v", err)
	}
	return t, nil
}
