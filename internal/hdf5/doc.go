// Package hdf5 is a minimal, read-only HDF5 reader in pure Go: exactly the
// parts of the format that BIOM 2.1 tables use, read through an io.ReaderAt
// with bounded buffers (no part of the file is read whole unless it is a
// small structure: a header, a heap, one chunk).
//
// It implements, from the HDF5 File Format Specification version 3.0 (The
// HDF Group):
//
//   - superblock versions 0, 1, 2 and 3 (format signature at offset 0);
//   - object headers version 1 and 2, with continuation blocks;
//   - groups stored as symbol tables (version 1 B-tree of type 0, symbol
//     table nodes, local heap) and groups stored as link messages (compact
//     storage; hard links only);
//   - dataspaces (scalar, simple, null), datatypes of class fixed-point
//     (1, 2, 4, 8 bytes, signed or unsigned, either byte order),
//     floating-point (IEEE 754 binary32 and binary64, either byte order),
//     string (fixed length) and variable-length string (global heap);
//   - data layouts version 1 to 4: compact, contiguous and chunked, with the
//     chunk indexes version 1 B-tree (type 1), single chunk, implicit and
//     fixed array (paged or not);
//   - the filter pipeline with deflate (1), shuffle (2) and Fletcher-32 (3);
//   - attributes (messages version 1, 2 and 3; compact storage);
//   - the Jenkins lookup3 checksums of version 2 structures.
//
// It refuses, with an *Error naming the object and the feature: files
// whose signature is not at offset 0 (a user block), dense link or
// attribute storage (fractal heaps), soft and external links, shared or
// committed messages, compound, enumerated, array, reference, time and
// bitfield datatypes, chunked datasets of more than one dimension or
// indexed by an extensible array or a version 2 B-tree (datasets with an
// unlimited dimension in files written for the newest format), virtual
// layouts, other filters (szip, n-bit, scale-offset, third-party ones),
// and non-zero fill values where storage was never written.
//
// Superblock version 1 and data layout messages version 1 and 2 (written
// by HDF5 releases before 1.8, or with non-default B-tree settings) are
// implemented from the specification only: no fixture exercises them,
// as the HDF5 1.10 library behind python3-h5py does not write them by
// default. Every other structure above is read from files that
// python3-h5py wrote (testdata/taxa/biom2, scripts/biom2_fixtures.py).
//
// Every length and address read from the file is checked against the file
// size before anything is allocated, so a damaged or hostile file gives an
// error, never a huge allocation or a panic.
package hdf5
