package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"
	"sync"

	"headroom/complexity"
	"headroom/internal/freqtable"
)

// cell is one pre-formatted value of the summary: its TSV text and its JSON
// encoding. Missing values are empty in TSV and null in JSON (DESIGN.md).
type cell struct {
	tsv  string
	json string
}

var nullCell = cell{tsv: "", json: "null"}

func intCell(v int64) cell { s := strconv.FormatInt(v, 10); return cell{s, s} }

// countCell formats an expected number of units: one decimal, or from
// 1e15 on (beyond which a float64's digits past the 16th are noise, and
// beyond any real library) ten significant digits in exponent form, so
// that no digit is printed that the value does not hold.
func countCell(v float64) cell {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nullCell
	}
	s := strconv.FormatFloat(v, 'f', 1, 64)
	if math.Abs(v) >= countExpFrom {
		s = strconv.FormatFloat(v, 'e', 9, 64)
	}
	return cell{s, s}
}

const countExpFrom = 1e15

// fracCell formats a fraction or ratio (six significant digits).
func fracCell(v float64) cell {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nullCell
	}
	s := strconv.FormatFloat(v, 'g', 6, 64)
	return cell{s, s}
}

// strCell formats text; tabs and newlines become spaces so a TSV row stays
// one row.
func strCell(s string) cell {
	s = freqtable.CleanName(s)
	j, _ := json.Marshal(s)
	return cell{s, string(j)}
}

// column is a named summary value a subcommand adds (e.g. records for
// reads, chao1 for taxa); they are inserted before "method".
type column struct {
	key   string
	value cell
}

// sampleInput is what a subcommand hands to the shared estimation and
// output pipeline: one sample's frequency counts plus its own columns and
// notes. Every sample of a run must carry the same extra keys in the same
// order.
type sampleInput struct {
	name   string
	counts complexity.Counts
	extra  []column
	notes  []string
}

// runInfo describes the run for reports.
type runInfo struct {
	command string   // subcommand name
	inputs  []string // input files as given
	// settings are the subcommand's own flags worth showing in a report.
	settings []reportKV
	// notes are about the whole run (not one sample): shown once in the
	// report and as the top-level "notes" of the JSON summary.
	notes []string
	// extra are further output files of the subcommand, written atomically
	// together with the others (all or nothing).
	extra []pendingFile
}

// estimated is one sample after estimation.
type estimated struct {
	in  sampleInput
	rep complexity.Report
}

// estimateAll runs complexity.Analyze on every sample with the shared
// settings, in parallel over samples, results in input order.
func estimateAll(s *shared, samples []sampleInput, wantCurve bool) []estimated {
	out := make([]estimated, len(samples))
	workers := s.threads
	if workers > len(samples) {
		workers = len(samples)
	}
	// Threads left for each sample's bootstrap: the bootstrap is seeded per
	// replicate, so the split does not change any number.
	inner := 1
	if workers > 0 && s.threads/workers > 1 {
		inner = s.threads / workers
	}
	jobs := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range jobs {
				out[i] = estimated{in: samples[i], rep: complexity.Analyze(samples[i].counts, s.options(samples[i].counts, wantCurve, inner))}
			}
		}()
	}
	for i := range samples {
		jobs <- i
	}
	close(jobs)
	wg.Wait()
	return out
}

// options builds the per-sample estimation options.
func (s *shared) options(c complexity.Counts, wantCurve bool, threads int) complexity.Options {
	n := c.Reads()
	o := complexity.Options{Bootstrap: s.bootstrap, Seed: s.seed, Level: s.level, Threads: threads, Gates: complexity.NoGates()}
	for _, d := range s.depths {
		o.Depths = append(o.Depths, d.reads(n))
	}
	o.Gates.MaxDup, o.Gates.MinDistinct, o.Gates.MinCoverage = s.maxDup, s.minDistinct, s.minCoverage
	switch {
	case s.targetDepth != nil:
		o.Gates.Target = s.targetDepth.reads(n)
	case len(o.Depths) > 0:
		o.Gates.Target = o.Depths[0]
	default:
		o.Gates.Target = float64(n)
	}
	if wantCurve {
		o.Curve = curveGrid(n, s.maxDepth(n))
	}
	return o
}

