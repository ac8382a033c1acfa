package reads

import (
	"encoding/binary"
	"errors"
	"testing"
)

// bamRecord lays out one BAM alignment record as in the SAM
// specification section 4.2 (without block_size): refID, pos,
// l_read_name, mapq, bin, n_cigar_op, flag, l_seq, next_refID, next_pos,
// tlen, read_name NUL, cigar, seq (4-bit), qual, then optional fields.
func bamRecord(ref, pos int32, mapq uint8, flag uint16, name string, cigar []CigarOp, lSeq int, mref, mpos int32, aux []byte) []byte {
	le := binary.LittleEndian
	b := make([]byte, 32)
	le.PutUint32(b[0:], uint32(ref))
	le.PutUint32(b[4:], uint32(pos))
	b[8] = byte(len(name) + 1)
	b[9] = mapq
	le.PutUint16(b[12:], uint16(len(cigar)))
	le.PutUint16(b[14:], flag)
	le.PutUint32(b[16:], uint32(lSeq))
	le.PutUint32(b[20:], uint32(mref))
	le.PutUint32(b[24:], uint32(mpos))
	b = append(b, name...)
	b = append(b, 0)
	for _, c := range cigar {
		b = le.AppendUint32(b, uint32(c))
	}
	b = append(b, make([]byte, (lSeq+1)/2+lSeq)...)
	return append(b, aux...)
}

func op(n int64, code int) CigarOp { return CigarOp(n<<4 | int64(code)) }

func TestDecodeBAM(t *testing.T) {
	aux := []byte("XAi\x05\x00\x00\x00RGZlane1\x00BCBC\x02\x00\x00\x00\x01\x02RXZACGT-TTGA\x00MCZ5S95M\x00")
	b := bamRecord(1, 999, 60, 0x63, "A1:1:FC:1:1101:10:20", []CigarOp{op(5, CigarSoftClip), op(95, CigarMatch)}, 100, 1, 1199, aux)
	var r Record
	if err := DecodeBAM(b, 2, &r); err != nil {
		t.Fatal(err)
	}
	if r.Ref != 1 || r.Pos != 999 || r.MapQ != 60 || r.Flags != 0x63 || r.MateRef != 1 || r.MatePos != 1199 || r.SeqLen != 100 ||
		string(r.Name) != "A1:1:FC:1:1101:10:20" || string(r.RG) != "lane1" || string(r.Tag(Tag{'R', 'X'})) != "ACGT-TTGA" || string(r.Tag(Tag{'B', 'C'})) != "" || string(r.MC) != "5S95M" || len(r.Cigar) != 2 {
		t.Errorf("decoded %+v", r)
	}
	// Corruptions of a valid record are errors, never panics.
	bad := map[string][]byte{
		"short":            b[:20],
		"refID past refs":  bamRecord(5, 0, 0, 0, "r", nil, 0, -1, -1, nil),
		"cut in the CIGAR": b[:32+21+4],
		"bad op code":      bamRecord(0, 0, 0, 0, "r", []CigarOp{op(3, 9)}, 0, -1, -1, nil),
		"aux type":         bamRecord(0, 0, 0, 0, "r", nil, 0, -1, -1, []byte("XXq\x00")),
		"Z not terminated": bamRecord(0, 0, 0, 0, "r", nil, 0, -1, -1, []byte("RGZabc")),
		"B too long":       bamRecord(0, 0, 0, 0, "r", nil, 0, -1, -1, []byte("XBBI\xff\xff\x00\x00")),
	}
	for what, rec := range bad {
		if err := DecodeBAM(rec, 2, &r); !errors.Is(err, ErrBadRecord) {
			t.Errorf("%s: err = %v, want ErrBadRecord", what, err)
		}
	}
}

// TestDecodeBAMLongCigar: a CIGAR of more than 65535 operations is kept in
// the CG:B:I tag with the placeholder <l_seq>S<ref length>N (SAM
// specification 4.2.2); the real CIGAR decides the 5' end.
func TestDecodeBAMLongCigar(t *testing.T) {
	real := []CigarOp{op(7, CigarSoftClip), op(50, CigarMatch), op(3, CigarDel), op(43, CigarMatch), op(4, CigarSoftClip)}
	cg := []byte("CGBI\x05\x00\x00\x00")
	for _, c := range real {
		cg = binary.LittleEndian.AppendUint32(cg, uint32(c))
	}
	b := bamRecord(0, 1000, 60, 0x10, "long", []CigarOp{op(104, CigarSoftClip), op(96, CigarSkip)}, 104, -1, -1, cg)
	var r Record
	if err := DecodeBAM(b, 1, &r); err != nil {
		t.Fatal(err)
	}
	if len(r.Cigar) != 5 {
		t.Fatalf("CIGAR from CG: %d ops, want 5", len(r.Cigar))
	}
	// reverse: 1000 + (50+3+43) - 1 + 4
	if got := Unclipped5(r.Pos, r.Cigar, true); got != 1099 {
		t.Errorf("5' end %d, want 1099", got)
	}
}
