// Package amplicon reads taxon count tables (OTU or ASV tables) and reduces
// each sample to its frequency counts: how many taxa were seen exactly j
// times, for every j. The estimators of package complexity work on those.
//
// Formats:
//
//   - Delimited text: tab- or comma-separated (the delimiter is sniffed from
//     the header line; semicolons are accepted when neither occurs), RFC 4180
//     double quotes, '#' comment lines (a '#' line directly above the first
//     data row that has the table's shape, as in "#OTU ID<TAB>S1<TAB>S2", is
//     taken as the header), one header row, taxa as rows by default or
//     samples as rows. Trailing non-numeric columns (a taxonomy string, a
//     per-sample description) are skipped and reported in Table.Notes.
//   - BIOM 1.0 JSON, dense and sparse, per the BIOM 1.0 format
//     specification (fields shape, rows, columns, matrix_type,
//     matrix_element_type, data).
//   - BIOM 2.1 (HDF5), per the BIOM format specification version 2.1:
//     groups observation/ and sample/, each with ids and matrix/data,
//     matrix/indices, matrix/indptr (observation/matrix is compressed
//     sparse rows by taxon, sample/matrix by sample, i.e. CSC). The HDF5
//     structures are read by headroom/internal/hdf5 (HDF5 File Format
//     Specification version 3.0), which lists what it supports and what
//     it refuses. sample/matrix is streamed sample by sample (sample i's
//     counts are data[indptr[i]:indptr[i+1]] of taxa indices[...]), so
//     memory holds one sample, the IDs, one total per taxon and one
//     decoded chunk per dataset. Both matrices' indptr, the IDs and the
//     shape and nnz attributes must agree. An HDF5 stream without random
//     access (standard input, gzip) is copied to a temporary file.
//
// Any of these may be gzip-compressed. Files meant for another headroom
// subcommand (BAM, CRAM, SAM, FASTQ, frequency-count tables) are
// recognised and refused with the subcommand to use (ErrWrongFile).
//
// Reading streams: a table is read row by row into per-sample accumulators,
// so memory grows with samples × distinct count values (plus the row and
// column names, kept to refuse duplicates), not with the number of cells.
//
// Counts must be raw: whole, non-negative numbers ("12" or "12.0"). A
// fraction, a negative number or a word in a count cell is an error with
// its line and column (see ParseError), never a silently wrong number.
package amplicon
