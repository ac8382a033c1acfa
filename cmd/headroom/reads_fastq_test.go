package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// fastqMates writes n read pairs of an invented run: read i has the
// sequence of molecule i%mols, so each molecule is sequenced n/mols
// times. style says how names carry the mate: "slash" (/1, /2) or
// "casava" (" 1:N:0:ACGT", the CASAVA 1.8 comment; common practice).
func fastqMates(n, mols, start int, style string) (r1, r2 string) {
	var a, b strings.Builder
	bases := "ACGT"
	for i := start; i < start+n; i++ {
		m := i % mols
		s1, s2 := make([]byte, 30), make([]byte, 30)
		for j := range s1 {
			s1[j] = bases[(m>>(j%10)+j)%4]
			s2[j] = bases[(m*7>>(j%9)+3*j)%4]
		}
		name := fmt.Sprintf("SIM01:4:FCB7:1:1101:%d:%d", 1000+i, 2000+i)
		q := strings.Repeat("I", 30)
		if style == "slash" {
			fmt.Fprintf(&a, "@%s/1\n%s\n+\n%s\n", name, s1, q)
			fmt.Fprintf(&b, "@%s/2\n%s\n+\n%s\n", name, s2, q)
		} else {
			fmt.Fprintf(&a, "@%s 1:N:0:ACGT\n%s\n+\n%s\n", name, s1, q)
			fmt.Fprintf(&b, "@%s 2:N:0:ACGT\n%s\n+\n%s\n", name, s2, q)
		}
	}
	return a.String(), b.String()
}

// interleave puts the records of two mate files in turn.
func interleave(r1, r2 string) string {
	l1, l2 := strings.Split(r1, "\n"), strings.Split(r2, "\n")
	var b strings.Builder
	for i := 0; i+4 <= len(l1)-1; i += 4 {
		b.WriteString(strings.Join(l1[i:i+4], "\n") + "\n")
		b.WriteString(strings.Join(l2[i:i+4], "\n") + "\n")
	}
	return b.String()
}

// runReadsIn writes files into a temporary folder and runs `headroom reads`
// there, returning the exit code, summary rows by sample and stderr.
func runReadsIn(t *testing.T, files map[string]string, args ...string) (int, map[string][]string, string) {
	t.Helper()
	dir := t.TempDir()
	for n, b := range files {
		if err := os.WriteFile(filepath.Join(dir, n), []byte(b), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	wd, _ := os.Getwd()
	if err := os.Chdir(dir); err != nil {
		t.Fatal(err)
	}
	defer os.Chdir(wd)
	var stdout, stderr bytes.Buffer
	code := run(append([]string{"reads", "--bootstrap", "0", "--progress", "never"}, args...), strings.NewReader(""), &stdout, &stderr)
	rows := map[string][]string{}
	lines := strings.Split(strings.TrimSpace(stdout.String()), "\n")
	if len(lines) > 1 {
		head := strings.Split(lines[0], "\t")
		for _, l := range lines[1:] {
			f := strings.Split(l, "\t")
			for i, h := range head {
				if i < len(f) {
					rows[f[0]] = append(rows[f[0]], h+"="+f[i])
				}
			}
		}
	}
	return code, rows, stderr.String()
}

func rowField(row []string, key string) string {
	for _, kv := range row {
		if k, v, _ := strings.Cut(kv, "="); k == key {
			return v
		}
	}
	return ""
}

// TestReadsFASTQLayouts: mates pair by read name whatever the argument
// order and naming convention, interleaved files are read as pairs, lanes
// of one sample are one library named after the sample, and the counts
// agree with the plain R1 R2 run (every layout holds the same fragments:
// 400 pairs of 100 molecules, 4 copies each).
func TestReadsFASTQLayouts(t *testing.T) {
	r1, r2 := fastqMates(400, 100, 0, "slash")
	c1, c2 := fastqMates(400, 100, 0, "casava")
	l1a, l2a := fastqMates(200, 100, 0, "casava")
	l1b, l2b := fastqMates(200, 100, 200, "casava")
	cases := []struct {
		name   string
		files  map[string]string
		args   []string
		sample string
	}{
		{"R1 R2", map[string]string{"a_1.fq": r1, "a_2.fq": r2}, []string{"a_1.fq", "a_2.fq"}, "a_1.fq"},
		{"R2 R1", map[string]string{"a_1.fq": r1, "a_2.fq": r2}, []string{"a_2.fq", "a_1.fq"}, "a_1.fq"},
		{"casava comments, R2 first", map[string]string{"b_1.fq": c1, "b_2.fq": c2}, []string{"b_2.fq", "b_1.fq"}, "b_1.fq"},
		{"interleaved", map[string]string{"i.fq": interleave(r1, r2)}, []string{"i.fq"}, "i.fq"},
		{"lanes R1 R1 R2 R2", map[string]string{
			"LIB7_S3_L001_R1_001.fastq": l1a, "LIB7_S3_L002_R1_001.fastq": l1b,
			"LIB7_S3_L001_R2_001.fastq": l2a, "LIB7_S3_L002_R2_001.fastq": l2b},
			[]string{"LIB7_S3_L001_R1_001.fastq", "LIB7_S3_L002_R1_001.fastq", "LIB7_S3_L001_R2_001.fastq", "LIB7_S3_L002_R2_001.fastq"}, "LIB7"},
		{"--sample", map[string]string{"a_1.fq": r1, "a_2.fq": r2}, []string{"--sample", "liver-3", "a_1.fq", "a_2.fq"}, "liver-3"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, rows, stderr := runReadsIn(t, c.files, c.args...)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, stderr)
			}
			if len(rows) != 1 || rows[c.sample] == nil {
				t.Fatalf("rows %v, want one named %q", rows, c.sample)
			}
			row := rows[c.sample]
			if got := rowField(row, "records"); got != "800" {
				t.Errorf("records %s, want 800", got)
			}
			if got := rowField(row, "distinct"); got != "100" {
				t.Errorf("distinct %s, want 100", got)
			}
			if n := rowField(row, "notes"); strings.Contains(n, "single-end") {
				t.Errorf("notes say single-end: %s", n)
			}
		})
	}
}

