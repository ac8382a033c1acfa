package hdf5

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
)

// Kinds of error; an *Error wraps one of them (test with errors.Is).
var (
	ErrUnsupported = errors.New("hdf5: unsupported feature")
	ErrCorrupt     = errors.New("hdf5: damaged or truncated file")
	ErrNotFound    = errors.New("hdf5: no such object")
	ErrType        = errors.New("hdf5: wrong datatype")
)

// Error is a problem with one object of the file.
type Error struct {
	Path string // the object, e.g. "/sample/matrix/indptr"; "" for the file
	Kind error  // ErrUnsupported, ErrCorrupt, ErrNotFound or ErrType
	Msg  string // what is wrong, one line
}

func (e *Error) Error() string {
	if e.Path == "" {
		return "hdf5: " + e.Msg
	}
	return "hdf5: " + e.Path + ": " + e.Msg
}

// Unwrap returns the kind of error.
func (e *Error) Unwrap() error { return e.Kind }

func errf(path string, kind error, format string, args ...any) *Error {
	return &Error{Path: path, Kind: kind, Msg: fmt.Sprintf(format, args...)}
}

// Signature is the HDF5 format signature, the first 8 bytes of a file
// without a user block.
var Signature = []byte("\x89HDF\r\n\x1a\n")

// Limits on structures read whole. Real files stay far below them; a file
// claiming more is refused before the allocation.
const (
	maxHeader = 1 << 24 // bytes of one object header, continuations included
	maxHeap   = 1 << 26 // bytes of a local heap or a global heap collection
	maxChunk  = 1 << 26 // bytes of one decoded chunk
	maxDepth  = 32      // levels of a B-tree

	maxElements = 1 << 40 // elements of one dataset
	maxTypeSize = 1 << 16 // bytes of one element (a fixed-length string)
)

// File is an open HDF5 file.
type File struct {
	r      io.ReaderAt
	size   int64
	offSz  int // size of offsets (addresses), bytes
	lenSz  int // size of lengths, bytes
	root   uint64
	sbVer  byte              // superblock version
	gheaps map[uint64][]byte // global heap collections read (few)
	gorder []uint64
	// noChecksums skips checksum verification (fuzzing reaches deeper).
	noChecksums bool
}

// Open reads the superblock of the HDF5 file r of size bytes.
func Open(r io.ReaderAt, size int64) (*File, error) { return open(r, size, true) }

func open(r io.ReaderAt, size int64, checksums bool) (*File, error) {
	f := &File{r: r, size: size, gheaps: map[uint64][]byte{}, noChecksums: !checksums}
	head, err := f.read("", 0, 12)
	if err != nil {
		return nil, err
	}
	if !bytes.Equal(head[:8], Signature) {
		return nil, errf("", ErrUnsupported, "no HDF5 signature at the start of the file (a user block is not supported)")
	}
	f.sbVer = head[8]
	switch v := head[8]; v {
	case 0, 1:
		err = f.superblock01(v)
	case 2, 3:
		err = f.superblock23()
	default:
		err = errf("", ErrUnsupported, "superblock version %d (versions 0 to 3 are read)", v)
	}
	if err != nil {
		return nil, err
	}
	return f, nil
}

func (f *File) superblock01(version byte) error {
	n := 24
	if version == 1 {
		n += 4
	}
	b, err := f.read("", 0, n)
	if err != nil {
		return err
	}
	if err := f.setSizes(int(b[13]), int(b[14])); err != nil {
		return err
	}
	// base, free-space, end-of-file, driver addresses; root symbol table entry.
	rest, err := f.read("", int64(n), 4*f.offSz+2*f.offSz+24)
	if err != nil {
		return err
	}
	p := &dec{b: rest, f: f}
	if base := p.addr(); base != 0 {
		return errf("", ErrUnsupported, "superblock base address %d (only 0 is read)", base)
	}
	p.skip(3 * f.offSz)
	p.addr() // link name offset of the root entry
	f.root = p.addr()
	if p.bad {
		return errf("", ErrCorrupt, "superblock cut short")
	}
	return nil
}

