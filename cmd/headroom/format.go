package main

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// human writes a count for people (report cells, plot ticks): three
// significant digits with k/M/G, trailing zeros dropped: 500, 20k, 1.5M,
// 2.33M, 3G.
func human(v float64) string {
	if v != v || v > 1e300 || v < -1e300 {
		return ""
	}
	if v < 1e4 && v > -1e4 {
		return fmt.Sprintf("%.0f", v)
	}
	for _, u := range []struct {
		d   float64
		suf string
	}{{1e9, "G"}, {1e6, "M"}, {1e3, "k"}} {
		if v >= 0.9995*u.d || v <= -0.9995*u.d {
			x := v / u.d
			prec := 2
			switch {
			case x >= 100 || x <= -100:
				prec = 0
			case x >= 10 || x <= -10:
				prec = 1
			}
			t := strconv.FormatFloat(x, 'f', prec, 64)
			if strings.Contains(t, ".") {
				t = strings.TrimRight(strings.TrimRight(t, "0"), ".")
			}
			return t + u.suf
		}
	}
	return fmt.Sprint(v)
}

// frac3 writes a fraction with three decimals.
func frac3(v float64) string {
	if v != v {
		return ""
	}
	return fmt.Sprintf("%.3f", v)
}

// pct writes a signed relative error as a percentage.
func pct(v float64) string {
	if v != v {
		return ""
	}
	return fmt.Sprintf("%+.1f%%", 100*v)
}

// withInterval writes "12.4k (11.9k–13.0k)", or the value alone without
// an interval, or "–" when there is no value.
func withInterval(v, lo, hi float64) string {
	if math.IsNaN(v) {
		return "–"
	}
	if math.IsNaN(lo) || math.IsNaN(hi) {
		return human(v)
	}
	if math.IsInf(hi, 1) {
		return fmt.Sprintf("%s (%s–∞)", human(v), human(lo))
	}
	return fmt.Sprintf("%s (%s–%s)", human(v), human(lo), human(hi))
}

// percent writes a fraction as a whole percentage ("36%"), with one
// decimal below 10%.
func percent(v float64) string {
	if math.IsNaN(v) {
		return "–"
	}
	if math.Abs(v) < 0.1 {
		return fmt.Sprintf("%.1f%%", 100*v)
	}
	return fmt.Sprintf("%.0f%%", 100*v)
}
