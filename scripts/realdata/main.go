// Command realdata is headroom's real-data accuracy benchmark.
//
// Each source is a real count vector (how many times each distinct unit —
// read start site, UMI molecule, barcode, OTU, word, k-mer — occurs in the
// full data), built from Debian packages by scripts/realdata/fetch.sh and
// build.py and stored as a frequency-count table in
// scripts/realdata/vectors (sources.tsv there is the manifest: package,
// version, file, how the vector is built).
//
// Protocol. From the full vector of N reads, draw an exact hypergeometric
// subsample of n = round(f·N) reads (simple random sampling without
// replacement of the reads: selection sampling, Knuth TAOCP vol. 2,
// 3.4.2 Algorithm S) at f = 1/2, 1/10, 1/30, 1/100 (only where n ≥
// -minreads), several replicate draws each. headroom (its CLI, `headroom
// counts --format json`) and the baselines predict the distinct units at
// m = 2, 10, 30, 100 times the subsample's reads; a cell is scored where
// m·n ≤ N, against the exact rarefaction of the full vector at depth t =
// m·n (Hurlbert 1971; Heck et al. 1975):
//
//	E[D(t)] = Σ_k F_k [1 − C(N−k, t)/C(N, t)],
//
// F_k the number of units seen k times in the full data (at t = N, the
// full data's distinct count). Reported: median and 90th percentile of
// |relative error| and the share of 95% intervals that hold the truth, per
// source and overall, for the tuning and the held-out sources separately.
//
// The held-out third is drawn from the sorted source names by a shuffle
// seeded with -split (15, fixed before any result was looked at); their
// figures are the out-of-sample check of anything tuned on the others.
//
// Usage (from the repository root):
//
//	go run ./scripts/realdata [-reps 5] [-boot 100] [-seed 1] [-out FILE] [-csv FILE] [-only NAME,...] [-npmle]
//
// -npmle adds the grid NPMLE Poisson mixture (complexity.Baseline
// "npmle"), a candidate evaluated and rejected (BENCHMARKS.md section 6);
// it takes seconds per fit.
package main

import (
	"bufio"
	"bytes"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"time"

	"headroom/complexity"
	"headroom/internal/benchstat"
)

var (
	fractions = []float64{1.0 / 2, 1.0 / 10, 1.0 / 30, 1.0 / 100}
	fracNames = []string{"1/2", "1/10", "1/30", "1/100"}
	multiples = []float64{2, 10, 30, 100}
)

// source is one full count vector.
type source struct {
	name, kind string
	heldOut    bool
	freq       map[int64]int64 // times seen -> units
	reads      int64
	distinct   int64
}

// estimator names, in table order; headroom last.
var estNames = []string{"poisson (Lander–Waterman)", "ztnb (full ML)", "rfa (textbook)", "shen (Chao1-based)", "npmle (grid EM, candidate)", "headroom (CLI)"}

const (
	nEst     = 6
	npmleEst = 4 // index of the NPMLE row, run only with -npmle (slow)
)

var withNPMLE bool

// cell is one scored prediction.
type cell struct {
	src           int
	frac, rep, mk int
	reads         int64
	distinct      int64
	truth         float64
	pred          [nEst]float64
	lo, hi        float64 // headroom's interval
	method        string
	backtest      float64
}

