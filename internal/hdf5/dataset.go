package hdf5

import (
	"bytes"
	"encoding/binary"
	"io"
	"sort"

	"github.com/klauspost/compress/zlib"
)

// Dataset is a one-dimensional dataset (or a scalar, read as one
// element), read in slices through a cache of one decoded chunk.
type Dataset struct {
	f    *File
	Path string
	typ  datatype
	n    uint64 // elements

	layout  uint8  // 0 compact, 1 contiguous, 2 chunked
	compact []byte // compact data
	addr    uint64 // contiguous data, or the chunk index
	index   uint8  // chunk index: 0 v1 B-tree, 1 single, 2 implicit, 3 fixed array
	chunkN  uint64 // elements per chunk
	single  chunkRef
	filters []filter
	fillNZ  bool // a non-zero fill value is defined

	chunks []chunkRef // chunk index, by first element; built on first read
	built  bool
	cached uint64 // chunk number in buf (undef: none)
	buf    []byte
}

type chunkRef struct {
	first uint64 // first element
	addr  uint64
	size  uint64 // bytes stored
	mask  uint32 // filters skipped
}

type filter struct {
	id     uint16
	client []uint32
}

// Dataset opens the object at path as a one-dimensional dataset.
func (f *File) Dataset(path string) (*Dataset, error) {
	o, err := f.Lookup(path)
	if err != nil {
		return nil, err
	}
	return o.Dataset()
}

// Dataset returns o as a dataset.
func (o *Object) Dataset() (*Dataset, error) {
	ly, tm, sm := o.find(msgLayout), o.find(msgDatatype), o.find(msgDataspace)
	if ly == nil || tm == nil || sm == nil {
		return nil, errf(o.Path, ErrNotFound, "is a group, not a dataset")
	}
	if o.find(msgExternal) != nil {
		return nil, errf(o.Path, ErrUnsupported, "data stored in an external file")
	}
	d := &Dataset{f: o.f, Path: o.Path, cached: undef}
	var err error
	if d.typ, err = o.f.parseDatatype(o.Path, tm.data); err != nil {
		return nil, err
	}
	dims, null, err := o.f.parseDataspace(o.Path, sm.data)
	if err != nil {
		return nil, err
	}
	if len(dims) > 1 {
		return nil, errf(o.Path, ErrUnsupported, "dataset of %d dimensions (one is read)", len(dims))
	}
	d.n = 1
	if len(dims) == 1 {
		d.n = dims[0]
	}
	if null {
		d.n = 0
	}
	if d.n > maxElements {
		return nil, errf(o.Path, ErrCorrupt, "dataset of %d elements", d.n)
	}
	if m := o.find(msgFilters); m != nil {
		if d.filters, err = o.f.parseFilters(o.Path, m.data); err != nil {
			return nil, err
		}
	}
	if m := o.find(msgFill); m != nil {
		d.fillNZ = fillNonZero(m.data, true)
	} else if m := o.find(msgFillOld); m != nil {
		d.fillNZ = fillNonZero(m.data, false)
	}
	return d, d.parseLayout(ly.data, len(dims))
}

// fillNonZero reports whether a fill value message defines a value with
// a non-zero byte.
func fillNonZero(b []byte, isNew bool) bool {
	p := &dec{b: b}
	if isNew {
		v := p.u8()
		switch v {
		case 1, 2:
			p.skip(2)
			if p.u8() == 0 && v == 2 {
				return false
			}
		case 3:
			if p.u8()&0x20 == 0 {
				return false
			}
		default:
			return true // unknown: assume the worst
		}
	}
	n := int(p.u32())
	v := p.take(n)
	return bytes.ContainsFunc(v, func(r rune) bool { return r != 0 })
}

