// Command accuracy is headroom's extrapolation accuracy benchmark.
//
// It simulates libraries (populations of units with relative abundances
// p_i) from several abundance families and sizes, draws a shallow sample by
// Poisson sampling at depth N (unit i seen Poisson(N p_i) times), and
// compares each estimator's prediction of the distinct units at T = 2N,
// 10N, 30N, 100N with the exact expectation
//
//	E[D(T)] = Σ_i (1 − e^{−T p_i}),
//
// the truth for that library (not for one deeper sample). It reports the
// median and 90th percentile of |relative error|, the coverage of
// headroom's intervals and the failures (NaN, error or an inadmissible
// curve) per estimator, overall and by family, as markdown.
//
// It also measures headroom's reach answers (complexity.Options.Reach):
// for each target kind (distinct, dup, coverage, yield) the target is set
// to its true value at T = 3N, 10N, 30N (reachTargets), so the true
// answer is T; the table gives the median and 90th percentile |relative
// error| of the depth and the coverage of its interval.
//
// The grid: 14 families × library sizes S ∈ {1e4, 1e5, 1e6, 1e7} × depth
// N/S ∈ {0.1, 0.3, 1, 3} (a shallow QC pass sees anywhere from a tenth to a
// few times the library), one draw each; -quick uses S ≤ 1e6 and N/S ∈
// {0.3, 1}. Everything is seeded: the same -seed gives the same table.
// Seed 1 is the reporting set; the interval calibration in
// complexity/interval.go (the default model-error knots) and the choices made in
// complexity/select.go were derived from seed 2 (-seed 2 -calibrate prints
// the knots), so reported coverage and errors are measured on draws the
// tuning never saw.
//
// Usage:
//
//	go run ./scripts/accuracy [-quick] [-seed 1] [-boot 100] [-out FILE] [-csv FILE] [-candidates] [-calibrate]
package main

import (
	"flag"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"sort"
	"strings"
	"sync"
	"time"

	"headroom/complexity"
	"headroom/internal/benchstat"
	"headroom/internal/sim"
)

var multiples = []float64{2, 10, 30, 100}

// estimator is one row of the table: a curve fitted by
// complexity.Baseline under the name fit.
type estimator struct {
	name, fit string
}

var baselines = []estimator{
	{"poisson (Lander–Waterman)", "poisson"},
	{"ztnb (full ML)", "ztnb"},
	{"rfa (textbook)", "rfa"},
	{"shen (Chao1-based)", "shen"},
	{"lognormal (PLN ML)", "lognormal"},
}

const headroomName = "headroom (Analyze)"

// result of one estimator on one case.
type result struct {
	pred   [4]float64
	lo, hi [4]float64
	failed bool
	method string
	bt     float64 // headroom's self-backtest error (Report.BacktestError)
}

type caseResult struct {
	fam, S int
	ratio  float64
	n, d   int64
	truth  [4]float64
	res    []result // baselines..., headroom
	secs   float64
	// reach are headroom's answers to the reach targets of reachTargets,
	// whose true depth is reachMultiples[k] times the reads; elastic[k]
	// is the true curve's elasticity T·D'(T)/D(T) there.
	reach   []complexity.Reached
	elastic []float64
}

// reachMultiples are the true depths (multiples of the sample's reads) of
// the reach targets: each kind's target is set to its true value there.
var reachMultiples = []float64{3, 10, 30}

var reachKinds = []complexity.TargetKind{complexity.TargetDistinct, complexity.TargetDup, complexity.TargetCoverage, complexity.TargetYield}

// reachTargets returns, for each kind and each reach multiple m (kind
// major), the target whose true depth is T = m·N for the library p:
// E[D(T)] = Σ(1 − e^{−T p_i}), the duplicate fraction 1 − E[D(T)]/T, the
// coverage Σ p_i (1 − e^{−T p_i}) (the chance that the next read is of a
// unit already seen) and the marginal yield dE[D]/dT = Σ p_i e^{−T p_i};
// and the elasticity T·D'(T)/D(T) at each multiple: a relative error ε of
// D near T is a relative error of about ε/elasticity of the depth.
func reachTargets(p []float64, n float64) (out []complexity.Target, elastic []float64) {
	for _, k := range reachKinds {
		for _, m := range reachMultiples {
			T := m * n
			var d, cov, y float64
			for _, q := range p {
				e := math.Exp(-T * q)
				d += -math.Expm1(-T * q)
				cov += q * -math.Expm1(-T*q)
				y += q * e
			}
			if k == reachKinds[0] {
				elastic = append(elastic, T*y/d)
			}
			v := d
			switch k {
			case complexity.TargetDup:
				v = 1 - d/T
			case complexity.TargetCoverage:
				v = cov
			case complexity.TargetYield:
				v = y
			}
			out = append(out, complexity.Target{Kind: k, Value: v})
		}
	}
	return out, elastic
}

