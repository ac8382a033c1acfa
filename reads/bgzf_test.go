package reads

import (
	"bytes"
	"errors"
	"io"
	"math/rand/v2"
	"testing"

	"github.com/biogo/hts/bgzf"
)

// bgzfOf compresses data with github.com/biogo/hts/bgzf, an independent
// BGZF writer (SAM specification section 4.1), in blocks of at most
// blockSize bytes of data, ending with the EOF marker block.
func bgzfOf(t testing.TB, data []byte, blockSize int) []byte {
	t.Helper()
	var buf bytes.Buffer
	w := bgzf.NewWriter(&buf, 1)
	for len(data) > 0 {
		n := min(blockSize, len(data))
		if _, err := w.Write(data[:n]); err != nil {
			t.Fatal(err)
		}
		if err := w.Flush(); err != nil {
			t.Fatal(err)
		}
		data = data[n:]
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// readAllBGZF reads a stream with the given number of workers.
func readAllBGZF(z []byte, workers int) ([]byte, error) {
	r := newBGZFReader(bytes.NewReader(z), workers)
	defer r.Close()
	return io.ReadAll(r)
}

// TestBGZFRoundTrip: data written by biogo's BGZF writer reads back
// exactly, serially and with 2 and 7 workers, for empty data, one block
// and many blocks of mixed compressibility.
func TestBGZFRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	mixed := make([]byte, 3_000_000)
	for i := range mixed {
		if (i/10000)%2 == 0 {
			mixed[i] = byte(rng.IntN(256)) // incompressible stretch
		} else {
			mixed[i] = "ACGT"[rng.IntN(4)]
		}
	}
	for _, c := range []struct {
		name  string
		data  []byte
		block int
	}{
		{"empty", nil, 1},
		{"one block", mixed[:1000], 65280},
		{"many full blocks", mixed, 65280},
		{"small blocks", mixed[:200000], 777},
	} {
		z := bgzfOf(t, c.data, c.block)
		for _, w := range []int{1, 2, 7} {
			got, err := readAllBGZF(z, w)
			if err != nil || !bytes.Equal(got, c.data) {
				t.Errorf("%s, %d workers: %d bytes, %v; want %d bytes", c.name, w, len(got), err, len(c.data))
			}
		}
	}
}

// TestBGZFDamage: every kind of damage is an error of the right kind,
// after exactly the data of the blocks before it, whatever the workers.
func TestBGZFDamage(t *testing.T) {
	data := bytes.Repeat([]byte("ACGTTGCAAC"), 30000) // 300 kB: 5 blocks
	z := bgzfOf(t, data, 65280)
	first := int(z[16]) | int(z[17])<<8 + 1 // size of the first block
	flip := func(at int) []byte { b := bytes.Clone(z); b[at] ^= 0x40; return b }
	for _, c := range []struct {
		name string
		in   []byte
		want error
	}{
		{"cut inside the second block", z[:first+100], io.ErrUnexpectedEOF},
		{"cut inside a header", z[:first+5], io.ErrUnexpectedEOF},
		{"CRC of block 1", flip(first - 8), errBGZFCRC},
		{"ISIZE of block 1", flip(first - 2), errBGZFSize},
		{"no BC subfield", flip(first + 12), errBGZFHeader},
		{"not gzip after block 1", append(bytes.Clone(z[:first]), []byte("trailing text here")...), errBGZFHeader},
		{"XLEN larger than a block", append(bytes.Clone(z[:first]), append([]byte("\x1f\x8b\x08\x04\x00\x00\x00\x00\x00\xff\xff\xff"), make([]byte, 70000)...)...), errBGZFHeader},
	} {
		for _, w := range []int{1, 2, 5} {
			got, err := readAllBGZF(c.in, w)
			if !errors.Is(err, c.want) {
				t.Errorf("%s, %d workers: error %v, want %v", c.name, w, err, c.want)
			}
			if len(got) > 65280 || !bytes.Equal(got, data[:len(got)]) {
				t.Errorf("%s, %d workers: %d bytes before the error, not a prefix of block 1's data", c.name, w, len(got))
			}
		}
	}
	// Damaged deflate data inside block 2: an error, never wrong data.
	bad := bytes.Clone(z)
	for i := first + 30; i < first+60; i++ {
		bad[i] ^= 0xff
	}
	for _, w := range []int{1, 2} {
		got, err := readAllBGZF(bad, w)
		if err == nil || !bytes.Equal(got, data[:len(got)]) {
			t.Errorf("corrupt deflate, %d workers: %d bytes, %v", w, len(got), err)
		}
	}
}

// TestBGZFCloseEarly: closing a parallel reader mid-stream returns
// (goroutines end on their own; run with -race).
func TestBGZFCloseEarly(t *testing.T) {
	z := bgzfOf(t, bytes.Repeat([]byte("ACGT"), 500000), 65280)
	r := newBGZFReader(bytes.NewReader(z), 3)
	buf := make([]byte, 1000)
	if _, err := io.ReadFull(r, buf); err != nil {
		t.Fatal(err)
	}
	r.Close()
	r.Close()
}

// FuzzBGZF: any bytes give the same data and the same error with 1 and 3
// workers; never a panic or a hang.
func FuzzBGZF(f *testing.F) {
	f.Add(bgzfOf(f, []byte("hello BGZF"), 4))
	f.Add(bgzfEOF)
	f.Add([]byte("\x1f\x8b\x08\x04\x00\x00\x00\x00\x00\xff\x06\x00BC\x02\x00\xff\xff"))
	f.Fuzz(func(t *testing.T, in []byte) {
		a, ea := readAllBGZF(in, 1)
		b, eb := readAllBGZF(in, 3)
		if !bytes.Equal(a, b) || (ea == nil) != (eb == nil) || ea != nil && ea.Error() != eb.Error() {
			t.Fatalf("1 worker: %d bytes, %v; 3 workers: %d bytes, %v", len(a), ea, len(b), eb)
		}
	})
}