func (d *Dataset) parseLayout(b []byte, rank int) error {
	p := &dec{b: b, f: d.f}
	v := p.u8()
	bad := func() error { return errf(d.Path, ErrCorrupt, "data layout message cut short or inconsistent") }
	switch v {
	case 1, 2:
		nd := int(p.u8())
		d.layout = p.u8()
		p.skip(5)
		if d.layout != 0 {
			d.addr = p.addr()
		}
		dims := make([]uint64, 0, 4)
		for i := 0; i < nd && !p.bad; i++ {
			dims = append(dims, uint64(p.u32()))
		}
		switch d.layout {
		case 0:
			d.compact = p.take(int(p.u32()))
		case 2:
			if len(dims) != rank+1 {
				return bad()
			}
			return d.chunked(dims, 0)
		}
	case 3:
		d.layout = p.u8()
		switch d.layout {
		case 0:
			d.compact = p.take(int(p.u16()))
		case 1:
			d.addr = p.addr()
			p.length()
		case 2:
			nd := int(p.u8())
			d.addr = p.addr()
			dims := make([]uint64, 0, 4)
			for i := 0; i < nd && !p.bad; i++ {
				dims = append(dims, uint64(p.u32()))
			}
			if p.bad || len(dims) != rank+1 {
				return bad()
			}
			return d.chunked(dims, 0)
		}
	case 4:
		d.layout = p.u8()
		switch d.layout {
		case 0:
			d.compact = p.take(int(p.u16()))
		case 1:
			d.addr = p.addr()
			p.length()
		case 2:
			flags := p.u8()
			nd := int(p.u8())
			w := int(p.u8())
			if w < 1 || w > 8 {
				return bad()
			}
			dims := make([]uint64, 0, 4)
			for i := 0; i < nd && !p.bad; i++ {
				dims = append(dims, p.uint(w))
			}
			idx := p.u8()
			switch idx {
			case 1:
				if flags&2 != 0 {
					d.single.size = p.length()
					d.single.mask = p.u32()
				}
			case 2:
			case 3:
				p.skip(1)
			case 4:
				return errf(d.Path, ErrUnsupported, "chunk index of type extensible array (a dataset with an unlimited dimension)")
			case 5:
				return errf(d.Path, ErrUnsupported, "chunk index of type version 2 B-tree (a dataset with unlimited dimensions)")
			default:
				return errf(d.Path, ErrUnsupported, "chunk index of type %d", idx)
			}
			d.addr = p.addr()
			if p.bad || len(dims) != rank+1 {
				return bad()
			}
			return d.chunked(dims, idx)
		case 3:
			return errf(d.Path, ErrUnsupported, "virtual dataset layout")
		}
	default:
		return errf(d.Path, ErrUnsupported, "data layout message version %d", v)
	}
	if p.bad || d.layout > 2 {
		return bad()
	}
	if d.layout == 0 && uint64(len(d.compact)) < d.n*uint64(d.typ.size) {
		return errf(d.Path, ErrCorrupt, "compact data shorter than its %d elements", d.n)
	}
	return nil
}

// chunked records a chunked layout: dims are the chunk's dimensions and
// then the element size.
func (d *Dataset) chunked(dims []uint64, index uint8) error {
	d.layout, d.index = 2, index
	if es := dims[len(dims)-1]; es != uint64(d.typ.size) {
		return errf(d.Path, ErrCorrupt, "chunk element size %d differs from the datatype's %d", es, d.typ.size)
	}
	d.chunkN = 1
	if len(dims) == 2 {
		d.chunkN = dims[0]
	}
	if d.chunkN == 0 || d.chunkN > maxChunk || d.chunkN*uint64(d.typ.size) > maxChunk {
		return errf(d.Path, ErrUnsupported, "chunks of %d elements", d.chunkN)
	}
	return nil
}

// Len is the number of elements.
func (d *Dataset) Len() uint64 { return d.n }

// Class is the class of the values.
func (d *Dataset) Class() Class { return d.typ.class }

// maxSlice bounds the elements of one read, so that a caller's request
// never makes a huge buffer.
const maxSlice = 1 << 20

