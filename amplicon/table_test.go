package amplicon

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"headroom/complexity"
)

var taxaDir = filepath.Join("..", "testdata", "taxa")

// goldenFreq reads per-sample frequency counts computed by numpy.bincount
// in scripts/taxa_reference.py (testdata/taxa/*_freq.tsv), and the sample
// order of the matching *_alpha.tsv.
func goldenFreq(t *testing.T, prefix string) (order []string, freq map[string][]complexity.Class) {
	t.Helper()
	freq = map[string][]complexity.Class{}
	each := func(name string, fn func([]string)) {
		f, err := os.Open(filepath.Join(taxaDir, name))
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		sc := bufio.NewScanner(f)
		head := true
		for sc.Scan() {
			if strings.HasPrefix(sc.Text(), "#") {
				continue
			}
			if head {
				head = false
				continue
			}
			fn(strings.Split(sc.Text(), "\t"))
		}
	}
	each(prefix+"_freq.tsv", func(r []string) {
		j, _ := strconv.ParseInt(r[1], 10, 64)
		u, _ := strconv.ParseInt(r[2], 10, 64)
		freq[r[0]] = append(freq[r[0]], complexity.Class{Times: j, Units: u})
	})
	each(prefix+"_alpha.tsv", func(r []string) { order = append(order, r[0]) })
	return order, freq
}

func readFile(t *testing.T, path string, opt Options) *Table {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	tab, err := Read(f, opt)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return tab
}

func checkTable(t *testing.T, what string, tab *Table, order []string, freq map[string][]complexity.Class) {
	t.Helper()
	if len(tab.Samples) != len(order) {
		t.Fatalf("%s: %d samples, want %d", what, len(tab.Samples), len(order))
	}
	for i, s := range tab.Samples {
		if s.Name != order[i] {
			t.Errorf("%s: sample %d is %q, want %q", what, i, s.Name, order[i])
		}
		got := s.Counts.Classes()
		want := freq[order[i]]
		if len(got) == 0 && len(want) == 0 {
			continue
		}
		if !reflect.DeepEqual(got, want) {
			t.Errorf("%s: sample %s counts\n got %v\nwant %v (numpy.bincount)", what, s.Name, got, want)
		}
	}
}

// All layouts of the generated table give the frequency counts numpy
// computed from the same matrix.
func TestLayoutsAgreeWithNumpy(t *testing.T) {
	order, freq := goldenFreq(t, "skbio")
	for _, tc := range []struct {
		file   string
		format string
		layout Layout
		notes  int
	}{
		{"gen_taxa_rows.tsv", "tsv", TaxaAsRows, 1},
		{"gen_samples_rows.csv", "csv", SamplesAsRows, 2},
		{"gen_dense.biom", "biom-dense", TaxaAsRows, 0},
		{"gen_sparse.biom", "biom-sparse", TaxaAsRows, 0},
	} {
		tab := readFile(t, filepath.Join(taxaDir, tc.file), Options{})
		if tab.Format != tc.format || tab.Layout != tc.layout {
			t.Errorf("%s: format %q layout %v, want %q %v", tc.file, tab.Format, tab.Layout, tc.format, tc.layout)
		}
		if tab.Taxa != 300 {
			t.Errorf("%s: %d taxa, want 300", tc.file, tab.Taxa)
		}
		if len(tab.Notes) != tc.notes {
			t.Errorf("%s: notes %q, want %d", tc.file, tab.Notes, tc.notes)
		}
		checkTable(t, tc.file, tab, order, freq)
	}
}

// gzip input reads the same.
func TestGzip(t *testing.T) {
	order, freq := goldenFreq(t, "skbio")
	for _, name := range []string{"gen_taxa_rows.tsv", "gen_sparse.biom"} {
		raw, err := os.ReadFile(filepath.Join(taxaDir, name))
		if err != nil {
			t.Fatal(err)
		}
		var b bytes.Buffer
		zw := gzip.NewWriter(&b)
		zw.Write(raw)
		zw.Close()
		tab, err := Read(bytes.NewReader(b.Bytes()), Options{})
		if err != nil {
			t.Fatalf("%s.gz: %v", name, err)
		}
		if !strings.HasSuffix(tab.Format, ".gz") {
			t.Errorf("%s.gz: format %q", name, tab.Format)
		}
		checkTable(t, name+".gz", tab, order, freq)
		// Cut short: an error, not a smaller table.
		if _, err := Read(bytes.NewReader(b.Bytes()[:b.Len()/2]), Options{}); !errors.Is(err, ErrTruncated) {
			t.Errorf("%s.gz cut in half: err = %v, want ErrTruncated", name, err)
		}
	}
}

// The real table Twins.csv (Debian r-bioc-dirichletmultinomial), fetched by
// scripts/fetch_taxa_data.sh, against numpy's bincount of the same file.
func TestTwins(t *testing.T) {
	path := filepath.Join(taxaDir, "external", "Twins.csv")
	if _, err := os.Stat(path); err != nil {
		t.Skip("testdata/taxa/external/Twins.csv absent: run sh scripts/fetch_taxa_data.sh to fetch it from Debian")
	}
	order, freq := goldenFreq(t, "twins")
	tab := readFile(t, path, Options{})
	if tab.Layout != TaxaAsRows || tab.Taxa != 130 || len(tab.Samples) != 278 {
		t.Errorf("Twins.csv: layout %v, %d taxa, %d samples; want taxa as rows, 130, 278", tab.Layout, tab.Taxa, len(tab.Samples))
	}
	checkTable(t, "Twins.csv", tab, order, freq)
}
