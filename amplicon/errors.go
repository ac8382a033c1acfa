package amplicon

import (
	"errors"
	"fmt"
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

// ParseError is bad input at a position. Line and Column are 1-based;
// Column is the field number in delimited text and the byte position on
// the line in JSON; 0 means unknown.
type ParseError struct {
	Line   int64
	Column int64
	Kind   error  // one of the Err* values above
	Msg    string // what is wrong and what to do, without position
}

func (e *ParseError) Error() string {
	switch {
	case e.Line > 0 && e.Column > 0:
		return fmt.Sprintf("amplicon: line %d, column %d: %s", e.Line, e.Column, e.Msg)
	case e.Line > 0:
		return fmt.Sprintf("amplicon: line %d: %s", e.Line, e.Msg)
	}
	return "amplicon: " + e.Msg
}

// Unwrap returns the kind of error.
func (e *ParseError) Unwrap() error { return e.Kind }

func perr(line, col int64, kind error, format string, args ...any) *ParseError {
	return &ParseError{Line: line, Column: col, Kind: kind, Msg: fmt.Sprintf(format, args...)}
}