// raw returns the bytes of elements [start, start+n); the slice is
// overwritten by the next call.
func (d *Dataset) raw(start, n uint64) ([]byte, error) {
	if start > d.n || n > d.n-start {
		return nil, errf(d.Path, ErrCorrupt, "elements [%d, %d) asked of a dataset of %d", start, start+n, d.n)
	}
	es := uint64(d.typ.size)
	if n > maxSlice || n*es > maxChunk {
		return nil, errf(d.Path, ErrUnsupported, "a read of %d elements at once", n)
	}
	switch d.layout {
	case 0:
		return d.compact[start*es : (start+n)*es], nil
	case 1:
		if d.addr == undef {
			if d.fillNZ {
				return nil, errf(d.Path, ErrUnsupported, "storage never written, with a non-zero fill value")
			}
			return make([]byte, n*es), nil
		}
		if d.addr > uint64(d.f.size) {
			return nil, errf(d.Path, ErrCorrupt, "data address %#x beyond the end of the file", d.addr)
		}
		return d.f.readAddr(d.Path, d.addr+start*es, n*es)
	}
	out := make([]byte, 0, n*es)
	for i := start; i < start+n; {
		k := i / d.chunkN
		c, err := d.chunk(k)
		if err != nil {
			return nil, err
		}
		lo := (i - k*d.chunkN) * es
		hi := min(start+n-k*d.chunkN, d.chunkN) * es
		if c == nil {
			out = append(out, make([]byte, hi-lo)...) // never written: zeros
		} else {
			out = append(out, c[lo:hi]...)
		}
		i = (k + 1) * d.chunkN
	}
	return out, nil
}

// Ints reads elements [start, start+len(dst)) of an integer dataset.
func (d *Dataset) Ints(start uint64, dst []int64) error {
	b, err := d.raw(start, uint64(len(dst)))
	if err != nil {
		return err
	}
	return d.typ.ints(d.Path, b, dst)
}

// Floats reads elements [start, start+len(dst)) as numbers.
func (d *Dataset) Floats(start uint64, dst []float64) error {
	b, err := d.raw(start, uint64(len(dst)))
	if err != nil {
		return err
	}
	return d.typ.floats(d.Path, b, dst)
}

// Strings reads elements [start, start+len(dst)) of a string dataset.
func (d *Dataset) Strings(start uint64, dst []string) error {
	b, err := d.raw(start, uint64(len(dst)))
	if err != nil {
		return err
	}
	return d.f.strings(d.Path, d.typ, b, dst)
}

// chunk returns decoded chunk k (cached), nil for a chunk never written
// (whose elements are the fill value, zero).
func (d *Dataset) chunk(k uint64) ([]byte, error) {
	if k == d.cached {
		return d.buf, nil
	}
	if !d.built {
		if err := d.buildIndex(); err != nil {
			return nil, err
		}
		d.built = true
	}
	want := d.chunkN * uint64(d.typ.size)
	first := k * d.chunkN
	i := sort.Search(len(d.chunks), func(i int) bool { return d.chunks[i].first >= first })
	if i == len(d.chunks) || d.chunks[i].first != first || d.chunks[i].addr == undef {
		if d.fillNZ {
			return nil, errf(d.Path, ErrUnsupported, "chunk %d never written, with a non-zero fill value", k)
		}
		return nil, nil
	}
	c := d.chunks[i]
	stored := c.size
	if stored == 0 {
		stored = want
	}
	if stored > maxChunk {
		return nil, errf(d.Path, ErrCorrupt, "chunk %d of %d bytes", k, stored)
	}
	b, err := d.f.readAddr(d.Path, c.addr, stored)
	if err != nil {
		return nil, err
	}
	if b, err = d.unfilter(k, b, c.mask, want); err != nil {
		return nil, err
	}
	if uint64(len(b)) != want {
		return nil, errf(d.Path, ErrCorrupt, "chunk %d holds %d bytes, %d expected", k, len(b), want)
	}
	d.buf = b
	d.cached = k
	return d.buf, nil
}

// nChunks is the number of chunks of the dataset.
func (d *Dataset) nChunks() uint64 { return (d.n + d.chunkN - 1) / d.chunkN }

