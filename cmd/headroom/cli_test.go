package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runCLI runs the command line in-process and returns exit code, stdout
// and stderr.
func runCLI(t *testing.T, stdin string, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, strings.NewReader(stdin), &out, &errb)
	return code, out.String(), errb.String()
}

func writeFile(t *testing.T, dir, name, body string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

const goodTable = "sample\ttimes_seen\tunits\nA\t1\t100\nA\t2\t30\nA\t3\t10\n"

// TestCountsBadInput: each malformed table gets exit 1, one line on stderr
// naming the file and line, and leaves an existing -o file untouched.
func TestCountsBadInput(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		name, body, want string
	}{
		{"empty", "", "empty file"},
		{"noheader", "A\t1\t100\n", ":1: missing header"},
		{"times0", "sample\ttimes_seen\tunits\nA\t0\t5\n", ":2: column 2: times_seen"},
		{"timesneg", "sample\ttimes_seen\tunits\nA\t-3\t5\n", ":2: column 2: times_seen"},
		{"unitsfrac", "sample\ttimes_seen\tunits\nA\t1\t2.5\n", ":2: column 3: units must be a whole number"},
		{"unitsneg", "sample\ttimes_seen\tunits\nA\t1\t-2\n", ":2: column 3: units"},
		{"repeat", "sample\ttimes_seen\tunits\nA\t1\t5\nA\t2\t1\nA\t1\t3\n", ":4: column 2: this (sample, times_seen) pair was already given"},
		{"huge", "sample\ttimes_seen\tunits\nA\t1\t99999999999999999999\n", ":2: column 3: number too large"},
		{"overflow", "sample\ttimes_seen\tunits\nA\t4611686018427387904\t3\n", ":2: column 3: total reads"},
		{"fields", "sample\ttimes_seen\tunits\nA\t1\n", ":2: expected 3 tab-separated fields"},
		{"headeronly", "sample\ttimes_seen\tunits\n", "no rows"},
	}
	out := writeFile(t, dir, "keep.tsv", "old contents\n")
	for _, c := range cases {
		p := writeFile(t, dir, c.name+".tsv", c.body)
		code, stdout, stderr := runCLI(t, "", "counts", "--bootstrap", "0", "-o", out, p)
		if code != exitInput {
			t.Errorf("%s: exit %d, want 1 (stderr %q)", c.name, code, stderr)
		}
		if !strings.Contains(stderr, p) || !strings.Contains(stderr, c.want) {
			t.Errorf("%s: stderr %q, want file name and %q", c.name, stderr, c.want)
		}
		if strings.Count(stderr, "\n") != 1 || !strings.HasPrefix(stderr, "headroom: ") {
			t.Errorf("%s: stderr is not one headroom: line: %q", c.name, stderr)
		}
		if stdout != "" {
			t.Errorf("%s: stdout not empty: %q", c.name, stdout)
		}
		if b, _ := os.ReadFile(out); string(b) != "old contents\n" {
			t.Errorf("%s: existing output changed to %q", c.name, b)
		}
	}
	// Missing file, directory.
	for _, c := range []struct{ arg, want string }{
		{filepath.Join(dir, "nope.tsv"), "no such file"},
		{dir, "is a directory"},
	} {
		code, _, stderr := runCLI(t, "", "counts", c.arg)
		if code != exitInput || !strings.Contains(stderr, c.want) {
			t.Errorf("%s: exit %d stderr %q, want 1 and %q", c.arg, code, stderr, c.want)
		}
	}
	if ents, _ := os.ReadDir(dir); len(ents) != len(cases)+1 {
		t.Errorf("temporary files left behind: %d entries", len(ents))
	}
}

