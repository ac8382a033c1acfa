package main

import (
	"bytes"
	"compress/gzip"
	"encoding/binary"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func readsFixture(t *testing.T, name string) []byte {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "reads", name))
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func gzipBytes(t *testing.T, b []byte) []byte {
	t.Helper()
	var buf bytes.Buffer
	z := gzip.NewWriter(&buf)
	z.Write(b)
	z.Close()
	return buf.Bytes()
}

const samHead = "@HD\tVN:1.6\tSO:unsorted\n@SQ\tSN:chr1\tLN:10000\n"

// TestReadsBadInput: every kind of bad input of the issue gives exit 1 and
// one line "headroom: FILE[:LINE]: ..." naming the file (and the line or
// record), never a panic, and leaves an existing -o file untouched.
func TestReadsBadInput(t *testing.T) {
	bam := readsFixture(t, "sorted.bam")
	firstBlock := int(binary.LittleEndian.Uint16(bam[16:])) + 1
	crc := append([]byte(nil), bam...)
	crc[firstBlock-8] ^= 0xff // CRC32 of the first BGZF block
	fq := "@r1/1\nACGT\n+\nIIII\n@r2/1\nACGA\n+\nIIII\n"
	var many strings.Builder
	for i := 0; i < 5000; i++ {
		fmt.Fprintf(&many, "@read%d\n%s\n+\n%s\n", i*7919%10007, strings.Repeat("ACGT"[i%4:i%4+1], 1+i%13), strings.Repeat("I", 1+i%13))
	}
	gzMany := gzipBytes(t, []byte(many.String()))
	cases := []struct {
		name  string
		files map[string][]byte
		args  []string
		want  []string // substrings of the one error line
	}{
		{"empty", map[string][]byte{"e.bam": nil}, []string{"e.bam"}, []string{"e.bam:", "empty"}},
		{"random bytes", map[string][]byte{"r.bin": []byte("\x00\x01\x02garbage\xff\xfe not a read file")}, []string{"r.bin"}, []string{"r.bin:", "not BAM, SAM or FASTQ"}},
		{"CRAM", map[string][]byte{"x.cram": []byte("CRAM\x03\x00rest")}, []string{"x.cram"}, []string{"x.cram:", "convert it to BAM"}},
		{"BGZF cut mid-block", map[string][]byte{"cut.bam": bam[:len(bam)/2]}, []string{"cut.bam"}, []string{"cut.bam:", "truncated"}},
		{"BGZF without EOF block", map[string][]byte{"noeof.bam": bam[:len(bam)-28]}, []string{"noeof.bam"}, []string{"noeof.bam:", "end-of-file marker missing"}},
		{"BGZF CRC", map[string][]byte{"crc.bam": crc}, []string{"crc.bam"}, []string{"crc.bam:", "corrupted"}},
		{"gzip cut", map[string][]byte{"c.fastq.gz": gzMany[:len(gzMany)/2]}, []string{"c.fastq.gz"}, []string{"c.fastq.gz", "truncated"}},
		{"SAM too few fields", map[string][]byte{"f.sam": []byte(samHead + "r1\t0\tchr1\t100\t60\t10M\n")}, []string{"f.sam"}, []string{"f.sam:3:", "6 tab-separated fields"}},
		{"SAM POS", map[string][]byte{"p.sam": []byte(samHead + "r1\t0\tchr1\tx100\t60\t10M\t*\t0\t0\t*\t*\n")}, []string{"p.sam"}, []string{"p.sam:3:", "POS"}},
		{"SAM CIGAR", map[string][]byte{"c.sam": []byte(samHead + "r1\t0\tchr1\t100\t60\t10Q\t*\t0\t0\t*\t*\n")}, []string{"c.sam"}, []string{"c.sam:3:", "CIGAR"}},
		{"SAM reference", map[string][]byte{"u.sam": []byte(samHead + "r1\t0\tchr9\t100\t60\t10M\t*\t0\t0\t*\t*\n")}, []string{"u.sam"}, []string{"u.sam:3:", `"chr9"`, "@SQ"}},
		{"FASTQ no quality", map[string][]byte{"q.fq": []byte("@r1\nACGT\n+\nIIII\n@r2\nACGT\n+\n")}, []string{"q.fq"}, []string{"q.fq:5:", "quality"}},
		{"FASTQ lengths", map[string][]byte{"l.fq": []byte("@r1\nACGT\n+\nIII\n")}, []string{"l.fq"}, []string{"l.fq:4:", "quality has 3"}},
		{"FASTQ no @", map[string][]byte{"a.fq": []byte("@r1\nACGT\n+\nIIII\nr2\nACGT\n+\nIIII\n")}, []string{"a.fq"}, []string{"a.fq:5:", "'@'"}},
		{"pair lengths", map[string][]byte{"p_1.fq": []byte(fq), "p_2.fq": []byte(strings.ReplaceAll(fq, "/1", "/2")[:18])}, []string{"p_1.fq", "p_2.fq"}, []string{"p_1.fq:5:", "more records than p_2.fq"}},
		{"pair out of step", map[string][]byte{"s_1.fq": []byte(fq), "s_2.fq": []byte("@r1/2\nACGT\n+\nIIII\n@r3/2\nACGA\n+\nIIII\n")}, []string{"s_1.fq", "s_2.fq"}, []string{"s_2.fq:5:", "out of step"}},
		{"not a file", map[string][]byte{}, []string{"missing.bam"}, []string{"missing.bam:", "cannot open"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			for n, b := range c.files {
				if err := os.WriteFile(filepath.Join(dir, n), b, 0o644); err != nil {
					t.Fatal(err)
				}
			}
			out := filepath.Join(dir, "summary.tsv")
			os.WriteFile(out, []byte("old\n"), 0o644)
			wd, _ := os.Getwd()
			if err := os.Chdir(dir); err != nil {
				t.Fatal(err)
			}
			defer os.Chdir(wd)
			var stdout, stderr bytes.Buffer
			args := append([]string{"reads", "--bootstrap", "0", "-o", out, "--save-counts", "c.tsv"}, c.args...)
			code := run(args, strings.NewReader(""), &stdout, &stderr)
			msg := stderr.String()
			if code != exitInput {
				t.Fatalf("exit %d, want %d; stderr %q", code, exitInput, msg)
			}
			if strings.Count(msg, "\n") != 1 || !strings.HasPrefix(msg, "headroom: ") {
				t.Errorf("want one line starting with 'headroom: ', got %q", msg)
			}
			for _, w := range c.want {
				if !strings.Contains(msg, w) {
					t.Errorf("message %q lacks %q", msg, w)
				}
			}
			if b, _ := os.ReadFile(out); string(b) != "old\n" {
				t.Errorf("-o file changed to %q", b)
			}
			if _, err := os.Stat("c.tsv"); err == nil {
				t.Errorf("--save-counts file written despite the error")
			}
		})
	}
}