// TestReadsFASTQUnpairable: mates that cannot be paired, an odd
// interleaved file and --cell-tag with FASTQ stop with one line naming
// the file(s); a bad --umi-tag is a usage error.
func TestReadsFASTQUnpairable(t *testing.T) {
	r1, r2 := fastqMates(40, 10, 0, "slash")
	_, other := fastqMates(40, 10, 7, "slash")
	inter := interleave(r1, r2)
	odd := strings.Join(strings.Split(inter, "\n")[:4*79], "\n") + "\n"
	cases := []struct {
		name  string
		files map[string]string
		args  []string
		code  int
		want  []string
	}{
		{"lane mates disagree", map[string]string{"S_S1_L001_R1_001.fastq": r1, "S_S1_L001_R2_001.fastq": other},
			[]string{"S_S1_L001_R1_001.fastq", "S_S1_L001_R2_001.fastq"}, exitInput,
			[]string{"S_S1_L001_R1_001.fastq and S_S1_L001_R2_001.fastq", "cannot be paired", "SIM01:4:FCB7:1:1101:1007:2007"}},
		{"odd interleaved", map[string]string{"odd.fq": odd}, []string{"odd.fq"}, exitInput, []string{"odd.fq:313:", "odd number of records"}},
		{"same mate twice", map[string]string{"x_1.fq": r1, "y_1.fq": r1}, []string{"x_1.fq", "y_1.fq"}, exitInput, []string{"y_1.fq:", "both start with mate 1"}},
		{"cell tag on FASTQ", map[string]string{"a.fq": r1}, []string{"--cell-tag", "CB", "a.fq"}, exitInput, []string{"a.fq:", "--cell-tag CB needs aligned input"}},
		{"bad umi tag", map[string]string{"a.fq": r1}, []string{"--umi-tag", "R!", "a.fq"}, exitUsage, []string{"--umi-tag", `"R!"`}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, _, msg := runReadsIn(t, c.files, c.args...)
			if code != c.code {
				t.Fatalf("exit %d, want %d: %s", code, c.code, msg)
			}
			if strings.Count(msg, "\n") != 1 {
				t.Errorf("want one line, got %q", msg)
			}
			for _, w := range c.want {
				if !strings.Contains(msg, w) {
					t.Errorf("message %q lacks %q", msg, w)
				}
			}
		})
	}
}

