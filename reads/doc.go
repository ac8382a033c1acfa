// Package reads streams sequencing reads from BAM, SAM and FASTQ files and
// gives each record in the form that duplicate counting needs: flags,
// reference, position, CIGAR, mate fields and the RG, RX and MC tags for
// alignments; name, sequence and quality for FASTQ.
//
// Formats are recognised from the first bytes, never from the file name:
// BAM (BGZF-compressed, decompressed in parallel with
// github.com/biogo/hts/bgzf), SAM (plain or gzip), FASTQ (plain, gzip or
// BGZF). CRAM is recognised and refused.
//
// Readers reuse their buffers: a Record returned by a Read call is valid
// until the next call. Errors are sticky and carry the record or line
// number (ParseError).
//
// Specifications implemented:
//
//   - Sequence Alignment/Map Format Specification (SAM/BAM), The SAM/BAM
//     Format Specification Working Group, sections 1.4 (alignment line),
//     1.4.6 (CIGAR operations and which consume query and reference),
//     4.2 (BAM encoding) and 4.1 (BGZF, including the end-of-file marker).
//   - Sequence Alignment/Map Optional Fields Specification (RG, RX, MC).
//   - FASTQ as described by Cock et al. 2010, Nucleic Acids Research
//     38:1767 (four-line records; multi-line FASTQ is not accepted).
//   - RFC 1952 (gzip).
package reads
