package complexity

import (
	"encoding/binary"
	"math"
	"testing"
)

// countsFromBytes turns fuzz input into a frequency-count table: each 4
// bytes give a class (times 1..65536 from two bytes, units 0..65535).
func countsFromBytes(data []byte) (Counts, bool) {
	m := map[int64]int64{}
	for len(data) >= 4 && len(m) < 64 {
		t := int64(binary.LittleEndian.Uint16(data)) + 1
		u := int64(binary.LittleEndian.Uint16(data[2:]))
		m[t] += u
		data = data[4:]
	}
	c, err := FromMap(m)
	return c, err == nil
}

// FuzzAnalyze: any frequency counts give a report whose values are finite
// or missing (NaN, shown as empty/null), never infinite, with predictions
// within [0, depth] and never below the observed distinct count above the
// observed depth; reach answers within the horizon, inside their interval,
// or missing with a note; and Analyze returns (no hang, no panic).
func FuzzAnalyze(f *testing.F) {
	f.Add([]byte{0, 0, 100, 0, 1, 0, 30, 0, 2, 0, 10, 0})
	f.Add([]byte{0, 0, 1, 0})
	f.Add([]byte{4, 0, 9, 0})
	f.Add([]byte{0, 0, 255, 255, 255, 255, 1, 0})
	f.Add([]byte{1, 0, 200, 0, 2, 0, 50, 0, 3, 0, 10, 0})
	f.Fuzz(func(t *testing.T, data []byte) {
		c, ok := countsFromBytes(data)
		if !ok {
			return
		}
		n := float64(c.Reads())
		depths := []float64{n / 2, 2 * n, 10 * n, 100 * n}
		reach := []Target{{TargetDistinct, 2 * float64(c.Distinct())}, {TargetDup, 0.5}, {TargetCoverage, 0.99}, {TargetYield, 0.1}}
		r := Analyze(c, Options{Depths: depths, Bootstrap: 4, Seed: 1, Threads: 2, Gates: NoGates(), Curve: []float64{1, n, 3 * n}, Reach: reach})
		for _, q := range r.Reach {
			switch {
			case math.IsNaN(q.Reads) && q.Note == "":
				t.Fatalf("%v: %v missing without a note", c.Classes(), q.Target)
			case !math.IsNaN(q.Reads) && !(q.Reads >= 0 && q.Reads <= horizon*n):
				t.Fatalf("%v: %v reached at %v, outside [0, %v]", c.Classes(), q.Target, q.Reads, horizon*n)
			case q.Lo > q.Reads || q.Hi < q.Reads:
				t.Fatalf("%v: %v at %v outside its interval [%v, %v]", c.Classes(), q.Target, q.Reads, q.Lo, q.Hi)
			}
		}
		vals := append(flat(r), r.DupFraction, r.SampleCoverage, r.MarginalYield)
		for _, v := range vals {
			if math.IsInf(v, 0) {
				t.Fatalf("infinite value for %v: %v", c.Classes(), vals)
			}
		}
		for _, p := range r.Predictions {
			if math.IsNaN(p.Distinct) {
				continue
			}
			if p.Distinct < -1e-9 || p.Distinct > p.Reads*(1+1e-9)+1e-9 {
				t.Fatalf("%v: distinct %v outside [0, %v]", c.Classes(), p.Distinct, p.Reads)
			}
			if p.Reads > n && p.Distinct < float64(c.Distinct())*(1-1e-9) {
				t.Fatalf("%v: distinct %v at %v below observed %d", c.Classes(), p.Distinct, p.Reads, c.Distinct())
			}
		}
	})
}