// maxDepth is the deepest depth asked for (at least 10x the sample).
func (s *shared) maxDepth(n int64) float64 {
	m := 10 * float64(n)
	for _, d := range s.depths {
		m = math.Max(m, d.reads(n))
	}
	if s.targetDepth != nil {
		m = math.Max(m, s.targetDepth.reads(n))
	}
	return m
}

// curvePoints is the number of curve points on each side of the observed
// depth: enough for a smooth plot, few enough for a small file.
const curvePoints = 40

// curveGrid returns depths log-spaced from n/1000 (at least 1) to n and
// from n to max, each rounded to whole reads, deduplicated, ascending.
func curveGrid(n int64, max float64) []float64 {
	if n < 1 {
		return nil
	}
	var g []float64
	add := func(v float64) {
		v = math.Round(v)
		if v >= 1 && (len(g) == 0 || v > g[len(g)-1]) {
			g = append(g, v)
		}
	}
	lo := math.Max(1, float64(n)/1000)
	for i := 0; i <= curvePoints; i++ {
		add(lo * math.Pow(float64(n)/lo, float64(i)/curvePoints))
	}
	for i := 1; i <= curvePoints; i++ {
		add(float64(n) * math.Pow(max/float64(n), float64(i)/curvePoints))
	}
	return g
}

// summaryKeys returns the summary column names in DESIGN order for the
// given extra keys (inserted before method) and --at labels.
func summaryKeys(extra []string) []string {
	keys := []string{"sample", "reads", "distinct", "dup_fraction", "singletons", "doubletons",
		"sample_coverage", "marginal_yield", "total_est", "total_lo", "total_hi", "saturation"}
	keys = append(keys, extra...)
	return append(keys, "method", "backtest_error", "verdict", "notes")
}

// methodText is the method column: the curve's method and the total's
// estimator, as "METHOD; total=TOTAL".
func methodText(r complexity.Report) string {
	switch {
	case r.TotalMethod == "":
		return r.Method
	case r.Method == "":
		return "total=" + r.TotalMethod
	}
	return r.Method + "; total=" + r.TotalMethod
}

// summaryCells returns the cells of summaryKeys for one sample.
func summaryCells(e estimated) []cell {
	r := e.rep
	c := []cell{strCell(e.in.name), intCell(r.Reads), intCell(r.Distinct), fracCell(r.DupFraction),
		intCell(r.Singletons), intCell(r.Doubletons), fracCell(r.SampleCoverage), fracCell(r.MarginalYield),
		countCell(r.Total), countCell(r.TotalLo), countCell(r.TotalHi), fracCell(r.Saturation)}
	for _, x := range e.in.extra {
		c = append(c, x.value)
	}
	method := nullCell
	if m := methodText(r); m != "" {
		method = strCell(m)
	}
	verdict := nullCell
	if r.Verdict != complexity.VerdictNone {
		verdict = strCell(string(r.Verdict))
	}
	notes := nullCell
	if all := append(append([]string(nil), e.in.notes...), r.Notes...); len(all) > 0 {
		notes = strCell(strings.Join(all, "; "))
	}
	return append(c, method, fracCell(r.BacktestError), verdict, notes)
}

func extraKeys(samples []estimated) []string {
	if len(samples) == 0 {
		return nil
	}
	var k []string
	for _, x := range samples[0].in.extra {
		k = append(k, x.key)
	}
	return k
}

// writeSummaryTSV renders the summary table.
func writeSummaryTSV(s *shared, samples []estimated) []byte {
	var b bytes.Buffer
	keys := summaryKeys(extraKeys(samples))
	for _, d := range s.depths {
		keys = append(keys, "distinct_"+d.label, "lo_"+d.label, "hi_"+d.label, "dup_fraction_"+d.label)
	}
	b.WriteString(strings.Join(keys, "\t"))
	b.WriteByte('\n')
	for _, e := range samples {
		cells := summaryCells(e)
		for _, p := range e.rep.Predictions {
			cells = append(cells, countCell(p.Distinct), countCell(p.Lo), countCell(p.Hi), fracCell(p.DupFraction))
		}
		for i, c := range cells {
			if i > 0 {
				b.WriteByte('\t')
			}
			b.WriteString(c.tsv)
		}
		b.WriteByte('\n')
	}
	return b.Bytes()
}

