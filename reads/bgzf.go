package reads

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"hash/crc32"
	"io"
	"sync"

	"github.com/klauspost/compress/flate"
)

// BGZF (SAM specification section 4.1): a series of gzip members of at
// most 64 KiB each, whose extra field holds a "BC" subfield with the
// member's total size minus 1 (BSIZE), so that a reader can take whole
// blocks off the stream without inflating them and inflate them in
// parallel. Each block ends in the CRC32 and the length (ISIZE) of its
// data, both checked here.

// Errors of the BGZF reader; wrapInflate words them for the user.
var (
	errBGZFHeader = errors.New("not a BGZF block (gzip header without the BC extra subfield)")
	errBGZFSize   = errors.New("BGZF block inflates to a different length than its ISIZE")
	errBGZFCRC    = errors.New("BGZF block data do not match its CRC32")
)

// bgzfMaxBlock is the largest BGZF block (BSIZE is 16 bits) and the
// largest data a block may hold.
const bgzfMaxBlock = 1 << 16

// bgzfBlock is one block on its way through the reader.
type bgzfBlock struct {
	comp  []byte // the whole compressed block
	data  []byte // its inflated data
	err   error
	ready chan struct{} // receives once data/err are set (parallel mode)
}

// bgzfReader inflates a BGZF stream. With workers > 1, one goroutine
// takes whole blocks off the source, workers inflate them, and Read hands
// out their data in stream order; with 1, Read does both in turn.
type bgzfReader struct {
	src *bufio.Reader

	// serial mode
	one  *bgzfBlock
	infl inflater

	// parallel mode
	order chan *bgzfBlock // blocks in stream order, to Read
	free  chan *bgzfBlock
	done  chan struct{}
	once  sync.Once

	cur *bgzfBlock // block being read out (its data from off)
	off int
	err error // sticky
}

// newBGZFReader returns a reader of the data of the BGZF stream r, with
// workers goroutines inflating blocks (1: none, all in Read).
func newBGZFReader(r io.Reader, workers int) *bgzfReader {
	z := &bgzfReader{src: bufio.NewReaderSize(r, 1<<16)}
	if workers <= 1 {
		z.one = newBGZFBlock()
		return z
	}
	depth := 2 * workers // blocks in flight: every worker busy, as many done and waiting
	z.order = make(chan *bgzfBlock, depth)
	z.free = make(chan *bgzfBlock, depth)
	z.done = make(chan struct{})
	for i := 0; i < depth; i++ {
		z.free <- newBGZFBlock()
	}
	jobs := make(chan *bgzfBlock, depth)
	go z.split(jobs)
	for i := 0; i < workers; i++ {
		go z.inflateLoop(jobs)
	}
	return z
}

func newBGZFBlock() *bgzfBlock {
	return &bgzfBlock{comp: make([]byte, 0, bgzfMaxBlock), data: make([]byte, 0, bgzfMaxBlock), ready: make(chan struct{}, 1)}
}

// split takes blocks off the source and sends each to the workers and, in
// the same order, to Read. It stops at the end of the source, at a damaged
// header (sent on as the block's error) or when the reader is closed.
func (z *bgzfReader) split(jobs chan<- *bgzfBlock) {
	defer close(jobs)
	defer close(z.order)
	for {
		var b *bgzfBlock
		select {
		case b = <-z.free:
		case <-z.done:
			return
		}
		eof, err := readBGZFBlock(z.src, b)
		if eof {
			return
		}
		b.err = err
		select {
		case z.order <- b:
		case <-z.done:
			return
		}
		if err != nil {
			b.ready <- struct{}{}
			return
		}
		select {
		case jobs <- b:
		case <-z.done:
			return
		}
	}
}

func (z *bgzfReader) inflateLoop(jobs <-chan *bgzfBlock) {
	var infl inflater
	for b := range jobs {
		b.err = infl.block(b)
		b.ready <- struct{}{}
	}
}

// inflater is one reusable deflate decoder (made on first use).
type inflater struct {
	fr io.Reader // also a flate.Resetter
}