func main() {
	dir := flag.String("vectors", "scripts/realdata/vectors", "directory of the frequency-count tables and sources.tsv")
	bin := flag.String("headroom", "", "headroom binary (default: built from ./cmd/headroom into a temporary folder)")
	reps := flag.Int("reps", 5, "replicate subsamples per fraction")
	boot := flag.Int("boot", 100, "bootstrap replicates for headroom's intervals")
	seed := flag.Uint64("seed", 1, "seed of the subsampling (1 = reporting)")
	split := flag.Uint64("split", 15, "seed of the held-out draw (fixed; do not change to tune)")
	minReads := flag.Int64("minreads", 1000, "smallest subsample (reads) scored")
	out := flag.String("out", "", "also write the markdown to FILE")
	csvOut := flag.String("csv", "", "write per-cell rows to FILE")
	only := flag.String("only", "", "comma-separated source names to run (default all)")
	flag.BoolVar(&withNPMLE, "npmle", false, "also run the grid NPMLE candidate (seconds per fit)")
	flag.Parse()

	srcs, err := loadSources(*dir)
	if err != nil {
		fail(err)
	}
	markHeldOut(srcs, *split)
	if *bin == "" {
		tmp, err := os.MkdirTemp("", "realdata")
		if err != nil {
			fail(err)
		}
		defer os.RemoveAll(tmp)
		*bin = filepath.Join(tmp, "headroom")
		cmd := exec.Command("go", "build", "-o", *bin, "./cmd/headroom")
		cmd.Stderr = os.Stderr
		if err := cmd.Run(); err != nil {
			fail(fmt.Errorf("building headroom: %v", err))
		}
	}
	want := map[string]bool{}
	for _, s := range strings.Split(*only, ",") {
		if s != "" {
			want[s] = true
		}
	}
	start := time.Now()
	var cells []cell
	for si := range srcs {
		if len(want) > 0 && !want[srcs[si].name] {
			continue
		}
		t0 := time.Now()
		cs, err := runSource(srcs, si, *bin, *reps, *boot, *seed, *minReads)
		if err != nil {
			fail(err)
		}
		fmt.Fprintf(os.Stderr, "%s: %d cells, %.0f s\n", srcs[si].name, len(cs), time.Since(t0).Seconds())
		cells = append(cells, cs...)
	}
	var sb strings.Builder
	fmt.Fprintf(&sb, "Command: `go run ./scripts/realdata -reps %d -boot %d -seed %d`; %d sources (%d held out, split seed %d), %d scored cells, %.0f s.\n\n",
		*reps, *boot, *seed, len(srcs), countHeld(srcs), *split, len(cells), time.Since(start).Seconds())
	writeTables(&sb, srcs, cells)
	fmt.Print(sb.String())
	if *out != "" {
		if err := os.WriteFile(*out, []byte(sb.String()), 0o644); err != nil {
			fail(err)
		}
	}
	if *csvOut != "" {
		f, err := os.Create(*csvOut)
		if err != nil {
			fail(err)
		}
		writeCSV(f, srcs, cells)
		if err := f.Close(); err != nil {
			fail(err)
		}
	}
}

func fail(err error) {
	fmt.Fprintln(os.Stderr, "realdata:", err)
	os.Exit(1)
}

func countHeld(srcs []source) int {
	n := 0
	for _, s := range srcs {
		if s.heldOut {
			n++
		}
	}
	return n
}

// loadSources reads sources.tsv and each NAME.counts.tsv.
func loadSources(dir string) ([]source, error) {
	f, err := os.Open(filepath.Join(dir, "sources.tsv"))
	if err != nil {
		return nil, err
	}
	defer f.Close()
	var srcs []source
	sc := bufio.NewScanner(f)
	for ln := 1; sc.Scan(); ln++ {
		t := strings.Split(sc.Text(), "\t")
		if ln == 1 {
			continue
		}
		if len(t) < 2 {
			return nil, fmt.Errorf("%s line %d: want name and kind", f.Name(), ln)
		}
		s := source{name: t[0], kind: t[1], freq: map[int64]int64{}}
		if err := readTable(filepath.Join(dir, s.name+".counts.tsv"), &s); err != nil {
			return nil, err
		}
		srcs = append(srcs, s)
	}
	sort.Slice(srcs, func(i, j int) bool { return srcs[i].name < srcs[j].name })
	return srcs, sc.Err()
}

func readTable(path string, s *source) error {
	b, err := os.ReadFile(path)
	if err != nil {
		return err
	}
	for ln, line := range strings.Split(strings.TrimRight(string(b), "\n"), "\n") {
		if ln == 0 {
			continue
		}
		t := strings.Split(line, "\t")
		if len(t) != 3 {
			return fmt.Errorf("%s line %d: want 3 fields", path, ln+1)
		}
		k, err1 := strconv.ParseInt(t[1], 10, 64)
		u, err2 := strconv.ParseInt(t[2], 10, 64)
		if err1 != nil || err2 != nil || k < 1 || u < 1 {
			return fmt.Errorf("%s line %d: bad counts", path, ln+1)
		}
		s.freq[k] += u
		s.reads += k * u
		s.distinct += u
	}
	return nil
}

