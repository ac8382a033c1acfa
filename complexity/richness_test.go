package complexity

import (
	"bufio"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// richTol is the relative tolerance against scikit-bio: both sides evaluate
// the same closed forms in float64, so only rounding differs (a few ulps,
// amplified at most by exp/log in the interval).
const richTol = 1e-12

func richClose(got, want, tol float64) bool {
	if math.IsNaN(want) {
		return math.IsNaN(got)
	}
	return math.Abs(got-want) <= tol*math.Max(1, math.Abs(want))
}

// richReadTSV reads a tab-separated file with a header, skipping '#' lines.
func richReadTSV(t *testing.T, path string) (header []string, rows [][]string) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		fields := strings.Split(line, "\t")
		if header == nil {
			header = fields
			continue
		}
		rows = append(rows, fields)
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return header, rows
}

// richReadFreq reads frequency-count tables (sample, times_seen, units).
func richReadFreq(t *testing.T, path string) map[string]Counts {
	t.Helper()
	_, rows := richReadTSV(t, path)
	m := map[string]map[int64]int64{}
	for _, r := range rows {
		j, _ := strconv.ParseInt(r[1], 10, 64)
		u, _ := strconv.ParseInt(r[2], 10, 64)
		if m[r[0]] == nil {
			m[r[0]] = map[int64]int64{}
		}
		m[r[0]][j] = u
	}
	out := map[string]Counts{}
	for s, mm := range m {
		c, err := FromMap(mm)
		if err != nil {
			t.Fatal(err)
		}
		out[s] = c
	}
	return out
}

func richParseCell(s string) float64 {
	if s == "" {
		return math.NaN()
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return math.NaN()
	}
	return v
}

// richCheckSkbio compares Chao1, its intervals, ACE and Good's coverage
// with the values of scikit-bio 0.5.8 (skbio.diversity.alpha) written by
// scripts/taxa_reference.py.
func richCheckSkbio(t *testing.T, freqPath, alphaPath string) {
	counts := richReadFreq(t, freqPath)
	header, rows := richReadTSV(t, alphaPath)
	col := map[string]int{}
	for i, h := range header {
		col[h] = i
	}
	if len(rows) == 0 {
		t.Fatalf("%s: no rows", alphaPath)
	}
	for _, r := range rows {
		name := r[0]
		c := counts[name] // absent: zero reads
		want := func(k string) float64 { return richParseCell(r[col[k]]) }
		if got := float64(c.Reads()); got != want("reads") {
			t.Errorf("%s: reads %v, skbio %v", name, got, want("reads"))
		}
		if got := float64(c.Distinct()); got != want("observed") {
			t.Errorf("%s: observed %v, skbio observed_otus %v", name, got, want("observed"))
		}
		if got := float64(c.Units(1)); got != want("singles") {
			t.Errorf("%s: singletons %v, skbio singles %v", name, got, want("singles"))
		}
		if got := float64(c.Units(2)); got != want("doubles") {
			t.Errorf("%s: doubletons %v, skbio doubles %v", name, got, want("doubles"))
		}
		if c.Reads() == 0 {
			// Documented difference: skbio gives chao1 = 0 for an empty
			// vector; Chao1 says nothing was observed (NaN).
			if est, lo, hi := Chao1(c, 0.95); !math.IsNaN(est) || !math.IsNaN(lo) || !math.IsNaN(hi) {
				t.Errorf("%s: Chao1 of an empty sample = %v %v %v, want NaN", name, est, lo, hi)
			}
			if v := ACE(c, 10); !math.IsNaN(v) {
				t.Errorf("%s: ACE of an empty sample = %v, want NaN", name, v)
			}
			if v := GoodCoverage(c); !math.IsNaN(v) {
				t.Errorf("%s: GoodCoverage of an empty sample = %v, want NaN", name, v)
			}
			continue
		}
		for _, lv := range []float64{0.95, 0.90} {
			est, lo, hi := Chao1(c, lv)
			sfx := "_" + strconv.FormatFloat(lv, 'g', -1, 64)
			if !richClose(est, want("chao1"), richTol) {
				t.Errorf("%s: Chao1 = %v, skbio chao1(bias_corrected=True) %v", name, est, want("chao1"))
			}
			if !richClose(lo, want("chao1_lo"+sfx), richTol) || !richClose(hi, want("chao1_hi"+sfx), richTol) {
				t.Errorf("%s: Chao1 interval at %v = [%v, %v], skbio chao1_ci [%v, %v]", name, lv, lo, hi,
					want("chao1_lo"+sfx), want("chao1_hi"+sfx))
			}
		}
		if got := ACE(c, 10); !richClose(got, want("ace"), richTol) {
			t.Errorf("%s: ACE = %v, skbio ace(rare_threshold=10) %v", name, got, want("ace"))
		}
		if got := GoodCoverage(c); !richClose(got, want("goods_coverage"), richTol) {
			t.Errorf("%s: GoodCoverage = %v, skbio goods_coverage %v", name, got, want("goods_coverage"))
		}
	}
}

func TestRichnessSkbioGenerated(t *testing.T) {
	dir := filepath.Join("..", "testdata", "taxa")
	richCheckSkbio(t, filepath.Join(dir, "skbio_freq.tsv"), filepath.Join(dir, "skbio_alpha.tsv"))
}