// buildIndex reads the chunk index into d.chunks, sorted by first element.
func (d *Dataset) buildIndex() error {
	nc := d.nChunks()
	es := uint64(d.typ.size)
	switch {
	case d.addr == undef:
		return nil // nothing written
	case d.index == 0:
		err := d.f.walkBTree1(d.Path, d.addr, 1, uint64(8+8*2), func(child uint64, key []byte) error {
			p := &dec{b: key, f: d.f}
			size, mask, off := uint64(p.u32()), p.u32(), p.uint(8)
			if off%d.chunkN != 0 || off >= d.n || uint64(len(d.chunks)) >= nc {
				return errf(d.Path, ErrCorrupt, "chunk index entry at element %d does not fit the dataset", off)
			}
			d.chunks = append(d.chunks, chunkRef{off, child, size, mask})
			return nil
		})
		if err != nil {
			return err
		}
		sort.Slice(d.chunks, func(i, j int) bool { return d.chunks[i].first < d.chunks[j].first })
		for i := 1; i < len(d.chunks); i++ {
			if d.chunks[i].first == d.chunks[i-1].first {
				return errf(d.Path, ErrCorrupt, "two chunk index entries for element %d", d.chunks[i].first)
			}
		}
	case d.index == 1:
		c := d.single
		c.addr = d.addr
		d.chunks = []chunkRef{c}
	case d.index == 2:
		if d.addr > uint64(d.f.size) || nc*d.chunkN*es > uint64(d.f.size)-d.addr {
			return errf(d.Path, ErrCorrupt, "%d chunks of %d bytes at %#x reach beyond the end of the file", nc, d.chunkN*es, d.addr)
		}
		for k := uint64(0); k < nc; k++ {
			d.chunks = append(d.chunks, chunkRef{first: k * d.chunkN, addr: d.addr + k*d.chunkN*es})
		}
	case d.index == 3:
		return d.fixedArray(nc)
	}
	return nil
}

// fixedArray reads a fixed array chunk index (header "FAHD", data block
// "FADB", pages when the array has more than 2^page-bits entries).
func (d *Dataset) fixedArray(nc uint64) error {
	f := d.f
	hsz := uint64(8 + f.lenSz + f.offSz + 4)
	h, err := f.readAddr(d.Path, d.addr, hsz)
	if err != nil {
		return err
	}
	if !bytes.HasPrefix(h, []byte("FAHD")) {
		return errf(d.Path, ErrCorrupt, "fixed array header without its \"FAHD\" signature")
	}
	if err := f.checksum(d.Path, "fixed array header", h); err != nil {
		return err
	}
	p := &dec{b: h[5:], f: f}
	client, esz, pageBits := p.u8(), uint64(p.u8()), p.u8()
	n, dblk := p.length(), p.addr()
	if n != nc || pageBits > 32 || esz < uint64(f.offSz) || esz > 32 || client > 1 {
		return errf(d.Path, ErrCorrupt, "fixed array of %d entries of %d bytes for %d chunks", n, esz, nc)
	}
	if n*esz > uint64(f.size) {
		return errf(d.Path, ErrCorrupt, "fixed array of %d entries larger than the file", n)
	}
	pre := uint64(4 + 1 + 1 + f.offSz)
	perPage := uint64(1) << pageBits
	entry := func(q *dec, k uint64) {
		c := chunkRef{first: k * d.chunkN, addr: q.addr()}
		if client == 1 {
			c.size = q.uint(int(esz) - f.offSz - 4)
			c.mask = q.u32()
		}
		d.chunks = append(d.chunks, c)
	}
	if n <= perPage {
		b, err := f.readAddr(d.Path, dblk, pre+n*esz+4)
		if err != nil {
			return err
		}
		if !bytes.HasPrefix(b, []byte("FADB")) {
			return errf(d.Path, ErrCorrupt, "fixed array data block without its \"FADB\" signature")
		}
		if err := f.checksum(d.Path, "fixed array data block", b); err != nil {
			return err
		}
		q := &dec{b: b[pre:], f: f}
		for k := uint64(0); k < n; k++ {
			entry(q, k)
		}
		return nil
	}
	pages := (n + perPage - 1) / perPage
	bm := (pages + 7) / 8
	b, err := f.readAddr(d.Path, dblk, pre+bm+4)
	if err != nil {
		return err
	}
	if !bytes.HasPrefix(b, []byte("FADB")) {
		return errf(d.Path, ErrCorrupt, "fixed array data block without its \"FADB\" signature")
	}
	if err := f.checksum(d.Path, "fixed array data block", b); err != nil {
		return err
	}
	at := dblk + pre + bm + 4
	for pg := uint64(0); pg < pages; pg++ {
		cnt := min(perPage, n-pg*perPage)
		if b[pre+pg/8]&(0x80>>(pg%8)) == 0 {
			for k := uint64(0); k < cnt; k++ {
				d.chunks = append(d.chunks, chunkRef{first: (pg*perPage + k) * d.chunkN, addr: undef})
			}
			at += perPage*esz + 4
			continue
		}
		pb, err := f.readAddr(d.Path, at, cnt*esz+4)
		if err != nil {
			return err
		}
		if err := f.checksum(d.Path, "fixed array page", pb); err != nil {
			return err
		}
		q := &dec{b: pb, f: f}
		for k := uint64(0); k < cnt; k++ {
			entry(q, pg*perPage+k)
		}
		at += perPage*esz + 4
	}
	return nil
}

