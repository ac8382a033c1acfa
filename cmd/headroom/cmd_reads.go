package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/schollz/progressbar/v3"

	"headroom/dedup"
	"headroom/reads"
)

func init() {
	register(subcommand{name: "reads", summary: "count molecules in BAM, SAM or FASTQ(.gz) reads and predict deeper sequencing", run: runReads})
}

const readsAbout = `Counts how many times each distinct molecule was sequenced, per library, in
BAM, SAM or FASTQ files (plain, gzip or BGZF; '-' reads standard input), and
predicts what deeper sequencing of each library would give. FASTQ mate files
are paired by their read names, in any order; lanes of one sample
(NAME_S1_L001_R1_001.fastq.gz ...) are one library.

Writes one summary row per library (TSV or JSON) to stdout or -o FILE, with the
columns records, used_fragments and optical_dups, and on request the curve,
plot, HTML report and the frequency counts (--save-counts, for headroom merge).`

// readsConfig is the parsed command line of `headroom reads`.
type readsConfig struct {
	by        string
	umiTag    []string
	cellTag   string
	umiErrors int
	sample    string
	minMapQ   int
	optical   int64
	keyBases  int
	mode      string
	maxMemory string
	inputs    []string
}

func runReads(a *app, args []string) error {
	cmd := newCommand("reads", "headroom reads [flags] FILE...", readsAbout,
		"headroom reads --at 10x,100M --report lanes.html testdata/demo/qc_run.bam",
		"headroom reads --umi-tag UB --cell-tag CB --by cell --bootstrap 0 cells.bam",
		"headroom reads --bootstrap 0 -o /dev/null --save-counts chr1.counts.tsv chr1.bam")
	var c readsConfig
	fs := cmd.flags(groupInputs)
	fs.StringVar(&c.by, "by", "library", "one summary row per `UNIT`: library (@RG LB), read-group (@RG ID), file or cell (--cell-tag, default CB)")
	fs.StringSliceVar(&c.umiTag, "umi-tag", []string{"RX"}, "where UMIs come from: `TAG[,TAG]`, the first a record has (e.g. RX, UB, BX); name for the read name; none")
	fs.StringVar(&c.cellTag, "cell-tag", "", "tag of the cell barcode (`TAG`, e.g. CB): the cell is then part of each molecule")
	fs.IntVar(&c.umiErrors, "umi-errors", 1, "merge UMIs within `N` mismatch of a more abundant UMI at the same position (directional adjacency); 0 = off")
	fs.StringVar(&c.sample, "sample", "", "name the library of records that name none (FASTQ, no read group) `NAME`")
	fs.IntVar(&c.minMapQ, "min-mapq", 0, "skip alignments with mapping quality below `Q`")
	fs.Int64Var(&c.optical, "optical-distance", 100, "largest |dx| and |dy| in pixels of optical duplicates (`PX`; 0 = off); unless given, 2500 for patterned flow cells, detected from read names")
	fs.IntVar(&c.keyBases, "key-bases", 16, "FASTQ: leading bases of each mate in the molecule key (`N`); up to 28, keys within 2 mismatches merge as sequencing errors; 0 = whole reads, exact")
	run := cmd.flags(groupRun)
	run.StringVar(&c.mode, "mode", "auto", "counting: auto (window when the header says coordinate-sorted), sorted or hashed")
	run.StringVar(&c.maxMemory, "max-memory", "4G", "memory budget of the hash tables (`SIZE`, e.g. 512M, 4G); past it molecules are subsampled by hash")
	s := addShared(cmd, "yield:0.1")
	if help, err := cmd.parse(a, args); help || err != nil {
		return err
	}
	if err := s.check(); err != nil {
		return err
	}
	by, ok := map[string]dedup.By{"library": dedup.ByLibrary, "read-group": dedup.ByReadGroup, "file": dedup.ByFile, "cell": dedup.ByCell}[c.by]
	if !ok {
		return usagef("reads: --by must be library, read-group, file or cell, not %q", c.by)
	}
	key, err := readsKeyOptions(&c)
	if err != nil {
		return err
	}
	switch c.mode {
	case "auto", "sorted", "hashed":
	default:
		return usagef("reads: --mode must be auto, sorted or hashed, not %q", c.mode)
	}
	if c.minMapQ < 0 || c.minMapQ > 255 {
		return usagef("reads: --min-mapq must be from 0 to 255, not %d", c.minMapQ)
	}
	if c.optical < 0 {
		return usagef("reads: --optical-distance must be 0 or more, not %d", c.optical)
	}
	if c.keyBases < 0 {
		return usagef("reads: --key-bases must be 0 or more, not %d", c.keyBases)
	}
	if c.umiErrors < 0 || c.umiErrors > 1 {
		return usagef("reads: --umi-errors must be 0 or 1 (mismatches), not %d", c.umiErrors)
	}
	mem, err := readsParseSize(c.maxMemory)
	if err != nil {
		return usagef("reads: --max-memory: %v", err)
	}
	c.inputs = cmd.args()
	if len(c.inputs) == 0 {
		return usagef("reads: give at least one BAM, SAM or FASTQ file ('-' for standard input)")
	}
	stdin := 0
	for _, f := range c.inputs {
		if f == "-" {
			stdin++
		}
	}
	if stdin > 1 {
		return usagef("reads: standard input ('-') can be given once only")
	}
	if err := s.checkOutputs(c.inputs); err != nil {
		return err
	}
	opt := dedup.Options{
		OpticalDistance:   c.optical,
		MemoryBudget:      mem,
		BudgetName:        "--max-memory " + c.maxMemory,
		By:                by,
		Mode:              map[string]dedup.Mode{"auto": dedup.ModeAuto, "sorted": dedup.ModeSorted, "hashed": dedup.ModeHashed}[c.mode],
		Key:               key,
		UMIAsked:          cmd.changed("umi-tag"),
		PatternedDistance: map[bool]int64{false: 2500, true: 0}[cmd.changed("optical-distance")],
		Threads:           s.threads,
	}
	in, err := a.readsInputs(&c, s.showProgress(a), &opt)
	defer in.close()
	if err != nil {
		return err
	}
	libs, err := dedup.Count(in.inputs, opt)
	if err != nil {
		return readsInputErr(err)
	}
	samples := make([]sampleInput, len(libs))
	for i, l := range libs {
		samples[i] = sampleInput{
			name:   l.Name,
			counts: l.Counts,
			extra: []column{
				{key: "records", value: intCell(l.Records)},
				{key: "used_fragments", value: intCell(l.UsedFragments)},
				{key: "optical_dups", value: intCell(l.OpticalDups)},
			},
			notes:     l.Notes,
			sequenced: l.Sequenced,
		}
	}
	return a.estimateAndWrite(s, runInfo{command: "reads", inputs: c.inputs}, samples)
}