func (f *File) superblock23() error {
	b, err := f.read("", 0, 12)
	if err != nil {
		return err
	}
	if err := f.setSizes(int(b[9]), int(b[10])); err != nil {
		return err
	}
	n := 12 + 4*f.offSz + 4
	b, err = f.read("", 0, n)
	if err != nil {
		return err
	}
	if err := f.checksum("", "superblock", b); err != nil {
		return err
	}
	p := &dec{b: b[12:], f: f}
	if base := p.addr(); base != 0 {
		return errf("", ErrUnsupported, "superblock base address %d (only 0 is read)", base)
	}
	p.addr() // superblock extension: holds nothing a reader of groups and datasets needs
	p.addr() // end of file
	f.root = p.addr()
	return nil
}

func (f *File) setSizes(off, length int) error {
	ok := func(n int) bool { return n == 2 || n == 4 || n == 8 }
	if !ok(off) || !ok(length) {
		return errf("", ErrCorrupt, "superblock gives sizes of offsets %d and lengths %d (2, 4 or 8 expected); the file is damaged", off, length)
	}
	f.offSz, f.lenSz = off, length
	return nil
}

// undef is the undefined address.
const undef = ^uint64(0)

// read reads n bytes at addr, for the object at path. It refuses ranges
// outside the file before allocating.
func (f *File) read(path string, addr int64, n int) ([]byte, error) {
	if addr < 0 || n < 0 || addr > f.size || int64(n) > f.size-addr {
		return nil, errf(path, ErrCorrupt, "%d bytes at address %d lie beyond the end of the file (%d bytes); the file is cut short or damaged", n, addr, f.size)
	}
	b := make([]byte, n)
	if _, err := f.r.ReadAt(b, addr); err != nil && !(err == io.EOF && n > 0) {
		if err == io.EOF || err == io.ErrUnexpectedEOF {
			return nil, errf(path, ErrCorrupt, "file ends at %d bytes, before the structure at address %d", f.size, addr)
		}
		return nil, err
	}
	return b, nil
}

// readAddr is read with an address from the file.
func (f *File) readAddr(path string, addr uint64, n uint64) ([]byte, error) {
	if addr == undef || addr > uint64(f.size) || n > uint64(f.size) {
		return nil, errf(path, ErrCorrupt, "%d bytes at address %#x lie beyond the end of the file (%d bytes); the file is cut short or damaged", n, addr, f.size)
	}
	return f.read(path, int64(addr), int(n))
}

// checksum verifies b's last 4 bytes, the lookup3 checksum of the rest.
func (f *File) checksum(path, what string, b []byte) error {
	if f.noChecksums || len(b) < 4 {
		return nil
	}
	n := len(b) - 4
	if got, want := lookup3(b[:n], 0), binary.LittleEndian.Uint32(b[n:]); got != want {
		return errf(path, ErrCorrupt, "%s checksum mismatch (stored %#08x, computed %#08x); the file is damaged", what, want, got)
	}
	return nil
}

// dec decodes little-endian fields from b. Reading past the end sets bad
// and yields zeros, so that a caller checks once after a run of fields.
type dec struct {
	b   []byte
	off int
	bad bool
	f   *File
}

func (p *dec) take(n int) []byte {
	if n < 0 || p.off+n > len(p.b) || p.off+n < p.off {
		p.bad = true
		p.off = len(p.b)
		return nil
	}
	s := p.b[p.off : p.off+n]
	p.off += n
	return s
}

func (p *dec) skip(n int) { p.take(n) }

func (p *dec) u8() uint8 {
	if s := p.take(1); s != nil {
		return s[0]
	}
	return 0
}

func (p *dec) u16() uint16 { return uint16(p.uint(2)) }
func (p *dec) u32() uint32 { return uint32(p.uint(4)) }

// uint reads an n-byte little-endian unsigned integer (n ≤ 8).
func (p *dec) uint(n int) uint64 {
	s := p.take(n)
	var v uint64
	for i := len(s) - 1; i >= 0; i-- {
		v = v<<8 | uint64(s[i])
	}
	return v
}

// addr reads an address; all bits set (of the file's size) is undef.
func (p *dec) addr() uint64 {
	v := p.uint(p.f.offSz)
	if p.f.offSz < 8 && v == 1<<(8*p.f.offSz)-1 {
		return undef
	}
	return v
}

func (p *dec) length() uint64 { return p.uint(p.f.lenSz) }

func (p *dec) left() int { return len(p.b) - p.off }

// align moves to the next multiple of n bytes counted from start.
func (p *dec) align(start, n int) {
	if r := (p.off - start) % n; r != 0 {
		p.skip(n - r)
	}
}
