package amplicon

import (
	"bytes"
	"compress/gzip"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// checkTable holds for any table Read accepts: the taxa's totals add up
// to the samples' reads, and no sample has more taxa than the table.
func checkInvariants(t *testing.T, tab *Table) {
	var reads int64
	for _, s := range tab.Samples {
		reads += s.Counts.Reads()
		if s.Counts.Distinct() > tab.Taxa {
			t.Fatalf("sample %q has %d taxa, the table %d", s.Name, s.Counts.Distinct(), tab.Taxa)
		}
	}
	if reads != tab.TaxonTotals.Reads() {
		t.Fatalf("samples hold %d reads, taxon totals %d", reads, tab.TaxonTotals.Reads())
	}
	if tab.TaxonTotals.Distinct() > tab.Taxa {
		t.Fatalf("%d taxa with reads, %d taxa", tab.TaxonTotals.Distinct(), tab.Taxa)
	}
}

// fuzzRead runs Read in every layout and checks it fails only with a
// *ParseError (or succeeds with a consistent table), and that the serial
// reader (Threads 1) gives the same table or the same error.
func fuzzRead(t *testing.T, data []byte) {
	for _, l := range []Layout{LayoutAuto, TaxaAsRows, SamplesAsRows} {
		tab, err := Read(bytes.NewReader(data), Options{Layout: l})
		sameAsSerial(t, data, Options{Layout: l, Threads: 1}, tab, err)
		if err != nil {
			checkParseError(t, err)
			continue
		}
		checkInvariants(t, tab)
	}
}

// sameAsSerial fails t unless reading data with opt gives tab, err.
func sameAsSerial(t *testing.T, data []byte, opt Options, tab *Table, err error) {
	t.Helper()
	st, serr := Read(bytes.NewReader(data), opt)
	switch {
	case (err == nil) != (serr == nil):
		t.Fatalf("pipelined error %v, serial error %v", err, serr)
	case err != nil:
		if err.Error() != serr.Error() {
			t.Fatalf("pipelined error %q, serial error %q", err, serr)
		}
	default:
		if d := sameTable(tab, st); d != "" || tab.Format != st.Format || tab.Layout != st.Layout || strings.Join(tab.Notes, "|") != strings.Join(st.Notes, "|") {
			t.Fatalf("pipelined and serial tables differ: %s (format %s/%s, layout %v/%v, notes %q/%q)", d, tab.Format, st.Format, tab.Layout, st.Layout, tab.Notes, st.Notes)
		}
	}
}

// FuzzReadTable fuzzes the delimited-text reader (seed corpus in
// testdata/fuzz/FuzzReadTable).
func FuzzReadTable(f *testing.F) {
	for _, s := range []string{
		"taxon\tA\tB\nt1\t3\t2\nt2\t0\t2\n",
		"#OTU ID,A,B,taxonomy\nt1,3,2,\"k__X; p__Y\"\n",
		"SampleID;t1;t2\nA;1;0\nB;4;5.0\n",
		"\"A\"\t\"B\"\n\"t1\"\t1\t2\n",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(fuzzRead)
}

// FuzzReadBIOM fuzzes the BIOM 1.0 JSON reader, plain and gzipped (seed
// corpus in testdata/fuzz/FuzzReadBIOM).
func FuzzReadBIOM(f *testing.F) {
	ids := `"rows":[{"id":"t1"},{"id":"t2"}],"columns":[{"id":"A"},{"id":"B"}]`
	for _, s := range []string{
		`{"shape":[2,2],"matrix_type":"dense",` + ids + `,"data":[[1,2],[3,4]]}`,
		`{"shape":[2,2],"matrix_type":"sparse",` + ids + `,"data":[[0,0,1.0],[1,1,7.0]]}`,
		`{"data":[[0,1,2]],"matrix_type":"sparse",` + ids + `,"shape":[2,2]}`,
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		fuzzRead(t, data)
		var b bytes.Buffer
		zw := gzip.NewWriter(&b)
		zw.Write(data)
		zw.Close()
		fuzzRead(t, b.Bytes())
	})
}

// FuzzReadBIOM2 fuzzes the BIOM 2.1 reader above the HDF5 layer (seeds:
// the fixtures of testdata/taxa/biom2, written by
// scripts/biom2_fixtures.py; corpus in testdata/fuzz/FuzzReadBIOM2).
func FuzzReadBIOM2(f *testing.F) {
	for _, name := range []string{"small.biom", "no_metadata.biom", "h5-latest-contiguous.biom", "h5-int-counts.biom",
		"bad/fraction.biom", "bad/indptr_decreasing.biom"} {
		if b, err := os.ReadFile(filepath.Join(biom2Dir, name)); err == nil {
			f.Add(b)
		}
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		tab, err := Read(bytes.NewReader(data), Options{})
		if err != nil {
			checkParseError(t, err)
			return
		}
		checkInvariants(t, tab)
	})
}

// checkParseError fails unless err is a *ParseError with a one-line
// message.
func checkParseError(t *testing.T, err error) {
	t.Helper()
	var pe *ParseError
	if !errors.As(err, &pe) {
		t.Fatalf("error is not a *ParseError: %v", err)
	}
	if strings.ContainsAny(pe.Err.Error(), "\n\r") {
		t.Fatalf("multi-line message %q", pe.Err.Error())
	}
}
