package reads

import (
	"errors"
	"strings"
	"testing"
)

// TestUnclipped5 checks the unclipped 5' end on CIGARs with every kind of
// operation, on both strands. Expected values are worked by hand from the
// SAM specification (v1.6, section 1.4.6, the table of CIGAR operations):
// M, D, N, = and X consume the reference; I, S, H and P do not; S and H at
// either end are the clips. POS is 0-based here (SAM POS minus 1).
func TestUnclipped5(t *testing.T) {
	cases := []struct {
		cigar string
		pos   int32
		rev   bool
		want  int64
		why   string
	}{
		{"100M", 1000, false, 1000, "no clip: forward end is POS"},
		{"100M", 1000, true, 1099, "reverse: POS + 100 - 1"},
		{"5S95M", 1000, false, 995, "leading soft clip moves the forward end left"},
		{"5S95M", 1000, true, 1094, "a leading clip is the reverse read's 3' end: ignored"},
		{"95M5S", 1000, true, 1099, "trailing soft clip added to the reverse end"},
		{"95M5S", 1000, false, 1000, "trailing clip is the forward read's 3' end: ignored"},
		{"3H5S92M", 1000, false, 992, "H and S both count: 1000 - 8"},
		{"92M5S3H", 1000, true, 1099, "1000 + 92 - 1 + 8"},
		{"50M2I48M", 1000, true, 1097, "I does not consume the reference: 98 ref bases"},
		{"50M4D50M", 1000, true, 1103, "D consumes the reference: 104 ref bases"},
		{"40M300N60M", 1000, true, 1399, "N consumes the reference: 400 ref bases"},
		{"40M300N60M", 1000, false, 1000, "N does not move the forward end"},
		{"10S40M2P3I300N20=5X12S", 2000, true, 2000 + 40 + 300 + 20 + 5 - 1 + 12, "P and I skipped, = and X consume"},
		{"10S40M2P3I300N20=5X12S", 2000, false, 1990, "forward: only the 10S lead counts"},
		{"7H", 500, false, 493, "only clips: forward end is POS - clip"},
		{"*", 500, true, 500, "no CIGAR: the read covers its position"},
	}
	for _, c := range cases {
		cig, err := ParseCigar(nil, []byte(c.cigar))
		if err != nil {
			t.Fatalf("ParseCigar(%q): %v", c.cigar, err)
		}
		if got := Unclipped5(c.pos, cig, c.rev); got != c.want {
			t.Errorf("Unclipped5(pos=%d, %s, reverse=%v) = %d, want %d (%s)", c.pos, c.cigar, c.rev, got, c.want, c.why)
		}
	}
}

func TestParseCigar(t *testing.T) {
	good := map[string]int{"*": 0, "10M": 1, "1S2M3I4D5N6S7H8P9=10X": 10}
	for s, n := range good {
		c, err := ParseCigar(nil, []byte(s))
		if err != nil || len(c) != n {
			t.Errorf("ParseCigar(%q) = %d ops, %v; want %d ops", s, len(c), err, n)
		}
	}
	for _, s := range []string{"", "M", "10", "10Q", "5M*", "-5M", "268435456M"} {
		if _, err := ParseCigar(nil, []byte(s)); !errors.Is(err, ErrBadCigar) {
			t.Errorf("ParseCigar(%q): err = %v, want ErrBadCigar", s, err)
		}
	}
}

func TestParseSpot(t *testing.T) {
	cases := []struct {
		name       string
		ok         bool
		lane, tile int64
		x, y       int64
	}{
		{"A00123:8:HXYZ:2:1101:12345:2000", true, 2, 1101, 12345, 2000},
		{"A00123:8:HXYZ:2:1101:12345:2000/1", true, 2, 1101, 12345, 2000},
		{"A00123:8:HXYZ:2:1101:12345:2000:ACGTACGT", true, 2, 1101, 12345, 2000},
		{"HWI-1:3:22:1733:98", true, 3, 22, 1733, 98},
		{"read17", false, 0, 0, 0, 0},
		{"a:b:c:d:e:f:g", false, 0, 0, 0, 0},
		{"A:1:F:2:1101:2000000:5", false, 0, 0, 0, 0}, // x beyond 20 bits
	}
	for _, c := range cases {
		s := ParseSpot([]byte(c.name))
		if (s != 0) != c.ok {
			t.Errorf("ParseSpot(%q) = %#x, want ok=%v", c.name, uint64(s), c.ok)
			continue
		}
		if c.ok && (s.X() != c.x || s.Y() != c.y || s>>40 != Spot(uint64(c.lane+1)<<16|uint64(c.tile))) {
			t.Errorf("ParseSpot(%q): x=%d y=%d tile bits %#x", c.name, s.X(), s.Y(), uint64(s>>40))
		}
	}
}

