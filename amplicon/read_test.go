package amplicon

import (
	"errors"
	"reflect"
	"strings"
	"testing"

	"headroom/complexity"
)

// freqOf returns the frequency counts of per-taxon counts, computed
// directly (the definition: n_j = taxa with exactly j reads).
func freqOf(perTaxon ...int64) []complexity.Class {
	m := map[int64]int64{}
	for _, v := range perTaxon {
		if v > 0 {
			m[v]++
		}
	}
	c, _ := complexity.FromMap(m)
	return c.Classes()
}

type wantSample struct {
	name  string
	freq  []complexity.Class
	reads int64
}

func checkSamples(t *testing.T, what string, tab *Table, want []wantSample) {
	t.Helper()
	if len(tab.Samples) != len(want) {
		t.Fatalf("%s: %d samples, want %d", what, len(tab.Samples), len(want))
	}
	for i, w := range want {
		s := tab.Samples[i]
		if s.Name != w.name || !reflect.DeepEqual(s.Counts.Classes(), w.freq) {
			t.Errorf("%s: sample %d = %q %v, want %q %v", what, i, s.Name, s.Counts.Classes(), w.name, w.freq)
		}
	}
}

// Each variant below holds the same table: samples A, B; taxa t1..t3 with
// A = (3, 0, 1), B = (2, 2, 5).
func TestDelimitedVariants(t *testing.T) {
	want := []wantSample{{name: "A", freq: freqOf(3, 0, 1)}, {name: "B", freq: freqOf(2, 2, 5)}}
	cases := []struct {
		name   string
		body   string
		opt    Options
		layout Layout
		format string
		note   string
	}{
		{"tsv", "taxon\tA\tB\nt1\t3\t2\nt2\t0\t2\nt3\t1\t5\n", Options{}, TaxaAsRows, "tsv", ""},
		{"crlf", "taxon,A,B\r\nt1,3,2\r\nt2,0,2\r\nt3,1,5\r\n", Options{}, TaxaAsRows, "csv", ""},
		{"no final newline", "taxon\tA\tB\nt1\t3\t2\nt2\t0\t2\nt3\t1\t5", Options{}, TaxaAsRows, "tsv", ""},
		{"semicolon", "taxon;A;B\nt1;3;2\nt2;0;2\nt3;1;5\n", Options{}, TaxaAsRows, "ssv", ""},
		{"quoted", "\"taxon\",\"A\",\"B\"\n\"t1\",3,2\n\"t,2\",0,2\n\"t\"\"3\",1,5\n", Options{}, TaxaAsRows, "csv", ""},
		{"bom and comments", "\xef\xbb\xbf# made by hand\n\n# another\ntaxon\tA\tB\nt1\t3\t2\n# mid-table comment\nt2\t0\t2\n\nt3\t1\t5\n", Options{}, TaxaAsRows, "tsv", ""},
		{"otu id header", "# Constructed from biom file\n#OTU ID\tA\tB\nt1\t3\t2\nt2\t0\t2\nt3\t1\t5\n", Options{}, TaxaAsRows, "tsv", ""},
		{"decimals", "taxon\tA\tB\nt1\t3.0\t2.00\nt2\t0\t2e0\nt3\t1\t5.0\n", Options{}, TaxaAsRows, "tsv", ""},
		{"spaces", "taxon, A, B\nt1, 3, 2\nt2, 0, 2\nt3, 1 ,5\n", Options{}, TaxaAsRows, "csv", ""},
		{"R header", "\"A\" \"B\"\n", Options{}, TaxaAsRows, "", ""}, // placeholder, replaced below
		{"taxonomy column", "#OTU ID\tA\tB\ttaxonomy\tConfidence\nt1\t3\t2\tk__X; p__Y\t0.9\nt2\t0\t2\tk__X; p__Z\t0.8\nt3\t1\t5\t\t0.7\n", Options{}, TaxaAsRows, "tsv", "skipped taxon metadata column(s) taxonomy, Confidence"},
		{"metadata omitted", "taxon\tA\tB\tlineage\nt1\t3\t2\tk__X\nt2\t0\t2\nt3\t1\t5\tk__Q\n", Options{}, TaxaAsRows, "tsv", "skipped taxon metadata column(s) lineage"},
		{"trailing tab", "taxon\tA\tB\t\nt1\t3\t2\t\nt2\t0\t2\t\nt3\t1\t5\t\n", Options{}, TaxaAsRows, "tsv", "skipped taxon metadata column(s) (unnamed)"},
		{"samples as rows", "SampleID\tt1\tt2\tt3\nA\t3\t0\t1\nB\t2\t2\t5\n", Options{}, SamplesAsRows, "tsv", "read as samples in rows (the first header cell \"SampleID\")"},
		{"samples as rows, taxonomy names", "id,k__X;p__Y;g__A,k__X;p__Y;g__B,k__X;p__Z;g__C\nA,3,0,1\nB,2,2,5\n", Options{}, SamplesAsRows, "csv", "column names that are taxonomy strings or sequences"},
		{"samples as rows, sequence names", "\"\",\"ACGTACGTACGTACGTACGTACGTACGTACGTAA\",\"ACGTACGTACGTACGTACGTACGTACGTACGTCC\",\"TTGTACGTACGTACGTACGTACGTACGTACGTGG\"\n\"A\",3,0,1\n\"B\",2,2,5\n", Options{}, SamplesAsRows, "csv", "column names that are taxonomy strings or sequences"},
		{"samples as rows, forced", "who\tt1\tt2\tt3\tsite\nA\t3\t0\t1\tnorth shore\nB\t2\t2\t5\tsouth\n", Options{Layout: SamplesAsRows}, SamplesAsRows, "tsv", "skipped sample metadata column(s) site"},
	}
	cases[9].body = "A\tB\nt1\t3\t2\nt2\t0\t2\nt3\t1\t5\n"
	cases[9].format = "tsv"
	cases[9].note = "the header has no name for the first column"
	for _, c := range cases {
		tab, err := Read(strings.NewReader(c.body), c.opt)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if tab.Layout != c.layout || tab.Format != c.format || tab.Taxa != 3 {
			t.Errorf("%s: layout %v format %q taxa %d, want %v %q 3", c.name, tab.Layout, tab.Format, tab.Taxa, c.layout, c.format)
		}
		if c.note == "" && len(tab.Notes) > 0 || c.note != "" && !strings.Contains(strings.Join(tab.Notes, "|"), c.note) {
			t.Errorf("%s: notes %q, want %q", c.name, tab.Notes, c.note)
		}
		checkSamples(t, c.name, tab, want)
		// Taxon totals 5, 2, 6.
		if got := tab.TaxonTotals.Classes(); !reflect.DeepEqual(got, freqOf(5, 2, 6)) {
			t.Errorf("%s: taxon totals %v, want %v", c.name, got, freqOf(5, 2, 6))
		}
	}
}

