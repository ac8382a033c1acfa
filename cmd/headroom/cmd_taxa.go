package main

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/pflag"

	"headroom/amplicon"
	"headroom/complexity"
)

func init() {
	register(subcommand{name: "taxa", summary: "estimate per-sample saturation and richness from a taxon count table", run: runTaxa})
}

const taxaUsage = `usage: headroom taxa [flags] TABLE

Reads a taxon count table (OTU/ASV table) and estimates, for every sample,
how many more taxa deeper sequencing would find. TABLE is tab- or
comma-separated text (delimiter sniffed, '#' comment lines, one header row)
with taxa as rows (default) or samples as rows, a BIOM 1.0 JSON file
(dense or sparse) or a BIOM 2.1 (HDF5) file; gzip is accepted; '-' reads
standard input. Trailing text columns such as a taxonomy string are skipped.

Writes one summary row per sample (TSV or JSON) to stdout or -o FILE, with
the columns every subcommand has plus chao1 chao1_lo chao1_hi ace
good_coverage reads_to_coverage.

flags:
%s
exit status: 0 success, 1 bad input, 2 usage error, 3 a gate failed under --strict

examples:
  headroom taxa --min-coverage 0.95 --at 2x,50000 otu_table.tsv
  headroom taxa --advise-depth depths.tsv --bootstrap 0 table.biom
`

// aceRare is ACE's rare threshold (Chao et al. 2000; DESIGN.md).
const aceRare = 10

