package reads

import (
	"bytes"
	"fmt"
)

// Tag is the two-character name of a SAM optional field ("RX", "CB").
type Tag [2]byte

// ParseTag checks a tag name against the SAM specification's pattern for
// optional field tags, [A-Za-z][A-Za-z0-9] (section 1.5).
func ParseTag(s string) (Tag, error) {
	alpha := func(c byte) bool { return c >= 'A' && c <= 'Z' || c >= 'a' && c <= 'z' }
	if len(s) != 2 || !alpha(s[0]) || !(alpha(s[1]) || s[1] >= '0' && s[1] <= '9') {
		return Tag{}, fmt.Errorf("reads: %q is not a SAM tag name (a letter, then a letter or digit)", s)
	}
	return Tag{s[0], s[1]}, nil
}

func (t Tag) String() string { return string(t[:]) }

// Tag returns the value of the record's optional field t when it is a
// string (type Z) or a character (type A), else nil. The slice points into
// the reader's buffer like the record's others.
func (r *Record) Tag(t Tag) []byte {
	if r.bamAux != nil {
		return bamTag(r.bamAux, t)
	}
	return samTag(r.samAux, t)
}

// bamTag finds t in BAM optional fields that scanAux has checked.
func bamTag(a []byte, t Tag) []byte {
	for len(a) > 0 {
		f, rest, err := nextAux(a)
		if err != nil {
			return nil
		}
		if f.tag == t && (f.typ == 'Z' || f.typ == 'A') {
			return f.val
		}
		a = rest
	}
	return nil
}

// samTag finds t among SAM optional fields (TAG:TYPE:VALUE, tab-separated).
func samTag(s []byte, t Tag) []byte { return textTag(s, "\t", t) }

// CommentTag returns the value of a TAG:Z:VALUE (or TAG:A:) word in a
// FASTQ header comment, as samtools fastq -T writes SAM tags there, or nil.
func CommentTag(comment []byte, t Tag) []byte { return textTag(comment, " \t", t) }

// textTag finds the string or character field t in text fields
// TAG:TYPE:VALUE separated by any of seps.
func textTag(s []byte, seps string, t Tag) []byte {
	for len(s) > 0 {
		var f []byte
		if j := bytes.IndexAny(s, seps); j >= 0 {
			f, s = s[:j], s[j+1:]
		} else {
			f, s = s, nil
		}
		if len(f) >= 5 && f[0] == t[0] && f[1] == t[1] && f[2] == ':' && (f[3] == 'Z' || f[3] == 'A') && f[4] == ':' {
			return f[5:]
		}
	}
	return nil
}