// markHeldOut holds out a third (rounded up) of the sources: the sorted
// names shuffled by a PCG stream of seed, the first third.
func markHeldOut(srcs []source, seed uint64) {
	idx := make([]int, len(srcs))
	for i := range idx {
		idx[i] = i
	}
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	rng.Shuffle(len(idx), func(i, j int) { idx[i], idx[j] = idx[j], idx[i] })
	for _, i := range idx[:(len(srcs)+2)/3] {
		srcs[i].heldOut = true
	}
}

// units expands the frequency table into one count per unit, in a fixed
// order (ascending times seen).
func (s *source) units() []int64 {
	ks := make([]int64, 0, len(s.freq))
	for k := range s.freq {
		ks = append(ks, k)
	}
	sort.Slice(ks, func(i, j int) bool { return ks[i] < ks[j] })
	u := make([]int64, 0, s.distinct)
	for _, k := range ks {
		for i := int64(0); i < s.freq[k]; i++ {
			u = append(u, k)
		}
	}
	return u
}

// subsample draws n of the N reads without replacement (Algorithm S: read
// j of the remaining N−j is taken with probability (n − taken)/(N − j)),
// exactly a multivariate hypergeometric draw of the units' counts.
func subsample(units []int64, N, n int64, rng *rand.Rand) map[int64]int64 {
	freq := map[int64]int64{}
	seen, taken := int64(0), int64(0)
	for _, c := range units {
		x := int64(0)
		for r := int64(0); r < c; r++ {
			if taken < n && rng.Int64N(N-seen) < n-taken {
				taken++
				x++
			}
			seen++
		}
		if x > 0 {
			freq[x]++
		}
	}
	return freq
}

// rarefied is the exact expected distinct units in t reads drawn without
// replacement from the full vector (hypergeometric rarefaction), with
// log-binomials through Lgamma.
func rarefied(freq map[int64]int64, N int64, t int64) float64 {
	if t >= N {
		d := 0.0
		for _, u := range freq {
			d += float64(u)
		}
		return d
	}
	lc := func(a, b int64) float64 {
		x, _ := math.Lgamma(float64(a + 1))
		y, _ := math.Lgamma(float64(b + 1))
		z, _ := math.Lgamma(float64(a - b + 1))
		return x - y - z
	}
	base := lc(N, t)
	s := 0.0
	for k, u := range freq {
		q := 0.0 // C(N−k, t)/C(N, t), zero when N−k < t
		if N-k >= t {
			q = math.Exp(lc(N-k, t) - base)
		}
		s += float64(u) * (1 - q)
	}
	return s
}

type jsonOut struct {
	Samples []struct {
		Sample      string   `json:"sample"`
		Reads       int64    `json:"reads"`
		Distinct    int64    `json:"distinct"`
		Method      string   `json:"method"`
		Backtest    *float64 `json:"backtest_error"`
		Predictions []struct {
			Label    string   `json:"label"`
			Distinct *float64 `json:"distinct"`
			Lo       *float64 `json:"lo"`
			Hi       *float64 `json:"hi"`
		} `json:"predictions"`
	} `json:"samples"`
}

func val(p *float64) float64 {
	if p == nil {
		return math.NaN()
	}
	return *p
}

