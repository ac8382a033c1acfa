package amplicon

import (
	"bytes"
	"compress/gzip"
	"errors"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// biom2Dir holds BIOM 2.1 files written by Debian's python3-biom-format and
// python3-h5py, with the same tables as BIOM 1.0 JSON and TSV written by
// biom-format (scripts/biom2_fixtures.py).
var biom2Dir = filepath.Join(taxaDir, "biom2")

// sameTable reports how two tables differ in samples, per-sample
// frequency counts, taxa and taxon totals ("" if they agree).
func sameTable(a, b *Table) string {
	if len(a.Samples) != len(b.Samples) {
		return "sample count differs"
	}
	for i := range a.Samples {
		sa, sb := a.Samples[i], b.Samples[i]
		if sa.Name != sb.Name {
			return "sample " + quote(sa.Name) + " vs " + quote(sb.Name)
		}
		if !reflect.DeepEqual(sa.Counts.Classes(), sb.Counts.Classes()) {
			return "counts of sample " + quote(sa.Name)
		}
	}
	if a.Taxa != b.Taxa || !reflect.DeepEqual(a.TaxonTotals.Classes(), b.TaxonTotals.Classes()) {
		return "taxa or taxon totals"
	}
	return ""
}

// Every BIOM 2.1 fixture gives the same counts as the same table written
// by biom-format as TSV and (for tables biom-format wrote in both forms)
// BIOM 1.0 JSON.
func TestBIOM2MatchesOtherLayouts(t *testing.T) {
	files, err := filepath.Glob(filepath.Join(biom2Dir, "*.biom"))
	if err != nil || len(files) < 15 {
		t.Fatalf("%d BIOM 2.1 fixtures (%v); run /usr/bin/python3 scripts/biom2_fixtures.py", len(files), err)
	}
	for _, f := range files {
		base := strings.TrimSuffix(f, ".biom")
		h5 := readFile(t, f, Options{})
		if h5.Format != "biom-hdf5" || h5.Layout != TaxaAsRows {
			t.Errorf("%s: format %q layout %v", f, h5.Format, h5.Layout)
		}
		checkInvariants(t, h5)
		for _, other := range []string{".tsv", ".json"} {
			if _, err := os.Stat(base + other); err != nil {
				if other == ".tsv" {
					t.Errorf("%s: no %s twin", f, other)
				}
				continue
			}
			if d := sameTable(h5, readFile(t, base+other, Options{Layout: TaxaAsRows})); d != "" {
				t.Errorf("%s and %s%s differ: %s", filepath.Base(f), filepath.Base(base), other, d)
			}
		}
	}
}

// A BIOM 2.1 stream without random access (standard input, gzip) is
// copied to a temporary file and reads the same.
func TestBIOM2Streams(t *testing.T) {
	path := filepath.Join(biom2Dir, "small_gzip.biom")
	want := readFile(t, path, Options{})
	raw, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	got, err := Read(io.MultiReader(bytes.NewReader(raw)), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if d := sameTable(got, want); d != "" {
		t.Errorf("stream: %s", d)
	}
	var b bytes.Buffer
	zw := gzip.NewWriter(&b)
	zw.Write(raw)
	zw.Close()
	got, err = Read(&b, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if d := sameTable(got, want); d != "" || got.Format != "biom-hdf5.gz" {
		t.Errorf("gzip: format %q, %s", got.Format, d)
	}
}

// Malformed BIOM 2.1 files give one error naming the object.
func TestBIOM2Bad(t *testing.T) {
	small, err := os.ReadFile(filepath.Join(biom2Dir, "small.biom"))
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		file string
		data []byte
		kind error
		want string
	}{
		{"no_sample_indptr.biom", nil, ErrSyntax, "HDF5 object /sample/matrix/indptr: no such object"},
		{"no_observation_indptr.biom", nil, ErrSyntax, "HDF5 object /observation/matrix/indptr: no such object"},
		{"fraction.biom", nil, ErrNotCount, `/sample/matrix/data: entry 1 (sample "pond-B", taxon "ASV1"): "2.5" is not a whole number`},
		{"indptr_decreasing.biom", nil, ErrSyntax, "/sample/matrix/indptr: entries 1 and 2 are 1 and 0"},
		{"indptr_beyond.biom", nil, ErrShape, "/sample/matrix/indptr: last entry"},
		{"not_biom.h5", nil, ErrSyntax, "not a BIOM 2.1 table: it has no /observation group"},
		{"inflate.biom", nil, ErrTruncated, "/sample/matrix/data: chunk 0 does not inflate"},
		{"truncated", small[:len(small)/2], ErrTruncated, "beyond the end of the file"},
		{"superblock only", small[:40], ErrTruncated, "beyond the end of the file"},
	} {
		data := c.data
		if data == nil {
			if data, err = os.ReadFile(filepath.Join(biom2Dir, "bad", c.file)); err != nil {
				t.Fatal(err)
			}
		}
		_, err := Read(bytes.NewReader(data), Options{})
		var pe *ParseError
		if !errors.As(err, &pe) || !errors.Is(err, c.kind) || !strings.Contains(pe.Err.Error(), c.want) || strings.ContainsAny(pe.Err.Error(), "\r\n") {
			t.Errorf("%s: err = %v, want %v containing %q", c.file, err, c.kind, c.want)
		}
	}
}

// Reading in batches of 3 elements (so that IDs, indptr and a sample's
// entries all span several batches) gives the same table.
func TestBIOM2SmallBatches(t *testing.T) {
	path := filepath.Join(biom2Dir, "many_samples.biom")
	want := readFile(t, path, Options{})
	defer func(n int) { biomBatch = n }(biomBatch)
	biomBatch = 3
	if d := sameTable(readFile(t, path, Options{}), want); d != "" {
		t.Errorf("batches of 3: %s", d)
	}
}
