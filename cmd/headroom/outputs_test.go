package main

import (
	"bytes"
	"encoding/xml"
	"image/png"
	"io"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"headroom/internal/freqtable"
)

// TestEverySubcommandWritesEveryOutput: counts, reads and taxa each write
// a well-formed SVG plot, a decodable PNG plot, an HTML report, a curve in
// the long format and a frequency-count table that reads back, through the
// one shared implementation.
func TestEverySubcommandWritesEveryOutput(t *testing.T) {
	inputs := map[string]string{
		"counts": demoCounts,
		"reads":  demoBAM,
		"taxa":   "../../testdata/taxa/gen_taxa_rows.tsv",
	}
	for cmd, in := range inputs {
		dir := t.TempDir()
		p := func(n string) string { return filepath.Join(dir, n) }
		args := []string{cmd, "--bootstrap", "10", "--progress", "never", "--target", "10x", "--min-coverage", "0.5",
			"-o", p("summary.tsv"), "--curve", p("curve.tsv"), "--save-counts", p("counts.tsv"),
			"--report", p("report.html"), "--plot", p("plot.svg"), in}
		if code, _, stderr := runCLI(t, "", args...); code != 0 {
			t.Fatalf("%s: exit %d: %s", cmd, code, stderr)
		}
		args[len(args)-2] = p("plot.png")
		if code, _, stderr := runCLI(t, "", args...); code != 0 {
			t.Fatalf("%s png: exit %d: %s", cmd, code, stderr)
		}
		svg, _ := os.ReadFile(p("plot.svg"))
		d := xml.NewDecoder(bytes.NewReader(svg))
		for {
			if _, err := d.Token(); err == io.EOF {
				break
			} else if err != nil {
				t.Fatalf("%s: SVG not well-formed: %v", cmd, err)
			}
		}
		f, _ := os.Open(p("plot.png"))
		if _, err := png.Decode(f); err != nil {
			t.Errorf("%s: PNG: %v", cmd, err)
		}
		f.Close()
		html, _ := os.ReadFile(p("report.html"))
		if !bytes.HasPrefix(html, []byte("<!DOCTYPE html>")) || !bytes.Contains(html, []byte("<svg")) || !bytes.HasSuffix(bytes.TrimSpace(html), []byte("</html>")) {
			t.Errorf("%s: report is not a complete HTML page with an inline plot", cmd)
		}
		curve, _ := os.ReadFile(p("curve.tsv"))
		lines := strings.Split(strings.TrimSpace(string(curve)), "\n")
		if lines[0] != "sample\treads\tdistinct\tlo\thi\tkind" || len(lines) < 10 {
			t.Errorf("%s: curve header %q, %d lines", cmd, lines[0], len(lines))
		}
		kinds := map[string]bool{}
		for _, l := range lines[1:] {
			f := strings.Split(l, "\t")
			if len(f) != 6 {
				t.Fatalf("%s: curve line %q", cmd, l)
			}
			kinds[f[5]] = true
		}
		for _, k := range []string{"rarefied", "observed", "extrapolated"} {
			if !kinds[k] {
				t.Errorf("%s: curve has no %s points", cmd, k)
			}
		}
		cb, _ := os.ReadFile(p("counts.tsv"))
		if _, err := freqtable.Read(bytes.NewReader(cb)); err != nil {
			t.Errorf("%s: saved counts do not read back: %v", cmd, err)
		}
		// The saved counts give the same summary through counts.
		if cmd != "counts" {
			want, _ := os.ReadFile(p("summary.tsv"))
			code, got, stderr := runCLI(t, "", "counts", "--bootstrap", "10", "--target", "10x", "--min-coverage", "0.5", p("counts.tsv"))
			if code != 0 {
				t.Fatalf("%s: counts on saved counts: exit %d %s", cmd, code, stderr)
			}
			if a, b := firstColumns(string(want), 12), firstColumns(got, 12); a != b {
				t.Errorf("%s: saved counts estimate differently:\n%s\nvs\n%s", cmd, a, b)
			}
		}
	}
}