// runSource draws the subsamples of one source, runs headroom once on all
// of them (one file, one sample each) and the baselines in process.
func runSource(srcs []source, si int, bin string, reps, boot int, seed uint64, minReads int64) ([]cell, error) {
	s := &srcs[si]
	units := s.units()
	type sub struct {
		fi, rep int
		name    string
		freq    map[int64]int64
		reads   int64
	}
	var subs []sub
	var tbl bytes.Buffer
	tbl.WriteString("sample\ttimes_seen\tunits\n")
	for fi, f := range fractions {
		n := int64(math.Round(f * float64(s.reads)))
		if n < minReads {
			continue
		}
		for r := 0; r < reps; r++ {
			rng := rand.New(rand.NewPCG(seed, uint64(si)*1000003+uint64(fi)*1009+uint64(r)))
			fr := subsample(units, s.reads, n, rng)
			name := fmt.Sprintf("%s_f%d_r%d", s.name, fi, r)
			subs = append(subs, sub{fi, r, name, fr, n})
			ks := make([]int64, 0, len(fr))
			for k := range fr {
				ks = append(ks, k)
			}
			sort.Slice(ks, func(i, j int) bool { return ks[i] < ks[j] })
			for _, k := range ks {
				fmt.Fprintf(&tbl, "%s\t%d\t%d\n", name, k, fr[k])
			}
		}
	}
	if len(subs) == 0 {
		return nil, nil
	}
	tmp, err := os.CreateTemp("", "realdata-*.tsv")
	if err != nil {
		return nil, err
	}
	defer os.Remove(tmp.Name())
	if _, err := tmp.Write(tbl.Bytes()); err != nil {
		return nil, err
	}
	tmp.Close()
	cmd := exec.Command(bin, "counts", "--format", "json", "--at", "2x,10x,30x,100x",
		"--bootstrap", strconv.Itoa(boot), "--seed", strconv.FormatUint(seed, 10), "--threads", "2", "--progress", "never", tmp.Name())
	cmd.Stderr = os.Stderr
	outb, err := cmd.Output()
	if err != nil {
		return nil, fmt.Errorf("%s: headroom: %v", s.name, err)
	}
	var js jsonOut
	if err := json.Unmarshal(outb, &js); err != nil {
		return nil, fmt.Errorf("%s: headroom output: %v", s.name, err)
	}
	byName := map[string]int{}
	for i, x := range js.Samples {
		byName[x.Sample] = i
	}
	var cells []cell
	for _, sb := range subs {
		ji, ok := byName[sb.name]
		if !ok {
			return nil, fmt.Errorf("%s: no output for %s", s.name, sb.name)
		}
		hj := js.Samples[ji]
		c, err := complexity.FromMap(sb.freq)
		if err != nil {
			return nil, err
		}
		maxT := multiples[len(multiples)-1] * float64(c.Reads())
		base := baselines(c, maxT)
		for k, m := range multiples {
			t := int64(math.Round(m * float64(sb.reads)))
			if t > s.reads+s.reads/1000 { // m·f ≤ 1 (f·N rounded)
				continue
			}
			cl := cell{src: si, frac: sb.fi, rep: sb.rep, mk: k, reads: sb.reads, distinct: c.Distinct(),
				truth: rarefied(s.freq, s.reads, t), method: hj.Method, backtest: val(hj.Backtest)}
			for e := 0; e < nEst-1; e++ {
				cl.pred[e] = base[e][k]
			}
			cl.pred[nEst-1], cl.lo, cl.hi = math.NaN(), math.NaN(), math.NaN()
			if k < len(hj.Predictions) {
				p := hj.Predictions[k]
				cl.pred[nEst-1], cl.lo, cl.hi = val(p.Distinct), val(p.Lo), val(p.Hi)
			}
			cells = append(cells, cl)
		}
	}
	return cells, nil
}

// baselines are the accuracy program's textbook estimators (see
// scripts/accuracy): Lander–Waterman, full ZTNB ML, textbook RFA, Chao1
// based (Shen et al. 2003); and the grid NPMLE Poisson mixture
// (complexity.Baseline "npmle"), a candidate under evaluation. A failed or inadmissible fit is NaN.
func baselines(c complexity.Counts, maxT float64) [nEst - 1][4]float64 {
	fits := []string{"poisson", "ztnb", "rfa", "shen", "npmle"}
	var out [nEst - 1][4]float64
	for e, fit := range fits {
		if e == npmleEst && !withNPMLE {
			for k := range multiples {
				out[e][k] = math.NaN()
			}
			continue
		}
		m, admissible, err := complexity.Baseline(fit, c, maxT)
		ok := err == nil && m != nil && admissible
		for k, mult := range multiples {
			out[e][k] = math.NaN()
			if ok {
				out[e][k] = m.Distinct(mult * float64(c.Reads()))
			}
		}
	}
	return out
}

func relErr(pred, truth float64) float64 {
	if math.IsNaN(pred) || math.IsInf(pred, 0) {
		return math.Inf(1)
	}
	return math.Abs(pred/truth - 1)
}

var quantile = benchstat.Quantile

func pct(v float64) string { return benchstat.Pct(v, 0.1) }

