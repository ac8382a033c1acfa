package hdf5

import (
	"bytes"
	"encoding/binary"
	"math"
)

// Class is a datatype class of the values this package decodes.
type Class int

// Datatype classes read.
const (
	Integer Class = iota // fixed-point
	Float                // IEEE 754 floating-point
	String               // fixed-length or variable-length string
)

// datatype is a decoded datatype message.
type datatype struct {
	class    Class
	size     int  // bytes of one element as stored
	bigEnd   bool // byte order
	signed   bool
	vlen     bool // variable-length string: stored as a global heap ID
	nulTerm  bool // fixed string padding: NUL-terminated or NUL-padded
	spacePad bool // fixed string padded with spaces
}

// parseDatatype decodes a datatype message.
func (f *File) parseDatatype(path string, b []byte) (datatype, error) {
	p := &dec{b: b, f: f}
	cv := p.u8()
	bf := p.uint(3)
	size := int(p.u32())
	class := cv & 0x0f
	var t datatype
	if p.bad || size <= 0 || size > maxTypeSize {
		return t, errf(path, ErrCorrupt, "datatype message cut short or of size %d", size)
	}
	t.size = size
	switch class {
	case 0: // fixed-point
		t.class = Integer
		t.bigEnd = bf&1 != 0
		t.signed = bf&8 != 0
		off, prec := p.u16(), p.u16()
		if p.bad || off != 0 || int(prec) != 8*size || !(size == 1 || size == 2 || size == 4 || size == 8) {
			return t, errf(path, ErrUnsupported, "integer datatype of %d bytes with %d bits at offset %d", size, prec, off)
		}
	case 1: // floating-point
		t.class = Float
		t.bigEnd = bf&1 != 0
		if bf&0x40 != 0 {
			return t, errf(path, ErrUnsupported, "VAX byte order of a floating-point datatype")
		}
		p.skip(4) // bit offset, precision
		expLoc, expSz, manLoc, manSz := p.u8(), p.u8(), p.u8(), p.u8()
		ieee := (size == 4 && expLoc == 23 && expSz == 8 && manLoc == 0 && manSz == 23) ||
			(size == 8 && expLoc == 52 && expSz == 11 && manLoc == 0 && manSz == 52)
		if p.bad || !ieee {
			return t, errf(path, ErrUnsupported, "floating-point datatype of %d bytes that is not IEEE 754 binary32 or binary64", size)
		}
	case 3: // string
		t.class = String
		pad := bf & 0x0f
		t.nulTerm = pad == 0
		t.spacePad = pad == 2
	case 9: // variable-length
		if bf&0x0f != 1 {
			return t, errf(path, ErrUnsupported, "variable-length sequence datatype (only variable-length strings are read)")
		}
		t.class = String
		t.vlen = true
		if size != 4+f.offSz+4 {
			return t, errf(path, ErrCorrupt, "variable-length string datatype of size %d", size)
		}
	default:
		names := map[uint8]string{2: "time", 4: "bitfield", 5: "opaque", 6: "compound", 7: "reference", 8: "enumerated", 10: "array"}
		n := names[class]
		if n == "" {
			n = "unknown"
		}
		return t, errf(path, ErrUnsupported, "%s datatype (class %d)", n, class)
	}
	return t, nil
}

// parseDataspace decodes a dataspace message into its dimensions; a
// scalar has none, a null dataspace returns null.
func (f *File) parseDataspace(path string, b []byte) (dims []uint64, null bool, err error) {
	p := &dec{b: b, f: f}
	v, rank, flags := p.u8(), int(p.u8()), p.u8()
	switch v {
	case 1:
		p.skip(5)
	case 2:
		switch p.u8() {
		case 0:
			rank = 0
		case 2:
			return nil, true, nil
		}
	default:
		return nil, false, errf(path, ErrUnsupported, "dataspace message version %d", v)
	}
	if rank > 32 {
		return nil, false, errf(path, ErrCorrupt, "dataspace of rank %d", rank)
	}
	dims = make([]uint64, rank)
	for i := range dims {
		dims[i] = p.length()
	}
	_ = flags // maximum dimensions follow; a reader does not need them
	if p.bad {
		return nil, false, errf(path, ErrCorrupt, "dataspace message cut short")
	}
	return dims, false, nil
}

