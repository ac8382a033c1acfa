package reads

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Native fuzz tests of every parser. Seed corpora live in
// testdata/fuzz/<FuzzName>/ (written from the fixtures of
// ../testdata/reads by TestWriteFuzzCorpus with HEADROOM_WRITE_CORPUS=1).
// Run one with: go test ./reads -run '^$' -fuzz FuzzDecodeBAM -fuzztime 60s

func FuzzDecodeBAM(f *testing.F) {
	f.Add(make([]byte, 32))
	f.Fuzz(func(t *testing.T, b []byte) {
		var rec Record
		if err := DecodeBAM(b, 3, &rec); err != nil {
			return
		}
		if rec.Ref < -1 || rec.Ref >= 3 || len(rec.Name) > len(b) {
			t.Fatalf("accepted an impossible record: %+v", rec)
		}
		_ = Unclipped5(rec.Pos, rec.Cigar, rec.Flags&FlagReverse != 0)
		for _, tag := range []Tag{{'R', 'X'}, {'C', 'B'}, {'U', 'B'}, {'X', 'A'}} {
			if v := rec.Tag(tag); len(v) > len(b) {
				t.Fatalf("tag %s longer than the record", tag)
			}
		}
		var k Keyer
		k.Opt = KeyOptions{UMITags: []Tag{{'B', 'X'}, {'R', 'X'}}, UMIFromName: true, CellTag: Tag{'C', 'B'}, Collapse: true, OpticalNames: true}
		k.Alignment(&rec, 0)
	})
}

func fuzzHeader() *Header {
	return &Header{Refs: []string{"chr1", "chr2"}, refIndex: map[string]int32{"chr1": 0, "chr2": 1}, Library: map[string]string{}}
}

func FuzzParseSAMLine(f *testing.F) {
	f.Add([]byte("r1\t99\tchr1\t100\t60\t5S95M\t=\t300\t250\t*\t*\tRG:Z:g1\tMC:Z:100M"))
	h := fuzzHeader()
	f.Fuzz(func(t *testing.T, line []byte) {
		var rec Record
		if err := ParseSAMLine(line, h, &rec); err != nil {
			return
		}
		if rec.Ref < -1 || rec.Ref > 1 || rec.Pos < -1 {
			t.Fatalf("accepted an impossible record: %+v", rec)
		}
		_ = Unclipped5(rec.Pos, rec.Cigar, rec.Flags&FlagReverse != 0)
		_, _ = ParseSpot(rec.Name), NameUMI(rec.Name)
		var k Keyer
		k.Opt.OpticalNames, k.Opt.UMIFromName, k.Opt.Collapse = true, true, true
		k.Opt.UMITags, k.Opt.CellTag = []Tag{{'R', 'X'}, {'B', 'X'}}, Tag{'C', 'B'}
		k.Alignment(&rec, 0)
	})
}

func FuzzFASTQ(f *testing.F) {
	f.Add([]byte("@r1\nACGT\n+\nIIII\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		r := newFASTQReader(bytes.NewReader(data))
		var rec FASTQRecord
		for i := 0; ; i++ {
			err := r.Read(&rec)
			if err != nil {
				if err != io.EOF && r.Read(&rec) != err {
					t.Fatalf("error not sticky")
				}
				return
			}
			if len(rec.Seq) != len(rec.Qual) {
				t.Fatalf("record %d: seq %d qual %d", i, len(rec.Seq), len(rec.Qual))
			}
			if i > len(data) {
				t.Fatalf("more records than bytes")
			}
		}
	})
}

// FuzzFASTQPairs reads FASTQ text as an interleaved file after peeking at
// its first two records, as headroom reads does, and parses mate numbers
// and comment tags: errors or pairs, never a panic, a mismatch that slips
// through or a record of the wrong length.
func FuzzFASTQPairs(f *testing.F) {
	f.Add([]byte("@r1/1\nACGT\n+\nIIII\n@r1/2\nTTGA\n+\nIIII\n"))
	f.Add([]byte("@r1 1:N:0:AC RX:Z:AAC\nACGT\n+\nIIII\n@r1 2:N:0:AC\nTTGA\n+\nIIII\n@r2 1:N:0\nA\n+\nI\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		r := newFASTQReader(bytes.NewReader(data))
		for i := 0; i < 2; i++ {
			rec, err := r.Peek(i)
			if err != nil {
				break
			}
			_ = MateNumber(rec.Name, rec.Comment)
			_ = CommentTag(rec.Comment, Tag{'R', 'X'})
		}
		p := NewInterleavedReader(r, "x")
		var a, b FASTQRecord
		for {
			err := p.Read(&a, &b)
			if err != nil {
				if err != io.EOF && p.Read(&a, &b) != err {
					t.Fatalf("error not sticky")
				}
				return
			}
			if !bytes.Equal(MateName(a.Name), MateName(b.Name)) || len(a.Seq) != len(a.Qual) || len(b.Seq) != len(b.Qual) {
				t.Fatalf("bad pair %q %q", a.Name, b.Name)
			}
		}
	})
}

