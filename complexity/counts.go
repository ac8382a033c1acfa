package complexity

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// Class is one row of a frequency-count table: Units distinct units were
// each seen exactly Times times.
type Class struct {
	Times int64
	Units int64
}

// Counts is a validated frequency-count table (a "frequency of frequencies"
// histogram): for each j >= 1, n_j = the number of distinct units seen
// exactly j times. Its zero value is an empty table (no reads).
//
// A Counts is immutable once built; methods never modify it.
type Counts struct {
	classes  []Class // Times ascending, strictly; Units > 0
	reads    int64   // N = sum_j j n_j
	distinct int64   // D = sum_j n_j
}

// Errors returned when a frequency-count table is invalid.
var (
	ErrTimes    = errors.New("complexity: times_seen must be at least 1")
	ErrUnits    = errors.New("complexity: units must not be negative")
	ErrRepeat   = errors.New("complexity: times_seen repeated within a sample")
	ErrOverflow = errors.New("complexity: total reads overflow int64")
)

// NewCounts validates classes and returns the table they describe. Classes
// may come in any order; classes with zero units are dropped. A repeated
// Times is an error (use Builder to accumulate).
func NewCounts(classes []Class) (Counts, error) {
	cs := make([]Class, 0, len(classes))
	for _, c := range classes {
		if c.Times < 1 {
			return Counts{}, fmt.Errorf("%w (got %d)", ErrTimes, c.Times)
		}
		if c.Units < 0 {
			return Counts{}, fmt.Errorf("%w (got %d)", ErrUnits, c.Units)
		}
		cs = append(cs, c)
	}
	sort.Slice(cs, func(i, j int) bool { return cs[i].Times < cs[j].Times })
	for i := 1; i < len(cs); i++ {
		if cs[i].Times == cs[i-1].Times {
			return Counts{}, fmt.Errorf("%w (times_seen %d)", ErrRepeat, cs[i].Times)
		}
	}
	out := Counts{classes: cs[:0]}
	for _, c := range cs {
		if c.Units == 0 {
			continue
		}
		if c.Units > math.MaxInt64/c.Times {
			return Counts{}, ErrOverflow
		}
		r := c.Times * c.Units
		if out.reads > math.MaxInt64-r {
			return Counts{}, ErrOverflow
		}
		out.reads += r
		out.distinct += c.Units // distinct <= reads, cannot overflow first
		out.classes = append(out.classes, c)
	}
	return out, nil
}

// FromMap builds a table from a map times -> units.
func FromMap(m map[int64]int64) (Counts, error) {
	cs := make([]Class, 0, len(m))
	for t, u := range m {
		cs = append(cs, Class{Times: t, Units: u})
	}
	return NewCounts(cs)
}

// fromUnitCounts builds a table from per-unit read counts (one entry per
// unit; zeros are ignored).
func fromUnitCounts(perUnit []int64) (Counts, error) {
	m := make(map[int64]int64)
	for _, x := range perUnit {
		if x < 0 {
			return Counts{}, fmt.Errorf("%w (got %d)", ErrUnits, x)
		}
		if x > 0 {
			m[x]++
		}
	}
	return FromMap(m)
}

// Classes returns the non-empty classes, Times ascending. The slice is a
// copy; callers may modify it.
func (c Counts) Classes() []Class { return append([]Class(nil), c.classes...) }

// Reads returns N = sum_j j n_j, the number of reads (observations).
func (c Counts) Reads() int64 { return c.reads }

// Distinct returns D = sum_j n_j, the number of distinct units observed.
func (c Counts) Distinct() int64 { return c.distinct }

// Units returns n_j, the number of units seen exactly j times.
func (c Counts) Units(j int64) int64 {
	i := sort.Search(len(c.classes), func(i int) bool { return c.classes[i].Times >= j })
	if i < len(c.classes) && c.classes[i].Times == j {
		return c.classes[i].Units
	}
	return 0
}

// MaxTimes returns the largest j with n_j > 0 (0 for an empty table).
func (c Counts) MaxTimes() int64 {
	if len(c.classes) == 0 {
		return 0
	}
	return c.classes[len(c.classes)-1].Times
}

// Add returns the class-wise sum of c and b (the frequency counts of the
// union of two disjoint sets of units, as when shards are merged), or
// ErrOverflow when the reads would overflow.
func (c Counts) Add(b Counts) (Counts, error) {
	a := c
	m := make(map[int64]int64, len(a.classes)+len(b.classes))
	for _, c := range a.classes {
		m[c.Times] += c.Units
	}
	for _, c := range b.classes {
		if m[c.Times] > math.MaxInt64-c.Units {
			return Counts{}, ErrOverflow
		}
		m[c.Times] += c.Units
	}
	return FromMap(m)
}

// Builder accumulates a frequency-count table one unit (or class) at a
// time. Its zero value is ready to use.
type Builder struct {
	m   map[int64]int64
	err error
}

// AddUnit records one unit seen times times (times <= 0 is ignored).
func (b *Builder) AddUnit(times int64) { b.AddClass(times, 1) }

// AddClass records units units each seen times times.
func (b *Builder) AddClass(times, units int64) {
	if times <= 0 || units == 0 {
		return
	}
	if b.m == nil {
		b.m = make(map[int64]int64)
	}
	if units < 0 || b.m[times] > math.MaxInt64-units {
		if b.err == nil {
			b.err = ErrOverflow
		}
		return
	}
	b.m[times] += units
}

// Counts returns the table accumulated so far.
func (b *Builder) Counts() (Counts, error) {
	if b.err != nil {
		return Counts{}, b.err
	}
	return FromMap(b.m)
}