// elements returns the number of elements of dims, or false on overflow.
func elements(dims []uint64) (uint64, bool) {
	n := uint64(1)
	for _, d := range dims {
		if d != 0 && n > math.MaxUint64/d {
			return 0, false
		}
		n *= d
	}
	return n, true
}

// Attr is an attribute: its value, decoded on demand.
type Attr struct {
	f    *File
	path string
	typ  datatype
	dims []uint64
	data []byte
}

// Attr returns the attribute name of o; ErrNotFound when there is none
// in compact storage.
func (o *Object) Attr(name string) (*Attr, error) {
	path := o.Path + " (attribute " + name + ")"
	for _, m := range o.msgs {
		if m.typ != msgAttribute {
			continue
		}
		p := &dec{b: m.data, f: o.f}
		v := p.u8()
		fl := p.u8()
		nsz, tsz, ssz := int(p.u16()), int(p.u16()), int(p.u16())
		if v == 3 {
			p.skip(1) // name character set
		}
		pad := func(n int) int { return n }
		if v == 1 {
			pad = func(n int) int { return (n + 7) &^ 7 }
		} else if v != 2 && v != 3 {
			return nil, errf(path, ErrUnsupported, "attribute message version %d", v)
		}
		nb := p.take(pad(nsz))
		if p.bad || nsz == 0 {
			return nil, errf(path, ErrCorrupt, "attribute message cut short")
		}
		if string(bytes.TrimRight(nb[:nsz], "\x00")) != name {
			continue
		}
		if fl&3 != 0 {
			return nil, errf(path, ErrUnsupported, "attribute with a shared datatype or dataspace")
		}
		tb, sb := p.take(pad(tsz)), p.take(pad(ssz))
		if p.bad {
			return nil, errf(path, ErrCorrupt, "attribute message cut short")
		}
		t, err := o.f.parseDatatype(path, tb)
		if err != nil {
			return nil, err
		}
		dims, null, err := o.f.parseDataspace(path, sb)
		if err != nil {
			return nil, err
		}
		n, ok := elements(dims)
		if null {
			n = 0
		}
		if !ok || n > uint64(p.left())/uint64(t.size) {
			return nil, errf(path, ErrCorrupt, "attribute value shorter than its %v elements of %d bytes", dims, t.size)
		}
		return &Attr{f: o.f, path: path, typ: t, dims: dims, data: p.take(int(n) * t.size)}, nil
	}
	if m := o.find(msgAttrInfo); m != nil {
		p := &dec{b: m.data, f: o.f}
		p.skip(1)
		if p.u8()&1 != 0 {
			p.skip(2)
		}
		if heap := p.addr(); !p.bad && heap != undef {
			return nil, errf(path, ErrUnsupported, "dense attribute storage (fractal heap)")
		}
	}
	return nil, errf(path, ErrNotFound, "no such attribute")
}

// Class is the class of the attribute's values.
func (a *Attr) Class() Class { return a.typ.class }

// Len is the number of values.
func (a *Attr) Len() int { return len(a.data) / a.typ.size }

// Ints returns the values of an integer attribute.
func (a *Attr) Ints() ([]int64, error) {
	dst := make([]int64, a.Len())
	return dst, a.typ.ints(a.path, a.data, dst)
}

// Strings returns the values of a string attribute.
func (a *Attr) Strings() ([]string, error) {
	dst := make([]string, a.Len())
	return dst, a.f.strings(a.path, a.typ, a.data, dst)
}

func (t datatype) order() binary.ByteOrder {
	if t.bigEnd {
		return binary.BigEndian
	}
	return binary.LittleEndian
}

// ints decodes len(dst) integers from raw.
func (t datatype) ints(path string, raw []byte, dst []int64) error {
	if t.class != Integer {
		return errf(path, ErrType, "holds %s values, integers expected", t.class)
	}
	bo := t.order()
	for i := range dst {
		e := raw[i*t.size : (i+1)*t.size]
		switch t.size {
		case 1:
			if t.signed {
				dst[i] = int64(int8(e[0]))
			} else {
				dst[i] = int64(e[0])
			}
		case 2:
			if t.signed {
				dst[i] = int64(int16(bo.Uint16(e)))
			} else {
				dst[i] = int64(bo.Uint16(e))
			}
		case 4:
			if t.signed {
				dst[i] = int64(int32(bo.Uint32(e)))
			} else {
				dst[i] = int64(bo.Uint32(e))
			}
		case 8:
			u := bo.Uint64(e)
			if !t.signed && u > math.MaxInt64 {
				return errf(path, ErrType, "unsigned value %d at element %d is too large", u, i)
			}
			dst[i] = int64(u)
		}
	}
	return nil
}