// The real table Twins.csv (Debian r-bioc-dirichletmultinomial), reduced
// to frequency counts by numpy and evaluated by skbio in
// scripts/taxa_reference.py --twins. The goldens are committed, so this
// test does not need the table itself.
func TestRichnessSkbioTwins(t *testing.T) {
	dir := filepath.Join("..", "testdata", "taxa")
	if _, err := os.Stat(filepath.Join(dir, "twins_alpha.tsv")); err != nil {
		t.Skip("testdata/taxa/twins_alpha.tsv absent: run scripts/fetch_taxa_data.sh and scripts/taxa_reference.py --twins")
	}
	richCheckSkbio(t, filepath.Join(dir, "twins_freq.tsv"), filepath.Join(dir, "twins_alpha.tsv"))
}

// Closed-form cases worked by hand from the formulas in the doc comments.
func TestRichnessWorked(t *testing.T) {
	mk := func(m map[int64]int64) Counts {
		c, err := FromMap(m)
		if err != nil {
			t.Fatal(err)
		}
		return c
	}
	// f1=4, f2=2, f3=1 (S=7, N=11): Chao1 = 7 + 4*3/(2*3) = 9.
	c := mk(map[int64]int64{1: 4, 2: 2, 3: 1})
	if est, _, _ := Chao1(c, 0.95); !richClose(est, 9, richTol) {
		t.Errorf("Chao1(f1=4,f2=2,f3=1) = %v, want 9 (closed form)", est)
	}
	// ACE, same counts: S_rare=7, N_rare=11, C=1-4/11=7/11,
	// Σj(j-1)f_j = 2*2 + 6*1 = 10, γ² = max(7/(7/11)*10/(11*10) - 1, 0) = 0,
	// S_ace = 7/(7/11) = 11.
	if got := ACE(c, 10); !richClose(got, 11, richTol) {
		t.Errorf("ACE(f1=4,f2=2,f3=1) = %v, want 11 (closed form)", got)
	}
	// Good's coverage: 1 - 4/11.
	if got := GoodCoverage(c); !richClose(got, 7.0/11, richTol) {
		t.Errorf("GoodCoverage = %v, want 7/11", got)
	}
	// Every rare unit a singleton: ACE undefined.
	if got := ACE(mk(map[int64]int64{1: 3, 50: 1}), 10); !math.IsNaN(got) {
		t.Errorf("ACE with only singletons rare = %v, want NaN", got)
	}
	// No rare unit: ACE = S_abund.
	if got := ACE(mk(map[int64]int64{20: 3}), 10); got != 3 {
		t.Errorf("ACE with no rare unit = %v, want 3", got)
	}
	// A single singleton: T = 0, interval [S, S].
	if est, lo, hi := Chao1(mk(map[int64]int64{1: 1, 5: 2}), 0.95); est != 3 || lo != 3 || hi != 3 {
		t.Errorf("Chao1 with f1=1 = %v [%v, %v], want 3 [3, 3]", est, lo, hi)
	}
	// The interval widens with the level and always contains the estimate.
	c = mk(map[int64]int64{1: 30, 2: 10, 3: 5, 8: 20})
	e1, lo1, hi1 := Chao1(c, 0.80)
	_, lo2, hi2 := Chao1(c, 0.99)
	if !(lo2 < lo1 && lo1 < e1 && e1 < hi1 && hi1 < hi2) || lo2 < float64(c.Distinct()) {
		t.Errorf("intervals not nested: 0.80 [%v, %v], 0.99 [%v, %v], est %v", lo1, hi1, lo2, hi2, e1)
	}
	if est, _, _ := Chao1(c, 1); !math.IsNaN(est) {
		t.Errorf("Chao1 at level 1 = %v, want NaN", est)
	}
}

func TestSingletonsDepleted(t *testing.T) {
	mk := func(m map[int64]int64) Counts {
		c, err := FromMap(m)
		if err != nil {
			t.Fatal(err)
		}
		return c
	}
	for _, tc := range []struct {
		m    map[int64]int64
		want bool
	}{
		{map[int64]int64{2: 16, 3: 9, 5: 40}, true},          // f1 = 0, floor 2*256/27 = 19
		{map[int64]int64{1: 2, 2: 40, 3: 20, 9: 50}, true},   // floor 53, f1 = 2
		{map[int64]int64{1: 60, 2: 40, 3: 20, 9: 50}, false}, // f1 above the floor
		{map[int64]int64{2: 2, 3: 1, 7: 10}, false},          // floor 2.7: too few to tell
		{map[int64]int64{1: 20, 2: 30, 3: 20, 9: 5}, false},  // floor 30, f1 = 20: within noise
		{map[int64]int64{}, false},
	} {
		c := mk(tc.m)
		if got := SingletonsDepleted(c); got != tc.want {
			t.Errorf("SingletonsDepleted(%v) = %v, want %v (floor %.3g)", tc.m, got, tc.want, SingletonFloor(c))
		}
	}
	// Mixed-Poisson counts never flag: Poisson with a gamma-distributed
	// mean (negative binomial) has expected f_j in closed form; round them.
	// With shape k and scale θ, E f_j ∝ Γ(j+k)/(j! Γ(k)) (θ/(1+θ))^j.
	for _, k := range []float64{0.1, 0.5, 1, 3} {
		for _, theta := range []float64{1, 10, 100} {
			m := map[int64]int64{}
			p := theta / (1 + theta)
			for j := int64(1); j <= 2000; j++ {
				lg, _ := math.Lgamma(float64(j) + k)
				lk, _ := math.Lgamma(k)
				lj, _ := math.Lgamma(float64(j) + 1)
				e := 1e5 * math.Exp(lg-lk-lj+float64(j)*math.Log(p))
				if r := math.Round(e); r > 0 {
					m[j] = int64(r)
				}
			}
			if c := mk(m); SingletonsDepleted(c) {
				t.Errorf("negative binomial k=%v θ=%v flagged: f1=%d floor=%.4g", k, theta, c.Units(1), SingletonFloor(c))
			}
		}
	}
}