func TestNameUMI(t *testing.T) {
	for name, want := range map[string]string{
		"A1:8:FC:2:1101:1:2:ACGTTT+GGCA": "ACGTTT+GGCA",
		"read7_TTAGGC":                   "TTAGGC",
		"read7_TTAGGC/2":                 "TTAGGC",
		"A1:8:FC:2:1101:1:2":             "",
	} {
		if got := string(NameUMI([]byte(name))); got != want {
			t.Errorf("NameUMI(%q) = %q, want %q", name, got, want)
		}
	}
}

// TestPairCountedOnce: of the two records of a pair exactly one starts the
// fragment, whichever of them carries an MC tag (SAM specification 1.5:
// MC is optional; a file may have it on one mate only), and the two mates
// of one pair always agree. Positions are chosen so that the raw order
// (POS) and the unclipped order disagree: mate 1 at POS 110 forward with
// 20S (unclipped end 90), mate 2 at POS 100 reverse with 10M (end 109).
func TestPairCountedOnce(t *testing.T) {
	m1 := Record{Name: []byte("p"), Flags: FlagPaired | FlagRead1 | FlagMateReverse, Ref: 0, Pos: 110, MapQ: 60,
		Cigar: mustCigar(t, "20S30M"), MateRef: 0, MatePos: 100}
	m2 := Record{Name: []byte("p"), Flags: FlagPaired | FlagRead2 | FlagReverse, Ref: 0, Pos: 100, MapQ: 60,
		Cigar: mustCigar(t, "10M"), MateRef: 0, MatePos: 110}
	withMC := func(r Record, mc string) Record {
		r.MC = []byte(mc)
		if err := parseMC(&r); err != nil {
			t.Fatal(err)
		}
		return r
	}
	for _, c := range []struct {
		name   string
		r1, r2 Record
	}{
		{"no MC", m1, m2},
		{"both MC", withMC(m1, "10M"), withMC(m2, "20S30M")},
		{"MC on mate 1 only", withMC(m1, "10M"), m2},
		{"MC on mate 2 only", m1, withMC(m2, "20S30M")},
		{"MC * on one", withMC(m1, "*"), withMC(m2, "20S30M")},
	} {
		var k Keyer
		_, ok1 := k.Alignment(&c.r1, 0)
		_, ok2 := k.Alignment(&c.r2, 0)
		if ok1 == ok2 {
			t.Errorf("%s: mate 1 counts %v, mate 2 counts %v; want exactly one", c.name, ok1, ok2)
		}
	}
	// Both MC: the key holds the exact unclipped ends; it is the same
	// whichever mate was read 1 (the mates swapped).
	var k Keyer
	r2 := withMC(m2, "20S30M")
	f, ok := k.Alignment(&r2, 0)
	s1, s2 := withMC(m1, "10M"), withMC(m2, "20S30M")
	s1.Flags, s2.Flags = s1.Flags&^FlagRead1|FlagRead2, s2.Flags&^FlagRead2|FlagRead1
	g, ok2 := k.Alignment(&s2, 0)
	if !ok || !ok2 || f.Key != g.Key {
		t.Errorf("mates swapped: keys %x (%v) and %x (%v) differ", f.Key, ok, g.Key, ok2)
	}
	// Mates at the same POS: read 1 counts; when the flags do not say
	// which mate is first (both or neither set), the forward one does.
	for _, fl := range []uint16{FlagRead1, FlagRead1 | FlagRead2, 0} {
		t1 := Record{Name: []byte("t"), Flags: FlagPaired | FlagMateReverse | fl, Ref: 0, Pos: 500, MapQ: 60, Cigar: mustCigar(t, "30M"), MateRef: 0, MatePos: 500}
		t2 := Record{Name: []byte("t"), Flags: FlagPaired | FlagReverse | fl, Ref: 0, Pos: 500, MapQ: 60, Cigar: mustCigar(t, "30M"), MateRef: 0, MatePos: 500}
		if fl == FlagRead1 {
			t2.Flags = t2.Flags&^FlagRead1 | FlagRead2
		}
		var k Keyer
		_, ok1 := k.Alignment(&t1, 0)
		_, ok2 := k.Alignment(&t2, 0)
		if ok1 == ok2 {
			t.Errorf("tie with flags %#x: mate 1 counts %v, mate 2 counts %v; want exactly one", fl, ok1, ok2)
		}
	}
	if bad := (Record{MC: []byte("10Q")}); parseMC(&bad) == nil {
		t.Error("MC 10Q parsed")
	}
}

