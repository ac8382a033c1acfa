package reads

import (
	"bytes"
	"fmt"
	"io"
)

// PairReader reads the two mate files of paired-end FASTQ in step: record
// i of one file and record i of the other are the two reads of one
// fragment, and their names (MateName) must agree.
type PairReader struct {
	r           [2]*FASTQReader
	interleaved bool
	name        [2]string // the files' names, for errors
	own         []byte    // interleaved: the first mate's bytes, copied
	n           int64     // pairs read
	err         error
}

// NewPairReader returns a reader of the mates in r1 and r2, named name1
// and name2 in its errors.
func NewPairReader(r1, r2 *FASTQReader, name1, name2 string) *PairReader {
	return &PairReader{r: [2]*FASTQReader{r1, r2}, name: [2]string{name1, name2}}
}

// NewInterleavedReader returns a reader of the mates of an interleaved
// file, records 2i+1 and 2i+2 being the two reads of fragment i.
func NewInterleavedReader(r *FASTQReader, name string) *PairReader {
	return &PairReader{r: [2]*FASTQReader{r, r}, name: [2]string{name, name}, interleaved: true}
}

// Pairs returns the number of pairs read so far.
func (p *PairReader) Pairs() int64 { return p.n }

// Read reads the next pair into a and b. It returns io.EOF after the last
// pair, having checked both files' ends. A file's own error is returned
// as a *FileError naming it; files out of step (names that disagree, one
// file longer than the other) as a *FileError naming the file that
// disagrees first, with a *ParseError at its line. Errors are sticky.
func (p *PairReader) Read(a, b *FASTQRecord) error {
	if p.err != nil {
		return p.err
	}
	p.err = p.read(a, b)
	return p.err
}

func (p *PairReader) read(a, b *FASTQRecord) error {
	e1 := p.r[0].Read(a)
	if p.interleaved && e1 == nil {
		// The second Read may move the buffer the first record is in.
		p.own = append(p.own[:0], a.Name...)
		p.own = append(p.own, a.Comment...)
		p.own = append(p.own, a.Seq...)
		p.own = append(p.own, a.Qual...)
		o := p.own
		n, c, s := len(a.Name), len(a.Comment), len(a.Seq)
		a.Name, a.Comment, a.Seq, a.Qual = o[:n:n], o[n:n+c:n+c], o[n+c:n+c+s:n+c+s], o[n+c+s:]
	}
	e2 := p.r[1].Read(b)
	for i, e := range [2]error{e1, e2} {
		if e != nil && e != io.EOF {
			return &FileError{File: p.name[i], Err: e}
		}
	}
	switch {
	case e1 == io.EOF && e2 == io.EOF:
		return io.EOF
	case p.interleaved && e1 == io.EOF:
		return io.EOF
	case p.interleaved && e2 == io.EOF:
		return &FileError{File: p.name[0], Err: &ParseError{Line: p.r[0].RecordLine(),
			Err: fmt.Errorf("the interleaved file ends with an unpaired record (an odd number of records, %d): it is cut short or not interleaved", 2*p.n+1)}}
	case e1 == io.EOF:
		return p.longer(1)
	case e2 == io.EOF:
		return p.longer(0)
	}
	p.n++
	if !bytes.Equal(MateName(a.Name), MateName(b.Name)) {
		if p.interleaved {
			return &FileError{File: p.name[0], Err: &ParseError{Line: p.r[0].RecordLine(),
				Err: fmt.Errorf("read name %q does not match %q of the record before it: the file starts interleaved (mates in turn) but is not interleaved here", b.Name, a.Name)}}
		}
		return &FileError{File: p.name[1], Err: &ParseError{Line: p.r[1].RecordLine(),
			Err: fmt.Errorf("read name %q does not match %q at line %d of %s: the mate files are out of step (give R1 and R2 of the same run, unfiltered or filtered together)",
				b.Name, a.Name, p.r[0].RecordLine(), p.name[0])}}
	}
	return nil
}

// longer reports that file i has a record where the other file ended.
func (p *PairReader) longer(i int) error {
	return &FileError{File: p.name[i], Err: &ParseError{Line: p.r[i].RecordLine(),
		Err: fmt.Errorf("has more records than %s (%d): mate files must have the same reads in the same order", p.name[1-i], p.n)}}
}
