package main

import (
	"fmt"
	"math"
	"strings"
	"sync"
	"sync/atomic"

	"headroom/complexity"
)

// sampleInput is what a subcommand hands to the shared estimation and
// output pipeline: one sample's frequency counts plus its own columns and
// notes. Every sample of a run must carry the same extra keys in the same
// order.
type sampleInput struct {
	name   string
	counts complexity.Counts
	extra  []column
	notes  []string
	// sequenced is what this run bought for the sample, in reads as the
	// run delivers them (read pairs for paired data, before any
	// filtering); 0 means the counts' own reads (tables, counts).
	sequenced int64
}

// bought returns the reads this run bought for the sample.
func (in sampleInput) bought() int64 {
	if in.sequenced > 0 {
		return in.sequenced
	}
	return in.counts.Reads()
}

// usable is the share of bought reads that the curve speaks of.
func (in sampleInput) usable() float64 {
	b := in.bought()
	if b == 0 {
		return 1
	}
	return float64(in.counts.Reads()) / float64(b)
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
	in    sampleInput
	rep   complexity.Report
	reach []reachAnswer
}

// pass says what one estimation pass over the samples computes.
type pass struct {
	curve    bool           // the curve points (--curve, --plot, --report)
	noBoot   bool           // point estimates only (the plan's first pass)
	extra    [][]float64    // per sample, depths predicted after the --at ones
	progress func(done int) // units of work done: bootstrap replicates (or one per sample without)
}

// estimateAll runs complexity.Analyze on every sample with the shared
// settings, in parallel over samples, results in input order.
func estimateAll(s *shared, samples []sampleInput, p pass) []estimated {
	out := make([]estimated, len(samples))
	workers := min(s.threads, len(samples))
	// Threads left for each sample's bootstrap: the bootstrap is seeded per
	// replicate, so the split does not change any number.
	inner := 1
	if workers > 0 && s.threads/workers > 1 {
		inner = s.threads / workers
	}
	jobs := make(chan int)
	done := make(chan struct{}, len(samples))
	// Progress counts bootstrap replicates, so that one large sample shows
	// its progress too; a sample that needs none counts as its share.
	units := int64(max(1, s.bootstrap))
	if p.noBoot {
		units = 1
	}
	var work atomic.Int64
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range jobs {
				var extra []float64
				if p.extra != nil {
					extra = p.extra[i]
				}
				o := s.options(samples[i].counts, p.curve, inner, extra)
				if p.noBoot {
					o.Bootstrap = 0
				}
				var mine atomic.Int64
				if p.progress != nil && !p.noBoot {
					o.Progress = func() {
						if mine.Add(1) <= units {
							p.progress(int(work.Add(1)))
						}
					}
				}
				e := estimated{in: samples[i], rep: complexity.Analyze(samples[i].counts, o)}
				for k, r := range e.rep.Reach {
					// Notes name the target as the user wrote it (distinct:3x).
					note := strings.Replace(r.Note, r.Target.String(), s.reaches[k].label, 1)
					e.reach = append(e.reach, reachAnswer{spec: s.reaches[k], reads: r.Reads, lo: r.Lo, hi: r.Hi, note: note})
				}
				out[i] = e
				if rest := units - mine.Load(); rest > 0 && p.progress != nil {
					p.progress(int(work.Add(rest)))
				}
				done <- struct{}{}
			}
		}()
	}
	go func() {
		for i := range samples {
			jobs <- i
		}
		close(jobs)
	}()
	for range samples {
		<-done
	}
	wg.Wait()
	return out
}

// options builds the per-sample estimation options; extra depths are
// predicted after the --at ones.
func (s *shared) options(c complexity.Counts, wantCurve bool, threads int, extra []float64) complexity.Options {
	n := c.Reads()
	o := complexity.Options{Bootstrap: s.bootstrap, Seed: s.seed, Level: s.level, Threads: threads, Gates: complexity.NoGates()}
	for _, d := range s.depths {
		o.Depths = append(o.Depths, d.reads(n))
	}
	o.Depths = append(o.Depths, extra...)
	for _, r := range s.reaches {
		o.Reach = append(o.Reach, r.target(c.Distinct()))
	}
	o.Gates.MaxDup, o.Gates.MinDistinct, o.Gates.MinCoverage = s.maxDup, s.minDistinct, s.minCoverage
	switch {
	case s.targetDepth != nil:
		o.Gates.Target = s.targetDepth.reads(n)
	case len(s.depths) > 0:
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

// estimateAndWrite is the shared back half of every estimating subcommand:
// estimate each sample, render every requested output, and write them all
// atomically. Nothing is written unless everything rendered. With --strict
// it returns errStrict after writing when any sample failed a gate.
func (a *app) estimateAndWrite(s *shared, info runInfo, samples []sampleInput) error {
	if s.strict && !s.anyGate() {
		fmt.Fprintln(a.stderr, "headroom: warning: --strict without a gate (--max-dup, --min-distinct, --min-coverage) can never fail a sample")
	}
	p := pass{curve: s.curve != "" || s.plot != "" || s.report != ""}
	var pl *plan
	if s.plan != "" {
		var err error
		if pl, err = newPlan(s, samples); err != nil {
			return err
		}
		p.extra = pl.depths()
	}
	bar := s.bar(a, len(samples)*max(1, s.bootstrap), "estimating")
	p.progress = bar.set
	est := estimateAll(s, samples, p)
	bar.finish()
	if pl != nil {
		pl.fill(est)
	}
	var outs outputs
	var summary []byte
	switch s.resolvedFormat(a) {
	case "json":
		summary = writeSummaryJSON(s, info, est)
	case "text":
		summary = writeText(s, info, est, pl)
	default:
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
		page, err := renderReport(s, info, est, pl)
		if err != nil {
			return err
		}
		outs.add(s.report, page)
	}
	if s.saveCounts != "" {
		outs.add(s.saveCounts, writeCounts(samples))
	}
	if pl != nil {
		outs.add(s.plan, pl.render(s.plan))
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
