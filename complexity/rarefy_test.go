package complexity

import (
	"bufio"
	"fmt"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"
)

// Tolerances for rarefaction against the exact references.
const (
	// rarefyMeanTol: each log q is a sum of at most 16 log1p terms (<= ~16
	// eps) or Loader's form (a few Stirling/deviance terms, ~10 eps); 1-q
	// comes from expm1 and the class sum is compensated, so ~1e-14 is
	// expected. 1e-12 leaves a factor 100 of headroom.
	rarefyMeanTol = 1e-12
	// rarefyVarRelTol and rarefyVarAbsTol: the variance is the diagonal
	// sum (<= the mean) plus negative covariance terms q_j q_l expm1(Δ),
	// each relatively accurate to a few eps (see hgLogCovRatio), so the
	// absolute error is a few eps times the mean. Where the variance is much
	// smaller than the mean (m near 0 or N) the relative error grows by that
	// ratio: the worst measured on the golden file is 3.5e-11 (table "deep",
	// N = 2.2e9, m = 3, variance 6.9e-6, mean 3). 1e-9 relative leaves room
	// for other rounding (e.g. fused multiply-add on other platforms); the
	// absolute part, 1e-13 of the mean, covers variances that are exactly 0.
	rarefyVarRelTol = 1e-9
	rarefyVarAbsTol = 1e-13 // times the mean
	// coverageTol is as rarefyMeanTol: the same q machinery, positive terms.
	coverageTol = 1e-12
)

type rarefyGolden struct {
	table          string
	c              Counts
	m              int64
	mean, variance float64
	coverage       float64 // NaN when not given (m = N)
	method         string
}

