package freqtable

import (
	"bytes"
	"compress/gzip"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"headroom/complexity"
)

func TestReadRoundTrip(t *testing.T) {
	in := "sample\ttimes_seen\tunits\nB\t2\t7\nA\t1\t10\nB\t1\t3\nA\t5\t0\nA\t3\t2\n"
	got, err := Read(strings.NewReader(in))
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 2 || got[0].Name != "B" || got[1].Name != "A" {
		t.Fatalf("samples %+v, want B then A (first appearance)", got)
	}
	if got[1].Counts.Reads() != 16 || got[1].Counts.Distinct() != 12 || got[0].Counts.Reads() != 17 {
		t.Errorf("A reads %d distinct %d; B reads %d", got[1].Counts.Reads(), got[1].Counts.Distinct(), got[0].Counts.Reads())
	}
	var b bytes.Buffer
	if err := Write(&b, got); err != nil {
		t.Fatal(err)
	}
	want := "sample\ttimes_seen\tunits\nB\t1\t3\nB\t2\t7\nA\t1\t10\nA\t3\t2\n"
	if b.String() != want {
		t.Errorf("Write:\n%s\nwant\n%s", b.String(), want)
	}
}

func TestReadErrors(t *testing.T) {
	for _, c := range []struct {
		in   string
		line int64
		err  error
	}{
		{"", 0, ErrEmpty},
		{"x\ty\tz\n", 1, ErrHeader},
		{Header + "\nA\t0\t1\n", 2, ErrTimes},
		{Header + "\nA\t1\t-1\n", 2, ErrUnits},
		{Header + "\nA\t1\tfive\n", 2, ErrUnits},
		{Header + "\nA\t1\t1\nA\t1\t2\n", 3, ErrRepeat},
		{Header + "\nA\t1\t92233720368547758070\n", 2, ErrOverflow},
		{Header + "\nA\t2\t4611686018427387904\n", 2, ErrTotal},
		{Header + "\n\t1\t1\n", 2, ErrNoSample},
		{Header + "\nA\t1\t1\t1\n", 2, ErrFields},
		{Header + "\n", 1, ErrNoRows},
		{Header + "\nA\t1\t1\x00\n", 2, ErrBinary},
		{Header + "\n" + strings.Repeat("a", maxLine+10) + "\t1\t1\n", 2, ErrLineLong},
	} {
		_, err := Read(strings.NewReader(c.in))
		var pe *ParseError
		if !errors.As(err, &pe) || pe.Line != c.line || !errors.Is(err, c.err) {
			t.Errorf("Read(%.40q): %v; want line %d, %v", c.in, err, c.line, c.err)
		}
	}
}

func TestReadPerUnit(t *testing.T) {
	c, err := ReadPerUnit(strings.NewReader("3\n1\n\n1\n0\n7"))
	if err != nil {
		t.Fatal(err)
	}
	if c.Reads() != 12 || c.Distinct() != 4 || c.Units(1) != 2 {
		t.Errorf("got reads %d distinct %d n1 %d", c.Reads(), c.Distinct(), c.Units(1))
	}
	if _, err := ReadPerUnit(strings.NewReader("3\n1.5\n")); !errors.Is(err, ErrPerUnit) {
		t.Errorf("fraction: %v", err)
	}
}

// gzipped compresses s as two gzip members (RFC 1952 allows several;
// gzip -dc reads them one after another).
func gzipped(s string) []byte {
	var b bytes.Buffer
	for _, part := range []string{s[:len(s)/2], s[len(s)/2:]} {
		zw := gzip.NewWriter(&b)
		zw.Write([]byte(part)) // a bytes.Buffer does not fail
		zw.Close()
	}
	return b.Bytes()
}

// TestReadGzip: a gzip-compressed table reads as its text; a cut one is
// a ParseError naming the line being read, never a shorter table.
func TestReadGzip(t *testing.T) {
	var text strings.Builder
	text.WriteString(Header + "\n")
	for i := 1; i <= 2000; i++ {
		fmt.Fprintf(&text, "S%d\t%d\t%d\n", i%2, i, i%7+1)
	}
	plain, err := Read(strings.NewReader(text.String()))
	if err != nil {
		t.Fatal(err)
	}
	z := gzipped(text.String())
	got, err := Read(bytes.NewReader(z))
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != len(plain) || got[0].Counts.Reads() != plain[0].Counts.Reads() || got[1].Counts.Distinct() != plain[1].Counts.Distinct() {
		t.Errorf("gzip read %+v, plain %+v", got, plain)
	}
	_, err = Read(bytes.NewReader(z[:len(z)*3/4]))
	var pe *ParseError
	if !errors.As(err, &pe) || !errors.Is(err, ErrGzipCut) || pe.Line < 2 || pe.Line > 2001 {
		t.Errorf("cut gzip: %v, want ErrGzipCut at a data line", err)
	}
	pu := gzipped("3\n1\n1\n0\n7\n")
	c, err := ReadPerUnit(bytes.NewReader(pu))
	if err != nil || c.Reads() != 12 || c.Distinct() != 4 {
		t.Errorf("per-unit gzip: %v reads %d distinct %d", err, c.Reads(), c.Distinct())
	}
	if _, err := ReadPerUnit(bytes.NewReader(pu[:len(pu)-3])); !errors.Is(err, ErrGzipCut) {
		t.Errorf("per-unit cut gzip: %v, want ErrGzipCut", err)
	}
}

