package amplicon

import (
	"bytes"

	"headroom/internal/freqtable"
)

// wrongTool recognises, from the first bytes of the (decompressed) input,
// files that another headroom subcommand reads, and says which. The
// signatures: BAM's magic "BAM\1" and CRAM's "CRAM" (SAM specification
// 4.2; CRAM specification 3.0), SAM header lines "@HD", "@SQ", "@RG",
// "@PG", "@CO" followed by a tab (SAM specification 1.3), FASTQ's record
// of '@' line, sequence, '+' line (common practice), and headroom's own
// frequency-count header (internal/freqtable).
func wrongTool(head []byte) string {
	switch {
	case bytes.HasPrefix(head, []byte("BAM\x01")):
		return "this is a BAM file (aligned reads), not a taxon count table: use headroom reads"
	case bytes.HasPrefix(head, []byte("CRAM")):
		return "this is a CRAM file (aligned reads), not a taxon count table: convert it to BAM and use headroom reads"
	}
	lines := bytes.SplitN(head, []byte("\n"), 5)
	first := bytes.TrimRight(lines[0], "\r")
	if len(first) >= 4 && first[0] == '@' && first[3] == '\t' {
		for _, tag := range []string{"@HD", "@SQ", "@RG", "@PG", "@CO"} {
			if string(first[:3]) == tag {
				return "this is a SAM file (aligned reads), not a taxon count table: use headroom reads"
			}
		}
	}
	if isSAMRecord(first) {
		return "this is a SAM file without header (aligned reads), not a taxon count table: use headroom reads"
	}
	if len(first) > 1 && first[0] == '@' && len(lines) >= 4 && bytes.HasPrefix(lines[2], []byte("+")) && isSequence(bytes.TrimRight(lines[1], "\r")) {
		return "this is a FASTQ file (reads), not a taxon count table: use headroom reads"
	}
	if string(first) == freqtable.Header || string(bytes.ReplaceAll(first, []byte(","), []byte("\t"))) == freqtable.Header {
		return "this is a frequency-count table (sample, times_seen, units), not a taxon count table: use headroom counts"
	}
	return ""
}

// isSAMRecord reports whether line is a SAM alignment line (SAM
// specification 1.4): 11 or more tab-separated fields, FLAG, POS and MAPQ
// numbers, a CIGAR string or "*", and SEQ of letters or "*".
func isSAMRecord(line []byte) bool {
	f := bytes.Split(line, []byte("\t"))
	if len(f) < 11 {
		return false
	}
	for _, i := range []int{1, 3, 4} {
		if len(f[i]) == 0 || !isDigits(f[i]) {
			return false
		}
	}
	cigar := string(f[5]) == "*" || len(f[5]) > 0 && len(bytes.Trim(f[5], "0123456789MIDNSHP=X")) == 0
	return cigar && (string(f[9]) == "*" || isSequence(f[9]))
}

func isDigits(b []byte) bool {
	for _, c := range b {
		if c < '0' || c > '9' {
			return false
		}
	}
	return true
}

// isSequence reports whether b looks like a line of nucleotides.
func isSequence(b []byte) bool {
	if len(b) == 0 {
		return false
	}
	for _, c := range b {
		switch c | 0x20 {
		case 'a', 'c', 'g', 't', 'n', 'u', '.':
		default:
			return false
		}
	}
	return true
}
