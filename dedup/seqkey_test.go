package dedup

import (
	"math/rand/v2"
	"testing"
)

// keyPartsByBase is keyParts written base by base, as its comment
// defines it: the key's bases (SeqA then SeqB) cut into four quarters,
// quarter q holding bases q·n/4 up to (q+1)·n/4.
func keyPartsByBase(m umiMol) [4]uint64 {
	la, lb := int(m.umi>>56), int(m.seqB>>56)
	n := la + lb
	base := func(i int) uint64 {
		if i < la {
			return m.umi >> (2 * (la - 1 - i)) & 3
		}
		return m.seqB >> (2 * (lb - 1 - (i - la))) & 3
	}
	var p [4]uint64
	for q := 0; q < 4; q++ {
		lo, hi := q*n/4, (q+1)*n/4
		var c uint64
		for i := lo; i < hi; i++ {
			c = c<<2 | base(i)
		}
		p[q] = c | uint64(hi-lo)<<56
	}
	return p
}

// TestKeyPartsByBase: the word-at-a-time quarters equal the base-by-base
// ones for every pair of mate lengths up to reads.MaxPackedKey (28) and
// for single-end keys.
func TestKeyPartsByBase(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	pack := func(l int) uint64 {
		if l == 0 {
			return 0
		}
		return rng.Uint64()&(1<<(2*l)-1) | uint64(l)<<56
	}
	for la := 1; la <= 28; la++ {
		for lb := 0; lb <= 28; lb++ {
			for k := 0; k < 20; k++ {
				m := umiMol{umi: pack(la), seqB: pack(lb)}
				if got, want := keyParts(m), keyPartsByBase(m); got != want {
					t.Fatalf("lengths %d+%d: keyParts %x, want %x", la, lb, got, want)
				}
			}
		}
	}
}
