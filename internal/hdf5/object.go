package hdf5

import (
	"bytes"
	"strings"
)

// Header message types (HDF5 File Format Specification 3.0, IV.A.2).
const (
	msgNil          = 0x00
	msgDataspace    = 0x01
	msgLinkInfo     = 0x02
	msgDatatype     = 0x03
	msgFillOld      = 0x04
	msgFill         = 0x05
	msgLink         = 0x06
	msgExternal     = 0x07
	msgLayout       = 0x08
	msgFilters      = 0x0b
	msgAttribute    = 0x0c
	msgContinuation = 0x10
	msgSymbolTable  = 0x11
	msgAttrInfo     = 0x15
)

type message struct {
	typ   uint16
	flags uint8
	data  []byte
}

// Object is a group or a dataset: its path and header messages.
type Object struct {
	f    *File
	Path string
	msgs []message
}

func (o *Object) find(typ uint16) *message {
	for i := range o.msgs {
		if o.msgs[i].typ == typ {
			return &o.msgs[i]
		}
	}
	return nil
}

// object reads the object header at addr.
func (f *File) object(path string, addr uint64) (*Object, error) {
	o := &Object{f: f, Path: path}
	b, err := f.readAddr(path, addr, 16)
	if err != nil {
		return nil, err
	}
	if bytes.HasPrefix(b, []byte("OHDR")) {
		err = o.header2(addr)
	} else if b[0] == 1 {
		err = o.header1(addr, b)
	} else {
		err = errf(path, ErrCorrupt, "no object header at address %#x (version byte %d, no \"OHDR\" signature)", addr, b[0])
	}
	if err != nil {
		return nil, err
	}
	for _, m := range o.msgs {
		if m.flags&0x02 != 0 && m.typ != msgNil {
			return nil, errf(path, ErrUnsupported, "shared header message of type %#x (committed datatypes or shared messages)", m.typ)
		}
	}
	return o, nil
}

// block is a stretch of header messages still to read.
type block struct{ addr, n uint64 }

// header1 reads a version 1 object header (prefix in pre).
func (o *Object) header1(addr uint64, pre []byte) error {
	p := &dec{b: pre, f: o.f}
	p.skip(2)
	nmsg := int(p.u16())
	p.skip(4)
	size := uint64(p.u32())
	todo := []block{{addr + 16, size}}
	seen := map[uint64]bool{}
	total := uint64(0)
	for len(todo) > 0 && len(o.msgs) < nmsg {
		bl := todo[0]
		todo = todo[1:]
		if seen[bl.addr] {
			return errf(o.Path, ErrCorrupt, "object header continuation loops back to address %#x", bl.addr)
		}
		seen[bl.addr] = true
		if total += bl.n; total > maxHeader {
			return errf(o.Path, ErrUnsupported, "object header larger than %d bytes", maxHeader)
		}
		b, err := o.f.readAddr(o.Path, bl.addr, bl.n)
		if err != nil {
			return err
		}
		q := &dec{b: b, f: o.f}
		for q.left() >= 8 && len(o.msgs) < nmsg {
			typ, sz, fl := q.u16(), int(q.u16()), q.u8()
			q.skip(3)
			data := q.take(sz)
			if q.bad {
				return errf(o.Path, ErrCorrupt, "header message of type %#x runs past its block", typ)
			}
			m := message{typ, fl, data}
			o.msgs = append(o.msgs, m)
			if typ == msgContinuation {
				c, err := o.continuation(m)
				if err != nil {
					return err
				}
				todo = append(todo, c)
			}
		}
	}
	return nil
}

func (o *Object) continuation(m message) (block, error) {
	p := &dec{b: m.data, f: o.f}
	c := block{p.addr(), p.length()}
	if p.bad || c.addr == undef {
		return c, errf(o.Path, ErrCorrupt, "bad object header continuation message")
	}
	return c, nil
}

// header2 reads a version 2 object header.
func (o *Object) header2(addr uint64) error {
	pre, err := o.f.readAddr(o.Path, addr, 6)
	if err != nil {
		return err
	}
	if pre[4] != 2 {
		return errf(o.Path, ErrUnsupported, "object header version %d", pre[4])
	}
	flags := pre[5]
	n := 6
	if flags&0x20 != 0 {
		n += 16
	}
	if flags&0x10 != 0 {
		n += 4
	}
	szLen := 1 << (flags & 3)
	b, err := o.f.readAddr(o.Path, addr, uint64(n+szLen))
	if err != nil {
		return err
	}
	chunk0 := (&dec{b: b[n:], f: o.f}).uint(szLen)
	if chunk0 > maxHeader {
		return errf(o.Path, ErrUnsupported, "object header larger than %d bytes", maxHeader)
	}
	start := uint64(n + szLen)
	all, err := o.f.readAddr(o.Path, addr, start+chunk0+4)
	if err != nil {
		return err
	}
	if err := o.f.checksum(o.Path, "object header", all); err != nil {
		return err
	}
	seen := map[uint64]bool{addr: true}
	total := chunk0
	more, err := o.messages2(all[start:start+chunk0], flags)
	if err != nil {
		return err
	}
	// Continuation blocks: "OCHK", messages, checksum.
	for len(more) > 0 {
		c := more[0]
		more = more[1:]
		if seen[c.addr] {
			return errf(o.Path, ErrCorrupt, "object header continuation loops back to address %#x", c.addr)
		}
		seen[c.addr] = true
		if total += c.n; total > maxHeader || c.n < 8 {
			return errf(o.Path, ErrCorrupt, "object header continuation block of %d bytes", c.n)
		}
		cb, err := o.f.readAddr(o.Path, c.addr, c.n)
		if err != nil {
			return err
		}
		if !bytes.HasPrefix(cb, []byte("OCHK")) {
			return errf(o.Path, ErrCorrupt, "object header continuation block without its \"OCHK\" signature")
		}
		if err := o.f.checksum(o.Path, "object header continuation", cb); err != nil {
			return err
		}
		m2, err := o.messages2(cb[4:len(cb)-4], flags)
		if err != nil {
			return err
		}
		more = append(more, m2...)
	}
	return nil
}