// firstColumns keeps the first n columns of each line (the columns every
// subcommand shares before its own).
func firstColumns(tsv string, n int) string {
	var b strings.Builder
	for _, l := range strings.Split(strings.TrimSpace(tsv), "\n") {
		f := strings.Split(l, "\t")
		if len(f) > n {
			f = f[:n]
		}
		b.WriteString(strings.Join(f, "\t") + "\n")
	}
	return b.String()
}

// TestFailedRunLeavesOldFiles: when one output cannot be written, none is
// replaced: older files of those names keep their contents and no
// temporary file is left.
func TestFailedRunLeavesOldFiles(t *testing.T) {
	dir := t.TempDir()
	old := filepath.Join(dir, "summary.tsv")
	curve := filepath.Join(dir, "curve.tsv")
	os.WriteFile(old, []byte("old summary\n"), 0o644)
	os.WriteFile(curve, []byte("old curve\n"), 0o644)
	bad := filepath.Join(dir, "no-such-dir", "plot.svg")
	// The folder is checked before any input is read (a usage error).
	code, _, stderr := runCLI(t, "", "counts", "--bootstrap", "0", "-o", old, "--curve", curve, "--plot", bad, demoCounts)
	if code != exitUsage || !strings.Contains(stderr, "no-such-dir") {
		t.Fatalf("exit %d, stderr %q", code, stderr)
	}
	for p, want := range map[string]string{old: "old summary\n", curve: "old curve\n"} {
		if b, _ := os.ReadFile(p); string(b) != want {
			t.Errorf("%s changed to %q", p, b)
		}
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 2 {
		var names []string
		for _, e := range ents {
			names = append(names, e.Name())
		}
		t.Errorf("files left: %v", names)
	}
}

// TestOutputToSpecialFilesAndLinks: an output that is not a regular file
// (here a named pipe, as /dev/null and /dev/stdout are character devices)
// is written in place, not replaced by a rename, which would turn
// /dev/null into a regular file for the whole machine (this happened with
// `-o /dev/null`, as the workflow examples write it). An output that is a
// symbolic link replaces the file it points to and stays a link.
func TestOutputToSpecialFilesAndLinks(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "summary.fifo")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skipf("no named pipes here: %v", err)
	}
	got := make(chan []byte)
	go func() {
		f, err := os.Open(fifo) // blocks until the writer opens it
		if err != nil {
			got <- nil
			return
		}
		b, _ := io.ReadAll(f)
		f.Close()
		got <- b
	}()
	target := filepath.Join(dir, "real-curve.tsv")
	os.WriteFile(target, []byte("old\n"), 0o644)
	link := filepath.Join(dir, "curve-link.tsv")
	if err := os.Symlink(target, link); err != nil {
		t.Fatal(err)
	}
	code, _, stderr := runCLI(t, "", "counts", "--bootstrap", "0", "-o", fifo, "--curve", link, demoCounts)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	select {
	case b := <-got:
		if !bytes.HasPrefix(b, []byte("sample\treads\t")) {
			t.Errorf("the pipe received %q", b)
		}
	case <-time.After(30 * time.Second):
		t.Fatal("nothing was written to the pipe (was it replaced by a file?)")
	}
	if st, err := os.Lstat(fifo); err != nil || st.Mode()&os.ModeNamedPipe == 0 {
		t.Errorf("%s is no longer a named pipe: %v %v", fifo, st.Mode(), err)
	}
	if st, err := os.Lstat(link); err != nil || st.Mode()&os.ModeSymlink == 0 {
		t.Errorf("%s is no longer a link: %v", link, err)
	}
	if b, _ := os.ReadFile(target); !bytes.HasPrefix(b, []byte("sample\treads\t")) {
		t.Errorf("the link's target holds %q", b)
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 3 {
		t.Errorf("%d entries in the folder, want the pipe, the link and its target", len(ents))
	}
}
