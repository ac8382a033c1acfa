package amplicon

import (
	"bufio"
	"bytes"
	"io"
	"math"
	"strings"
)

// maxLine bounds one line of a delimited table, so that a file without
// line breaks cannot take all memory.
const maxLine = 1 << 28

// lineReader returns the lines of a text file without their line ends,
// counting them. Errors are sticky.
type lineReader struct {
	br   *bufio.Reader
	long []byte // holds lines longer than the bufio buffer
	line int64  // number of the line last returned
	err  error
	eof  bool
}

// nextData returns the next line that is neither blank nor a '#'
// comment, as next does.
func (lr *lineReader) nextData() ([]byte, bool) {
	for {
		line, ok := lr.next()
		if !ok || !(isBlank(line) || line[0] == '#') {
			return line, ok
		}
	}
}

// next returns the next line; the slice is overwritten by the next call.
// It returns false at the end of the input or on error (see err).
func (lr *lineReader) next() ([]byte, bool) {
	if lr.err != nil || lr.eof {
		return nil, false
	}
	b, err := lr.br.ReadSlice('\n')
	if err == bufio.ErrBufferFull {
		lr.long = append(lr.long[:0], b...)
		for err == bufio.ErrBufferFull {
			b, err = lr.br.ReadSlice('\n')
			lr.long = append(lr.long, b...)
			if len(lr.long) > maxLine {
				lr.err = perr(lr.line+1, 0, ErrTooLarge, "line longer than %d MiB; is this a text table?", maxLine>>20)
				return nil, false
			}
		}
		b = lr.long
	}
	if err != nil {
		if err != io.EOF {
			lr.err = gzipErr(lr.line+1, err)
			return nil, false
		}
		lr.eof = true
		if len(b) == 0 {
			return nil, false
		}
	}
	lr.line++
	if n := len(b); n > 0 && b[n-1] == '\n' {
		b = b[:n-1]
	}
	if n := len(b); n > 0 && b[n-1] == '\r' {
		b = b[:n-1]
	}
	if lr.line == 1 {
		b = bytes.TrimPrefix(b, []byte("\xef\xbb\xbf"))
	}
	if bytes.IndexByte(b, 0) >= 0 {
		lr.err = perr(lr.line, 0, ErrSyntax, "binary data (a NUL byte) in a text table; is the file compressed in a format other than gzip?")
		return nil, false
	}
	return b, true
}

func isBlank(b []byte) bool { return len(bytes.TrimSpace(b)) == 0 }

// splitFields splits a line at delim into dst (reused), handling RFC 4180
// double quotes on one line. Quoted fields are unquoted in place, so the
// line is modified. On error it returns the 1-based field number and a
// message.
func splitFields(line []byte, delim byte, dst [][]byte) ([][]byte, int64, string) {
	dst = dst[:0]
	for i := 0; ; {
		if i < len(line) && line[i] == '"' {
			// Quoted field: copy down over the quotes.
			w := i
			j := i + 1
			for {
				k := bytes.IndexByte(line[j:], '"')
				if k < 0 {
					return dst, int64(len(dst) + 1), "unterminated quoted field (quotes must close on the same line)"
				}
				w += copy(line[w:], line[j:j+k])
				j += k + 1
				if j < len(line) && line[j] == '"' { // "" is a literal quote
					line[w] = '"'
					w++
					j++
					continue
				}
				break
			}
			dst = append(dst, line[i:w])
			if j == len(line) {
				return dst, 0, ""
			}
			if line[j] != delim {
				return dst, int64(len(dst)), "text after a closing quote"
			}
			i = j + 1
			continue
		}
		k := bytes.IndexByte(line[i:], delim)
		if k < 0 {
			dst = append(dst, line[i:])
			return dst, 0, ""
		}
		dst = append(dst, line[i:i+k])
		i += k + 1
	}
}

// sniffDelim picks the delimiter of a line: tab, else comma, else
// semicolon (common practice for tables written with a decimal comma).
func sniffDelim(line []byte) (byte, string, bool) {
	switch {
	case bytes.IndexByte(line, '\t') >= 0:
		return '\t', "tsv", true
	case bytes.IndexByte(line, ',') >= 0:
		return ',', "csv", true
	case bytes.IndexByte(line, ';') >= 0:
		return ';', "ssv", true
	}
	return 0, "", false
}