func main() {
	quick := flag.Bool("quick", false, "smaller grid for iteration")
	seed := flag.Uint64("seed", 1, "base seed (1 = reporting set, 2 = calibration set)")
	boot := flag.Int("boot", 100, "bootstrap replicates for headroom's intervals")
	out := flag.String("out", "", "also write the markdown to FILE")
	csvOut := flag.String("csv", "", "write per-case rows to FILE")
	workers := flag.Int("workers", 2, "cases run in parallel")
	famFilter := flag.String("family", "", "only families whose name contains this")
	flag.BoolVar(&showCands, "candidates", false, "also report headroom's candidate models and the best of them per case")
	calibrate := flag.Bool("calibrate", false, "derive the interval model-error knots (use a seed other than the reporting one)")
	flag.Parse()
	if *calibrate {
		knots = []complexity.Knot{{M: 1, S: 0}} // bootstrap-only intervals
		fitKnots = []complexity.Knot{{M: 1, S: 0}}
	}

	sizes := []int{1e4, 1e5, 1e6, 1e7}
	ratios := []float64{0.1, 0.3, 1, 3}
	if *quick {
		sizes = []int{1e4, 1e5, 1e6}
		ratios = []float64{0.3, 1}
	}
	start := time.Now()
	type job struct{ fam, si int }
	var jobs []job
	for fi, f := range sim.Families {
		if *famFilter != "" && !strings.Contains(f.Name, *famFilter) {
			continue
		}
		for si := range sizes {
			jobs = append(jobs, job{fi, si})
		}
	}
	results := make([][]caseResult, len(jobs))
	var wg sync.WaitGroup
	ch := make(chan int)
	for w := 0; w < *workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for ji := range ch {
				j := jobs[ji]
				results[ji] = runPopulation(*seed, j.fam, sizes[j.si], ratios, *boot)
			}
		}()
	}
	for i := range jobs {
		ch <- i
	}
	close(ch)
	wg.Wait()
	var all []caseResult
	for _, r := range results {
		all = append(all, r...)
	}

	var sb strings.Builder
	cmd := "go run ./scripts/accuracy"
	if *quick {
		cmd += " -quick"
	}
	fmt.Fprintf(&sb, "Command: `%s -seed %d -boot %d`; %d cases (%d families × S ∈ %v × N/S ∈ %v), %.0f s on %d workers.\n\n",
		cmd, *seed, *boot, len(all), len(jobs)/len(sizes), sizes, ratios, time.Since(start).Seconds(), *workers)
	writeTables(&sb, all)
	writeReach(&sb, all)
	if *calibrate {
		writeCalibration(&sb, all)
	}
	fmt.Print(sb.String())
	if *out != "" {
		if err := os.WriteFile(*out, []byte(sb.String()), 0o644); err != nil {
			fmt.Fprintln(os.Stderr, err)
			os.Exit(1)
		}
	}
	if *csvOut != "" {
		f, err := os.Create(*csvOut)
		if err != nil {
			fmt.Fprintln(os.Stderr, err)
			os.Exit(1)
		}
		writeCSV(f, all)
		f.Close()
	}
}

// candNames are headroom's candidate extrapolations, shown with
// -candidates (diagnostics: what selection chooses among).
var candNames = []string{"band-h", "powerlaw-h", "lognormal2-h", "lognormal2", "lognormal-h", "lognormal", "ztnb-h", "ztnb-c"}

var showCands bool

// knots and fitKnots are the model-error and backtest-weight knots of
// headroom's intervals (nil: the calibrated defaults).
var knots, fitKnots []complexity.Knot

func names() []string {
	var s []string
	for _, e := range baselines {
		s = append(s, e.name)
	}
	if showCands {
		for _, n := range candNames {
			s = append(s, "cand:"+n)
		}
		s = append(s, "oracle@10x", "select")
	}
	return append(s, headroomName)
}