// FuzzFASTQName parses arbitrary file names as instrument FASTQ names.
func FuzzFASTQName(f *testing.F) {
	f.Add("LIB7_S3_L001_R1_001.fastq.gz")
	f.Add("a_b_S12_R2_001.fq")
	f.Fuzz(func(t *testing.T, name string) {
		n, ok := ParseFASTQName(name)
		if ok && (n.Sample == "" || n.Read < 1 || n.Read > 2 || n.Lane < 0 || !strings.HasPrefix(name, n.Sample+"_S")) {
			t.Fatalf("%q parsed as %+v", name, n)
		}
	})
}

// FuzzOpen feeds arbitrary bytes through format sniffing and the matching
// reader, as `headroom reads` does: any input must end in records or an
// error, never a panic or a hang.
func FuzzOpen(f *testing.F) {
	f.Add([]byte("@HD\tVN:1.6\n"))
	f.Add([]byte("\x1f\x8b\x08\x00\x00\x00\x00\x00\x00\xff"))
	f.Fuzz(func(t *testing.T, data []byte) {
		in, err := Open(bytes.NewReader(data), 2)
		if err != nil {
			return
		}
		defer in.Close()
		switch in.Format {
		case FormatBAM:
			r, err := NewBAMReader(in)
			if err != nil {
				return
			}
			var rec Record
			for r.Read(&rec) == nil {
			}
		case FormatSAM:
			r, err := NewSAMReader(in)
			if err != nil {
				return
			}
			var rec Record
			for r.Read(&rec) == nil {
			}
		case FormatFASTQ:
			r := NewFASTQReader(in)
			var rec FASTQRecord
			for r.Read(&rec) == nil {
			}
		}
	})
}

// TestWriteFuzzCorpus regenerates the seed corpora from the fixtures.
func TestWriteFuzzCorpus(t *testing.T) {
	if os.Getenv("HEADROOM_WRITE_CORPUS") == "" {
		t.Skip("set HEADROOM_WRITE_CORPUS=1 to rewrite testdata/fuzz from ../testdata/reads")
	}
	fix := filepath.Join("..", "testdata", "reads")
	write := func(fuzz string, i int, b []byte) {
		dir := filepath.Join("testdata", "fuzz", fuzz)
		if err := os.MkdirAll(dir, 0o755); err != nil {
			t.Fatal(err)
		}
		body := fmt.Sprintf("go test fuzz v1\n[]byte(%q)\n", b)
		if err := os.WriteFile(filepath.Join(dir, fmt.Sprintf("seed%02d", i)), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	// BAM records: raw blocks of the first records of sorted.bam.
	fh, err := os.Open(filepath.Join(fix, "sorted.bam"))
	if err != nil {
		t.Fatal(err)
	}
	defer fh.Close()
	in, err := Open(fh, 1)
	if err != nil {
		t.Fatal(err)
	}
	br, err := NewBAMReader(in)
	if err != nil {
		t.Fatal(err)
	}
	r := in.Reader()
	for i := 0; i < 12; i++ {
		var l [4]byte
		if _, err := io.ReadFull(r, l[:]); err != nil {
			t.Fatal(err)
		}
		b := make([]byte, binary.LittleEndian.Uint32(l[:]))
		if _, err := io.ReadFull(r, b); err != nil {
			t.Fatal(err)
		}
		write("FuzzDecodeBAM", i, b)
	}
	_ = br
	// SAM lines.
	sam, err := os.ReadFile(filepath.Join(fix, "sorted.sam"))
	if err != nil {
		t.Fatal(err)
	}
	k := 0
	for _, l := range bytes.Split(sam, []byte("\n")) {
		if len(l) == 0 || l[0] == '@' {
			continue
		}
		l = bytes.Replace(l, []byte("chrA"), []byte("chr1"), -1)
		l = bytes.Replace(l, []byte("chrB"), []byte("chr2"), -1)
		write("FuzzParseSAMLine", k, l)
		if k++; k == 12 {
			break
		}
	}
	// FASTQ: the first records of single.fastq, and a damaged copy.
	fq, err := os.ReadFile(filepath.Join(fix, "single.fastq"))
	if err != nil {
		t.Fatal(err)
	}
	write("FuzzFASTQ", 0, fq[:1500])
	write("FuzzFASTQ", 1, append([]byte("@x\r\nAC\r\n+\r\nII\r\n\n\n"), fq[:300]...))
	write("FuzzOpen", 0, fq[:800])
	write("FuzzOpen", 1, sam[:3000])
	bam, _ := os.ReadFile(filepath.Join(fix, "sorted.bam"))
	write("FuzzOpen", 2, bam[:4096])
	gz, _ := os.ReadFile(filepath.Join(fix, "pairs_R1.fastq.gz"))
	write("FuzzOpen", 3, gz[:2048])
	// BGZF: small streams from biogo's writer (several blocks, the EOF
	// block, a cut one) and the first 4 KiB of sorted.bam.
	z := bgzfOf(t, fq[:3000], 700)
	write("FuzzBGZF", 0, z)
	write("FuzzBGZF", 1, z[:len(z)/2])
	write("FuzzBGZF", 2, bgzfOf(t, nil, 1))
	write("FuzzBGZF", 3, bam[:4096])
}