// TestUsageErrors: command-line mistakes exit 2 with a usage line.
func TestUsageErrors(t *testing.T) {
	dir := t.TempDir()
	p := writeFile(t, dir, "t.tsv", goodTable)
	for _, args := range [][]string{
		{},
		{"frobnicate"},
		{"counts", "--no-such-flag", p},
		{"counts", "--at", "10y", p},
		{"counts", "--at", "-5x", p},
		{"counts", "--threads", "-1", p},
		{"counts", "--level", "1.5", p},
		{"counts", "--format", "xml", p},
		{"counts"},
	} {
		code, _, stderr := runCLI(t, "", args...)
		if code != exitUsage {
			t.Errorf("%v: exit %d, want 2 (stderr %q)", args, code, stderr)
		}
		if !strings.Contains(stderr, "usage") && !strings.Contains(stderr, "headroom: ") {
			t.Errorf("%v: stderr %q lacks a message", args, stderr)
		}
	}
}

func TestParseDepth(t *testing.T) {
	for _, c := range []struct {
		in       string
		mult, ab float64
	}{
		{"10x", 10, 0}, {"2.5X", 2.5, 0}, {"50M", 0, 50e6}, {"2.5G", 0, 2.5e9}, {"1e8", 0, 1e8},
		{"40000000", 0, 4e7}, {"500k", 0, 5e5},
	} {
		d, err := parseDepth(c.in)
		if err != nil || d.multiple != c.mult || d.absolute != c.ab || d.label != c.in {
			t.Errorf("parseDepth(%q) = %+v, %v; want multiple %v absolute %v", c.in, d, err, c.mult, c.ab)
		}
	}
	for _, bad := range []string{"", "10y", "-5x", "0x", "x", "M", "-3", "1e400", "abc", "0.1"} {
		if _, err := parseDepth(bad); err == nil {
			t.Errorf("parseDepth(%q): no error", bad)
		}
	}
}

// TestCountsStdinAndSamples: '-' reads stdin; a sample given in two files
// is refused (merge adds shards).
func TestCountsStdinAndSamples(t *testing.T) {
	code, out, stderr := runCLI(t, goodTable, "counts", "--bootstrap", "0", "-")
	if code != 0 || !strings.HasPrefix(out, "sample\treads\tdistinct\t") || !strings.Contains(out, "\nA\t190\t140\t") {
		t.Fatalf("stdin: exit %d out %q err %q", code, out, stderr)
	}
	dir := t.TempDir()
	p := writeFile(t, dir, "a.tsv", goodTable)
	q := writeFile(t, dir, "b.tsv", goodTable)
	code, _, stderr = runCLI(t, "", "counts", p, q)
	if code != exitInput || !strings.Contains(stderr, "also in") {
		t.Errorf("duplicate sample: exit %d stderr %q", code, stderr)
	}
}

// TestMerge: shards add class-wise; different sample sets and repeated
// shards are refused.
func TestMerge(t *testing.T) {
	dir := t.TempDir()
	a := writeFile(t, dir, "a.tsv", "sample\ttimes_seen\tunits\nA\t1\t10\nA\t2\t3\nB\t1\t4\n")
	b := writeFile(t, dir, "b.tsv", "sample\ttimes_seen\tunits\nB\t1\t1\nB\t3\t2\nA\t2\t5\n")
	c := writeFile(t, dir, "c.tsv", "sample\ttimes_seen\tunits\nA\t1\t1\nC\t1\t1\n")
	code, out, stderr := runCLI(t, "", "merge", a, b)
	want := "sample\ttimes_seen\tunits\nA\t1\t10\nA\t2\t8\nB\t1\t5\nB\t3\t2\n"
	if code != 0 || out != want {
		t.Errorf("merge: exit %d, out\n%s\nwant\n%s\nstderr %s", code, out, want, stderr)
	}
	code, _, stderr = runCLI(t, "", "merge", a, c)
	if code != exitInput || !strings.Contains(stderr, "different run") || !strings.Contains(stderr, `"B"`) {
		t.Errorf("different samples: exit %d stderr %q", code, stderr)
	}
	code, _, _ = runCLI(t, "", "merge", "--partial", a, c)
	if code != 0 {
		t.Errorf("--partial: exit %d", code)
	}
	a2 := writeFile(t, dir, "a2.tsv", "sample\ttimes_seen\tunits\nA\t1\t10\nA\t2\t3\nB\t1\t4\n")
	code, _, stderr = runCLI(t, "", "merge", a, a2)
	if code != exitInput || !strings.Contains(stderr, "identical") {
		t.Errorf("same shard twice: exit %d stderr %q", code, stderr)
	}
}