// floats decodes len(dst) numbers from raw (integers converted).
func (t datatype) floats(path string, raw []byte, dst []float64) error {
	bo := t.order()
	switch {
	case t.class == Float && t.size == 8:
		for i := range dst {
			dst[i] = math.Float64frombits(bo.Uint64(raw[i*8:]))
		}
	case t.class == Float:
		for i := range dst {
			dst[i] = float64(math.Float32frombits(bo.Uint32(raw[i*4:])))
		}
	case t.class == Integer:
		v := make([]int64, len(dst))
		if err := t.ints(path, raw, v); err != nil {
			return err
		}
		for i, x := range v {
			dst[i] = float64(x)
		}
	default:
		return errf(path, ErrType, "holds %s values, numbers expected", t.class)
	}
	return nil
}

func (c Class) String() string {
	switch c {
	case Integer:
		return "integer"
	case Float:
		return "floating-point"
	}
	return "string"
}

// strings decodes len(dst) strings from raw.
func (f *File) strings(path string, t datatype, raw []byte, dst []string) error {
	if t.class != String {
		return errf(path, ErrType, "holds %s values, strings expected", t.class)
	}
	for i := range dst {
		e := raw[i*t.size : (i+1)*t.size]
		if !t.vlen {
			if t.nulTerm {
				if k := bytes.IndexByte(e, 0); k >= 0 {
					e = e[:k]
				}
			} else if t.spacePad {
				e = bytes.TrimRight(e, " ")
			} else {
				e = bytes.TrimRight(e, "\x00")
			}
			dst[i] = string(e)
			continue
		}
		p := &dec{b: e, f: f}
		n, coll, idx := uint64(p.u32()), p.addr(), p.u32()
		if n == 0 && (coll == 0 || coll == undef) {
			dst[i] = ""
			continue
		}
		s, err := f.globalObject(path, coll, idx)
		if err != nil {
			return err
		}
		if uint64(len(s)) < n {
			return errf(path, ErrCorrupt, "variable-length string %d longer than its global heap object", i)
		}
		dst[i] = string(bytes.TrimRight(s[:n], "\x00"))
	}
	return nil
}

// globalObject returns object idx of the global heap collection at coll.
// A few collections are kept, as consecutive strings share one.
func (f *File) globalObject(path string, coll uint64, idx uint32) ([]byte, error) {
	c, ok := f.gheaps[coll]
	if !ok {
		hd, err := f.readAddr(path, coll, uint64(8+f.lenSz))
		if err != nil {
			return nil, err
		}
		if !bytes.HasPrefix(hd, []byte("GCOL")) {
			return nil, errf(path, ErrCorrupt, "global heap collection without its \"GCOL\" signature")
		}
		size := (&dec{b: hd[8:], f: f}).length()
		if size > maxHeap || size < uint64(len(hd)) {
			return nil, errf(path, ErrCorrupt, "global heap collection of %d bytes", size)
		}
		if c, err = f.readAddr(path, coll, size); err != nil {
			return nil, err
		}
		if len(f.gorder) >= 4 {
			delete(f.gheaps, f.gorder[0])
			f.gorder = f.gorder[1:]
		}
		f.gheaps[coll] = c
		f.gorder = append(f.gorder, coll)
	}
	p := &dec{b: c, f: f, off: 8 + f.lenSz}
	for p.left() >= 8+f.lenSz {
		i := p.u16()
		p.skip(6)
		n := p.length()
		if i == 0 {
			break // free space: the rest of the collection
		}
		if n > uint64(p.left()) {
			break
		}
		obj := p.take(int(n))
		p.align(0, 8)
		if uint32(i) == idx {
			return obj, nil
		}
	}
	return nil, errf(path, ErrCorrupt, "global heap object %d not found in the collection at %#x", idx, coll)
}