// stats of estimator e over cells at multiple k: median, p90, coverage, n.
func stats(cells []cell, e, k int) (med, p90, cover float64, n int) {
	var errs []float64
	hit := 0
	for _, c := range cells {
		if c.mk != k {
			continue
		}
		errs = append(errs, relErr(c.pred[e], c.truth))
		if c.lo <= c.truth && c.truth <= c.hi {
			hit++
		}
	}
	if len(errs) == 0 {
		return math.NaN(), math.NaN(), math.NaN(), 0
	}
	return quantile(errs, 0.5), quantile(errs, 0.9), float64(hit) / float64(len(errs)), len(errs)
}

func filter(cells []cell, keep func(cell) bool) []cell {
	var out []cell
	for _, c := range cells {
		if keep(c) {
			out = append(out, c)
		}
	}
	return out
}

func writeTables(w io.Writer, srcs []source, cells []cell) {
	sets := []struct {
		name string
		keep func(cell) bool
	}{
		{"all sources", func(cell) bool { return true }},
		{"tuning sources", func(c cell) bool { return !srcs[c.src].heldOut }},
		{"held-out sources", func(c cell) bool { return srcs[c.src].heldOut }},
	}
	for _, set := range sets {
		cs := filter(cells, set.keep)
		fmt.Fprintf(w, "#### %s: |relative error| median / 90th percentile (cells); headroom's 95%% coverage\n\n", set.name)
		fmt.Fprintln(w, "| estimator | 2× | 10× | 30× | 100× |")
		fmt.Fprintln(w, "|---|---|---|---|---|")
		for e, name := range estNames {
			if e == npmleEst && !withNPMLE {
				continue
			}
			fmt.Fprintf(w, "| %s |", name)
			for k := range multiples {
				med, p90, _, n := stats(cs, e, k)
				fmt.Fprintf(w, " %s / %s (%d) |", pct(med), pct(p90), n)
			}
			fmt.Fprintln(w)
		}
		fmt.Fprint(w, "| headroom coverage |")
		for k := range multiples {
			_, _, cov, _ := stats(cs, nEst-1, k)
			fmt.Fprintf(w, " %s |", pct(cov))
		}
		fmt.Fprintln(w)
		fmt.Fprintln(w)
	}
	fmt.Fprintln(w, "#### Per source: median |relative error| at 2× / 10× / 30× / 100× (headroom, best baseline), headroom coverage")
	fmt.Fprintln(w)
	fmt.Fprintln(w, "| source | kind | set | reads | distinct | headroom | best baseline | coverage |")
	fmt.Fprintln(w, "|---|---|---|---|---|---|---|---|")
	for si, s := range srcs {
		cs := filter(cells, func(c cell) bool { return c.src == si })
		if len(cs) == 0 {
			continue
		}
		set := "tuning"
		if s.heldOut {
			set = "**held out**"
		}
		var h, b, cv []string
		for k := range multiples {
			med, _, cov, n := stats(cs, nEst-1, k)
			if n == 0 {
				h, b, cv = append(h, "–"), append(b, "–"), append(cv, "–")
				continue
			}
			h = append(h, pct(med))
			cv = append(cv, pct(cov))
			best := math.Inf(1)
			for e := 0; e < nEst-2; e++ {
				if m, _, _, _ := stats(cs, e, k); m < best {
					best = m
				}
			}
			b = append(b, pct(best))
		}
		fmt.Fprintf(w, "| %s | %s | %s | %d | %d | %s | %s | %s |\n", s.name, s.kind, set, s.reads, s.distinct,
			strings.Join(h, " / "), strings.Join(b, " / "), strings.Join(cv, " / "))
	}
	fmt.Fprintln(w)
}

func writeCSV(w io.Writer, srcs []source, cells []cell) {
	fmt.Fprintln(w, "source,set,frac,rep,mult,reads,distinct,truth,poisson,ztnb,rfa,shen,npmle,headroom,lo,hi,method,backtest")
	for _, c := range cells {
		set := "tune"
		if srcs[c.src].heldOut {
			set = "held"
		}
		fmt.Fprintf(w, "%s,%s,%s,%d,%g,%d,%d,%.6g", srcs[c.src].name, set, fracNames[c.frac], c.rep, multiples[c.mk], c.reads, c.distinct, c.truth)
		for _, p := range c.pred {
			fmt.Fprintf(w, ",%.6g", p)
		}
		fmt.Fprintf(w, ",%.6g,%.6g,%s,%.6g\n", c.lo, c.hi, strings.ReplaceAll(c.method, ",", ";"), c.backtest)
	}
}
