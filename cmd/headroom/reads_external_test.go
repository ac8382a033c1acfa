package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestReadsDebianFiles compares headroom with scripts/reads_reference.py
// (pysam 0.20.0) on real files from the Debian packages covtobed-examples
// 1.3.5+dfsg-1 and drop-seq-testdata 2.5.2+dfsg-1, fetched into
// testdata/external by scripts/fetch_real_data.sh. Golden:
// testdata/reads/external_golden.tsv.
func TestReadsDebianFiles(t *testing.T) {
	ext := filepath.Join("..", "..", "testdata", "external")
	vers, err := os.ReadFile(filepath.Join(ext, "VERSIONS"))
	if err != nil {
		t.Skip("real Debian files absent: run `sh scripts/fetch_real_data.sh` (needs apt-get and dpkg) to fetch them into testdata/external")
	}
	golden := filepath.Join("..", "..", "testdata", "reads", "external_golden.tsv")
	gb, err := os.ReadFile(golden)
	if err != nil {
		t.Fatal(err)
	}
	for _, l := range strings.Split(strings.TrimSpace(string(vers)), "\n") {
		if !strings.Contains(string(gb), "# "+l) {
			t.Skipf("testdata/external holds %q, the golden was computed for other package versions; rerun scripts/reads_reference.py --cases testdata/reads/external_cases.tsv --dir testdata/external", l)
		}
	}
	g := loadReadsGolden(t, golden)
	compareReadsCases(t, ext, filepath.Join("..", "..", "testdata", "reads", "external_cases.tsv"), g, nil)
}