// Forcing taxa as rows reads a samples-as-rows header the other way.
func TestLayoutOverride(t *testing.T) {
	tab, err := Read(strings.NewReader("sample\tX\tY\nt1\t3\t2\nt2\t1\t0\n"), Options{Layout: TaxaAsRows})
	if err != nil {
		t.Fatal(err)
	}
	checkSamples(t, "override", tab, []wantSample{{name: "X", freq: freqOf(3, 1)}, {name: "Y", freq: freqOf(2)}})
}

func TestBIOMVariants(t *testing.T) {
	want := []wantSample{{name: "A", freq: freqOf(3, 0, 1)}, {name: "B", freq: freqOf(2, 2, 5)}}
	ids := `"rows":[{"id":"t1","metadata":{"taxonomy":["k__X","p__Y"]}},{"id":"t2","metadata":null},{"id":"t3"}],` +
		`"columns":[{"id":"A","metadata":null},{"id":"B","metadata":{"site":[1,2,{"x":"y"}]}}]`
	cases := []struct{ name, body, format string }{
		{"dense", `{"format":"Biological Observation Matrix 1.0.0","shape":[3,2],"matrix_type":"dense","matrix_element_type":"int",` + ids + `,"data":[[3,2],[0,2],[1,5]]}`, "biom-dense"},
		{"sparse", `{"shape":[3,2],"matrix_type":"sparse","matrix_element_type":"float",` + ids + `,"data":[[0,0,3.0],[0,1,2.0],[1,1,2.0],[2,0,1.0],[2,1,5.0]]}`, "biom-sparse"},
		{"sparse column-major", `{"shape":[3,2],"matrix_type":"sparse",` + ids + `,"data":[[0,0,3],[1,0,0],[2,0,1],[0,1,2],[1,1,2],[2,1,5]]}`, "biom-sparse"},
		{"data first", "{\n\"data\": [[0,0,3],[0,1,2],[1,1,2],[2,0,1],[2,1,5]],\n" + ids + `,"matrix_type":"sparse","shape":[3,2]}`, "biom-sparse"},
		{"dense data before shape", `{"matrix_type":"dense","data":[[3,2],[0,2],[1,5]],` + ids + `,"shape":[3,2],"extra":{"a":[1,{"b":null}]}}`, "biom-dense"},
		{"pretty", "{\n  \"shape\": [3, 2],\n  \"matrix_type\": \"dense\",\n  " + ids + ",\n  \"data\": [\n    [3, 2],\n    [0, 2],\n    [1, 5]\n  ]\n}\n", "biom-dense"},
	}
	for _, c := range cases {
		tab, err := Read(strings.NewReader(c.body), Options{})
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if tab.Format != c.format || tab.Taxa != 3 {
			t.Errorf("%s: format %q taxa %d", c.name, tab.Format, tab.Taxa)
		}
		checkSamples(t, c.name, tab, want)
		if got := tab.TaxonTotals.Classes(); !reflect.DeepEqual(got, freqOf(5, 2, 6)) {
			t.Errorf("%s: taxon totals %v, want %v", c.name, got, freqOf(5, 2, 6))
		}
	}
}

