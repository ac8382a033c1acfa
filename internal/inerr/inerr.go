// Package inerr holds the one error shape that every reader of headroom
// uses to say where its input is wrong, in the manner of encoding/csv's
// ParseError: a position (line, column, record; 0 = not known) and the
// error, which callers match with errors.Is and errors.As.
package inerr

import (
	"fmt"
	"strings"
)

// ParseError is bad input at a position. Line and Column count from 1 in
// text inputs; Record counts records (or other units a binary format is
// made of) from 1. Zero means the position is not known or not meaningful.
type ParseError struct {
	Line   int64
	Column int64
	Record int64
	Err    error
}

// Error gives the position, then the error: "line 3, column 2: ...".
func (e *ParseError) Error() string {
	if p := e.Position(); p != "" {
		return p + ": " + e.Err.Error()
	}
	return e.Err.Error()
}

// Unwrap returns the underlying error.
func (e *ParseError) Unwrap() error { return e.Err }

// Position renders the known parts of the position ("" when none): line
// and column for text, record for binary formats.
func (e *ParseError) Position() string {
	var p []string
	if e.Line > 0 {
		p = append(p, fmt.Sprintf("line %d", e.Line))
	}
	if e.Column > 0 {
		p = append(p, fmt.Sprintf("column %d", e.Column))
	}
	if e.Record > 0 && e.Line == 0 {
		p = append(p, fmt.Sprintf("record %d", e.Record))
	}
	return strings.Join(p, ", ")
}