// TestHelp: every subcommand's --help goes to stdout with exit 0 and has a
// synopsis, its flags with defaults, the exit codes and an example.
func TestHelp(t *testing.T) {
	for name := range subcommands {
		if name == "version" {
			continue
		}
		code, out, stderr := runCLI(t, "", name, "--help")
		if code != 0 || stderr != "" {
			t.Errorf("%s --help: exit %d, stderr %q", name, code, stderr)
		}
		for _, want := range []string{"usage: headroom " + name, "exit status:", "example", "  headroom " + name} {
			if !strings.Contains(out, want) {
				t.Errorf("%s --help lacks %q", name, want)
			}
		}
		if strings.Contains(out, "NaN") {
			t.Errorf("%s --help shows NaN", name)
		}
	}
}

// TestCountsPerUnit: --per-unit reads one count per unit per line and
// names the sample after the file; a fraction is an error naming the line.
func TestCountsPerUnit(t *testing.T) {
	dir := t.TempDir()
	p := writeFile(t, dir, "LIB-09.txt", "3\n1\n1\n2\n0\n1\n")
	code, out, stderr := runCLI(t, "", "counts", "--per-unit", "--bootstrap", "0", p)
	if code != 0 || !strings.Contains(out, "\nLIB-09\t8\t5\t") {
		t.Errorf("per-unit: exit %d out %q stderr %q", code, out, stderr)
	}
	q := writeFile(t, dir, "bad.txt", "3\n1.5\n")
	code, _, stderr = runCLI(t, "", "counts", "--per-unit", q)
	if code != exitInput || !strings.Contains(stderr, q+":2:") {
		t.Errorf("per-unit fraction: exit %d stderr %q", code, stderr)
	}
}

// TestOutputIsInput: an output that would replace an input is refused
// (exit 2) and the input is left as it was.
func TestOutputIsInput(t *testing.T) {
	dir := t.TempDir()
	p := writeFile(t, dir, "a.tsv", goodTable)
	for _, args := range [][]string{
		{"counts", "--bootstrap", "0", "-o", p, p},
		{"counts", "--bootstrap", "0", "--save-counts", p, p},
		{"merge", "-o", p, p},
	} {
		code, _, stderr := runCLI(t, "", args...)
		if code != exitUsage || !strings.Contains(stderr, "also an input") {
			t.Errorf("%v: exit %d stderr %q", args, code, stderr)
		}
		if b, _ := os.ReadFile(p); string(b) != goodTable {
			t.Fatalf("%v: input changed to %q", args, b)
		}
	}
}

// TestPipelineHazards: --strict without a gate warns on stderr (it could
// never fail a sample); --progress always reports the estimation phase on
// stderr and leaves stdout to the summary.
func TestPipelineHazards(t *testing.T) {
	code, out, stderr := runCLI(t, "", "counts", "--bootstrap", "0", "--strict", demoCounts)
	if code != 0 || !strings.Contains(stderr, "--strict without a gate") || !strings.HasPrefix(out, "sample\t") {
		t.Errorf("--strict without gates: exit %d, stderr %q", code, stderr)
	}
	code, out, stderr = runCLI(t, "", "counts", "--bootstrap", "20", "--threads", "2", "--progress", "always", demoCounts)
	if code != 0 || !strings.Contains(stderr, "estimating") || !strings.HasPrefix(out, "sample\t") {
		t.Errorf("--progress always: exit %d, stderr %q", code, stderr)
	}
}