// runPopulation simulates one library and samples it at each depth ratio.
func runPopulation(seed uint64, fi, S int, ratios []float64, boot int) []caseResult {
	rng := rand.New(rand.NewPCG(seed, uint64(fi)*1000003+uint64(S)))
	a := sim.Families[fi].Gen(rng, S)
	sum := 0.0
	for _, v := range a {
		sum += v
	}
	for i := range a {
		a[i] /= sum
	}
	var out []caseResult
	for ri, ratio := range ratios {
		t0 := time.Now()
		N := ratio * float64(S)
		srng := rand.New(rand.NewPCG(seed^0xabcdef, uint64(fi)*1000003+uint64(S)*31+uint64(ri)))
		var b complexity.Builder
		for _, p := range a {
			b.AddUnit(sim.Poisson(srng, N*p))
		}
		c, err := b.Counts()
		if err != nil {
			panic(err) // cannot happen: counts are small and positive
		}
		cr := caseResult{fam: fi, S: S, ratio: ratio, n: c.Reads(), d: c.Distinct()}
		// Truth at multiples of the drawn sample's reads.
		for k, m := range multiples {
			T := m * float64(c.Reads())
			s := 0.0
			for _, p := range a {
				s += -math.Expm1(-T * p)
			}
			cr.truth[k] = s
		}
		maxT := multiples[len(multiples)-1] * float64(c.Reads())
		for _, e := range baselines {
			cr.res = append(cr.res, runModel(e, c, maxT))
		}
		if showCands {
			best, bestE := -1, math.Inf(1)
			for _, n := range candNames {
				r := runModel(estimator{n, n}, c, maxT)
				cr.res = append(cr.res, r)
				if e := relErr(r.pred[1], cr.truth[1]); !r.failed && e < bestE {
					best, bestE = len(cr.res)-1, e
				}
			}
			if best >= 0 {
				cr.res = append(cr.res, cr.res[best])
			} else {
				cr.res = append(cr.res, result{failed: true})
			}
			sr := runModel(estimator{"select", "select"}, c, maxT)
			cr.res = append(cr.res, sr)
		}
		targets, elastic := reachTargets(a, float64(c.Reads()))
		hr, reach := runHeadroom(c, boot, seed, targets)
		cr.elastic = elastic
		cr.res, cr.reach = append(cr.res, hr), reach
		cr.secs = time.Since(t0).Seconds()
		out = append(out, cr)
	}
	return out
}

func runModel(e estimator, c complexity.Counts, maxT float64) result {
	var r result
	for k := range r.pred {
		r.pred[k], r.lo[k], r.hi[k] = math.NaN(), math.NaN(), math.NaN()
	}
	m, admissible, err := complexity.Baseline(e.fit, c, maxT)
	if err != nil {
		r.failed = true
		return r
	}
	r.method = m.Name()
	if !admissible {
		r.failed = true
	}
	for k, mult := range multiples {
		v := m.Distinct(mult * float64(c.Reads()))
		r.pred[k] = v
		if math.IsNaN(v) || math.IsInf(v, 0) {
			r.failed = true
		}
	}
	return r
}

func runHeadroom(c complexity.Counts, boot int, seed uint64, targets []complexity.Target) (result, []complexity.Reached) {
	var depths []float64
	for _, m := range multiples {
		depths = append(depths, m*float64(c.Reads()))
	}
	rep := complexity.Analyze(c, complexity.Options{Depths: depths, Bootstrap: boot, Seed: seed, Threads: 1,
		Gates: complexity.NoGates(), ModelError: knots, FitError: fitKnots, Reach: targets})
	var r result
	r.method = rep.Method
	r.bt = rep.BacktestError
	if rep.TotalMethod != "" {
		r.method += "; total=" + rep.TotalMethod
	}
	for k := range multiples {
		if k >= len(rep.Predictions) {
			r.failed = true
			continue
		}
		p := rep.Predictions[k]
		r.pred[k], r.lo[k], r.hi[k] = p.Distinct, p.Lo, p.Hi
		if math.IsNaN(p.Distinct) || math.IsInf(p.Distinct, 0) {
			r.failed = true
		}
	}
	return r, rep.Reach
}

func relErr(pred, truth float64) float64 { return math.Abs(pred/truth - 1) }

var quantile = benchstat.Quantile

type summary struct {
	med, p90 [4]float64
	cover    [4]float64 // NaN when no intervals
	fails    int
	n        int
}

