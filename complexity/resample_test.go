package complexity

import (
	"math"
	"testing"
)

// TestThinExpectation: binomial thinning keeps a unit seen j times with
// probability 1 - (1-f)^j (closed form of the binomial zero class), so the
// expected distinct count after thinning is sum_j n_j (1 - (1-f)^j) and
// the expected reads f N. Checked over seeded replicates with a tolerance
// of 5 standard errors of the replicate mean.
func TestThinExpectation(t *testing.T) {
	c, err := FromMap(map[int64]int64{1: 4000, 2: 1500, 3: 700, 5: 300, 12: 80, 40: 10, 3000: 2, 50000: 1})
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range []float64{0.05, 0.1, 0.5} {
		var wantD float64
		for _, cl := range c.Classes() {
			wantD += float64(cl.Units) * -math.Expm1(float64(cl.Times)*math.Log1p(-f))
		}
		wantN := f * float64(c.Reads())
		const reps = 400
		var sd, sd2, sn, sn2 float64
		for k := 0; k < reps; k++ {
			tc := thin(c, f, newRand(42, uint64(k)))
			d, n := float64(tc.Distinct()), float64(tc.Reads())
			sd += d
			sd2 += d * d
			sn += n
			sn2 += n * n
		}
		md, mn := sd/reps, sn/reps
		sed := math.Sqrt((sd2/reps - md*md) / reps)
		sen := math.Sqrt((sn2/reps - mn*mn) / reps)
		if math.Abs(md-wantD) > 5*sed {
			t.Errorf("f=%v: mean distinct %v, want %v (se %v)", f, md, wantD, sed)
		}
		if math.Abs(mn-wantN) > 5*sen {
			t.Errorf("f=%v: mean reads %v, want %v (se %v)", f, mn, wantN, sen)
		}
	}
}

// TestResample: a bootstrap replicate has the same distinct count, and
// each class's expected size is n_j (multinomial mean), so the expected
// reads equal N; checked over seeded replicates within 5 standard errors.
func TestResample(t *testing.T) {
	c, _ := FromMap(map[int64]int64{1: 500, 2: 200, 3: 50, 10: 5, 100: 1})
	const reps = 500
	var s, s2 float64
	for k := 0; k < reps; k++ {
		rc := resample(c, newRand(7, uint64(k)))
		if rc.Distinct() != c.Distinct() {
			t.Fatalf("replicate %d: distinct %d, want %d", k, rc.Distinct(), c.Distinct())
		}
		n := float64(rc.Reads())
		s += n
		s2 += n * n
	}
	m := s / reps
	se := math.Sqrt((s2/reps - m*m) / reps)
	if math.Abs(m-float64(c.Reads())) > 5*se {
		t.Errorf("mean reads %v, want %v (se %v)", m, c.Reads(), se)
	}
	// Same stream, same replicate.
	a, b := resample(c, newRand(7, 3)), resample(c, newRand(7, 3))
	if a.Reads() != b.Reads() {
		t.Errorf("same seed and stream gave different replicates")
	}
}

// TestThinHugeClasses: thinning classes with very many units and very many
// reads each finishes quickly (the work is bounded by the window of likely
// counts) and keeps the expected reads f N within 5 standard errors.
func TestThinHugeClasses(t *testing.T) {
	c, err := FromMap(map[int64]int64{5000: 1_000_000_000_000, 3: 7, 800_000_000_000: 4})
	if err != nil {
		t.Fatal(err)
	}
	const f = 0.1
	tc := thin(c, f, newRand(3, 1))
	want := f * float64(c.Reads())
	// Var of thinned reads = N f (1-f); the window's truncation is < 1e-30.
	se := math.Sqrt(float64(c.Reads()) * f * (1 - f))
	if math.Abs(float64(tc.Reads())-want) > 5*se {
		t.Errorf("thinned reads %d, want %v (se %v)", tc.Reads(), want, se)
	}
	// Units seen 5000 or 8e11 times keep reads with probability 1 - 0.9^j,
	// 1 to within 1e-228; the 7 units seen 3 times may vanish.
	if d := tc.Distinct(); d < 1_000_000_000_004 || d > c.Distinct() {
		t.Errorf("distinct %d, want between %d and %d", d, int64(1_000_000_000_004), c.Distinct())
	}
}

// TestResampleHuge: tables near the int64 limit of reads resample to
// valid tables (no negative units, no overflowed reads), and binomial
// never returns more than n (float64 draws round above 2^53).
func TestResampleHuge(t *testing.T) {
	c, err := NewCounts([]Class{{1, 2_300_000_000_000_000_000}, {200_000_000_000_000_000, 11}})
	if err != nil {
		t.Fatal(err)
	}
	for k := uint64(0); k < 200; k++ {
		rc := resample(c, newRand(9, k))
		if rc.Reads() <= 0 || rc.Distinct() != c.Distinct() {
			t.Fatalf("replicate %d: reads %d distinct %d", k, rc.Reads(), rc.Distinct())
		}
		for _, cl := range rc.Classes() {
			if cl.Units <= 0 {
				t.Fatalf("replicate %d: class %+v", k, cl)
			}
		}
	}
	for _, n := range []int64{1<<53 + 1, math.MaxInt64 - 1, math.MaxInt64} {
		for k := uint64(0); k < 50; k++ {
			if v := binomial(newRand(3, k), n, 0.999999); v > n || v < 0 {
				t.Fatalf("binomial(%d) = %d", n, v)
			}
		}
	}
}
