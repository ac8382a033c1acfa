package hdf5

import (
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// Test vectors of lookup3.c's self-test (driver5), from memory; the
// checksums of every version 2 structure in the fixtures below check the
// implementation again against the HDF5 library.
func TestLookup3(t *testing.T) {
	for _, c := range []struct {
		s    string
		init uint32
		want uint32
	}{
		{"", 0, 0xdeadbeef},
		{"", 0xdeadbeef, 0xbd5b7dde},
		{"Four score and seven years ago", 0, 0x17770551},
		{"Four score and seven years ago", 1, 0xcd628161},
	} {
		if got := lookup3([]byte(c.s), c.init); got != c.want {
			t.Errorf("lookup3(%q, %#x) = %#08x, want %#08x", c.s, c.init, got, c.want)
		}
	}
}

var fixtures = filepath.Join("..", "..", "testdata", "taxa", "biom2")

func openFixture(t *testing.T, name string) *File {
	t.Helper()
	fh, err := os.Open(filepath.Join(fixtures, name))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { fh.Close() })
	st, _ := fh.Stat()
	f, err := Open(fh, st.Size())
	if err != nil {
		t.Fatal(err)
	}
	return f
}

// The fixtures written by python3-h5py (scripts/biom2_fixtures.py) cover
// the structures this package reads: h5py's libver="earliest" writes
// superblock 0, symbol-table groups and layout version 3 (v1 B-tree chunk
// index); libver="latest" writes superblock 3, link-message groups and
// layout version 4 with a fixed array, single chunk or implicit index.
func TestFixtureStructures(t *testing.T) {
	for _, c := range []struct {
		file    string
		symbols bool // root is a symbol-table group
		layout  uint8
		index   uint8
		filters []uint16
		paged   bool
	}{
		{"h5-earliest-contiguous.biom", true, 1, 0, nil, false},
		{"h5-earliest-chunked.biom", true, 2, 0, nil, false},
		{"h5-earliest-gzip-shuffle.biom", true, 2, 0, []uint16{2, 1}, false},
		{"h5-earliest-fletcher.biom", true, 2, 0, []uint16{1, 3}, false},
		{"h5-latest-contiguous.biom", false, 1, 0, nil, false},
		{"h5-latest-chunked.biom", false, 2, 3, nil, false},
		{"h5-latest-gzip-shuffle.biom", false, 2, 3, []uint16{2, 1}, false},
		{"h5-latest-single-chunk.biom", false, 2, 1, []uint16{1}, false},
		{"h5-latest-paged.biom", false, 2, 3, nil, true},
		{"small.biom", true, 1, 0, nil, false},
		{"small_gzip.biom", true, 2, 0, []uint16{1}, false},
		{"h5-compact.biom", false, 0, 0, nil, false},
		{"h5-latest-implicit.biom", false, 2, 2, nil, false},
		{"h5-v108.biom", false, 2, 0, []uint16{1}, false}, // layout 3: the fixed array came with 1.10
	} {
		f := openFixture(t, c.file)
		if want := map[bool]byte{true: 0, false: 3}[c.symbols]; c.file == "h5-v108.biom" && f.sbVer != 2 || c.file != "h5-v108.biom" && f.sbVer != want {
			t.Errorf("%s: superblock version %d", c.file, f.sbVer)
		}
		root, err := f.Root()
		if err != nil {
			t.Fatal(err)
		}
		d, err := f.Dataset("/sample/matrix/data")
		if err != nil {
			t.Fatalf("%s: %v", c.file, err)
		}
		var ids []uint16
		for _, fl := range d.filters {
			ids = append(ids, fl.id)
		}
		if err := d.Floats(0, make([]float64, d.Len())); err != nil {
			t.Fatalf("%s: %v", c.file, err)
		}
		paged := d.layout == 2 && d.index == 3 && d.nChunks() > 1024
		if got := root.find(msgSymbolTable) != nil; got != c.symbols || d.layout != c.layout || (d.layout == 2 && d.index != c.index) ||
			!reflect.DeepEqual(ids, c.filters) || paged != c.paged {
			t.Errorf("%s: symbol table %v, layout %d, index %d, filters %v, paged %v; want %v %d %d %v %v",
				c.file, got, d.layout, d.index, ids, paged, c.symbols, c.layout, c.index, c.filters, c.paged)
		}
	}
}

// IDs (variable-length and fixed strings) and attributes read back as
// biom-format and h5py wrote them (scripts/biom2_fixtures.py: samples
// "pond-A00", "pond-B01", ...; format-version [2, 1]).
func TestStringsAndAttributes(t *testing.T) {
	for _, name := range []string{"h5-earliest-contiguous.biom", "h5-fixed-ids.biom", "small.biom", "h5-latest-chunked.biom"} {
		f := openFixture(t, name)
		d, err := f.Dataset("/sample/ids")
		if err != nil {
			t.Fatal(err)
		}
		got := make([]string, 2)
		if err := d.Strings(0, got); err != nil || got[0] != "pond-A00" || got[1] != "pond-B01" {
			t.Errorf("%s: ids %q, %v", name, got, err)
		}
		root, _ := f.Root()
		a, err := root.Attr("format-version")
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if v, err := a.Ints(); err != nil || !reflect.DeepEqual(v, []int64{2, 1}) {
			t.Errorf("%s: format-version %v, %v", name, v, err)
		}
		if a, err := root.Attr("id"); err != nil {
			t.Errorf("%s: %v", name, err)
		} else if s, err := a.Strings(); err != nil || len(s) != 1 || s[0] != "invented pond survey" {
			t.Errorf("%s: id %q, %v", name, s, err)
		}
	}
}

// Dense storage (h5py libver="latest", more than 8 members or attributes;
// scripts/biom2_fixtures.py bad/dense.biom) is refused by name.
func TestDenseRefused(t *testing.T) {
	f := openFixture(t, filepath.Join("bad", "dense.biom"))
	root, err := f.Root()
	if err != nil {
		t.Fatal(err)
	}
	if _, err := root.Attr("shape"); !errors.Is(err, ErrUnsupported) || !strings.Contains(err.Error(), "dense attribute storage") {
		t.Errorf("attribute: %v", err)
	}
	if _, err := f.Lookup("/sample/matrix"); !errors.Is(err, ErrUnsupported) || !strings.Contains(err.Error(), "/sample: dense link storage") {
		t.Errorf("link: %v", err)
	}
}
