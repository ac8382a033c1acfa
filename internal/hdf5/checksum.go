package hdf5

import "math/bits"

// lookup3 is Bob Jenkins' lookup3 "hashlittle" hash (lookup3.c, 2006,
// public domain), byte-wise form, which the HDF5 File Format
// Specification version 3.0 names as the checksum of version 2
// structures.
func lookup3(k []byte, initval uint32) uint32 {
	a := 0xdeadbeef + uint32(len(k)) + initval
	b, c := a, a
	word := func(s []byte) uint32 {
		return uint32(s[0]) | uint32(s[1])<<8 | uint32(s[2])<<16 | uint32(s[3])<<24
	}
	for len(k) > 12 {
		a += word(k[0:])
		b += word(k[4:])
		c += word(k[8:])
		a -= c
		a ^= bits.RotateLeft32(c, 4)
		c += b
		b -= a
		b ^= bits.RotateLeft32(a, 6)
		a += c
		c -= b
		c ^= bits.RotateLeft32(b, 8)
		b += a
		a -= c
		a ^= bits.RotateLeft32(c, 16)
		c += b
		b -= a
		b ^= bits.RotateLeft32(a, 19)
		a += c
		c -= b
		c ^= bits.RotateLeft32(b, 4)
		b += a
		k = k[12:]
	}
	if len(k) == 0 {
		return c
	}
	var tail [12]byte
	copy(tail[:], k)
	a += word(tail[0:])
	b += word(tail[4:])
	c += word(tail[8:])
	c ^= b
	c -= bits.RotateLeft32(b, 14)
	a ^= c
	a -= bits.RotateLeft32(c, 11)
	b ^= a
	b -= bits.RotateLeft32(a, 25)
	c ^= b
	c -= bits.RotateLeft32(b, 16)
	a ^= c
	a -= bits.RotateLeft32(c, 4)
	b ^= a
	b -= bits.RotateLeft32(a, 14)
	c ^= b
	c -= bits.RotateLeft32(b, 24)
	return c
}

// fletcher32 is the Fletcher-32 checksum as the HDF5 library's Fletcher-32
// filter computes it: over big-endian 16-bit words, an odd last byte taken
// as the high byte of a word.
func fletcher32(d []byte) uint32 {
	var s1, s2 uint32
	for len(d) >= 2 {
		n := min(len(d)/2, 360)
		for i := 0; i < n; i++ {
			s1 += uint32(d[0])<<8 | uint32(d[1])
			s2 += s1
			d = d[2:]
		}
		s1 = s1&0xffff + s1>>16
		s2 = s2&0xffff + s2>>16
	}
	if len(d) == 1 {
		s1 += uint32(d[0]) << 8
		s2 += s1
		s1 = s1&0xffff + s1>>16
		s2 = s2&0xffff + s2>>16
	}
	s1 = s1&0xffff + s1>>16
	s2 = s2&0xffff + s2>>16
	return s2<<16 | s1
}