// readsKeyOptions checks --umi-tag, --cell-tag and --umi-errors.
func readsKeyOptions(c *readsConfig) (reads.KeyOptions, error) {
	k := reads.KeyOptions{MinMapQ: c.minMapQ, KeyBases: c.keyBases, Collapse: c.umiErrors > 0}
	for _, t := range c.umiTag {
		switch t {
		case "none":
			if len(c.umiTag) > 1 {
				return k, usagef("reads: --umi-tag none cannot be combined with other sources")
			}
		case "name":
			k.UMIFromName = true
		default:
			tag, err := reads.ParseTag(t)
			if err != nil {
				return k, usagef("reads: --umi-tag: %q is not a SAM tag name (two characters: a letter, then a letter or digit), name or none", t)
			}
			k.UMITags = append(k.UMITags, tag)
		}
	}
	cell := c.cellTag
	if cell == "" && c.by == "cell" {
		cell = "CB"
	}
	if cell != "" {
		tag, err := reads.ParseTag(cell)
		if err != nil {
			return k, usagef("reads: --cell-tag: %q is not a SAM tag name (two characters: a letter, then a letter or digit)", cell)
		}
		k.CellTag = tag
	}
	return k, nil
}

// readsParseSize reads 512M, 4G, 1e9, 1048576 (bytes; k, M, G, T are powers of 1024).
func readsParseSize(s string) (int64, error) {
	t, p := splitSuffix(strings.TrimSpace(s))
	mult := math.Pow(1024, float64(p))
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || !(v > 0) || v*mult > 1<<62 {
		return 0, fmt.Errorf("%q is not a size such as 512M or 4G", s)
	}
	return int64(v * mult), nil
}

// readsFiles are the opened inputs of one run and their progress bars.
type readsFiles struct {
	inputs []dedup.Input
	files  []*os.File
	counts []*readsCountingReader
	sizes  []int64
	bars   []*progressbar.ProgressBar
}

func (f *readsFiles) close() {
	for _, x := range f.files {
		if x != nil {
			x.Close()
		}
	}
}

// readsInputs opens the files (or standard input for '-'), names their
// samples and, when progress is on, sets opt.Progress to draw a bar per
// input over its compressed bytes.
func (a *app) readsInputs(c *readsConfig, progress bool, opt *dedup.Options) (*readsFiles, error) {
	f := &readsFiles{}
	paths := c.inputs
	// Sample names for inputs without read groups: the base name, or the
	// path as given when two inputs share a base name.
	base := map[string]int{}
	for _, p := range paths {
		base[filepath.Base(readsDisplayName(p))]++
	}
	for _, p := range paths {
		name := readsDisplayName(p)
		sample := filepath.Base(name)
		if base[sample] > 1 {
			sample = name
		}
		if n, ok := reads.ParseFASTQName(filepath.Base(name)); ok {
			sample = n.Sample // lanes and mates of one sample are one library
		}
		if c.sample != "" {
			sample = c.sample
		}
		in := dedup.Input{Name: name, Sample: sample}
		cr := &readsCountingReader{}
		size := int64(-1)
		var file *os.File
		if p == "-" {
			cr.r = a.stdin
		} else {
			x, err := os.Open(p)
			if err != nil {
				return f, inputf(p, 0, "cannot open: %v", errors.Unwrap(err))
			}
			file = x
			if st, err := x.Stat(); err == nil {
				if st.IsDir() {
					x.Close()
					return f, inputf(p, 0, "is a directory; give BAM, SAM or FASTQ files")
				}
				size = st.Size()
			}
			cr.r = x
			i := len(f.inputs)
			in.Reopen = func() (io.Reader, error) {
				x, err := os.Open(p)
				if err != nil {
					return nil, err
				}
				f.files = append(f.files, x)
				f.counts[i] = &readsCountingReader{r: x}
				return f.counts[i], nil
			}
		}
		in.R = cr
		f.inputs = append(f.inputs, in)
		f.files = append(f.files, file)
		f.counts = append(f.counts, cr)
		f.sizes = append(f.sizes, size)
	}
	if progress {
		opt.Progress = f.progress(a.stderr)
	}
	return f, nil
}

// readsInputErr turns a counting error into "FILE:LINE: ..." or
// "FILE: record N: ...", without the package prefixes of the readers.
func readsInputErr(err error) error {
	var fe *reads.FileError
	if !errors.As(err, &fe) {
		return inputf("", 0, "%s", stripPackage(err.Error()))
	}
	return inputError(fe.File, fe.Err)
}

func readsDisplayName(path string) string {
	if path == "-" {
		return "stdin"
	}
	return path
}