// isNumber reports whether a cell reads as a number (a count, or a
// fraction or negative number that parseCount will refuse with a reason),
// as opposed to text.
func isNumber(b []byte) bool {
	b = trimSpace(b)
	digits := 0
	for _, c := range b {
		switch {
		case c >= '0' && c <= '9':
			digits++
		case c == '.' || c == 'e' || c == 'E' || c == '+' || c == '-':
		default:
			return false
		}
	}
	return digits > 0
}

// normName lowercases a header name and drops everything but letters and
// digits, so "#OTU ID", "OTU_ID" and "otuid" compare equal.
func normName(s string) string {
	var b strings.Builder
	for _, r := range strings.ToLower(s) {
		if r >= 'a' && r <= 'z' || r >= '0' && r <= '9' {
			b.WriteRune(r)
		}
	}
	return b.String()
}

// Header words that name the layout (common practice in OTU/ASV tables).
var (
	sampleCorners = map[string]bool{"sample": true, "samples": true, "sampleid": true, "sampleids": true,
		"samplename": true, "samplenames": true, "sampleidentifier": true}
	taxaCorners = map[string]bool{"otuid": true, "otu": true, "otus": true, "asv": true, "asvid": true, "asvs": true,
		"featureid": true, "feature": true, "features": true, "taxon": true, "taxa": true, "taxonid": true,
		"taxonomy": true, "genus": true, "species": true, "clade": true, "lineage": true, "otuname": true}
	// metadataNames are trailing columns skipped even when their cells
	// look numeric (a classifier's confidence, say).
	metadataNames = map[string]bool{"taxonomy": true, "taxon": true, "lineage": true, "consensuslineage": true,
		"confidence": true, "description": true, "sequence": true, "kingdom": true, "domain": true,
		"phylum": true, "class": true, "order": true, "family": true, "genus": true, "species": true}
)

// looksTaxonomic reports whether a name is a taxonomy string such as
// "k__Bacteria;p__Firmicutes" (rank prefixes or two or more ';' ranks).
func looksTaxonomic(s string) bool {
	return strings.Contains(s, "__") || strings.Count(s, ";") >= 2
}

// looksSequence reports whether a name is a DNA sequence, as ASV tables
// name their taxa (common practice: denoisers use the sequence itself).
func looksSequence(s string) bool {
	if len(s) < 30 {
		return false
	}
	for i := 0; i < len(s); i++ {
		switch s[i] {
		case 'A', 'C', 'G', 'T', 'N', 'a', 'c', 'g', 't', 'n':
		default:
			return false
		}
	}
	return true
}

// taxonLike reports whether a name is a taxonomy string or a sequence.
func taxonLike(s string) bool { return looksTaxonomic(s) || looksSequence(s) }

