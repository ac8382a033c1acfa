package main

import (
	"bufio"
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
)

// readsGolden is the output of scripts/reads_reference.py: per case, the
// frequency counts and summary columns an independent implementation of
// the DESIGN.md counting rules (pysam 0.20.0, Debian python3-pysam)
// computes on the fixtures of testdata/reads/.
type readsGolden struct {
	counts  map[string][]string // case -> sorted "sample\ttimes\tunits"
	columns map[string][]string // case -> sorted "sample\trecords\tused\toptical"
}

func loadReadsGolden(t *testing.T, path string) readsGolden {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	g := readsGolden{counts: map[string][]string{}, columns: map[string][]string{}}
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		if line == "" || line[0] == '#' {
			continue
		}
		f := strings.Split(line, "\t")
		switch f[0] {
		case "counts":
			g.counts[f[1]] = append(g.counts[f[1]], strings.Join(f[2:], "\t"))
		case "columns":
			g.columns[f[1]] = append(g.columns[f[1]], strings.Join(f[2:], "\t"))
		}
	}
	for _, m := range []map[string][]string{g.counts, g.columns} {
		for _, v := range m {
			sort.Strings(v)
		}
	}
	return g
}

// readsCases reads a cases file: case name, tab, arguments.
func readsCases(t *testing.T, path string) [][2]string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var out [][2]string
	for _, line := range strings.Split(string(b), "\n") {
		if line == "" || line[0] == '#' {
			continue
		}
		c, args, ok := strings.Cut(line, "\t")
		if !ok {
			t.Fatalf("%s: bad line %q", path, line)
		}
		out = append(out, [2]string{c, args})
	}
	return out
}

// runReadsCase runs `headroom reads` on one case and returns its counts
// and columns rows, sorted, in the golden's layout.
func runReadsCase(t *testing.T, dir, args string, threads int) (counts, columns []string, summary string) {
	t.Helper()
	tmp := t.TempDir()
	saved := filepath.Join(tmp, "counts.tsv")
	out := filepath.Join(tmp, "summary.tsv")
	argv := []string{"reads", "--bootstrap", "0", "--threads", fmt.Sprint(threads), "--progress", "never", "--save-counts", saved, "-o", out}
	files := strings.Fields(args)
	for i, a := range files {
		if !strings.HasPrefix(a, "-") && (i == 0 || !strings.HasPrefix(files[i-1], "--")) {
			a = filepath.Join(dir, a)
		}
		argv = append(argv, a)
	}
	// Sample names come from base names, so run where the paths are.
	var stdout, stderr bytes.Buffer
	code := run(argv, strings.NewReader(""), &stdout, &stderr)
	if code != 0 {
		t.Fatalf("reads %s: exit %d: %s", args, code, stderr.String())
	}
	c, err := os.ReadFile(saved)
	if err != nil {
		t.Fatal(err)
	}
	for _, l := range strings.Split(strings.TrimSpace(string(c)), "\n")[1:] {
		if strings.HasSuffix(l, "\t0") {
			continue // an empty sample may be written as one class of 0 units
		}
		counts = append(counts, l)
	}
	s, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(s)), "\n")
	head := strings.Split(lines[0], "\t")
	col := map[string]int{}
	for i, h := range head {
		col[h] = i
	}
	for _, k := range []string{"sample", "records", "used_fragments", "optical_dups"} {
		if _, ok := col[k]; !ok {
			t.Fatalf("summary has no column %q: %s", k, lines[0])
		}
	}
	for _, l := range lines[1:] {
		f := strings.Split(l, "\t")
		columns = append(columns, strings.Join([]string{f[col["sample"]], f[col["records"]], f[col["used_fragments"]], f[col["optical_dups"]]}, "\t"))
	}
	sort.Strings(counts)
	sort.Strings(columns)
	return counts, columns, string(s)
}

func diffRows(t *testing.T, what string, got, want []string) {
	t.Helper()
	if strings.Join(got, "\n") == strings.Join(want, "\n") {
		return
	}
	gs := map[string]bool{}
	for _, g := range got {
		gs[g] = true
	}
	ws := map[string]bool{}
	for _, w := range want {
		ws[w] = true
	}
	var miss, extra []string
	for _, w := range want {
		if !gs[w] {
			miss = append(miss, w)
		}
	}
	for _, g := range got {
		if !ws[g] {
			extra = append(extra, g)
		}
	}
	t.Errorf("%s differ from the pysam reference:\n missing (want, not got): %q\n extra (got, not wanted): %q", what, miss, extra)
}

// TestReadsMatchPysamReference compares headroom's frequency counts and
// summary columns with scripts/reads_reference.py (pysam 0.20.0) on every
// fixture format: sorted BAM, unsorted BAM, a BAM whose header claims
// coordinate order falsely, SAM, SAM.gz, paired FASTQ (gzip + BGZF),
// single FASTQ; for --threads 1 and 2.
func TestReadsMatchPysamReference(t *testing.T) {
	dir := filepath.Join("..", "..", "testdata", "reads")
	g := loadReadsGolden(t, filepath.Join(dir, "reference_golden.tsv"))
	compareReadsCases(t, dir, filepath.Join(dir, "reference_cases.tsv"), g, func(t *testing.T, name, summary string) {
		if len(g.counts[name]) == 0 {
			t.Errorf("no golden counts for case %s: rerun scripts/reads_reference.py", name)
		}
		if name == "bam_liar" && !strings.Contains(summary, "counted by hashing instead") {
			t.Errorf("a falsely sorted BAM must be noted; summary:\n%s", summary)
		}
	})
}

// compareReadsCases runs every case of the cases file (inputs relative to
// dir) with --threads 1 and 2 and compares its frequency counts and
// columns with the golden g (every case has golden columns; counts may
// be empty where nothing is counted); check, if not nil, adds its own.
func compareReadsCases(t *testing.T, dir, cases string, g readsGolden, check func(t *testing.T, name, summary string)) {
	for _, c := range readsCases(t, cases) {
		for _, threads := range []int{1, 2} {
			t.Run(fmt.Sprintf("%s/threads=%d", c[0], threads), func(t *testing.T) {
				if len(g.columns[c[0]]) == 0 {
					t.Fatalf("no golden for case %s: rerun scripts/reads_reference.py", c[0])
				}
				counts, columns, summary := runReadsCase(t, dir, c[1], threads)
				diffRows(t, "frequency counts", counts, g.counts[c[0]])
				diffRows(t, "records/used_fragments/optical_dups", columns, g.columns[c[0]])
				if check != nil {
					check(t, c[0], summary)
				}
			})
		}
	}
}