func runTaxa(a *app, args []string) error {
	fs := pflag.NewFlagSet("taxa", pflag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fs.SortFlags = false
	s := addShared(fs)
	samplesRows := fs.Bool("samples-as-rows", false, "the table has one row per sample (default: one row per taxon, unless the header says otherwise)")
	taxaRows := fs.Bool("taxa-as-rows", false, "the table has one row per taxon, whatever the header suggests")
	covTarget := fs.Float64("coverage-target", 0.99, "sample coverage `C` for the reads_to_coverage column")
	advise := fs.String("advise-depth", "", "write a rarefaction-depth table to `FILE`: samples kept, coverage and richness retained at candidate depths")
	help := fs.BoolP("help", "h", false, "show this help")
	short := "usage: headroom taxa [flags] TABLE (see headroom taxa --help)"
	if err := fs.Parse(args); err != nil {
		return &exitError{code: exitUsage, msg: "taxa: " + err.Error(), usage: short}
	}
	if *help {
		fmt.Fprintf(a.stdout, taxaUsage, fs.FlagUsages())
		return nil
	}
	s.moreOutputs = append(s.moreOutputs, [2]string{"--advise-depth", *advise})
	if err := s.check(); err != nil {
		return err
	}
	if *samplesRows && *taxaRows {
		return &exitError{code: exitUsage, msg: "taxa: --samples-as-rows and --taxa-as-rows contradict each other", usage: short}
	}
	if !(*covTarget > 0 && *covTarget < 1) {
		return usagef("taxa: --coverage-target must be between 0 and 1 (e.g. 0.99), not %v", *covTarget)
	}
	if fs.NArg() != 1 {
		return &exitError{code: exitUsage, msg: fmt.Sprintf("taxa: give exactly one TABLE (got %d)", fs.NArg()), usage: short}
	}
	file := fs.Arg(0)
	opt := amplicon.Options{}
	switch {
	case *samplesRows:
		opt.Layout = amplicon.SamplesAsRows
	case *taxaRows:
		opt.Layout = amplicon.TaxaAsRows
	}
	tab, err := readTaxaTable(a, file, opt)
	if err != nil {
		return err
	}
	samples, runNotes := taxaSamples(tab, s.level, *covTarget)
	info := runInfo{command: "taxa", inputs: []string{file}, notes: runNotes}
	if *advise != "" {
		// Committed with the other outputs: all or nothing.
		info.extra = append(info.extra, pendingFile{path: *advise, data: depthAdvice(tab)})
	}
	return a.estimateAndWrite(s, info, samples)
}

// readTaxaTable opens and reads the table, turning reader errors into
// "FILE:LINE: column C: message".
func readTaxaTable(a *app, file string, opt amplicon.Options) (*amplicon.Table, error) {
	r, err := openInput(a, file)
	if err != nil {
		return nil, err
	}
	defer r.Close()
	tab, err := amplicon.Read(r, opt)
	if err != nil {
		var pe *amplicon.ParseError
		if errors.As(err, &pe) {
			msg := pe.Msg
			if pe.Column > 0 {
				msg = fmt.Sprintf("column %d: %s", pe.Column, msg)
			}
			return nil, inputf(displayName(file), pe.Line, "%s", msg)
		}
		return nil, inputf(displayName(file), 0, "cannot read: %v", unwrapPath(err))
	}
	return tab, nil
}

// taxaSamples builds the per-sample inputs (frequency counts, the richness
// columns and the notes) and the notes about the whole table. The reader's
// notes (layout, skipped columns) are said once, for the run; cautions that
// change what every sample's numbers mean (singleton filtering,
// presence/absence, a rarefied table) are also repeated on each sample, as
// the TSV has no other place for them.
func taxaSamples(tab *amplicon.Table, level, covTarget float64) ([]sampleInput, []string) {
	var tableNotes []string
	nonEmpty, depleted := 0, 0
	for _, sm := range tab.Samples {
		if sm.Counts.Reads() > 0 {
			nonEmpty++
			if complexity.SingletonsDepleted(sm.Counts) {
				depleted++
			}
		}
	}
	if tt := tab.TaxonTotals; complexity.SingletonsDepleted(tt) {
		tableNotes = append(tableNotes, fmt.Sprintf("table singletons: %d taxa have 1 read in the whole table where at least %.0f are "+
			"expected from the %d with 2 reads; the table looks filtered by a minimum total count, which removes rare taxa "+
			"from every sample and makes all totals too low", tt.Units(1), math.Ceil(complexity.SingletonFloor(tt)), tt.Units(2)))
	}
	if binary, cells := presenceOnly(tab); binary && cells >= 10 {
		tableNotes = append(tableNotes, "every count in the table is 0 or 1: if it records presence/absence, "+
			"not reads, the richness and saturation numbers are meaningless; headroom needs read counts")
	}
	if depth, ok := commonDepth(tab); ok {
		tableNotes = append(tableNotes, fmt.Sprintf("every sample has exactly %d reads: the table looks rarefied; "+
			"the numbers describe that depth, not the depth that was sequenced", depth))
	}
	if depleted >= 2 && 2*depleted >= nonEmpty {
		tableNotes = append(tableNotes, fmt.Sprintf("table singletons: %d of %d samples have too few singletons; "+
			"the table looks singleton-filtered or denoised", depleted, nonEmpty))
	}
	out := make([]sampleInput, len(tab.Samples))
	for i, sm := range tab.Samples {
		c := sm.Counts
		est, lo, hi := complexity.Chao1(c, level)
		need := taxaReadsToCoverage(c, covTarget)
		needCell := nullCell
		if !math.IsNaN(need) {
			needCell = intCell(int64(need))
		}
		in := sampleInput{name: sm.Name, counts: c, extra: []column{
			{"chao1", countCell(est)}, {"chao1_lo", countCell(lo)}, {"chao1_hi", countCell(hi)},
			{"ace", countCell(complexity.ACE(c, aceRare))}, {"good_coverage", fracCell(complexity.GoodCoverage(c))},
			{"reads_to_coverage", needCell},
		}}
		in.notes = append(in.notes, tableNotes...)
		// (A sample without reads is noted by the estimator.)
		if c.Reads() > 0 && complexity.SingletonsDepleted(c) {
			in.notes = append(in.notes, singletonNote(c, level))
		}
		out[i] = in
	}
	return out, append(append([]string(nil), tab.Notes...), tableNotes...)
}

// presenceOnly reports whether no sample has a taxon with more than one
// read, and how many non-zero cells the table has.
func presenceOnly(tab *amplicon.Table) (bool, int64) {
	var cells int64
	for _, sm := range tab.Samples {
		if sm.Counts.MaxTimes() > 1 {
			return false, 0
		}
		cells += sm.Counts.Distinct()
	}
	return true, cells
}

// commonDepth reports whether at least three samples have reads and all of
// them the same number.
func commonDepth(tab *amplicon.Table) (int64, bool) {
	var depth int64
	n := 0
	for _, sm := range tab.Samples {
		r := sm.Counts.Reads()
		if r == 0 {
			continue
		}
		if n > 0 && r != depth {
			return 0, false
		}
		depth = r
		n++
	}
	return depth, n >= 3
}

// singletonNote explains a sample whose singletons look removed, with the
// Chao1 it would have with singletons at their plausibility floor (a lower
// bound for the Chao1 of the unfiltered sample).
func singletonNote(c complexity.Counts, level float64) string {
	floor := math.Ceil(complexity.SingletonFloor(c))
	msg := fmt.Sprintf("singletons: %d taxa seen once where at least %.0f are expected from the %d seen twice "+
		"(2*f2^2/(3*f3), any mixed-Poisson sampling); singletons look filtered out or absorbed by denoising, so chao1, "+
		"ace and totals that lean on singletons are too low and good_coverage and sample_coverage too high",
		c.Units(1), floor, c.Units(2))
	cls := c.Classes()
	if len(cls) > 0 && cls[0].Times == 1 {
		cls[0].Units = int64(floor)
	} else {
		cls = append([]complexity.Class{{Times: 1, Units: int64(floor)}}, cls...)
	}
	if r, err := complexity.NewCounts(cls); err == nil {
		if est, _, _ := complexity.Chao1(r, level); !math.IsNaN(est) {
			msg += fmt.Sprintf("; with singletons at that floor chao1 is at least %.1f", est)
		}
	}
	return msg
}

// coverageSearchMax bounds the depth searched for reads_to_coverage: far
// beyond any sequencing run, and the extrapolated coverage is in closed
// form, so the search stays cheap.
const coverageSearchMax = 1e15

// taxaReadsToCoverage returns the depth in whole reads at which the
// expected sample coverage (Chao & Jost 2012; complexity.CoverageAt)
// reaches target: below the sample's reads when it is already reached
// there (the rarefied depth that still reaches it), above otherwise. NaN
// for an empty sample or when the target cannot be reached.
func taxaReadsToCoverage(c complexity.Counts, target float64) float64 {
	if c.Reads() == 0 {
		return math.NaN()
	}
	r := complexity.Curve{Counts: c}.ReadsForCoverage(target, coverageSearchMax)
	if !r.Reachable {
		return math.NaN()
	}
	return r.Reads
}

// --- Rarefaction-depth advisor ------------------------------------------

// adviceRow is one candidate rarefaction depth.
type adviceRow struct {
	depth int64
	basis []string
}

// depthCandidates returns the candidate depths: the smallest sample depth,
// the 5%, 10%, 25% and 50% quantiles of the sample depths (each an actual
// sample's depth, so that sample is kept), and the round numbers
// 1, 2, 5 x 10^k between a tenth of the smallest depth and the largest.
func depthCandidates(depths []int64) []adviceRow {
	var d []int64
	for _, v := range depths {
		if v > 0 {
			d = append(d, v)
		}
	}
	if len(d) == 0 {
		return nil
	}
	sort.Slice(d, func(i, j int) bool { return d[i] < d[j] })
	byDepth := map[int64][]string{}
	add := func(v int64, why string) { byDepth[v] = append(byDepth[v], why) }
	add(d[0], "min")
	for _, q := range []struct {
		p    float64
		name string
	}{{0.05, "q05"}, {0.10, "q10"}, {0.25, "q25"}, {0.50, "median"}} {
		k := int(math.Ceil(q.p*float64(len(d)))) - 1
		if k < 0 {
			k = 0
		}
		add(d[k], q.name)
	}
	lo, hi := d[0]/10, d[len(d)-1]
	for p := int64(1); p <= hi && p < math.MaxInt64/10; p *= 10 {
		for _, m := range []int64{1, 2, 5} {
			if v := m * p; v >= lo && v >= 100 && v <= hi {
				add(v, "round")
			}
		}
	}
	var rows []adviceRow
	for v, why := range byDepth {
		rows = append(rows, adviceRow{depth: v, basis: why})
	}
	sort.Slice(rows, func(i, j int) bool { return rows[i].depth < rows[j].depth })
	return rows
}

// depthAdvice renders the rarefaction-depth table: for each candidate
// depth, the samples kept (reads >= depth) and dropped, and over the kept
// samples the minimum and median expected coverage (Chao & Jost 2012) and
// share of observed taxa retained (Hurlbert 1971) after rarefying to it.
func depthAdvice(tab *amplicon.Table) []byte {
	depths := make([]int64, len(tab.Samples))
	for i, sm := range tab.Samples {
		depths[i] = sm.Counts.Reads()
	}
	var b bytes.Buffer
	b.WriteString("depth\tbasis\tsamples_kept\tsamples_dropped\tmin_coverage\tmedian_coverage\tmin_taxa_retained\tmedian_taxa_retained\tdropped\n")
	for _, row := range depthCandidates(depths) {
		var cov, share []float64
		var dropped []string
		for _, sm := range tab.Samples {
			c := sm.Counts
			if c.Reads() < row.depth {
				dropped = append(dropped, sm.Name)
				continue
			}
			m := float64(row.depth)
			cov = append(cov, complexity.CoverageAt(c, m))
			share = append(share, complexity.RarefyMean(c, m)/float64(c.Distinct()))
		}
		fmt.Fprintf(&b, "%d\t%s\t%d\t%d\t%s\t%s\t%s\t%s\t%s\n", row.depth, strings.Join(row.basis, ","),
			len(cov), len(dropped), fracCell(minOf(cov)).tsv, fracCell(median(cov)).tsv,
			fracCell(minOf(share)).tsv, fracCell(median(share)).tsv, listNames(dropped, 5))
	}
	return b.Bytes()
}

func minOf(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	m := v[0]
	for _, x := range v[1:] {
		m = math.Min(m, x)
	}
	return m
}

func median(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	s := append([]float64(nil), v...)
	sort.Float64s(s)
	k := len(s) / 2
	if len(s)%2 == 1 {
		return s[k]
	}
	return (s[k-1] + s[k]) / 2
}

// listNames lists up to max names, then how many more.
func listNames(names []string, max int) string {
	if len(names) <= max {
		return strCell(strings.Join(names, ",")).tsv
	}
	return strCell(strings.Join(names[:max], ",")).tsv + ",+" + strconv.Itoa(len(names)-max) + " more"
}