func readDelimited(br *bufio.Reader, opt Options) (*Table, error) {
	lr := &lineReader{br: br}
	var comment, first []byte
	var commentLine, firstLine int64
	for {
		line, ok := lr.next()
		if !ok {
			break
		}
		if isBlank(line) {
			comment = nil
			continue
		}
		if line[0] == '#' {
			comment, commentLine = append(comment[:0], line[1:]...), lr.line
			continue
		}
		first, firstLine = append([]byte(nil), line...), lr.line
		break
	}
	if lr.err != nil {
		return nil, lr.err
	}
	if first == nil {
		return nil, perr(0, 0, ErrEmpty, "empty table: no header line (only comments or blank lines)")
	}
	delim, format, ok := sniffDelim(first)
	if !ok {
		return nil, perr(firstLine, 0, ErrShape, "no tab, comma or semicolon on the header line; a table needs an ID column and at least one count column")
	}
	ff, bad, msg := splitFields(first, delim, nil)
	if bad > 0 {
		return nil, perr(firstLine, bad, ErrSyntax, "%s", msg)
	}
	header, headerLine := ff, firstLine
	var pending [][]byte
	pendingLine := int64(0)
	if comment != nil && len(ff) >= 2 && isNumber(ff[1]) {
		// "#OTU ID<TAB>S1..." above a data row: the comment is the header.
		cf, bad, _ := splitFields(comment, delim, nil)
		if bad == 0 && len(cf) == len(ff) {
			header, headerLine = cf, commentLine
			pending, pendingLine = ff, firstLine
		}
	}
	if pending == nil {
		for {
			line, ok := lr.nextData()
			if !ok {
				break
			}
			var bad int64
			var msg string
			pending, bad, msg = splitFields(line, delim, nil)
			pendingLine = lr.line
			if bad > 0 {
				return nil, perr(pendingLine, bad, ErrSyntax, "%s", msg)
			}
			// Keep the row: the reader's buffer is reused.
			for i := range pending {
				pending[i] = append([]byte(nil), pending[i]...)
			}
			break
		}
		if lr.err != nil {
			return nil, lr.err
		}
	}
	if pending == nil {
		return nil, perr(headerLine, 0, ErrEmpty, "empty table: a header but no data rows")
	}
	t := &Table{Format: format}
	names := make([]string, len(header))
	for i, h := range header {
		names[i] = strings.TrimSpace(string(h))
	}
	if len(pending) == len(names)+1 && !sampleCorners[normName(names[0])] && !taxaCorners[normName(names[0])] {
		// A header without a name for the row-name column, as R's
		// write.table writes it.
		names = append([]string{""}, names...)
		t.Notes = append(t.Notes, "the header has no name for the first column; read that column as row names")
	}
	if len(names) < 2 {
		return nil, perr(headerLine, 0, ErrShape, "the header has a single column; a table needs an ID column and at least one count column")
	}

	// Trailing metadata columns.
	meta := len(names)
	for j := len(names) - 1; j >= 1; j-- {
		var cell []byte
		if j < len(pending) {
			cell = trimSpace(pending[j])
		}
		emptyLast := j == len(names)-1 && names[j] == "" && len(cell) == 0 // a trailing delimiter on every line
		if metadataNames[normName(names[j])] || (len(cell) > 0 && !isNumber(cell)) || emptyLast {
			meta = j
			continue
		}
		break
	}
	if meta == 1 {
		return nil, perr(pendingLine, 2, ErrNotCount, "no count columns: every column after the first holds text")
	}

	// Layout.
	layout := opt.Layout
	if layout == LayoutAuto {
		corner := normName(names[0])
		taxaHint := taxaCorners[corner] || taxonLike(string(trimSpace(pending[0])))
		for j := meta; j < len(names); j++ {
			if normName(names[j]) == "taxonomy" {
				taxaHint = true
			}
		}
		taxNames := 0
		for _, n := range names[1:meta] {
			if taxonLike(n) {
				taxNames++
			}
		}
		samplesHint := sampleCorners[corner] || taxNames*2 > meta-1
		layout = TaxaAsRows
		if samplesHint && !taxaHint {
			layout = SamplesAsRows
			why := "the first header cell " + quote(names[0])
			if !sampleCorners[corner] {
				why = "column names that are taxonomy strings or sequences"
			}
			t.Notes = append(t.Notes, "read as samples in rows ("+why+"); use --taxa-as-rows to read it the other way")
		}
	}
	t.Layout = layout
	if meta < len(names) {
		what := "taxon"
		if layout == SamplesAsRows {
			what = "sample"
		}
		skipped := make([]string, 0, len(names)-meta)
		for _, n := range names[meta:] {
			if n == "" {
				n = "(unnamed)"
			}
			skipped = append(skipped, n)
		}
		t.Notes = append(t.Notes, note("skipped %s metadata column(s) %s", what, strings.Join(skipped, ", ")))
	}

	// Header names must be unique and present.
	seen := make(map[string]int64, meta)
	for j := 1; j < meta; j++ {
		what := "sample"
		if layout == SamplesAsRows {
			what = "taxon"
		}
		n := names[j]
		if n == "" {
			return nil, perr(headerLine, int64(j+1), ErrShape, "header column %d has no %s name", j+1, what)
		}
		if k, dup := seen[n]; dup {
			return nil, perr(headerLine, int64(j+1), ErrDuplicate, "%s ID %s repeated (also column %d); %s IDs must be unique", what, quote(n), k, what)
		}
		seen[n] = int64(j + 1)
	}

	rd := &rowReader{names: names, meta: meta, layout: layout, headerLine: headerLine}
	if layout == TaxaAsRows {
		rd.accs = make([]accum, meta-1)
	} else {
		rd.taxTotals = make([]int64, meta-1)
	}
	rd.ids = make(map[string]int64)
	if err := rd.row(pending, pendingLine); err != nil {
		return nil, err
	}
	if opt.Threads == 1 {
		if err := rd.rowsSerial(lr, delim); err != nil {
			return nil, err
		}
	} else if err := rd.rowsPipelined(lr, delim); err != nil {
		return nil, err
	}
	if err := rd.finish(t); err != nil {
		return nil, err
	}
	return t, nil
}

