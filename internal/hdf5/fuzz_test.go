package hdf5

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// fuzzPaths are the objects a BIOM 2.1 reader opens.
var fuzzPaths = []string{
	"/observation/ids", "/sample/ids",
	"/observation/matrix/data", "/observation/matrix/indices", "/observation/matrix/indptr",
	"/sample/matrix/data", "/sample/matrix/indices", "/sample/matrix/indptr",
	"/observation/metadata/taxonomy", "/temperature",
}

// checkErr fails unless err is a one-line *Error.
func checkErr(t *testing.T, err error) {
	t.Helper()
	var e *Error
	if !errors.As(err, &e) {
		t.Fatalf("error is not an *Error: %v", err)
	}
	if strings.ContainsAny(e.Msg, "\r\n") {
		t.Fatalf("multi-line message %q", e.Msg)
	}
}

// FuzzHDF5 opens the objects of a BIOM 2.1 file and reads their values,
// with and without checksum verification (most mutations break a
// checksum; skipping it lets the fuzzer reach the structures behind).
// Seeds: fixtures of testdata/taxa/biom2 and the corpus
// testdata/fuzz/FuzzHDF5 of tiny tables, whole, cut and flipped (both
// written by scripts/biom2_fixtures.py).
func FuzzHDF5(f *testing.F) {
	f.Add([]byte("\x89HDF\r\n\x1a\n\x00"))
	for _, name := range []string{"small.biom", "small_gzip.biom", "h5-earliest-fletcher.biom", "h5-latest-single-chunk.biom",
		"h5-latest-paged.biom", "h5-bigendian.biom", "h5-fixed-ids.biom"} {
		if b, err := os.ReadFile(filepath.Join(fixtures, name)); err == nil {
			f.Add(b)
		}
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		for _, verify := range []bool{true, false} {
			file, err := open(bytes.NewReader(data), int64(len(data)), verify)
			if err != nil {
				checkErr(t, err)
				continue
			}
			if root, err := file.Root(); err != nil {
				checkErr(t, err)
			} else {
				for _, name := range []string{"format-version", "shape", "nnz", "id"} {
					a, err := root.Attr(name)
					if err != nil {
						checkErr(t, err)
						continue
					}
					if _, err := a.Ints(); err != nil {
						checkErr(t, err)
					}
					if _, err := a.Strings(); err != nil {
						checkErr(t, err)
					}
				}
			}
			for _, p := range fuzzPaths {
				d, err := file.Dataset(p)
				if err != nil {
					checkErr(t, err)
					continue
				}
				n := min(d.Len(), 2000)
				for start := uint64(0); start < n; start += 100 {
					k := min(100, n-start)
					var err error
					switch d.Class() {
					case Integer:
						err = d.Ints(start, make([]int64, k))
					case Float:
						err = d.Floats(start, make([]float64, k))
					default:
						err = d.Strings(start, make([]string, k))
					}
					if err != nil {
						checkErr(t, err)
						break
					}
				}
			}
		}
	})
}
