package main

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"testing"
)

// badCorpus is the malformed-input corpus: files and the manifest
// cases.tsv, written by scripts/gen_bad_corpus.py (see its docstring).
var badCorpus = filepath.Join("..", "..", "testdata", "bad")

type badCase struct {
	name, stdin string
	args        []string
	exit        int
	want, what  string
}

func readBadCases(t *testing.T) []badCase {
	t.Helper()
	f, err := os.Open(filepath.Join(badCorpus, "cases.tsv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var cases []badCase
	sc := bufio.NewScanner(f)
	header := true
	for n := 1; sc.Scan(); n++ {
		line := sc.Text()
		if strings.HasPrefix(line, "#") || line == "" {
			continue
		}
		if header {
			header = false
			continue
		}
		fs := strings.Split(line, "\t")
		if len(fs) != 6 {
			t.Fatalf("cases.tsv:%d: %d fields, want 6", n, len(fs))
		}
		code, err := strconv.Atoi(fs[3])
		if err != nil {
			t.Fatalf("cases.tsv:%d: exit %q", n, fs[3])
		}
		cases = append(cases, badCase{fs[0], fs[1], strings.Fields(fs[2]), code, fs[4], fs[5]})
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return cases
}

// tenMB is the length of the single long line of the "%...long_line" cases
// (issue 6: "a single 10 MB line in a table gets a clear error").
const tenMB = 10 << 20

// genBadInput writes the corpus files that are too large to commit.
func genBadInput(t *testing.T, dir, name string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	var b []byte
	switch name {
	case "sam_long_line.sam":
		b = []byte("@HD\tVN:1.6\tSO:unsorted\n@SQ\tSN:chr1\tLN:10000\n" + strings.Repeat("x", tenMB) + "\n")
	case "taxa_long_line.tsv":
		b = []byte("taxon\tS1\nT1\t" + strings.Repeat("1", tenMB) + "\n")
	case "counts_long_line.tsv":
		b = []byte("sample\ttimes_seen\tunits\n" + strings.Repeat("x", tenMB) + "\t1\t5\n")
	case "fq_long_line.fq":
		seq := strings.Repeat("ACGT", tenMB/4)
		b = []byte("@long\n" + seq + "\n+\n" + strings.Repeat("I", len(seq)) + "\n@next\nACGT\n-\nIIII\n")
	case "fq_bomb.fastq.gz":
		// A gzip bomb: one member of 1 MiB of identical records,
		// compressed to a few KiB, repeated 128 times (a multi-member
		// stream, RFC 1952 section 2.2), then a member cut short.
		var rec bytes.Buffer
		for rec.Len() < 1<<20 {
			rec.WriteString("@bomb\nACGTACGTAC\n+\nIIIIIIIIII\n")
		}
		var m bytes.Buffer
		z := gzip.NewWriter(&m)
		z.Write(rec.Bytes())
		z.Close()
		b = bytes.Repeat(m.Bytes(), 128)
		b = append(b, m.Bytes()[:m.Len()/2]...)
	default:
		t.Fatalf("no generator for %%%s", name)
	}
	if err := os.WriteFile(p, b, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// maxBadAlloc bounds what one bad-input case may allocate in total: the
// largest inputs are the 10 MB lines and the 128 MiB (decompressed) gzip
// bomb, which must stream. A reader that trusted a length field of the
// input (a BAM l_text of 1 GiB) allocated gigabytes here.
const maxBadAlloc = 256 << 20

// endless is an input stream that never ends: head, then fill repeated.
// n counts the bytes served.
type endless struct {
	head     []byte
	fill     byte
	n, limit int64
}

func (e *endless) Read(p []byte) (int, error) {
	k := copy(p, e.head)
	e.head = e.head[k:]
	for i := k; i < len(p); i++ {
		p[i] = e.fill
	}
	e.n += int64(len(p))
	return len(p), nil
}

// genBadStream returns the endless stdin streams of the corpus, each with
// the most bytes a reader may consume before it gives up.
func genBadStream(t *testing.T, name string) *endless {
	switch name {
	case "sam_endless":
		// reads.maxSAMLine (256 MiB), plus the buffers in front of it.
		return &endless{head: []byte("@HD\tVN:1.6\tSO:unsorted\n@SQ\tSN:chr1\tLN:10000\n"), fill: 'x', limit: 256<<20 + 4<<20}
	case "fq_endless":
		// reads.maxFASTQRecord (256 MiB), plus the buffers in front of it.
		return &endless{head: []byte("@"), fill: 'A', limit: 256<<20 + 4<<20}
	}
	t.Fatalf("no stream generator for %%%s", name)
	return nil
}

// TestBadInputCorpus runs every case of testdata/bad/cases.tsv in-process
// and checks the contract of DESIGN.md for bad input: exit 1 (2 for a
// usage error), one line on stderr "headroom: FILE[:LINE]: ..." naming the
// file (and the line, record or column through the case's fragment), no
// panic, nothing on stdout, and existing output files (-o, --save-counts,
// --curve) left byte-for-byte as they were.
func TestBadInputCorpus(t *testing.T) {
	cases := readBadCases(t)
	if len(cases) < 40 {
		t.Fatalf("%d cases, the corpus needs at least 40", len(cases))
	}
	corpus, err := filepath.Abs(badCorpus)
	if err != nil {
		t.Fatal(err)
	}
	seen := map[string]bool{}
	for _, c := range cases {
		if seen[c.name] {
			t.Fatalf("case %s given twice", c.name)
		}
		seen[c.name] = true
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			var inputs []string // paths the message may name
			var args []string
			for _, a := range c.args {
				switch {
				case strings.HasPrefix(a, "@"):
					a = filepath.Join(corpus, a[1:])
					inputs = append(inputs, a)
				case strings.HasPrefix(a, "%"):
					a = genBadInput(t, dir, a[1:])
					inputs = append(inputs, a)
				}
				args = append(args, a)
			}
			var stdin io.Reader = bytes.NewReader(nil)
			var stream *endless
			switch {
			case strings.HasPrefix(c.stdin, "%"):
				if testing.Short() {
					t.Skip("-short: an endless stream reads 256 MiB")
				}
				stream = genBadStream(t, c.stdin[1:])
				stdin = stream
				inputs = append(inputs, "stdin", "<stdin>")
			case c.stdin != "-":
				b, err := os.ReadFile(filepath.Join(corpus, c.stdin))
				if err != nil {
					t.Fatal(err)
				}
				stdin = bytes.NewReader(b)
				inputs = append(inputs, "stdin", "<stdin>")
			}
			// Existing outputs, which a failed run must leave alone.
			outs := map[string]string{}
			var outFlags []string
			for _, o := range []struct{ flag, file string }{{"-o", "summary.tsv"}, {"--save-counts", "counts.tsv"}, {"--curve", "curve.tsv"}} {
				if len(args) == 0 || args[0] == "merge" && o.flag != "-o" {
					continue
				}
				p := filepath.Join(dir, o.file)
				body := "old " + o.file + " of an earlier run\n"
				if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
					t.Fatal(err)
				}
				outs[p] = body
				outFlags = append(outFlags, o.flag, p)
			}
			if len(args) > 0 {
				switch args[0] {
				case "reads", "taxa", "counts":
					outFlags = append(outFlags, "--bootstrap", "0", "--progress", "never")
				case "merge":
				default:
					outFlags = nil
				}
				// A flag the case gives itself is not added again: a
				// single-value flag may be given once.
				var add []string
				for i := 0; i+1 < len(outFlags); i += 2 {
					if !containsArg(args[1:], outFlags[i]) {
						add = append(add, outFlags[i], outFlags[i+1])
					}
				}
				args = append(append([]string{args[0]}, add...), args[1:]...)
			}

			var stdout, stderr bytes.Buffer
			var m0, m1 runtime.MemStats
			runtime.ReadMemStats(&m0)
			code := run(args, stdin, &stdout, &stderr)
			runtime.ReadMemStats(&m1)
			msg := stderr.String()
			alloc := m1.TotalAlloc - m0.TotalAlloc
			t.Logf("exit %d, %d MiB allocated: %s", code, alloc>>20, trimForLog(msg))
			if stream != nil && stream.n > stream.limit {
				t.Errorf("read %d bytes of the endless stream, want at most %d", stream.n, stream.limit)
			}
			// Bounded memory: no case may allocate in total more than
			// maxBadAlloc (endless streams excepted: they are bounded by
			// the bytes read, above).
			if stream == nil && alloc > maxBadAlloc {
				t.Errorf("allocated %d MiB, want at most %d MiB", alloc>>20, maxBadAlloc>>20)
			}
			first, _, _ := strings.Cut(msg, "\n")
			if strings.Contains(msg, "internal error") || strings.Contains(msg, "goroutine ") {
				t.Fatalf("panic: %q", msg)
			}
			if code != c.exit {
				t.Errorf("exit %d, want %d; stderr %q", code, c.exit, msg)
			}
			if !strings.HasPrefix(first, "headroom: ") {
				t.Errorf("first stderr line %q does not start with 'headroom: '", first)
			}
			if !strings.Contains(first, c.want) {
				t.Errorf("message %q lacks %q", first, c.want)
			}
			if c.exit == exitInput {
				if strings.Count(msg, "\n") != 1 {
					t.Errorf("stderr is not one line: %q", msg)
				}
				named := false
				for _, in := range inputs {
					named = named || strings.HasPrefix(first, "headroom: "+in)
				}
				if !named {
					t.Errorf("message %q does not start with an input's name %q", first, inputs)
				}
			}
			if stdout.Len() != 0 {
				t.Errorf("stdout not empty: %q", trimForLog(stdout.String()))
			}
			for p, body := range outs {
				if b, err := os.ReadFile(p); err != nil || string(b) != body {
					t.Errorf("%s: changed to %q (%v)", filepath.Base(p), trimForLog(string(b)), err)
				}
			}
			// The same message whatever --threads (decompression runs
			// in other goroutines with threads > 1).
			if c.exit == exitInput && c.stdin == "-" && (args[0] == "reads" || args[0] == "taxa" || args[0] == "counts") {
				one := append([]string{args[0], "--threads", "1"}, args[1:]...)
				var o1, e1 bytes.Buffer
				if code1 := run(one, bytes.NewReader(nil), &o1, &e1); code1 != code || e1.String() != msg {
					t.Errorf("--threads 1: exit %d, %q; default threads: exit %d, %q", code1, e1.String(), code, msg)
				}
			}
			ents, _ := os.ReadDir(dir)
			if want := len(outs) + countPrefix(c.args, "%"); len(ents) != want {
				var names []string
				for _, e := range ents {
					names = append(names, e.Name())
				}
				t.Errorf("files left in the output directory: %v", names)
			}
		})
	}
}

func countPrefix(args []string, p string) int {
	n := 0
	for _, a := range args {
		if strings.HasPrefix(a, p) {
			n++
		}
	}
	return n
}

func trimForLog(s string) string {
	if len(s) > 200 {
		return s[:200] + fmt.Sprintf("... (%d bytes)", len(s))
	}
	return s
}

// containsArg reports whether flag is among args, as "--flag" or "--flag=...".
func containsArg(args []string, flag string) bool {
	for _, a := range args {
		if a == flag || strings.HasPrefix(a, flag+"=") {
			return true
		}
	}
	return false
}