// rowReader turns the data rows of a delimited table into frequency counts.
type rowReader struct {
	names      []string
	meta       int // first metadata column (len(names) when none)
	layout     Layout
	headerLine int64
	ids        map[string]int64 // row IDs seen -> line

	accs    []accum  // TaxaAsRows: one per sample column
	totals  accum    // frequency counts of taxon totals
	rows    int64    // data rows
	samples []Sample // SamplesAsRows: one per row

	acc       accum   // SamplesAsRows: the current row's sample
	taxTotals []int64 // SamplesAsRows: per-taxon totals
	vals      []int64 // the current row's counts
}

// row reads one data row already split into fields.
func (rd *rowReader) row(f [][]byte, line int64) error {
	id, idFirst, err := rd.parseFields(f, line, rd.values())
	if err != nil {
		return rd.rowErr(id, line, idFirst, err)
	}
	return rd.commit(id, line)
}

// rowErr is what is reported for a row that did not parse: a bad ID
// first when the row's ID is checked before its cells (idFirst), as
// parseFields says.
func (rd *rowReader) rowErr(id []byte, line int64, idFirst bool, err error) error {
	if idFirst {
		if e := rd.checkID(id, line); e != nil {
			return e
		}
	}
	return err
}

// commit checks the row's ID and adds its values (rd.vals).
func (rd *rowReader) commit(id []byte, line int64) error {
	if err := rd.checkID(id, line); err != nil {
		return err
	}
	return rd.apply(string(id), line)
}

// parseLine parses data line number lineNo into vals and returns its ID:
// plain digits directly (parseFast, the common case of a large table),
// anything else split into fields (through scratch, which it returns for
// reuse). Errors are parseFields', and a field syntax error (idFirst false).
func (rd *rowReader) parseLine(line []byte, lineNo int64, delim byte, vals []int64, scratch [][]byte) (id []byte, _ [][]byte, idFirst bool, err error) {
	if id, ok := rd.parseFast(line, delim, vals); ok {
		return id, scratch, false, nil
	}
	scratch, bad, msg := splitFields(line, delim, scratch)
	if bad > 0 {
		return nil, scratch, false, perr(lineNo, bad, ErrSyntax, "%s", msg)
	}
	id, idFirst, err = rd.parseFields(scratch, lineNo, vals)
	return id, scratch, idFirst, err
}

// parseFields parses a row already split into fields into vals (one per
// count column) and returns its ID. An error is the row's shape (idFirst
// false) or a cell (idFirst true: a bad ID is reported before it, as the
// row is checked in that order).
func (rd *rowReader) parseFields(f [][]byte, line int64, vals []int64) (id []byte, idFirst bool, err error) {
	if len(f) != len(rd.names) && !(rd.meta < len(rd.names) && len(f) >= rd.meta && len(f) < len(rd.names)) {
		col := int64(len(f))
		if len(f) > len(rd.names) {
			col = int64(len(rd.names) + 1)
		}
		return nil, false, perr(line, col, ErrShape, "row has %d fields but the header (line %d) has %d; every row needs one cell per column",
			len(f), rd.headerLine, len(rd.names))
	}
	id = trimSpace(f[0])
	for j := 1; j < rd.meta; j++ {
		v, ce := parseCount(f[j])
		if ce != nil {
			what := "taxon"
			if rd.layout == TaxaAsRows {
				what = "sample"
			}
			return id, true, perr(line, int64(j+1), ce.kind, "%s %s: %s", what, quote(rd.names[j]), ce.msg)
		}
		vals[j-1] = v
	}
	return id, false, nil
}

