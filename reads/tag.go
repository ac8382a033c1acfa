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
	for len(a) >= 3 {
		t0, t1, typ := a[0], a[1], a[2]
		a = a[3:]
		size := 0
		switch typ {
		case 'A':
			if t0 == t[0] && t1 == t[1] && len(a) >= 1 {
				return a[:1]
			}
			size = 1
		case 'c', 'C':
			size = 1
		case 's', 'S':
			size = 2
		case 'i', 'I', 'f':
			size = 4
		case 'Z', 'H':
			i := bytes.IndexByte(a, 0)
			if i < 0 {
				return nil
			}
			if typ == 'Z' && t0 == t[0] && t1 == t[1] {
				return a[:i]
			}
			size = i + 1
		case 'B':
			if len(a) < 5 {
				return nil
			}
			es := 4
			switch a[0] {
			case 'c', 'C':
				es = 1
			case 's', 'S':
				es = 2
			}
			size = 5 + int(uint32(a[1])|uint32(a[2])<<8|uint32(a[3])<<16|uint32(a[4])<<24)*es
		default:
			return nil
		}
		if size > len(a) || size < 0 {
			return nil
		}
		a = a[size:]
	}
	return nil
}

// samTag finds t among SAM optional fields (TAG:TYPE:VALUE, tab-separated).
func samTag(s []byte, t Tag) []byte {
	for len(s) > 0 {
		var f []byte
		if j := bytes.IndexByte(s, '\t'); j >= 0 {
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

// CommentTag returns the value of a TAG:Z:VALUE (or TAG:A:) word in a
// FASTQ header comment, as samtools fastq -T writes SAM tags there, or nil.
func CommentTag(comment []byte, t Tag) []byte {
	for len(comment) > 0 {
		var w []byte
		if i := bytes.IndexAny(comment, " \t"); i >= 0 {
			w, comment = comment[:i], comment[i+1:]
		} else {
			w, comment = comment, nil
		}
		if len(w) >= 5 && w[0] == t[0] && w[1] == t[1] && w[2] == ':' && (w[3] == 'Z' || w[3] == 'A') && w[4] == ':' {
			return w[5:]
		}
	}
	return nil
}