// messages2 decodes the messages of one version 2 header block and
// returns its continuation blocks.
func (o *Object) messages2(b []byte, flags byte) ([]block, error) {
	hd := 4
	if flags&0x04 != 0 {
		hd += 2 // creation order
	}
	var more []block
	q := &dec{b: b, f: o.f}
	for q.left() >= hd {
		typ, sz, fl := uint16(q.u8()), int(q.u16()), q.u8()
		if flags&0x04 != 0 {
			q.skip(2)
		}
		data := q.take(sz)
		if q.bad {
			return nil, errf(o.Path, ErrCorrupt, "header message of type %#x runs past its block", typ)
		}
		m := message{typ, fl, data}
		o.msgs = append(o.msgs, m)
		if typ == msgContinuation {
			c, err := o.continuation(m)
			if err != nil {
				return nil, err
			}
			more = append(more, c)
		}
	}
	return more, nil
}

// IsGroup reports whether the object is a group.
func (o *Object) IsGroup() bool {
	return o.find(msgSymbolTable) != nil || o.find(msgLink) != nil || o.find(msgLinkInfo) != nil ||
		(o.find(msgLayout) == nil && o.find(msgDatatype) == nil)
}

// Root returns the root group.
func (f *File) Root() (*Object, error) { return f.object("/", f.root) }

// Lookup returns the object at an absolute path such as "/sample/ids".
func (f *File) Lookup(path string) (*Object, error) {
	o, err := f.Root()
	if err != nil {
		return nil, err
	}
	cur := ""
	for _, name := range strings.Split(strings.Trim(path, "/"), "/") {
		if name == "" {
			continue
		}
		if !o.IsGroup() {
			return nil, errf(o.Path, ErrNotFound, "is a dataset, not a group, so has no member %q", name)
		}
		addr, err := o.child(name)
		if err != nil {
			return nil, err
		}
		cur += "/" + name
		if o, err = f.object(cur, addr); err != nil {
			return nil, err
		}
	}
	return o, nil
}

// child finds the member name of group o and returns its header address.
func (o *Object) child(name string) (uint64, error) {
	path := strings.TrimSuffix(o.Path, "/") + "/" + name
	if m := o.find(msgSymbolTable); m != nil {
		return o.symbolTableChild(m, name, path)
	}
	for _, m := range o.msgs {
		if m.typ != msgLink {
			continue
		}
		ln, addr, err := o.link(m)
		if err != nil {
			return 0, err
		}
		if ln == name {
			if addr == undef {
				return 0, errf(path, ErrUnsupported, "soft or external link (only hard links are followed)")
			}
			return addr, nil
		}
	}
	if m := o.find(msgLinkInfo); m != nil {
		p := &dec{b: m.data, f: o.f}
		p.skip(1)
		if p.u8()&1 != 0 {
			p.skip(8)
		}
		if heap := p.addr(); !p.bad && heap != undef {
			return 0, errf(o.Path, ErrUnsupported, "dense link storage (fractal heap); looking for member %q", name)
		}
	}
	return 0, errf(path, ErrNotFound, "no such object")
}

// link decodes a link message: name and hard-link address (undef for
// soft and external links).
func (o *Object) link(m message) (string, uint64, error) {
	p := &dec{b: m.data, f: o.f}
	if v := p.u8(); v != 1 {
		return "", 0, errf(o.Path, ErrUnsupported, "link message version %d", v)
	}
	fl := p.u8()
	typ := uint8(0)
	if fl&0x08 != 0 {
		typ = p.u8()
	}
	if fl&0x04 != 0 {
		p.skip(8)
	}
	if fl&0x10 != 0 {
		p.skip(1)
	}
	nlen := p.uint(1 << (fl & 3))
	name := p.take(int(min(nlen, uint64(p.left()+1))))
	addr := undef
	if typ == 0 {
		addr = p.addr()
	}
	if p.bad {
		return "", 0, errf(o.Path, ErrCorrupt, "link message cut short")
	}
	return string(name), addr, nil
}

