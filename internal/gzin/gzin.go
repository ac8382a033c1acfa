// Package gzin opens text inputs that may be gzip-compressed (RFC 1952)
// and classifies what can go wrong while inflating them, for the table
// readers (taxon tables, frequency-count tables) and the read files.
package gzin

import (
	"bufio"
	"errors"
	"io"

	"github.com/klauspost/compress/gzip"
)

// Reader returns a buffered reader of the text of r (buffer size bytes),
// inflating it when r starts with the gzip magic bytes; several members
// are read one after another, as gzip -dc does. gz reports whether r was
// gzip. A gzip header that cannot be read is an error that Cut or
// Damaged classifies.
func Reader(r io.Reader, size int) (br *bufio.Reader, gz bool, err error) {
	br = bufio.NewReaderSize(r, size)
	if head, _ := br.Peek(2); len(head) < 2 || head[0] != 0x1f || head[1] != 0x8b {
		return br, false, nil
	}
	zr, err := gzip.NewReader(br)
	if err == io.EOF {
		err = io.ErrUnexpectedEOF // the magic bytes were there: a cut header
	}
	if err != nil {
		return nil, true, err
	}
	return bufio.NewReaderSize(zr, size), true, nil
}

// Cut reports whether err says a gzip stream ended before its end.
func Cut(err error) bool {
	return errors.Is(err, io.ErrUnexpectedEOF)
}

// Damaged reports whether err says a gzip header or checksum is wrong.
func Damaged(err error) bool {
	return errors.Is(err, gzip.ErrChecksum) || errors.Is(err, gzip.ErrHeader)
}