// readBGZFBlock reads the next whole block into b.comp. eof is true at a
// clean end of the stream (no byte of a further block).
func readBGZFBlock(src *bufio.Reader, b *bgzfBlock) (eof bool, err error) {
	b.comp, b.data, b.err = b.comp[:0], b.data[:0], nil
	head, err := src.Peek(12)
	if len(head) == 0 && err == io.EOF {
		return true, nil
	}
	if len(head) < 12 {
		return false, io.ErrUnexpectedEOF
	}
	if head[0] != 0x1f || head[1] != 0x8b || head[2] != 8 || head[3]&4 == 0 {
		return false, errBGZFHeader
	}
	xlen := int(binary.LittleEndian.Uint16(head[10:]))
	if 12+xlen+8 > bgzfMaxBlock {
		return false, errBGZFHeader // no room left in a block for data
	}
	full, err := src.Peek(12 + xlen)
	if len(full) < 12+xlen {
		return false, io.ErrUnexpectedEOF
	}
	bsize := -1
	for x := full[12:]; len(x) >= 4; {
		slen := int(binary.LittleEndian.Uint16(x[2:]))
		if x[0] == 'B' && x[1] == 'C' && slen == 2 && len(x) >= 6 {
			bsize = int(binary.LittleEndian.Uint16(x[4:]))
			break
		}
		if len(x) < 4+slen {
			break
		}
		x = x[4+slen:]
	}
	total := bsize + 1
	if bsize < 0 || total < 12+xlen+8 {
		return false, errBGZFHeader
	}
	b.comp = b.comp[:total]
	if n, err := io.ReadFull(src, b.comp); err != nil {
		if n > 0 || err == io.ErrUnexpectedEOF {
			return false, io.ErrUnexpectedEOF
		}
		return false, err
	}
	return false, nil
}

// block inflates b.comp into b.data and checks CRC32 and ISIZE.
func (f *inflater) block(b *bgzfBlock) error {
	c := b.comp
	xlen := int(binary.LittleEndian.Uint16(c[10:]))
	body := c[12+xlen : len(c)-8]
	crc := binary.LittleEndian.Uint32(c[len(c)-8:])
	isize := binary.LittleEndian.Uint32(c[len(c)-4:])
	if isize > bgzfMaxBlock {
		return errBGZFSize
	}
	if f.fr == nil {
		f.fr = flate.NewReader(bytes.NewReader(nil))
	}
	fr := f.fr
	if err := fr.(flate.Resetter).Reset(bytes.NewReader(body), nil); err != nil {
		return fmt.Errorf("flate: %w", err)
	}
	d := b.data[:isize]
	n, err := io.ReadFull(fr, d)
	switch {
	case err == io.ErrUnexpectedEOF || err == io.EOF && isize > 0:
		return errBGZFSize
	case err != nil && err != io.EOF:
		return fmt.Errorf("flate: %w", err)
	}
	// The deflate stream must end exactly here.
	var one [1]byte
	if m, err := fr.Read(one[:]); m > 0 {
		return errBGZFSize
	} else if err != nil && err != io.EOF {
		return fmt.Errorf("flate: %w", err)
	}
	if crc32.ChecksumIEEE(d[:n]) != crc {
		return errBGZFCRC
	}
	b.data = d[:n]
	return nil
}

// Read implements io.Reader.
func (z *bgzfReader) Read(p []byte) (int, error) {
	for {
		if z.err != nil {
			return 0, z.err
		}
		if z.cur != nil && z.off < len(z.cur.data) {
			n := copy(p, z.cur.data[z.off:])
			z.off += n
			return n, nil
		}
		z.next()
	}
}

// next makes the following block current, or sets z.err.
func (z *bgzfReader) next() {
	if z.one != nil {
		eof, err := readBGZFBlock(z.src, z.one)
		switch {
		case eof:
			z.err = io.EOF
		case err != nil:
			z.err = err
		default:
			z.err = z.infl.block(z.one)
		}
		z.cur, z.off = z.one, 0
		return
	}
	if z.cur != nil {
		z.free <- z.cur // cap(free) = blocks in flight: never blocks
		z.cur = nil
	}
	b, ok := <-z.order
	if !ok {
		z.err = io.EOF
		return
	}
	<-b.ready
	if b.err != nil {
		z.err = b.err
		return
	}
	z.cur, z.off = b, 0
}

// Close stops the goroutines (parallel mode): they end once they see it
// (a read of the source in progress finishes first). Read must not be
// called after Close.
func (z *bgzfReader) Close() error {
	if z.done != nil {
		z.once.Do(func() { close(z.done) })
	}
	return nil
}
