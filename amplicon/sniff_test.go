package amplicon

import (
	"bytes"
	"compress/gzip"
	"errors"
	"strings"
	"testing"
)

// Files for another subcommand are named, not parsed as a broken table.
// Inputs are built from the signatures the SAM specification (BAM magic,
// header lines, alignment fields) and internal/freqtable (the
// frequency-count header) define.
func TestWrongTool(t *testing.T) {
	bgzf := func(s string) string {
		var b bytes.Buffer
		zw := gzip.NewWriter(&b)
		zw.Write([]byte(s))
		zw.Close()
		return b.String()
	}
	for _, c := range []struct{ name, body, want string }{
		{"bam", bgzf("BAM\x01\x00\x00\x00\x00\x00\x00\x00\x00"), "this is a BAM file"},
		{"cram", "CRAM\x03\x00", "this is a CRAM file"},
		{"sam header", "@HD\tVN:1.6\n@SQ\tSN:c\tLN:9\n", "this is a SAM file"},
		{"sam no header", "r1\t0\tc\t1\t60\t4M\t*\t0\t0\tACGT\tIIII\n", "SAM file without header"},
		{"fastq", "@r1 x\nACGTN\n+\nIIIII\n", "this is a FASTQ file"},
		{"fastq gz", bgzf("@r1\nacgt\n+r1\nIIII\n"), "this is a FASTQ file"},
		{"frequency counts", "sample\ttimes_seen\tunits\nL1\t1\t40\n", "use headroom counts"},
	} {
		_, err := Read(strings.NewReader(c.body), Options{})
		var pe *ParseError
		if !errors.As(err, &pe) || !errors.Is(err, ErrWrongFile) || !strings.Contains(pe.Err.Error(), c.want) {
			t.Errorf("%s: err = %v, want ErrWrongFile %q", c.name, err, c.want)
		}
	}
	// Tables that only resemble them are read.
	for _, body := range []string{
		"@taxon\tA\n+t1\t4\n",
		"sample\ttimes_seen\tunits\textra\nA\t1\t2\t3\n",
	} {
		if _, err := Read(strings.NewReader(body), Options{}); errors.Is(err, ErrWrongFile) {
			t.Errorf("%q: %v", body, err)
		}
	}
}