// parseFast parses a row of plain digits into vals and returns its ID, or
// false when the row needs the general path (quotes, spaces, decimals,
// errors, omitted metadata); vals may then hold some of the row's values.
func (rd *rowReader) parseFast(line []byte, delim byte, vals []int64) ([]byte, bool) {
	if bytes.IndexByte(line, '"') >= 0 {
		return nil, false
	}
	k := bytes.IndexByte(line, delim)
	if k <= 0 {
		return nil, false
	}
	id := line[:k]
	if id[0] == ' ' || id[len(id)-1] == ' ' {
		return nil, false
	}
	n := rd.meta - 1
	i := k + 1
	for j := 0; j < n; j++ {
		var v int64
		start := i
		for ; i < len(line); i++ {
			c := line[i] - '0'
			if c > 9 {
				break
			}
			v = v*10 + int64(c)
		}
		if d := i - start; d == 0 || d > 18 {
			return nil, false
		}
		switch {
		case j < n-1 || rd.meta < len(rd.names):
			if i >= len(line) || line[i] != delim {
				return nil, false
			}
			i++
		case i != len(line):
			return nil, false
		}
		vals[j] = v
	}
	if rd.meta < len(rd.names) && rd.meta+1+bytes.Count(line[i:], []byte{delim}) > len(rd.names) {
		return nil, false
	}
	return id, true
}

// values returns the row buffer of count values.
func (rd *rowReader) values() []int64 {
	if len(rd.vals) != rd.meta-1 {
		rd.vals = make([]int64, rd.meta-1)
	}
	return rd.vals
}

// checkID refuses an empty or repeated row ID.
func (rd *rowReader) checkID(id []byte, line int64) error {
	what := "taxon"
	if rd.layout == SamplesAsRows {
		what = "sample"
	}
	if len(id) == 0 {
		return perr(line, 1, ErrShape, "row without a %s ID in the first column", what)
	}
	if prev, dup := rd.ids[string(id)]; dup {
		return perr(line, 1, ErrDuplicate, "%s ID %s repeated (first on line %d); %s IDs must be unique", what, quote(string(id)), prev, what)
	}
	return nil
}

// apply adds the row's values (rd.vals) to the accumulators.
func (rd *rowReader) apply(id string, line int64) error {
	rd.ids[id] = line
	rd.rows++
	overflow := func(j int) error {
		return perr(line, int64(j+2), ErrTooLarge, "counts add up to more than %d reads", int64(math.MaxInt64))
	}
	if rd.layout == TaxaAsRows {
		var total int64
		for j, v := range rd.vals {
			if v == 0 {
				continue
			}
			if !rd.accs[j].add(v) || total > math.MaxInt64-v {
				return overflow(j)
			}
			total += v
		}
		if total > 0 {
			rd.totals.add(total)
		}
		return nil
	}
	rd.acc.reset()
	for j, v := range rd.vals {
		if v == 0 {
			continue
		}
		if !rd.acc.add(v) || rd.taxTotals[j] > math.MaxInt64-v {
			return overflow(j)
		}
		rd.taxTotals[j] += v
	}
	c, err := rd.acc.counts()
	if err != nil {
		return perr(line, 0, ErrTooLarge, "%v", err)
	}
	rd.samples = append(rd.samples, Sample{Name: id, Counts: c})
	return nil
}

func (rd *rowReader) finish(t *Table) error {
	var err error
	if rd.layout == TaxaAsRows {
		t.Taxa = rd.rows
		t.Samples = make([]Sample, len(rd.accs))
		for j := range rd.accs {
			t.Samples[j].Name = rd.names[j+1]
			if t.Samples[j].Counts, err = rd.accs[j].counts(); err != nil {
				return perr(0, int64(j+2), ErrTooLarge, "%v", err)
			}
		}
	} else {
		t.Taxa = int64(len(rd.taxTotals))
		t.Samples = rd.samples
		for _, v := range rd.taxTotals {
			if v > 0 {
				rd.totals.add(v)
			}
		}
	}
	t.TaxonTotals, err = rd.totals.counts()
	if err != nil {
		return perr(0, 0, ErrTooLarge, "%v", err)
	}
	return nil
}
