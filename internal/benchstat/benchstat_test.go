package benchstat

import (
	"math"
	"testing"
)

// TestQuantile: values of R's quantile(c(1, 2, 3, 4, 10), type = 7), from
// its definition h = (n − 1)p + 1 (Hyndman & Fan 1996): 0.5 → 3, 0.9 →
// 4 + 0.6·6 = 7.6, 0.25 → 2, 1 → 10, 0 → 1.
func TestQuantile(t *testing.T) {
	v := []float64{10, 2, 4, 1, 3}
	for _, tc := range []struct{ p, want float64 }{{0.5, 3}, {0.9, 7.6}, {0.25, 2}, {1, 10}, {0, 1}} {
		if got := Quantile(v, tc.p); math.Abs(got-tc.want) > 1e-12 {
			t.Errorf("Quantile(%g) = %g, want %g", tc.p, got, tc.want)
		}
	}
	if v[0] != 10 {
		t.Error("input reordered")
	}
	if !math.IsNaN(Quantile(nil, 0.5)) {
		t.Error("empty input must give NaN")
	}
}

// TestPct: the formats of the benchmark tables (common practice).
func TestPct(t *testing.T) {
	for _, tc := range []struct {
		v, whole float64
		want     string
	}{{0.0123, 0.1, "1.2%"}, {0.234, 0.1, "23%"}, {0.234, 10, "23.4%"}, {math.NaN(), 10, "–"}, {math.Inf(1), 10, "fail"}} {
		if got := Pct(tc.v, tc.whole); got != tc.want {
			t.Errorf("Pct(%g, %g) = %q, want %q", tc.v, tc.whole, got, tc.want)
		}
	}
}
