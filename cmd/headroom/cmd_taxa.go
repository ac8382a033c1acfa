package main

import (
	"fmt"
	"math"

	"headroom/amplicon"
	"headroom/complexity"
)

func init() {
	register(subcommand{name: "taxa", summary: "estimate per-sample saturation and richness from a taxon count table", run: runTaxa})
}

const taxaAbout = `Reads a taxon count table (OTU/ASV table) and estimates, for every sample,
how many more taxa deeper sequencing would find. TABLE is tab- or
comma-separated text (delimiter sniffed, '#' comment lines, one header row)
with taxa as rows (default) or samples as rows, a BIOM 1.0 JSON file
(dense or sparse) or a BIOM 2.1 (HDF5) file; gzip is accepted; '-' reads
standard input. Trailing text columns such as a taxonomy string are skipped.

Writes one summary row per sample (TSV or JSON) to stdout or -o FILE, with
the columns every subcommand has plus chao1 chao1_lo chao1_hi ace
good_coverage, and by default the depth at which each sample's coverage
reaches 0.99 (--reach coverage:0.99).`

// aceRare is ACE's rare threshold (Chao et al. 2000; DESIGN.md).
const aceRare = 10

func runTaxa(a *app, args []string) error {
	c := newCommand("taxa", "headroom taxa [flags] TABLE", taxaAbout,
		"headroom taxa --min-coverage 0.95 --at 2x,50000 otu_table.tsv",
		"headroom taxa --advise-depth depths.tsv --bootstrap 0 table.biom")
	in := c.flags(groupInputs)
	samplesRows := in.Bool("samples-as-rows", false, "the table has one row per sample (default: one row per taxon, unless the header says otherwise)")
	taxaRows := in.Bool("taxa-as-rows", false, "the table has one row per taxon, whatever the header suggests")
	s := addShared(c, "coverage:0.99")
	advise := c.flags(groupOutputs).String("advise-depth", "", "write a rarefaction-depth table to `FILE`: samples kept, coverage and richness retained at candidate depths")
	if help, err := c.parse(a, args); help || err != nil {
		return err
	}
	s.moreOutputs = append(s.moreOutputs, [2]string{"--advise-depth", *advise})
	if err := s.check(); err != nil {
		return err
	}
	if *samplesRows && *taxaRows {
		return c.usageErr("--samples-as-rows and --taxa-as-rows contradict each other")
	}
	if len(c.args()) != 1 {
		return c.usageErr("give exactly one TABLE (got %d)", len(c.args()))
	}
	file := c.args()[0]
	if err := s.checkOutputs([]string{file}); err != nil {
		return err
	}
	opt := amplicon.Options{Threads: s.threads}
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
	samples, runNotes := taxaSamples(tab, s.level)
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
		return nil, inputError(file, err)
	}
	return tab, nil
}

// taxaSamples builds the per-sample inputs (frequency counts, the richness
// columns and the notes) and the notes about the whole table. The reader's
// notes (layout, skipped columns) are said once, for the run; cautions that
// change what every sample's numbers mean (singleton filtering,
// presence/absence, a rarefied table) are also repeated on each sample, as
// the TSV has no other place for them.
func taxaSamples(tab *amplicon.Table, level float64) ([]sampleInput, []string) {
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
		in := sampleInput{name: sm.Name, counts: c, extra: []column{
			{"chao1", countCell(est)}, {"chao1_lo", countCell(lo)}, {"chao1_hi", countCell(hi)},
			{"ace", countCell(complexity.ACE(c, aceRare))}, {"good_coverage", fracCell(complexity.GoodCoverage(c))},
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