// Bad input: the kind of error and where it is.
func TestBadInput(t *testing.T) {
	biomIDs := `"rows":[{"id":"t1"},{"id":"t2"}],"columns":[{"id":"A"},{"id":"B"}]`
	cases := []struct {
		name      string
		body      string
		kind      error
		line, col int64
		msg       string
	}{
		{"empty", "", ErrEmpty, 0, 0, "empty table"},
		{"blank", "\n  \n", ErrEmpty, 0, 0, "empty table"},
		{"comments only", "# nothing\n", ErrEmpty, 0, 0, "no header line"},
		{"header only", "taxon\tA\n", ErrEmpty, 1, 0, "no data rows"},
		{"one column", "taxon\nt1\n", ErrShape, 1, 0, "no tab, comma or semicolon"},
		{"proportion", "taxon\tA\tB\nt1\t0.5\t0.25\n", ErrNotCount, 2, 2, "not a whole number; headroom needs raw read counts"},
		{"proportion later", "taxon\tA\tB\nt1\t5\t3\nt2\t1\t0.3\n", ErrNotCount, 3, 3, "not a whole number"},
		{"negative", "taxon\tA\tB\nt1\t5\t3\nt2\t-1\t0\n", ErrNegative, 3, 2, "negative count"},
		{"word", "taxon\tA\tB\nt1\t5\t3\nt2\tabc\t0\n", ErrNotCount, 3, 2, "word \"abc\""},
		{"empty cell", "taxon\tA\tB\nt1\t5\t3\nt2\t\t0\n", ErrNotCount, 3, 2, "empty count cell"},
		{"text only", "taxon\tA\tB\nt1\tx\ty\n", ErrNotCount, 2, 2, "no count columns"},
		{"ragged short", "taxon\tA\tB\nt1\t5\t3\nt2\t1\n", ErrShape, 3, 2, "row has 2 fields but the header (line 1) has 3"},
		{"ragged long", "taxon\tA\tB\nt1\t5\t3\t4\n", ErrShape, 2, 4, "row has 4 fields"},
		{"dup sample", "taxon\tA\tB\tA\nt1\t5\t3\t1\n", ErrDuplicate, 1, 4, "sample ID \"A\" repeated (also column 2)"},
		{"dup taxon", "taxon\tA\nt1\t5\nt2\t1\nt1\t2\n", ErrDuplicate, 4, 1, "taxon ID \"t1\" repeated (first on line 2)"},
		{"no sample name", "taxon\tA\t\tB\nt1\t5\t3\t1\n", ErrShape, 1, 3, "no sample name"},
		{"no taxon id", "taxon\tA\nt1\t5\n\t1\n", ErrShape, 3, 1, "without a taxon ID"},
		{"unterminated quote", "taxon,A\n\"t1,5\n", ErrSyntax, 2, 1, "unterminated quoted field"},
		{"nul", "taxon\tA\nt1\t5\x00\n", ErrSyntax, 2, 0, "binary data"},
		{"huge", "taxon\tA\nt1\t99999999999999999999\n", ErrTooLarge, 2, 2, "too large"},
		{"overflow", "taxon\tA\nt1\t9223372036854775807\nt2\t1\n", ErrTooLarge, 3, 2, "more than"},
		{"hdf5 cut short", "\x89HDF\r\n\x1a\n\x00\x00", ErrTruncated, 0, 0, "HDF5: 12 bytes at address 0 lie beyond the end of the file"},
		{"biom truncated", `{"shape":[2,2],"matrix_type":"dense",` + biomIDs + `,"data":[[1,2],[3,`, ErrTruncated, 1, 0, "truncated BIOM JSON"},
		{"biom truncated key", `{"shape":[2,2],"matr`, ErrTruncated, 1, 0, "truncated BIOM JSON"},
		{"biom syntax", "{\"shape\":[2,2],\n\"data\" [[1,2]]}", ErrSyntax, 2, 0, "syntax error"},
		{"biom fraction", `{"shape":[2,2],"matrix_type":"dense",` + biomIDs + `,"data":[[1,2],[3,0.5]]}`, ErrNotCount, 1, 122, "not a whole number"},
		{"biom negative", `{"shape":[2,2],"matrix_type":"sparse",` + biomIDs + `,"data":[[1,1,-2]]}`, ErrNegative, 1, 0, "negative"},
		{"biom string", `{"shape":[2,2],"matrix_type":"sparse",` + biomIDs + `,"data":[[1,1,"7"]]}`, ErrNotCount, 1, 0, "not a number"},
		{"biom unicode", `{"shape":[2,2],"matrix_type":"sparse","matrix_element_type":"unicode",` + biomIDs + `,"data":[]}`, ErrNotCount, 1, 0, "text, not counts"},
		{"biom ragged", `{"shape":[2,2],"matrix_type":"dense",` + biomIDs + `,"data":[[1,2],[3]]}`, ErrShape, 1, 0, "row 1 has 1 values, want 2"},
		{"biom rows", `{"shape":[2,2],"matrix_type":"dense",` + biomIDs + `,"data":[[1,2],[3,4],[5,6]]}`, ErrShape, 1, 0, "more rows than shape"},
		{"biom index", `{"shape":[2,2],"matrix_type":"sparse",` + biomIDs + `,"data":[[2,0,1]]}`, ErrSyntax, 1, 0, "row index \"2\" is not an integer in [0, 2)"},
		{"biom repeat", `{"shape":[2,2],"matrix_type":"sparse",` + biomIDs + `,"data":[[0,0,1],[0,0,1]]}`, ErrDuplicate, 1, 0, "repeats"},
		{"biom entry", `{"shape":[2,2],"matrix_type":"sparse",` + biomIDs + `,"data":[[0,0,1,4]]}`, ErrSyntax, 1, 0, "[row, column, value]"},
		{"biom dup id", `{"shape":[2,2],"matrix_type":"dense","rows":[{"id":"t1"},{"id":"t1"}],"columns":[{"id":"A"},{"id":"B"}],"data":[[1,2],[3,4]]}`, ErrDuplicate, 1, 0, "taxon ID \"t1\" repeated"},
		{"biom no shape", `{"matrix_type":"dense",` + biomIDs + `,"data":[[1,2],[3,4]]}`, ErrSyntax, 0, 0, "without \"shape\""},
		{"biom no type", `{"shape":[2,2],` + biomIDs + `,"data":[[1,2],[3,4]]}`, ErrSyntax, 0, 0, "without matrix_type"},
		{"biom shape", `{"shape":[3,2],"matrix_type":"sparse",` + biomIDs + `,"data":[]}`, ErrShape, 0, 0, "does not match"},
		{"biom no columns", `{"shape":[2,0],"matrix_type":"sparse","rows":[{"id":"t1"},{"id":"t2"}],"columns":[],"data":[]}`, ErrEmpty, 0, 0, "no samples"},
		{"biom repeated key", `{"shape":[2,2],"shape":[2,2]}`, ErrSyntax, 1, 0, "repeated"},
		{"biom trailing", `{"shape":[2,2],"matrix_type":"dense",` + biomIDs + `,"data":[[1,2],[3,4]]} {}`, ErrSyntax, 1, 0, "after the end"},
		{"biom data first", "{\"data\": [[0,0,3],\n [0,1,2.5]],\n\"matrix_type\":\"sparse\"," + biomIDs + `,"shape":[2,2]}`, ErrNotCount, 2, 7, "not a whole number"},
		{"biom data first, pretty", "{\n  \"data\": [\n    [0, 0, 3],\n    [0, 1, 2.5]\n  ],\n\"matrix_type\":\"sparse\"," + biomIDs + `,"shape":[2,2]}`, ErrNotCount, 4, 12, "not a whole number"},
		{"biom 2 json", `{"format":"Biological Observation Matrix 2.1.0"}`, ErrHDF5, 1, 0, "not BIOM 1.0"},
	}
	for _, c := range cases {
		_, err := Read(strings.NewReader(c.body), Options{})
		var pe *ParseError
		if !errors.As(err, &pe) {
			t.Errorf("%s: err = %v, want a *ParseError", c.name, err)
			continue
		}
		if !errors.Is(err, c.kind) || pe.Line != c.line || (c.col != 0 && pe.Column != c.col) || !strings.Contains(pe.Err.Error(), c.msg) {
			t.Errorf("%s: got %v (line %d col %d kind %v), want line %d col %d kind %v and %q",
				c.name, err, pe.Line, pe.Column, pe.Err, c.line, c.col, c.kind, c.msg)
		}
		if strings.Contains(pe.Error(), "\n") {
			t.Errorf("%s: message spans lines: %q", c.name, pe.Error())
		}
	}
}

