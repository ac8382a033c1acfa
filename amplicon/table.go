package amplicon

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"

	"headroom/complexity"
	"headroom/internal/gzin"
	"headroom/internal/hdf5"
)

// Layout says which way a delimited table runs.
type Layout int

// Layouts. LayoutAuto reads taxa as rows unless the header says the table
// holds samples as rows (a first header cell such as "SampleID", or
// column names that are taxonomy strings or DNA sequences, and no sign of
// taxa as rows); a note says when it did so.
const (
	LayoutAuto Layout = iota
	TaxaAsRows
	SamplesAsRows
)

func (l Layout) String() string {
	switch l {
	case TaxaAsRows:
		return "taxa as rows"
	case SamplesAsRows:
		return "samples as rows"
	}
	return "auto"
}

// Options controls Read. The zero value detects the layout.
type Options struct {
	// Layout of delimited text; ignored for BIOM (whose rows are taxa).
	Layout Layout
	// Threads: 1 reads a delimited table on the calling goroutine; any
	// other value parses its rows on a second one (same result).
	Threads int
}

// Sample is one sample of a table.
type Sample struct {
	Name   string
	Counts complexity.Counts // frequency counts of the sample's taxa
}

// Table is a count table reduced to frequency counts.
type Table struct {
	// Format is "tsv", "csv", "ssv" (semicolons), "biom-dense",
	// "biom-sparse" (BIOM 1.0) or "biom-hdf5" (BIOM 2.1), with ".gz"
	// appended for gzip input.
	Format string
	// Layout is how a delimited table was read (TaxaAsRows for BIOM).
	Layout Layout
	// Samples in table order.
	Samples []Sample
	// Taxa is the number of taxa (rows, or count columns).
	Taxa int64
	// TaxonTotals are the frequency counts of the taxa's totals over all
	// samples: how many taxa have exactly j reads in the whole table.
	TaxonTotals complexity.Counts
	// Notes are remarks about the table as a whole (skipped metadata
	// columns, the layout detected), one phrase each.
	Notes []string
}

// readBuf is the read buffer size; longer lines are assembled (lineReader).
const readBuf = 64 << 10

// sniffLen is how many leading bytes tell the kind of file.
const sniffLen = 4096

// Read reads a whole table from r: delimited text or BIOM 1.0 JSON, either
// possibly gzip-compressed. Errors in the data are *ParseError values.
func Read(r io.Reader, opt Options) (*Table, error) {
	br, gz, err := gzin.Reader(r, readBuf)
	if err != nil {
		return nil, perr(0, 0, ErrTruncated, "gzip header unreadable: %v", err)
	}
	var t *Table
	head, _ := br.Peek(sniffLen)
	if msg := wrongTool(head); msg != "" {
		return nil, perr(0, 0, ErrWrongFile, "%s", msg)
	}
	if bytes.HasPrefix(head, hdf5.Signature) {
		t, err = readHDF5(r, br, gz)
	} else {
		t, err = readPlain(br, opt)
	}
	if err != nil {
		return nil, gzipErr(0, err)
	}
	if gz {
		t.Format += ".gz"
	}
	return t, nil
}

// gzipErr turns a decompression failure met while reading line into a
// ParseError (line 0: position unknown).
func gzipErr(line int64, err error) error {
	var pe *ParseError
	if errors.As(err, &pe) {
		return err
	}
	switch {
	case gzin.Damaged(err):
		return perr(line, 0, ErrTruncated, "gzip data corrupt (%v); the file is damaged", err)
	case gzin.Cut(err):
		return perr(line, 0, ErrTruncated, "gzip data ends early; the file was cut short")
	}
	return err
}

func readPlain(br *bufio.Reader, opt Options) (*Table, error) {
	// The first byte that is not white space (or a UTF-8 byte-order mark)
	// tells JSON from text.
	for i := 0; ; i++ {
		b, err := br.Peek(i + 1)
		if err != nil {
			if err == io.EOF {
				return nil, perr(0, 0, ErrEmpty, "empty table: no header and no data")
			}
			if err == bufio.ErrBufferFull {
				return nil, perr(0, 0, ErrSyntax, "no table: the first 64 KiB are white space")
			}
			return nil, err
		}
		c := b[i]
		if c == ' ' || c == '\t' || c == '\r' || c == '\n' || (i < 3 && bytes.HasPrefix([]byte("\xef\xbb\xbf"), b)) {
			continue
		}
		if c == '{' {
			return readBIOM(br)
		}
		break
	}
	return readDelimited(br, opt)
}

// readHDF5 reads a BIOM 2.1 table whose stream (r, buffered as br) starts
// with the HDF5 signature.
func readHDF5(r io.Reader, br *bufio.Reader, gz bool) (*Table, error) {
	ra, size, cleanup, err := hdf5Input(r, br, gz)
	if err != nil {
		return nil, err
	}
	defer cleanup()
	return readBIOM2(ra, size)
}

// note formats one phrase of Table.Notes.
func note(format string, args ...any) string { return fmt.Sprintf(format, args...) }
