package amplicon

import (
	"errors"
	"fmt"

	"headroom/internal/inerr"
)

// Kinds of bad input. A *ParseError wraps one of them; test with errors.Is.
var (
	ErrNotCount  = errors.New("amplicon: not a raw count")
	ErrNegative  = errors.New("amplicon: negative count")
	ErrShape     = errors.New("amplicon: ragged table")
	ErrDuplicate = errors.New("amplicon: duplicate identifier")
	ErrEmpty     = errors.New("amplicon: empty table")
	ErrTruncated = errors.New("amplicon: truncated input")
	ErrHDF5      = errors.New("amplicon: unsupported HDF5 feature")
	ErrSyntax    = errors.New("amplicon: malformed input")
	ErrTooLarge  = errors.New("amplicon: value too large")
	ErrWrongFile = errors.New("amplicon: not a taxon count table")
)

// ParseError is bad input at a position, the shape every reader of
// headroom shares (internal/inerr). Line and Column are 1-based; Column is
// the field number in delimited text and the byte position on the line in
// JSON; 0 means unknown. Err says what is wrong and what to do, without
// position, and wraps one of the kinds above (errors.Is).
type ParseError = inerr.ParseError

// problem is what is wrong (msg) and its kind, for errors.Is.
type problem struct {
	kind error
	msg  string
}

func (p *problem) Error() string { return p.msg }
func (p *problem) Unwrap() error { return p.kind }

func perr(line, col int64, kind error, format string, args ...any) *ParseError {
	return &ParseError{Line: line, Column: col, Err: &problem{kind: kind, msg: fmt.Sprintf(format, args...)}}
}