// TestReadsStdinAndUsage: '-' reads standard input; flag mistakes exit 2.
func TestReadsStdinAndUsage(t *testing.T) {
	sam := readsFixture(t, "sorted.sam")
	var stdout, stderr bytes.Buffer
	code := run([]string{"reads", "--bootstrap", "0", "--progress", "never", "-"}, bytes.NewReader(sam), &stdout, &stderr)
	if code != 0 {
		t.Fatalf("stdin: exit %d: %s", code, stderr.String())
	}
	if !strings.Contains(stdout.String(), "\nLIB-A\t") || !strings.Contains(stdout.String(), "\nstdin\t") {
		t.Errorf("stdin summary lacks LIB-A or the stdin sample:\n%s", stdout.String())
	}
	if !strings.Contains(strings.SplitN(stdout.String(), "\n", 2)[0], "\trecords\tused_fragments\toptical_dups\tmethod\t") {
		t.Errorf("extra columns missing or misplaced: %s", strings.SplitN(stdout.String(), "\n", 2)[0])
	}
	// A falsely sorted BAM on stdin cannot be re-read: it is an error.
	stderr.Reset()
	code = run([]string{"reads", "--bootstrap", "0", "-"}, bytes.NewReader(readsFixture(t, "liar.bam")), &stdout, &stderr)
	if code != exitInput || !strings.Contains(stderr.String(), "not in coordinate order") {
		t.Errorf("falsely sorted stdin: exit %d, %q", code, stderr.String())
	}
	for _, args := range [][]string{
		{"reads"},
		{"reads", "--by", "lane", "x.bam"},
		{"reads", "--umi", "tag", "x.bam"},
		{"reads", "--mode", "fast", "x.bam"},
		{"reads", "--max-memory", "lots", "x.bam"},
		{"reads", "--min-mapq", "-1", "x.bam"},
		{"reads", "-", "-"},
	} {
		stderr.Reset()
		if code := run(args, strings.NewReader(""), &stdout, &stderr); code != exitUsage {
			t.Errorf("%q: exit %d, want %d (%s)", args, code, exitUsage, stderr.String())
		}
	}
	stdout.Reset()
	if code := run([]string{"reads", "--help"}, nil, &stdout, &stderr); code != 0 || !strings.Contains(stdout.String(), "--optical-distance") {
		t.Errorf("--help: exit %d, %q", code, stdout.String())
	}
}

// TestReadsBudgetAndProgress: a memory budget too small for the demo BAM
// switches to hash subsampling and says so in notes; --progress always
// draws on stderr only, leaving stdout the same.
func TestReadsBudgetAndProgress(t *testing.T) {
	demo := filepath.Join("..", "..", "testdata", "demo", "qc_run.bam")
	var full, small, stderr bytes.Buffer
	if code := run([]string{"reads", "--bootstrap", "0", "--mode", "hashed", "--progress", "never", demo}, nil, &full, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	if code := run([]string{"reads", "--bootstrap", "0", "--mode", "hashed", "--max-memory", "200k", "--progress", "never", demo}, nil, &small, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	if !strings.Contains(small.String(), "memory budget --max-memory 200k reached") {
		t.Errorf("no subsampling note:\n%s", small.String())
	}
	if strings.Contains(full.String(), "memory budget") {
		t.Errorf("subsampling note without a budget:\n%s", full.String())
	}
	var withBar bytes.Buffer
	stderr.Reset()
	if code := run([]string{"reads", "--bootstrap", "0", "--progress", "always", demo}, nil, &withBar, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	var sorted bytes.Buffer
	run([]string{"reads", "--bootstrap", "0", "--progress", "never", demo}, nil, &sorted, io.Discard)
	if withBar.String() != sorted.String() {
		t.Errorf("--progress always changed stdout")
	}
	if stderr.Len() == 0 {
		t.Errorf("--progress always drew nothing on stderr")
	}
}