// A long line (a wide samples-as-rows table) is read whole.
func TestLongLine(t *testing.T) {
	var b strings.Builder
	b.WriteString("sample")
	const n = 300000 // about 2.5 MB per line, past the 1 MiB buffer
	for i := 0; i < n; i++ {
		b.WriteString("\tasv")
		b.WriteString(strings.Repeat("x", i%3))
		b.WriteString(itoa(i))
	}
	b.WriteString("\nS1")
	for i := 0; i < n; i++ {
		b.WriteString("\t")
		b.WriteString(itoa(i % 4))
	}
	b.WriteString("\n")
	tab, err := Read(strings.NewReader(b.String()), Options{})
	if err != nil {
		t.Fatal(err)
	}
	want := []complexity.Class{{Times: 1, Units: n / 4}, {Times: 2, Units: n / 4}, {Times: 3, Units: n / 4}}
	if len(tab.Samples) != 1 || !reflect.DeepEqual(tab.Samples[0].Counts.Classes(), want) {
		t.Errorf("got %v", tab.Samples)
	}
}

func itoa(i int) string {
	var buf [20]byte
	k := len(buf)
	for {
		k--
		buf[k] = byte('0' + i%10)
		i /= 10
		if i == 0 {
			return string(buf[k:])
		}
	}
}
