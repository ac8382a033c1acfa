package main

import (
	"bytes"
	"io"
	"sort"

	"headroom/internal/freqtable"

	"os"
	"path/filepath"
	"testing"

	"github.com/biogo/hts/bam"
)

const demoBAM = "../../testdata/demo/qc_run.bam"

// splitByReference writes one BAM per reference (records whose own
// reference is it; unmapped records without a reference are dropped, as a
// per-chromosome scatter does), with the full header, and returns the
// shard paths.
func splitByReference(t *testing.T, path, dir string) []string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	br, err := bam.NewReader(f, 1)
	if err != nil {
		t.Fatal(err)
	}
	defer br.Close()
	h := br.Header()
	writers := map[int]*bam.Writer{}
	files := map[int]*os.File{}
	var paths []string
	for {
		rec, err := br.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
		id := rec.Ref.ID()
		if id < 0 {
			continue
		}
		w, ok := writers[id]
		if !ok {
			p := filepath.Join(dir, h.Refs()[id].Name()+".bam")
			of, err := os.Create(p)
			if err != nil {
				t.Fatal(err)
			}
			w, err = bam.NewWriter(of, h, 1)
			if err != nil {
				t.Fatal(err)
			}
			writers[id], files[id] = w, of
			paths = append(paths, p)
		}
		if err := w.Write(rec); err != nil {
			t.Fatal(err)
		}
	}
	for id, w := range writers {
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
		files[id].Close()
	}
	return paths
}

// TestScatterGather: the scatter/gather contract. A coordinate-sorted BAM
// split per chromosome, each shard counted with --save-counts and the
// shards merged, gives exactly the whole file's frequency counts. Exact
// because each fragment is counted once, on its mate at the lower
// position (or its only record), whose chromosome decides its shard.
func TestScatterGather(t *testing.T) {
	if _, err := os.Stat(demoBAM); err != nil {
		t.Skipf("demo BAM absent: %v", err)
	}
	dir := t.TempDir()
	shards := splitByReference(t, demoBAM, dir)
	if len(shards) < 2 {
		t.Fatalf("demo BAM has %d references with records; need 2+", len(shards))
	}
	whole := filepath.Join(dir, "whole.counts.tsv")
	if code, _, stderr := runCLI(t, "", "reads", "--bootstrap", "0", "--progress", "never", "-o", os.DevNull, "--save-counts", whole, demoBAM); code != 0 {
		t.Fatalf("whole: exit %d %s", code, stderr)
	}
	var counted []string
	for _, s := range shards {
		out := s + ".counts.tsv"
		if code, _, stderr := runCLI(t, "", "reads", "--bootstrap", "0", "--progress", "never", "-o", os.DevNull, "--save-counts", out, s); code != 0 {
			t.Fatalf("%s: exit %d %s", s, code, stderr)
		}
		counted = append(counted, out)
	}
	merged := filepath.Join(dir, "merged.counts.tsv")
	if code, _, stderr := runCLI(t, "", append([]string{"merge", "--partial", "-o", merged}, counted...)...); code != 0 {
		t.Fatalf("merge: exit %d %s", code, stderr)
	}
	a, _ := os.ReadFile(whole)
	b, _ := os.ReadFile(merged)
	if canonicalCounts(t, a) != canonicalCounts(t, b) {
		t.Errorf("merged shards differ from the whole file:\nwhole:\n%s\nmerged:\n%s", a, b)
	}
}

// canonicalCounts renders a frequency-count table with samples sorted, so
// that tables differing only in sample order compare equal.
func canonicalCounts(t *testing.T, data []byte) string {
	t.Helper()
	got, err := freqtable.Read(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	sort.Slice(got, func(i, j int) bool { return got[i].Name < got[j].Name })
	var b bytes.Buffer
	freqtable.Write(&b, got)
	return b.String()
}