// TestReadsPatternedFlowCell: names of a patterned flow cell switch the
// optical distance to 2500 px with a note, unless --optical-distance was
// given. Each of 200 molecules is read twice, the second read 1,000 px
// from the first on the same tile: optical duplicates on a patterned flow
// cell, 200 of them at 2500 px and none at 100 px.
func TestReadsPatternedFlowCell(t *testing.T) {
	var b strings.Builder
	for i := 0; i < 200; i++ {
		s := fmt.Sprintf("%020b", i*2654435761%1048576)
		s = strings.NewReplacer("0", "A", "1", "C").Replace(s) + "GTGTGTGTGT"
		for c := 0; c < 2; c++ {
			fmt.Fprintf(&b, "@INV02:12:HVKNWDSXY:1:2471:%d:%d 1:N:0:ACGT\n%s\n+\n%s\n", 2000+i*10+c*1000, 5000, s, strings.Repeat("F", len(s)))
		}
	}
	files := map[string]string{"p.fq": b.String()}
	code, rows, msg := runReadsIn(t, files, "p.fq")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, msg)
	}
	row := rows["p.fq"]
	if got := rowField(row, "optical_dups"); got != "200" {
		t.Errorf("optical_dups %s, want 200", got)
	}
	if n := rowField(row, "notes"); !strings.Contains(n, "patterned flow cell (flow cell HVKNWDSXY, tile 2471): optical duplicates within 2500 px") {
		t.Errorf("no patterned note: %s", n)
	}
	_, rows, _ = runReadsIn(t, files, "--optical-distance", "100", "p.fq")
	if got, n := rowField(rows["p.fq"], "optical_dups"), rowField(rows["p.fq"], "notes"); got != "0" || strings.Contains(n, "patterned") {
		t.Errorf("--optical-distance 100: optical_dups %s, notes %s", got, n)
	}
}

// TestReadsFASTQErrorNote: reads with 3% substitution errors per base
// (300 molecules, 3,000 pairs) are merged back towards their molecules
// and the notes call the data error-dominated; error-free copies are not.
func TestReadsFASTQErrorNote(t *testing.T) {
	rng := uint64(88172645463325252) // xorshift64 (Marsaglia 2003), a fixed stream
	next := func() uint64 { rng ^= rng << 13; rng ^= rng >> 7; rng ^= rng << 17; return rng }
	mols := make([][]byte, 300)
	for i := range mols {
		mols[i] = make([]byte, 60)
		for j := range mols[i] {
			mols[i][j] = "ACGT"[next()%4]
		}
	}
	write := func(rate uint64) (string, string) {
		var a, b strings.Builder
		for i := 0; i < 3000; i++ {
			m := append([]byte(nil), mols[next()%300]...)
			for j := range m {
				if next()%1000 < rate {
					m[j] = "ACGT"[(strings.IndexByte("ACGT", m[j])+1+int(next()%3))%4]
				}
			}
			fmt.Fprintf(&a, "@x%d/1\n%s\n+\n%s\n", i, m[:30], strings.Repeat("I", 30))
			fmt.Fprintf(&b, "@x%d/2\n%s\n+\n%s\n", i, m[30:], strings.Repeat("I", 30))
		}
		return a.String(), b.String()
	}
	for _, c := range []struct {
		rate  uint64 // per thousand bases
		noisy bool
	}{{30, true}, {0, false}} {
		r1, r2 := write(c.rate)
		code, rows, msg := runReadsIn(t, map[string]string{"e_1.fq": r1, "e_2.fq": r2}, "e_1.fq", "e_2.fq")
		if code != 0 {
			t.Fatalf("exit %d: %s", code, msg)
		}
		notes := rowField(rows["e_1.fq"], "notes")
		if got := strings.Contains(notes, "error-dominated"); got != c.noisy {
			t.Errorf("%d‰ errors: error-dominated note %v, want %v: %s", c.rate, got, c.noisy, notes)
		}
	}
}