// FuzzRead: any input either parses into valid counts that survive a
// write/read round trip, or fails with a ParseError; never a panic.
func FuzzRead(f *testing.F) {
	f.Add([]byte(Header + "\nA\t1\t10\nA\t2\t3\n"))
	f.Add([]byte(Header + "\r\nA\t1\t10\r\n"))
	f.Add([]byte(Header + "\nA\t1\t9223372036854775807\n"))
	f.Add(gzipped(Header + "\nA\t1\t10\nB\t3\t2\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		got, err := Read(bytes.NewReader(data))
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error is not a ParseError: %v", err)
			}
			return
		}
		var b bytes.Buffer
		if err := Write(&b, got); err != nil {
			t.Fatal(err)
		}
		again, err := Read(&b)
		if err != nil {
			// Names are cleaned of tabs on write; a name that was only
			// whitespace may not survive. Anything else must.
			t.Fatalf("round trip failed: %v", err)
		}
		if len(again) != len(got) {
			t.Fatalf("round trip: %d samples, want %d", len(again), len(got))
		}
		for i := range got {
			if again[i].Counts.Reads() != got[i].Counts.Reads() {
				t.Fatalf("round trip changed reads of %q", got[i].Name)
			}
		}
	})
}

// FuzzReadPerUnit: per-unit files parse or fail cleanly.
func FuzzReadPerUnit(f *testing.F) {
	f.Add([]byte("1\n2\n3\n"))
	f.Add([]byte("0\n\n 5 \n"))
	f.Add(gzipped("4\n0\n1\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		c, err := ReadPerUnit(bytes.NewReader(data))
		if err == nil && c.Reads() < 0 {
			t.Fatal("negative reads")
		}
		_ = complexity.Counts{}
	})
}

// A UTF-8 byte-order mark before the header (as spreadsheets save text) is
// not part of the header (Unicode Standard section 23.8, U+FEFF at the
// start of a stream is a signature).
func TestReadByteOrderMark(t *testing.T) {
	got, err := Read(strings.NewReader("\ufeffsample\ttimes_seen\tunits\nA\t1\t10\n"))
	if err != nil || len(got) != 1 || got[0].Name != "A" {
		t.Fatalf("got %+v, %v; want sample A", got, err)
	}
}

// TestWriteFuzzCorpus writes the seed corpora of FuzzRead and
// FuzzReadPerUnit from the bad-input corpus and the demo table (run with
// HEADROOM_WRITE_CORPUS=1; the files are committed).
func TestWriteFuzzCorpus(t *testing.T) {
	if os.Getenv("HEADROOM_WRITE_CORPUS") == "" {
		t.Skip("set HEADROOM_WRITE_CORPUS=1 to rewrite testdata/fuzz seeds from ../../testdata")
	}
	write := func(fuzz, name string, b []byte) {
		dir := filepath.Join("testdata", "fuzz", fuzz)
		if err := os.MkdirAll(dir, 0o755); err != nil {
			t.Fatal(err)
		}
		body := fmt.Sprintf("go test fuzz v1\n[]byte(%q)\n", b)
		if err := os.WriteFile(filepath.Join(dir, "seed-"+name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	bad := filepath.Join("..", "..", "testdata", "bad")
	for _, pat := range []struct{ glob, fuzz string }{{"counts_*", "FuzzRead"}, {"perunit_*", "FuzzReadPerUnit"}} {
		files, _ := filepath.Glob(filepath.Join(bad, pat.glob))
		for _, f := range files {
			b, err := os.ReadFile(f)
			if err != nil {
				t.Fatal(err)
			}
			if len(b) > 4096 {
				continue // the fuzzer mutates small inputs best
			}
			write(pat.fuzz, filepath.Base(f), b)
		}
	}
	demo, err := os.ReadFile(filepath.Join("..", "..", "testdata", "demo", "qc-pass.counts.tsv"))
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(string(demo), "\n")
	write("FuzzRead", "demo-head", []byte(strings.Join(lines[:min(40, len(lines))], "")))
	write("FuzzRead", "demo-head.gz", gzipped(strings.Join(lines[:min(40, len(lines))], "")))
	write("FuzzReadPerUnit", "gz", gzipped("3\n1\n0\n12\n1\n"))
}