// symbolTableChild looks name up in an old-style group: a version 1
// B-tree of symbol table nodes whose names live in a local heap.
func (o *Object) symbolTableChild(m *message, name, path string) (uint64, error) {
	p := &dec{b: m.data, f: o.f}
	tree, heapAddr := p.addr(), p.addr()
	if p.bad {
		return 0, errf(o.Path, ErrCorrupt, "symbol table message cut short")
	}
	heap, err := o.f.localHeap(o.Path, heapAddr)
	if err != nil {
		return 0, err
	}
	found := undef
	err = o.f.walkBTree1(o.Path, tree, 0, uint64(o.f.lenSz), func(child uint64, _ []byte) error {
		if found != undef {
			return nil
		}
		addr, err := o.f.symbolNode(o.Path, child, heap, name)
		if err == nil && addr != undef {
			found = addr
		}
		return err
	})
	if err != nil {
		return 0, err
	}
	if found == undef {
		return 0, errf(path, ErrNotFound, "no such object")
	}
	return found, nil
}

// localHeap returns the data segment of the local heap at addr.
func (f *File) localHeap(path string, addr uint64) ([]byte, error) {
	b, err := f.readAddr(path, addr, uint64(8+2*f.lenSz+f.offSz))
	if err != nil {
		return nil, err
	}
	if !bytes.HasPrefix(b, []byte("HEAP")) {
		return nil, errf(path, ErrCorrupt, "local heap without its \"HEAP\" signature")
	}
	p := &dec{b: b[8:], f: f}
	size := p.length()
	p.length()
	data := p.addr()
	if size > maxHeap {
		return nil, errf(path, ErrUnsupported, "local heap of %d bytes", size)
	}
	return f.readAddr(path, data, size)
}

// heapString returns the NUL-terminated string at off in a local heap.
func heapString(heap []byte, off uint64) (string, bool) {
	if off >= uint64(len(heap)) {
		return "", false
	}
	s := heap[off:]
	if i := bytes.IndexByte(s, 0); i >= 0 {
		return string(s[:i]), true
	}
	return "", false
}

// symbolNode searches one symbol table node for name.
func (f *File) symbolNode(path string, addr uint64, heap []byte, name string) (uint64, error) {
	b, err := f.readAddr(path, addr, 8)
	if err != nil {
		return 0, err
	}
	if !bytes.HasPrefix(b, []byte("SNOD")) {
		return 0, errf(path, ErrCorrupt, "symbol table node without its \"SNOD\" signature")
	}
	n := uint64(b[6]) | uint64(b[7])<<8
	entry := uint64(2*f.offSz + 24)
	b, err = f.readAddr(path, addr+8, n*entry)
	if err != nil {
		return 0, err
	}
	p := &dec{b: b, f: f}
	for i := uint64(0); i < n; i++ {
		nameOff, hdr := p.uint(f.offSz), p.addr()
		p.skip(24)
		s, ok := heapString(heap, nameOff)
		if !ok {
			return 0, errf(path, ErrCorrupt, "symbol table entry names offset %d outside the local heap", nameOff)
		}
		if s == name {
			return hdr, nil
		}
	}
	return undef, nil
}

// walkBTree1 visits the leaf children of the version 1 B-tree of the
// given node type (0 groups, 1 chunks) and key size at addr, in key
// order. visit gets each child address and the key in front of it.
func (f *File) walkBTree1(path string, addr uint64, typ uint8, keySz uint64, visit func(child uint64, key []byte) error) error {
	seen := map[uint64]bool{}
	var walk func(addr uint64, depth int) error
	walk = func(addr uint64, depth int) error {
		if depth > maxDepth || seen[addr] {
			return errf(path, ErrCorrupt, "B-tree deeper than %d levels or with a loop", maxDepth)
		}
		seen[addr] = true
		hd := uint64(8 + 2*f.offSz)
		b, err := f.readAddr(path, addr, hd)
		if err != nil {
			return err
		}
		if !bytes.HasPrefix(b, []byte("TREE")) {
			return errf(path, ErrCorrupt, "B-tree node without its \"TREE\" signature at address %#x", addr)
		}
		if b[4] != typ {
			return errf(path, ErrCorrupt, "B-tree node of type %d where type %d was expected", b[4], typ)
		}
		level := b[5]
		used := uint64(b[6]) | uint64(b[7])<<8
		body, err := f.readAddr(path, addr+hd, used*(keySz+uint64(f.offSz))+keySz)
		if err != nil {
			return err
		}
		p := &dec{b: body, f: f}
		for i := uint64(0); i < used; i++ {
			key := p.take(int(keySz))
			child := p.addr()
			if p.bad {
				return errf(path, ErrCorrupt, "B-tree node cut short")
			}
			if level > 0 {
				if err := walk(child, depth+1); err != nil {
					return err
				}
				continue
			}
			if err := visit(child, key); err != nil {
				return err
			}
		}
		return nil
	}
	return walk(addr, 0)
}