func mustCigar(t *testing.T, s string) []CigarOp {
	t.Helper()
	c, err := ParseCigar(nil, []byte(s))
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// TestReadNameConventions: mate numbers (a "/1" "/2" suffix, or the CASAVA
// 1.8 comment "1:N:0:INDEX"), instrument file names
// (NAME_S#_L00#_R#_001.fastq.gz) and patterned flow cells, the layouts of
// common practice described in reads/name.go.
func TestReadNameConventions(t *testing.T) {
	for _, c := range []struct {
		name, comment string
		mate          int
	}{
		{"r1/1", "", 1}, {"r1/2", "BC:Z:ACGT", 2}, {"A1:7:FC:1:1101:10:20", "2:N:0:ACGTAC", 2},
		{"A1:7:FC:1:1101:10:20", "1:Y:18:7", 1}, {"r1", "3:N:0", 0}, {"r1", "", 0}, {"r1/3", "", 0},
	} {
		if got := MateNumber([]byte(c.name), []byte(c.comment)); got != c.mate {
			t.Errorf("MateNumber(%q, %q) = %d, want %d", c.name, c.comment, got, c.mate)
		}
	}
	for _, c := range []struct {
		file string
		want FASTQName
		ok   bool
	}{
		{"LIB7_S3_L001_R1_001.fastq.gz", FASTQName{"LIB7", 1, 1}, true},
		{"liver_3_S12_L004_R2_001.fq", FASTQName{"liver_3", 4, 2}, true},
		{"LIB7_S3_R2_001.fastq.gz", FASTQName{"LIB7", 0, 2}, true},
		{"LIB7_S3_L001_I1_001.fastq.gz", FASTQName{}, false},
		{"LIB7_R1.fastq.gz", FASTQName{}, false},
		{"S3_L001_R1_001.fastq.gz", FASTQName{}, false},
		{"LIB7_S3_L001_R1_001.bam", FASTQName{}, false},
	} {
		got, ok := ParseFASTQName(c.file)
		if ok != c.ok || ok && got != c.want {
			t.Errorf("ParseFASTQName(%q) = %+v, %v; want %+v, %v", c.file, got, ok, c.want, c.ok)
		}
	}
	for _, c := range []struct {
		name string
		want bool
	}{
		{"INV01:12:HVKNWDSXY:2:1101:5005:1000", true},   // NovaSeq-style flow cell ID
		{"INV01:3:H3TCKCCXY:4:1216:12000:3000/1", true}, // HiSeq X-style
		{"INV01:9:FCE77:1:2471:1200:3000", true},        // 71 tiles in a swath
		{"INV01:9:FCE77:1:2116:1200:3000", false},       // HiSeq 2500 numbering
		{"INV01:9:C6FD4ANXX:1:1101:1200:3000", false},   // HiSeq 2500 v4 flow cell ID
		{"INV01:1101:1200:3000", false},
	} {
		if got, _, _ := Patterned([]byte(c.name)); got != c.want {
			t.Errorf("Patterned(%q) = %v, want %v", c.name, got, c.want)
		}
	}
}

// TestUMICodeBytes: every byte value packs as UMICode's comment says:
// A, C, G, T in either case as 0-3, '-' and '+' skipped, anything else
// making the UMI unpackable; 28 bases at most.
func TestUMICodeBytes(t *testing.T) {
	for b := 0; b < 256; b++ {
		want := uint64(0)
		switch byte(b) {
		case 'A', 'a', 'C', 'c', 'G', 'g', 'T', 't':
			v := uint64(strings.IndexByte("ACGT", byte(b)&^0x20))
			want = 1<<2 | v | 2<<56
		case '-', '+':
			want = 1 | 1<<56
		}
		if got := UMICode([]byte{'C', byte(b)}); got != want {
			t.Errorf("UMICode(C%q) = %x, want %x", byte(b), got, want)
		}
	}
	if got := UMICode([]byte(strings.Repeat("T", 28))); got != 1<<56-1|28<<56 {
		t.Errorf("28 bases: %x", got)
	}
	if got := UMICode([]byte(strings.Repeat("T", 29))); got != 0 {
		t.Errorf("29 bases: %x, want 0", got)
	}
}