// writeSummaryJSON renders the summary document (DESIGN.md, JSON).
func writeSummaryJSON(s *shared, info runInfo, samples []estimated) []byte {
	var b bytes.Buffer
	v, _ := json.Marshal(toolVersion())
	fmt.Fprintf(&b, "{\"tool\":\"headroom\",\"version\":%s,", v)
	if len(info.notes) > 0 {
		n, _ := json.Marshal(info.notes)
		fmt.Fprintf(&b, "\"notes\":%s,", n)
	}
	b.WriteString("\"samples\":[")
	keys := summaryKeys(extraKeys(samples))
	for i, e := range samples {
		if i > 0 {
			b.WriteByte(',')
		}
		b.WriteString("\n{")
		for k, c := range summaryCells(e) {
			fmt.Fprintf(&b, "%q:%s,", keys[k], c.json)
		}
		b.WriteString("\"predictions\":[")
		for k, p := range e.rep.Predictions {
			if k > 0 {
				b.WriteByte(',')
			}
			label, _ := json.Marshal(s.depths[k].label)
			fmt.Fprintf(&b, "{\"label\":%s,\"reads\":%s,\"distinct\":%s,\"lo\":%s,\"hi\":%s,\"dup_fraction\":%s}",
				label, countCell(p.Reads).json, countCell(p.Distinct).json, countCell(p.Lo).json,
				countCell(p.Hi).json, fracCell(p.DupFraction).json)
		}
		b.WriteString("]}")
	}
	b.WriteString("\n]}\n")
	return b.Bytes()
}

// writeCurve renders the long-format curve.
func writeCurve(samples []estimated) []byte {
	var b bytes.Buffer
	b.WriteString("sample\treads\tdistinct\tlo\thi\tkind\n")
	for _, e := range samples {
		name := strCell(e.in.name).tsv
		for _, p := range e.rep.Points {
			fmt.Fprintf(&b, "%s\t%s\t%s\t%s\t%s\t%s\n", name, countCell(p.Reads).tsv, countCell(p.Distinct).tsv,
				countCell(p.Lo).tsv, countCell(p.Hi).tsv, p.Kind)
		}
	}
	return b.Bytes()
}

// writeCounts renders frequency-count tables in the interchange format.
func writeCounts(samples []sampleInput) []byte {
	var b bytes.Buffer
	ft := make([]freqtable.Sample, len(samples))
	for i, s := range samples {
		ft[i] = freqtable.Sample{Name: s.name, Counts: s.counts}
	}
	freqtable.Write(&b, ft) // writes to memory: cannot fail
	return b.Bytes()
}

// estimateAndWrite is the shared back half of every estimating subcommand:
// estimate each sample, render every requested output, and write them all
// atomically. Nothing is written unless everything rendered. With --strict
// it returns errStrict after writing when any sample failed a gate.
func (a *app) estimateAndWrite(s *shared, info runInfo, samples []sampleInput) error {
	wantCurve := s.curve != "" || s.plot != "" || s.report != ""
	est := estimateAll(s, samples, wantCurve)
	var outs outputs
	var summary []byte
	if s.format == "json" {
		summary = writeSummaryJSON(s, info, est)
	} else {
		summary = writeSummaryTSV(s, est)
	}
	outs.add(s.output, summary)
	if s.curve != "" {
		outs.add(s.curve, writeCurve(est))
	}
	if s.plot != "" {
		img, _, err := renderPlot(s.plot, s, est)
		if err != nil {
			return err
		}
		outs.add(s.plot, img)
	}
	if s.report != "" {
		page, err := renderReport(s, info, est)
		if err != nil {
			return err
		}
		outs.add(s.report, page)
	}
	if s.saveCounts != "" {
		outs.add(s.saveCounts, writeCounts(samples))
	}
	outs.files = append(outs.files, info.extra...)
	if err := refuseOverwritingInputs(outs.files, info.inputs); err != nil {
		return err
	}
	if err := outs.commit(a.stdout); err != nil {
		return err
	}
	if s.strict {
		for _, e := range est {
			if e.rep.Verdict == complexity.VerdictFail {
				return errStrict
			}
		}
	}
	return nil
}