// parseFilters decodes a filter pipeline message.
func (f *File) parseFilters(path string, b []byte) ([]filter, error) {
	p := &dec{b: b, f: f}
	v, n := p.u8(), int(p.u8())
	if v == 1 {
		p.skip(6)
	} else if v != 2 {
		return nil, errf(path, ErrUnsupported, "filter pipeline message version %d", v)
	}
	var out []filter
	for i := 0; i < n && !p.bad; i++ {
		id := p.u16()
		nameLen := 0
		if v == 1 || id >= 256 {
			nameLen = int(p.u16())
		}
		p.u16() // flags
		nv := int(p.u16())
		if v == 1 {
			nameLen = (nameLen + 7) &^ 7
		}
		p.skip(nameLen)
		fl := filter{id: id}
		for j := 0; j < nv && !p.bad; j++ {
			fl.client = append(fl.client, p.u32())
		}
		if v == 1 && nv%2 == 1 {
			p.skip(4)
		}
		switch id {
		case 1, 2, 3:
		default:
			names := map[uint16]string{4: "szip", 5: "n-bit", 6: "scale-offset", 32000: "LZF", 32001: "Blosc", 32004: "LZ4", 32008: "bitshuffle", 32015: "Zstandard"}
			nm := names[id]
			if nm == "" {
				nm = "unknown"
			}
			return nil, errf(path, ErrUnsupported, "filter %d (%s); deflate, shuffle and Fletcher-32 are read", id, nm)
		}
		out = append(out, fl)
	}
	if p.bad {
		return nil, errf(path, ErrCorrupt, "filter pipeline message cut short")
	}
	return out, nil
}

// unfilter undoes the filter pipeline on chunk k, last filter first,
// skipping the filters whose bit is set in mask.
func (d *Dataset) unfilter(k uint64, b []byte, mask uint32, want uint64) ([]byte, error) {
	for i := len(d.filters) - 1; i >= 0; i-- {
		if i < 32 && mask&(1<<i) != 0 {
			continue
		}
		switch fl := d.filters[i]; fl.id {
		case 1:
			zr, err := zlib.NewReader(bytes.NewReader(b))
			if err != nil {
				return nil, errf(d.Path, ErrCorrupt, "chunk %d does not inflate (deflate filter): %v", k, err)
			}
			out, err := io.ReadAll(io.LimitReader(zr, int64(want)+1))
			if err == nil {
				err = zr.Close()
			}
			if err != nil {
				return nil, errf(d.Path, ErrCorrupt, "chunk %d does not inflate (deflate filter): %v", k, err)
			}
			b = out
		case 2:
			es := d.typ.size
			if len(fl.client) > 0 {
				es = int(fl.client[0])
			}
			b = unshuffle(b, es)
		case 3:
			if len(b) < 4 {
				return nil, errf(d.Path, ErrCorrupt, "chunk %d shorter than its Fletcher-32 checksum", k)
			}
			n := len(b) - 4
			got, want := fletcher32(b[:n]), binary.LittleEndian.Uint32(b[n:])
			if !d.f.noChecksums && got != want {
				return nil, errf(d.Path, ErrCorrupt, "chunk %d fails its Fletcher-32 checksum; the file is damaged", k)
			}
			b = b[:n]
		}
	}
	return b, nil
}

// unshuffle undoes the shuffle filter: the stored chunk holds byte 0 of
// every element, then byte 1, and so on; a tail shorter than one element
// is left as is.
func unshuffle(b []byte, es int) []byte {
	if es <= 1 || len(b) < es {
		return b
	}
	n := len(b) / es
	out := make([]byte, len(b))
	for j := 0; j < es; j++ {
		src := b[j*n : (j+1)*n]
		for i, c := range src {
			out[i*es+j] = c
		}
	}
	copy(out[n*es:], b[n*es:])
	return out
}
