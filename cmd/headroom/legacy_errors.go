package main

import (
	"errors"
	"fmt"

	"headroom/reads"
)

// legacyPosition reads the position of the error types of the readers
// that do not yet report with inerr.ParseError. line < 0: no position
// type at all.
func legacyPosition(err error) (line int64, where []string, inner error) {
	var rp *reads.ParseError
	if errors.As(err, &rp) {
		if rp.Line == 0 && rp.Record > 0 {
			where = append(where, fmt.Sprintf("record %d", rp.Record))
		}
		return rp.Line, where, rp.Err
	}
	return -1, nil, err
}