// readRarefyGolden reads testdata/complexity/rarefaction_golden.tsv,
// written by scripts/ref_scipy_rarefaction.py (exact big-integer binomial
// coefficients from scipy.special.comb of python3-scipy 1.10.1, or mpmath
// 1.2.1 at 60 digits; see the header of the file).
func readRarefyGolden(t *testing.T) []rarefyGolden {
	t.Helper()
	f, err := os.Open("../testdata/complexity/rarefaction_golden.tsv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var out []rarefyGolden
	sc := bufio.NewScanner(f)
	sc.Buffer(nil, 1<<20)
	line := 0
	for sc.Scan() {
		line++
		s := sc.Text()
		if strings.HasPrefix(s, "#") || strings.HasPrefix(s, "table\t") || s == "" {
			continue
		}
		fs := strings.Split(s, "\t")
		if len(fs) != 7 {
			t.Fatalf("golden line %d: %d fields", line, len(fs))
		}
		var cls []Class
		for _, p := range strings.Split(fs[1], ",") {
			a, b, _ := strings.Cut(p, ":")
			j, err1 := strconv.ParseInt(a, 10, 64)
			u, err2 := strconv.ParseInt(b, 10, 64)
			if err1 != nil || err2 != nil {
				t.Fatalf("golden line %d: bad class %q", line, p)
			}
			cls = append(cls, Class{Times: j, Units: u})
		}
		c, err := NewCounts(cls)
		if err != nil {
			t.Fatalf("golden line %d: %v", line, err)
		}
		g := rarefyGolden{table: fs[0], c: c, method: fs[6], coverage: math.NaN()}
		var e [4]error
		g.m, e[0] = strconv.ParseInt(fs[2], 10, 64)
		g.mean, e[1] = strconv.ParseFloat(fs[3], 64)
		g.variance, e[2] = strconv.ParseFloat(fs[4], 64)
		if fs[5] != "" {
			g.coverage, e[3] = strconv.ParseFloat(fs[5], 64)
		}
		for _, err := range e {
			if err != nil {
				t.Fatalf("golden line %d: %v", line, err)
			}
		}
		out = append(out, g)
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	if len(out) < 50 {
		t.Fatalf("only %d golden rows", len(out))
	}
	return out
}

// TestRarefyGolden compares rarefy with exact values computed by
// scripts/ref_scipy_rarefaction.py (scipy.special.comb exact=True big
// integers, python3-scipy 1.10.1; mpmath 1.2.1 at 60 digits for the
// middle depths of the 716000-read table).
func TestRarefyGolden(t *testing.T) {
	var worstMean, worstVar float64
	var worstAt string
	defer func() {
		t.Logf("worst relative error: mean %.2g, variance %.2g (%s)", worstMean, worstVar, worstAt)
	}()
	for _, g := range readRarefyGolden(t) {
		mean, v := rarefy(g.c, g.m)
		worstMean = math.Max(worstMean, numRelErr(mean, g.mean))
		if r := numRelErr(v, g.variance); r > worstVar {
			worstVar, worstAt = r, fmt.Sprintf("%s m=%d: variance %.3g, mean %.3g", g.table, g.m, g.variance, g.mean)
		}
		if !numClose(mean, g.mean, rarefyMeanTol, 0) {
			t.Errorf("%s m=%d (%s): mean got %.17g want %.17g (rel %.2g)", g.table, g.m, g.method, mean, g.mean, numRelErr(mean, g.mean))
		}
		if !numClose(v, g.variance, rarefyVarRelTol, rarefyVarAbsTol*g.mean) {
			t.Errorf("%s m=%d (%s): variance got %.17g want %.17g (rel %.2g)", g.table, g.m, g.method, v, g.variance, numRelErr(v, g.variance))
		}
	}
}

// TestRarefyHand checks small cases by hand.
func TestRarefyHand(t *testing.T) {
	// Table {1:2, 2:1}: units A, B (one read each) and C (two reads), N = 4.
	// m = 2 of the C(4,2) = 6 pairs of reads: {C,C} gives 1 unit, the other
	// 5 give 2, so E = 11/6 and E[S^2] = (1 + 5*4)/6 = 21/6, Var = 21/6 -
	// 121/36 = 5/36. From the formula: q_1 = C(3,2)/6 = 1/2, q_2 = C(2,2)/6
	// = 1/6, E = 2*(1/2) + 1*(5/6) = 11/6.
	c := numCounts(t, map[int64]int64{1: 2, 2: 1})
	mean, v := rarefy(c, 2)
	if !numClose(mean, 11.0/6, 1e-15, 0) || !numClose(v, 5.0/36, 1e-14, 0) {
		t.Errorf("{1:2,2:1} m=2: got %v %v want %v %v", mean, v, 11.0/6, 5.0/36)
	}
	// One read always finds one unit (common practice: E[S_1] = 1, Var 0).
	for _, tab := range []map[int64]int64{{1: 5}, {3: 1, 10: 4}, {1: 1000000, 2: 3}} {
		c := numCounts(t, tab)
		mean, v := rarefy(c, 1)
		if !numClose(mean, 1, 1e-15, 0) || math.Abs(v) > 1e-12 {
			t.Errorf("%v m=1: got %v %v want 1 0", tab, mean, v)
		}
		n := c.Reads()
		mean, v = rarefy(c, n)
		if mean != float64(c.Distinct()) || v != 0 {
			t.Errorf("%v m=N: got %v %v want %d 0", tab, mean, v, c.Distinct())
		}
		// m = N-1: one read is left out; the unit is lost only if it was a
		// singleton, so E = D - f1/N and Var = p(1-p), p = f1/N.
		p := float64(c.Units(1)) / float64(n)
		mean, v = rarefy(c, n-1)
		if !numClose(mean, float64(c.Distinct())-p, 1e-14, 0) || !numClose(v, p*(1-p), 1e-9, 1e-13*mean) {
			t.Errorf("%v m=N-1: got %v %v want %v %v", tab, mean, v, float64(c.Distinct())-p, p*(1-p))
		}
	}
}

// TestRarefyDomain checks the NaN answers outside [0, N].
func TestRarefyDomain(t *testing.T) {
	c := numCounts(t, map[int64]int64{1: 3, 2: 1})
	for _, m := range []int64{-1, 6, math.MaxInt64} {
		mean, v := rarefy(c, m)
		if !math.IsNaN(mean) || !math.IsNaN(v) {
			t.Errorf("m=%d: got %v %v, want NaN NaN", m, mean, v)
		}
	}
	if mean, v := rarefy(Counts{}, 0); mean != 0 || v != 0 {
		t.Errorf("empty m=0: got %v %v", mean, v)
	}
	if mean, _ := rarefy(Counts{}, 1); !math.IsNaN(mean) {
		t.Errorf("empty m=1: got %v", mean)
	}
}

// TestRarefyLargeN checks precision where a plain log-gamma difference
// fails: N = 2.2e9 reads, m = 1..3. E[S_1] = 1 exactly; E[S_2] = 2 - p with
// p = P(both reads from one unit) = sum_j n_j j(j-1)/(N(N-1)) (closed
// forms, from the definition).
func TestRarefyLargeN(t *testing.T) {
	c := numCounts(t, map[int64]int64{1: 1e9, 2: 2e8, 50: 1e7, 1000: 1e5, 100000: 1000})
	n := float64(c.Reads())
	mean, _ := rarefy(c, 1)
	if !numClose(mean, 1, 1e-13, 0) {
		t.Errorf("m=1: got %.17g want 1", mean)
	}
	var pairs float64
	for _, cl := range c.Classes() {
		j := float64(cl.Times)
		pairs += float64(cl.Units) * j * (j - 1)
	}
	p := pairs / (n * (n - 1))
	mean, v := rarefy(c, 2)
	if !numClose(mean, 2-p, 1e-14, 0) {
		t.Errorf("m=2: got %.17g want %.17g", mean, 2-p)
	}
	// S_2 is 1 with probability p and 2 otherwise, so Var = p(1-p) (about
	// 2.5e-6 here): the diagonal (~2) and covariance (~-2) terms cancel to
	// 6 digits, so allow ~10 eps of the diagonal in absolute terms.
	if !numClose(v, p*(1-p), 0, 1e-14) {
		t.Errorf("m=2: variance got %.17g want %.17g", v, p*(1-p))
	}
	// m = 3 also uses pairs of large classes (50, 1000, 100000 reads).
	// S_3 = 3 - (pairs of reads from one unit among 3) + ...: check only
	// that the variance is positive and below that of m = 2 scaled by 3
	// (three pairs of reads, each colliding with probability ~p).
	_, v3 := rarefy(c, 3)
	if !(v3 > 0 && v3 < 3.5*p) {
		t.Errorf("m=3: variance %v outside (0, 3.5p = %v)", v3, 3.5*p)
	}
}

// TestRarefyRealDepth checks that the real-depth continuation agrees with
// rarefy at integers and is increasing between them.
func TestRarefyRealDepth(t *testing.T) {
	c := numCounts(t, map[int64]int64{1: 40, 2: 12, 3: 5, 17: 2, 30: 1})
	n := c.Reads()
	prev := -1.0
	for i := int64(0); i <= 4*n; i++ {
		x := float64(i) / 4
		got := rarefyMeanAt(c, x)
		if i%4 == 0 {
			want, _ := rarefy(c, i/4)
			if !numClose(got, want, 1e-14, 0) {
				t.Errorf("t=%v: got %v want %v", x, got, want)
			}
		}
		if !(got > prev) && x > 0 && got < float64(c.Distinct()) {
			t.Errorf("t=%v: %v not above %v", x, got, prev)
		}
		prev = got
	}
	if !math.IsNaN(rarefyMeanAt(c, float64(n)+0.5)) || !math.IsNaN(rarefyMeanAt(c, -0.5)) {
		t.Error("outside [0,N] should be NaN")
	}
}

// TestRarefyVarianceApprox measures the conditioned binomial approximation
// used beyond the pair budget against the exact pairwise variance (this
// package's exact path, itself checked against exact scipy values in
// TestRarefyGolden), on a table of 2000 classes (beyond the budget when m
// is small) and 7.2e7 reads. Measured: 0.84% at m = 100 (variance 3.55
// vs 3.58, 0.4% in the standard deviation), 4e-5 at m = 1000, below 2e-7
// from m = N/100 on. The bounds asserted are those with a margin of about 2.
func TestRarefyVarianceApprox(t *testing.T) {
	m := map[int64]int64{}
	for j := int64(1); j <= 2000; j++ {
		m[j*j/40+j] = 1 + 200000/(j*j)
	}
	c := numCounts(t, m)
	n := c.Reads()
	for _, d := range []int64{100, 1000, n / 100, n / 10, n / 2, n - n/10, n - n/100} {
		_, exact := rarefyBudget(c, float64(d), true, math.MaxInt)
		_, got := rarefy(c, d)
		approx := rarefyVarBinomial(c, float64(d))
		if got != approx && got != exact {
			t.Errorf("m=%d: rarefy variance %v is neither exact %v nor approximation %v", d, got, exact, approx)
		}
		r := numRelErr(approx, exact)
		bound := 5e-7
		switch {
		case d <= 100:
			bound = 0.02
		case d <= 1000:
			bound = 1e-4
		}
		if r > bound {
			t.Errorf("m=%d: approximation off by %.3g relative, want <= %.3g", d, r, bound)
		}
		t.Logf("m=%d (%.3g N): exact %.8g approx %.8g rel %.2g (rarefy used %s)", d, float64(d)/float64(n), exact, approx, r,
			map[bool]string{true: "exact", false: "approx"}[got == exact])
	}
}

// BenchmarkRarefyVariance times the exact pairwise variance near the pair
// budget (1400 classes, no pruning at m = N/100).
func BenchmarkRarefyVariance(b *testing.B) {
	m := map[int64]int64{}
	for j := int64(1); j <= 1400; j++ {
		m[j*j/40+j] = 1 + 200000/(j*j)
	}
	c := numCounts(b, m)
	d := c.Reads() / 100
	b.ReportAllocs()
	for b.Loop() {
		rarefy(c, d)
	}
}

func numCounts(t testing.TB, m map[int64]int64) Counts {
	t.Helper()
	c, err := FromMap(m)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// numClose reports |got-want| <= rel*|want| + abs.
func numClose(got, want, rel, abs float64) bool {
	if math.IsNaN(got) || math.IsNaN(want) {
		return math.IsNaN(got) && math.IsNaN(want)
	}
	return math.Abs(got-want) <= rel*math.Abs(want)+abs
}

func numRelErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

// BenchmarkRarefyMean times the rarefaction mean alone (1400 classes).
func BenchmarkRarefyMean(b *testing.B) {
	m := map[int64]int64{}
	for j := int64(1); j <= 1400; j++ {
		m[j*j/40+j] = 1 + 200000/(j*j)
	}
	c := numCounts(b, m)
	d := float64(c.Reads()) / 3
	b.ReportAllocs()
	for b.Loop() {
		rarefyMeanAt(c, d)
	}
}

// ExampleCurve_Distinct rarefies a small table: three units seen once, one
// seen twice and one seen four times (9 reads), to 4 reads (E[S_4] by
// hand: 5 − [3·C(8,4) + C(7,4) + C(5,4)]/C(9,4) = 5 − 250/126).
func ExampleCurve_Distinct() {
	c, _ := FromMap(map[int64]int64{1: 3, 2: 1, 4: 1})
	fmt.Printf("E[S_4] = %.6f\n", Curve{Counts: c}.Distinct(4))
	// Output: E[S_4] = 3.015873
}