// summarize: a failed case counts as infinite error for the quantiles (it
// is an unusable answer), and as a miss for coverage.
func summarize(cases []caseResult, ei int) summary {
	var s summary
	s.n = len(cases)
	for k := range multiples {
		var errs []float64
		covered, withCI := 0, 0
		for _, cr := range cases {
			r := cr.res[ei]
			e := math.Inf(1)
			if !r.failed && !math.IsNaN(r.pred[k]) {
				e = relErr(r.pred[k], cr.truth[k])
			}
			errs = append(errs, e)
			if !math.IsNaN(r.lo[k]) && !math.IsNaN(r.hi[k]) {
				withCI++
				if r.lo[k] <= cr.truth[k] && cr.truth[k] <= r.hi[k] {
					covered++
				}
			}
		}
		s.med[k] = quantile(errs, 0.5)
		s.p90[k] = quantile(errs, 0.9)
		s.cover[k] = math.NaN()
		if withCI > 0 {
			s.cover[k] = float64(covered) / float64(len(cases))
		}
	}
	for _, cr := range cases {
		if cr.res[ei].failed {
			s.fails++
		}
	}
	return s
}

func pct(v float64) string { return benchstat.Pct(v, 10) }

func writeTables(w io.Writer, all []caseResult) {
	fmt.Fprintln(w, "### Overall: |relative error| of E[D(T)], median / 90th percentile; 95% interval coverage; failures")
	fmt.Fprintln(w)
	fmt.Fprintln(w, "| estimator | 2× | 10× | 30× | 100× | coverage 2×/10×/30×/100× | failures |")
	fmt.Fprintln(w, "|---|---|---|---|---|---|---|")
	for ei, name := range names() {
		s := summarize(all, ei)
		fmt.Fprintf(w, "| %s |", name)
		for k := range multiples {
			fmt.Fprintf(w, " %s / %s |", pct(s.med[k]), pct(s.p90[k]))
		}
		if math.IsNaN(s.cover[0]) {
			fmt.Fprint(w, " – |")
		} else {
			fmt.Fprintf(w, " %s / %s / %s / %s |", pct(s.cover[0]), pct(s.cover[1]), pct(s.cover[2]), pct(s.cover[3]))
		}
		fmt.Fprintf(w, " %d of %d |\n", s.fails, s.n)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "### By family: median |relative error| at 10× / 100× (headroom coverage at 10× / 100×)")
	fmt.Fprintln(w)
	ns := names()
	fmt.Fprint(w, "| family |")
	for _, n := range ns {
		fmt.Fprintf(w, " %s |", strings.Fields(n)[0])
	}
	fmt.Fprintln(w, " headroom coverage |")
	fmt.Fprint(w, "|---|")
	for range ns {
		fmt.Fprint(w, "---|")
	}
	fmt.Fprintln(w, "---|")
	for fi, f := range sim.Families {
		var cs []caseResult
		for _, cr := range all {
			if cr.fam == fi {
				cs = append(cs, cr)
			}
		}
		if len(cs) == 0 {
			continue
		}
		fmt.Fprintf(w, "| %s |", f.Name)
		var hs summary
		for ei := range ns {
			s := summarize(cs, ei)
			fmt.Fprintf(w, " %s / %s |", pct(s.med[1]), pct(s.med[3]))
			hs = s
		}
		fmt.Fprintf(w, " %s / %s |\n", pct(hs.cover[1]), pct(hs.cover[3]))
	}
	fmt.Fprintln(w)
	// Which method headroom chose.
	cnt := map[string]int{}
	for _, cr := range all {
		m := cr.res[len(cr.res)-1].method
		if showCands {
			m = cr.res[len(cr.res)-2].method
		}
		if i := strings.Index(m, ";"); i >= 0 {
			m = m[:i]
		}
		if m == "" {
			m = "(none)"
		}
		cnt[m]++
	}
	var keys []string
	for k := range cnt {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	fmt.Fprint(w, "headroom's method column:")
	for _, k := range keys {
		fmt.Fprintf(w, " %s %d;", k, cnt[k])
	}
	fmt.Fprintln(w)
}

func writeCSV(w io.Writer, all []caseResult) {
	fmt.Fprint(w, "family,S,ratio,reads,distinct,f1,mult,truth")
	for _, n := range names() {
		k := strings.Fields(n)[0]
		fmt.Fprintf(w, ",%s,%s_lo,%s_hi", k, k, k)
	}
	fmt.Fprintln(w, ",method,secs,backtest")
	for _, cr := range all {
		for k, m := range multiples {
			fmt.Fprintf(w, "%s,%d,%g,%d,%d,0,%g,%.6g", sim.Families[cr.fam].Name, cr.S, cr.ratio, cr.n, cr.d, m, cr.truth[k])
			for _, r := range cr.res {
				fmt.Fprintf(w, ",%.6g,%.6g,%.6g", r.pred[k], r.lo[k], r.hi[k])
			}
			h := cr.res[len(cr.res)-1]
			fmt.Fprintf(w, ",%s,%.3f,%.6g\n", h.method, cr.secs, h.bt)
		}
	}
}

// writeCalibration derives the model-error term of headroom's intervals:
// for each multiple, the smallest s_model such that 95% of the cases have
// |log(Δ_true/Δ̂)| ≤ z·sqrt(s_boot² + s_model²), Δ = new units. With the
// knots set to zero, headroom's lower bound is D + Δ̂·exp(−z·s_boot), which
// gives s_boot per case. These are the knots without the adaptive term
// (the simulated set alone); the defaults in use are fitted together with
// that term by scripts/realdata/calibrate.py from this run's -csv and the
// real-data benchmark's (complexity/adapt.go).
func writeCalibration(w io.Writer, all []caseResult) {
	const z = 1.959963984540054
	hi := len(all[0].res) - 1
	fmt.Fprintln(w)
	fmt.Fprintln(w, "### Model-error knots without the adaptive term (the defaults are fitted with it: scripts/realdata/calibrate.py)")
	fmt.Fprintln(w)
	fmt.Fprint(w, "knots: {1, 0}")
	for k, m := range multiples {
		var es, sbs []float64
		for _, cr := range all {
			r := cr.res[hi]
			d := float64(cr.d)
			delta := r.pred[k] - d
			if r.failed || !(delta > 0) || !(r.lo[k] > d) || !(cr.truth[k] > d) {
				es = append(es, math.Inf(1))
				sbs = append(sbs, 0)
				continue
			}
			sbs = append(sbs, -math.Log((r.lo[k]-d)/delta)/z)
			es = append(es, math.Abs(math.Log((cr.truth[k]-d)/delta)))
		}
		cover := func(sm float64) float64 {
			n := 0
			for i, e := range es {
				if e <= z*math.Sqrt(sbs[i]*sbs[i]+sm*sm) {
					n++
				}
			}
			return float64(n) / float64(len(es))
		}
		a, b := 0.0, 5.0
		for i := 0; i < 60; i++ {
			c := (a + b) / 2
			if cover(c) >= 0.95 {
				b = c
			} else {
				a = c
			}
		}
		fmt.Fprintf(w, ", {%g, %.3f}", m, b)
	}
	fmt.Fprintln(w)
}

// writeReach writes the accuracy of headroom's reach answers: for each
// target kind and true depth, the median and 90th percentile of the
// |relative error| of the depth (a target not reached counts as an
// infinite error), the coverage of the interval and how many were not
// reached.
func writeReach(w io.Writer, all []caseResult) {
	fmt.Fprintln(w)
	fmt.Fprintln(w, "### Reach: |relative error| of the depth at which a target is reached, median / 90th percentile; interval coverage; not reached")
	fmt.Fprintln(w)
	fmt.Fprintf(w, "| target | true depth | median | 90th pct | coverage | not reached | median, elasticity ≥ %g (cases) |\n", wellPosed)
	fmt.Fprintln(w, "|---|---|---|---|---|---|---|")
	for ki, k := range reachKinds {
		for mi, m := range reachMultiples {
			var errs, posed []float64
			covered, missed := 0, 0
			for _, cr := range all {
				q := cr.reach[ki*len(reachMultiples)+mi]
				T := m * float64(cr.n)
				e := math.Inf(1)
				if !math.IsNaN(q.Reads) {
					e = relErr(q.Reads, T)
				} else {
					missed++
				}
				errs = append(errs, e)
				if cr.elastic[mi] >= wellPosed {
					posed = append(posed, e)
				}
				if q.Lo <= T && T <= q.Hi {
					covered++
				}
			}
			fmt.Fprintf(w, "| %v | %g× | %s | %s | %s | %d of %d | %s (%d) |\n", k, m, pct(quantileInf(errs, 0.5)), pct(quantileInf(errs, 0.9)),
				pct(float64(covered)/float64(len(all))), missed, len(all), pct(quantileInf(posed, 0.5)), len(posed))
		}
	}
}

// wellPosed is the elasticity from which a depth is well determined by
// the curve: 10% more reads add at least 1% distinct units there.
const wellPosed = 0.1

// quantileInf is quantile where infinite values (failures) stay infinite.
func quantileInf(v []float64, p float64) float64 {
	q := quantile(v, p)
	if math.IsNaN(q) && len(v) > 0 {
		return math.Inf(1)
	}
	return q
}
