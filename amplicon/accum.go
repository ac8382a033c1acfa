package amplicon

import (
	"math"
	"strconv"

	"headroom/complexity"
)

// smallCounts is how many count values an accumulator keeps in a dense
// array before falling back to a map: most cells of a taxon table are
// small, and an array increment is far cheaper than a map update.
const smallCounts = 256

// accum gathers one sample's frequency counts: freq[v] = taxa seen v times.
type accum struct {
	small []int64 // small[v] for 0 < v < smallCounts; nil until used
	big   map[int64]int64
	reads int64
}

// add records one taxon seen v > 0 times; it reports false when the
// sample's total would overflow int64.
func (a *accum) add(v int64) bool {
	if a.reads > math.MaxInt64-v {
		return false
	}
	a.reads += v
	if v < smallCounts {
		if a.small == nil {
			a.small = make([]int64, smallCounts)
		}
		a.small[v]++
		return true
	}
	if a.big == nil {
		a.big = make(map[int64]int64)
	}
	a.big[v]++
	return true
}

// counts returns the frequency counts gathered so far.
func (a *accum) counts() (complexity.Counts, error) {
	cs := make([]complexity.Class, 0, 64)
	for v, u := range a.small {
		if u > 0 {
			cs = append(cs, complexity.Class{Times: int64(v), Units: u})
		}
	}
	for v, u := range a.big {
		cs = append(cs, complexity.Class{Times: v, Units: u})
	}
	return complexity.NewCounts(cs)
}

// reset empties the accumulator, keeping its array.
func (a *accum) reset() {
	clear(a.small)
	a.big = nil
	a.reads = 0
}

// maxExact is the largest count accepted from a decimal with a fraction
// point or exponent: float64 holds every integer up to 2^53 exactly.
const maxExact = 1 << 53

// cellErr is what is wrong with a cell, without its position.
type cellErr struct {
	kind error
	msg  string
}

// parseCount reads one count cell. It accepts plain digits and whole
// numbers written as decimals ("12.0", "1e3"); surrounding spaces are
// ignored. The returned message says what is wrong and what to do.
func parseCount(b []byte) (int64, *cellErr) {
	// Fast path: up to 18 digits, no sign, no spaces.
	if n := len(b); n > 0 && n <= 18 {
		var v int64
		i := 0
		for ; i < n; i++ {
			c := b[i] - '0'
			if c > 9 {
				break
			}
			v = v*10 + int64(c)
		}
		if i == n {
			return v, nil
		}
	}
	return parseCountSlow(b)
}

func parseCountSlow(b []byte) (int64, *cellErr) {
	s := string(trimSpace(b))
	if s == "" {
		return 0, &cellErr{ErrNotCount, "empty count cell; write 0 for a taxon not seen in a sample"}
	}
	numeric := true
	for i := 0; i < len(s); i++ {
		c := s[i]
		if !(c >= '0' && c <= '9' || c == '.' || c == 'e' || c == 'E' || c == '+' || c == '-') {
			numeric = false
			break
		}
	}
	if !numeric {
		return 0, &cellErr{ErrNotCount, "word " + quote(s) + " in a count cell; count cells must hold whole numbers of reads"}
	}
	if v, err := strconv.ParseInt(s, 10, 64); err == nil {
		if v < 0 {
			return 0, &cellErr{ErrNegative, "negative count " + quote(s) + "; counts must be 0 or more"}
		}
		return v, nil
	} else if ne, ok := err.(*strconv.NumError); ok && ne.Err == strconv.ErrRange {
		return 0, &cellErr{ErrTooLarge, "count " + quote(s) + " is too large"}
	}
	f, err := strconv.ParseFloat(s, 64)
	if err != nil {
		if ne, ok := err.(*strconv.NumError); ok && ne.Err == strconv.ErrRange {
			return 0, &cellErr{ErrTooLarge, "count " + quote(s) + " is out of range"}
		}
		return 0, &cellErr{ErrNotCount, quote(s) + " is not a number; count cells must hold whole numbers of reads"}
	}
	if f < 0 {
		return 0, &cellErr{ErrNegative, "negative count " + quote(s) + "; counts must be 0 or more"}
	}
	if f != math.Trunc(f) {
		return 0, &cellErr{ErrNotCount, quote(s) + " is not a whole number; headroom needs raw read counts, " +
			"not proportions, relative abundances or normalised values"}
	}
	if f > maxExact {
		return 0, &cellErr{ErrTooLarge, "count " + quote(s) + " is too large to be exact in decimal notation; write it as plain digits"}
	}
	return int64(f), nil
}

func trimSpace(b []byte) []byte {
	for len(b) > 0 && (b[0] == ' ' || b[0] == '\t') {
		b = b[1:]
	}
	for len(b) > 0 && (b[len(b)-1] == ' ' || b[len(b)-1] == '\t') {
		b = b[:len(b)-1]
	}
	return b
}

// quote quotes s for a message, shortened to keep the message one line.
func quote(s string) string {
	const max = 40
	if len(s) > max {
		s = s[:max] + "..."
	}
	return strconv.Quote(s)
}
