package main

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime/debug"
	"strconv"
	"strings"
	"sync/atomic"
	"time"

	"github.com/schollz/progressbar/v3"

	"headroom/complexity"
	"headroom/dedup"
	"headroom/reads"
)

func init() {
	register(subcommand{name: "reads", summary: "count molecules in BAM, SAM or FASTQ(.gz) reads and predict deeper sequencing", run: runReads})
}

const readsAbout = `Counts how many times each distinct molecule was sequenced, per library, in
BAM, SAM or FASTQ files (plain, gzip or BGZF; '-' reads standard input), and
predicts what deeper sequencing of each library would give. Two FASTQ files in
a row whose first read names agree are read as the two mates of one library.

Writes one summary row per library (TSV or JSON) to stdout or -o FILE, with the
columns records, used_fragments and optical_dups, and on request the curve,
plot, HTML report and the frequency counts (--save-counts, for headroom merge).`

// readsConfig is the parsed command line of `headroom reads`.
type readsConfig struct {
	by          string
	umi         string
	minMapQ     int
	optical     int64
	keyBases    int
	mode        string
	maxMemory   string
	memBudget   int64
	inputs      []string
	threads     int
	progress    bool
	forceHashed bool // set when a sorted pass found disorder and restarts
}

func runReads(a *app, args []string) error {
	cmd := newCommand("reads", "headroom reads [flags] FILE...", readsAbout,
		"headroom reads --at 10x,100M --report lanes.html testdata/demo/qc_run.bam",
		"headroom reads --bootstrap 0 -o /dev/null --save-counts chr1.counts.tsv chr1.bam")
	var c readsConfig
	fs := cmd.flags(groupInputs)
	fs.StringVar(&c.by, "by", "library", "one summary row per `UNIT`: library (@RG LB), read-group (@RG ID) or file")
	fs.StringVar(&c.umi, "umi", "rx", "where UMIs come from: rx (the RX tag), name (the read name when a record has no RX), none")
	fs.IntVar(&c.minMapQ, "min-mapq", 0, "skip alignments with mapping quality below `Q`")
	fs.Int64Var(&c.optical, "optical-distance", 100, "largest |dx| and |dy| in pixels of optical duplicates (`PX`; 2500 for patterned flow cells; 0 = off)")
	fs.IntVar(&c.keyBases, "key-bases", 0, "FASTQ: leading bases of each mate in the molecule key (`N`; 0 = whole reads)")
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
	switch c.by {
	case "library", "read-group", "file":
	default:
		return usagef("reads: --by must be library, read-group or file, not %q", c.by)
	}
	switch c.umi {
	case "rx", "name", "none":
	default:
		return usagef("reads: --umi must be rx, name or none, not %q", c.umi)
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
	mem, err := readsParseSize(c.maxMemory)
	if err != nil {
		return usagef("reads: --max-memory: %v", err)
	}
	c.memBudget = mem
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
	c.threads = s.threads
	c.progress = s.showProgress(a)
	samples, err := countReads(a, &c)
	if errors.Is(err, errReadsDisorder) && c.mode == "auto" && stdin == 0 {
		// The header promised coordinate order and the records broke it:
		// count again from the start by hashing (the note says so).
		c.forceHashed = true
		samples, err = countReads(a, &c)
	}
	if err != nil {
		return err
	}
	return a.estimateAndWrite(s, runInfo{command: "reads", inputs: c.inputs}, samples)
}

// readsParseSize reads 512M, 4G, 1e9, 1048576 (bytes; k, M, G, T are powers of 1024).
func readsParseSize(s string) (int64, error) {
	t := strings.TrimSpace(s)
	mult := 1.0
	if n := len(t); n > 0 {
		switch t[n-1] {
		case 'k', 'K':
			mult, t = 1<<10, t[:n-1]
		case 'm', 'M':
			mult, t = 1<<20, t[:n-1]
		case 'g', 'G':
			mult, t = 1<<30, t[:n-1]
		case 't', 'T':
			mult, t = 1<<40, t[:n-1]
		}
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || !(v > 0) || v*mult > 1<<62 {
		return 0, fmt.Errorf("%q is not a size such as 512M or 4G", s)
	}
	return int64(v * mult), nil
}

// errReadsDisorder reports coordinate-sorted input whose records are not.
var errReadsDisorder = errors.New("records out of coordinate order")

// readsLibrary is one summary row being counted.
type readsLibrary struct {
	name    string
	records int64
}

// readsRun is the state of one counting pass over all inputs.
type readsRun struct {
	a       *app
	c       *readsConfig
	libs    []*readsLibrary
	libIdx  map[string]int
	notes   []string
	noteSet map[string]bool
	libNote map[int][]string // notes of one library
	sorted  *dedup.Sorted
	hashed  *dedup.Hashed
	keyer   reads.Keyer
	names   map[string]string // input -> sample name when no RG
}

func (r *readsRun) note(format string, args ...any) {
	n := fmt.Sprintf(format, args...)
	if !r.noteSet[n] {
		r.noteSet[n] = true
		r.notes = append(r.notes, n)
	}
}

func (r *readsRun) library(name string) int {
	if i, ok := r.libIdx[name]; ok {
		return i
	}
	r.libs = append(r.libs, &readsLibrary{name: name})
	r.libIdx[name] = len(r.libs) - 1
	return len(r.libs) - 1
}

// readsInput is one input after sniffing.
type readsInput struct {
	path  string
	name  string // sample name when nothing else names the library
	in    *reads.Input
	file  *os.File
	count *readsCountingReader
	size  int64
	fq    *reads.FASTQReader
	first reads.FASTQRecord
	ferr  error // error or io.EOF of the first FASTQ record
}

func (o *readsInput) close() {
	if o.in != nil {
		o.in.Close()
	}
	if o.file != nil {
		o.file.Close()
	}
}

// readsCountingReader counts the compressed bytes read, for progress.
type readsCountingReader struct {
	r io.Reader
	n atomic.Int64
}

func (c *readsCountingReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n.Add(int64(n))
	return n, err
}

// readsCleanErr drops the package prefix from reader errors for the CLI line.
func readsCleanErr(err error) string {
	return strings.ReplaceAll(err.Error(), "reads: ", "")
}

// readsInputErr turns a reader error into "FILE:LINE: ..." or "FILE: record N: ...".
func readsInputErr(path string, err error) error {
	var pe *reads.ParseError
	if errors.As(err, &pe) {
		if pe.Line > 0 {
			return inputf(path, pe.Line, "%s", readsCleanErr(pe.Err))
		}
		if pe.Record > 0 {
			return inputf(path, 0, "record %d: %s", pe.Record, readsCleanErr(pe.Err))
		}
	}
	return inputf(path, 0, "%s", readsCleanErr(err))
}

func readsDisplayName(path string) string {
	if path == "-" {
		return "stdin"
	}
	return path
}

// countReads reads every input and returns one sample per library.
func countReads(a *app, c *readsConfig) ([]sampleInput, error) {
	r := &readsRun{a: a, c: c, libIdx: map[string]int{}, noteSet: map[string]bool{}, libNote: map[int][]string{}, names: map[string]string{}}
	r.keyer.Opt = reads.KeyOptions{MinMapQ: c.minMapQ, UMIFromName: c.umi == "name", NoUMI: c.umi == "none", KeyBases: c.keyBases, OpticalNames: c.optical > 0}
	opt := dedup.Options{OpticalDistance: c.optical, MemoryBudget: c.memBudget}
	r.hashed = dedup.NewHashed(opt)

	// Sample names for inputs without read groups: the base name, or the
	// path as given when two inputs share a base name.
	base := map[string]int{}
	for _, p := range c.inputs {
		base[filepath.Base(readsDisplayName(p))]++
	}
	for _, p := range c.inputs {
		n := filepath.Base(readsDisplayName(p))
		if base[n] > 1 {
			n = readsDisplayName(p)
		}
		r.names[p] = n
	}

	var opened []*readsInput
	defer func() {
		for _, o := range opened {
			o.close()
		}
	}()
	var alignments, fastqs []*readsInput
	for _, p := range c.inputs {
		o, err := r.open(p)
		if err != nil {
			return nil, err
		}
		opened = append(opened, o)
		switch o.in.Format {
		case reads.FormatFASTQ:
			o.fq = reads.NewFASTQReader(o.in.Unbuffered())
			o.ferr = o.fq.Read(&o.first)
			if o.ferr != nil && o.ferr != io.EOF {
				return nil, readsInputErr(readsDisplayName(p), o.ferr)
			}
			if o.ferr == io.EOF {
				return nil, inputf(readsDisplayName(p), 0, "no FASTQ records")
			}
			fastqs = append(fastqs, o)
		default:
			alignments = append(alignments, o)
		}
	}
	allowSorted := len(alignments) == 1 && !c.forceHashed
	if !allowSorted || c.mode == "hashed" || len(fastqs) > 0 {
		// The hash tables are large pointer-free arrays that the collector
		// never scans, and segments outgrown by a doubling are garbage at
		// once: a low GC target frees them sooner for little CPU, keeping
		// the peak near the live size (peak RSS of --mode hashed over 1.17M
		// molecules: 60 MB at the default of 100, 43 MB at 25; BENCHMARKS.md).
		// The sorted window is small, and a low target would only cost CPU.
		defer debug.SetGCPercent(debug.SetGCPercent(25))
	}
	if len(alignments) > 1 && c.mode != "hashed" {
		r.note("%d alignment files: counted by hashing, so a library spread over files is one set of molecules", len(alignments))
	}
	for _, o := range alignments {
		if err := r.countAlignments(o, allowSorted); err != nil {
			return nil, err
		}
	}
	// FASTQ: consecutive files whose first names agree are mates.
	for i := 0; i < len(fastqs); i++ {
		if i+1 < len(fastqs) && bytes.Equal(reads.MateName(fastqs[i].first.Name), reads.MateName(fastqs[i+1].first.Name)) {
			if err := r.countFASTQ(fastqs[i], fastqs[i+1]); err != nil {
				return nil, err
			}
			i++
			continue
		}
		if len(fastqs) > 1 {
			// Say why this file is not half of a pair.
			other := fastqs[(i+1)%len(fastqs)]
			if i+1 == len(fastqs) && i > 0 {
				other = fastqs[i-1]
			}
			lib := r.library(fastqs[i].name)
			r.libNote[lib] = append(r.libNote[lib], fmt.Sprintf("read as single-end: its first read name %q does not match %q of %s (mates must be given as R1 R2 of the same reads)",
				fastqs[i].first.Name, other.first.Name, readsDisplayName(other.path)))
		}
		if err := r.countFASTQ(fastqs[i], nil); err != nil {
			return nil, err
		}
	}
	if c.forceHashed {
		r.note("the header says coordinate-sorted but the records are not: counted by hashing instead")
	}
	for lib, n := range r.keyer.NoMC {
		if n > 0 {
			r.libNote[lib] = append(r.libNote[lib], fmt.Sprintf("%d pairs lack the MC tag: the mate's 5' end was taken as PNEXT, ignoring its clipping (approximate; add MC with samtools fixmate -m)", n))
		}
	}
	return r.samples()
}

func (r *readsRun) open(p string) (*readsInput, error) {
	o := &readsInput{path: p, name: r.names[p], size: -1}
	var src io.Reader
	if p == "-" {
		src = r.a.stdin
	} else {
		f, err := os.Open(p)
		if err != nil {
			return nil, inputf(p, 0, "cannot open: %v", errors.Unwrap(err))
		}
		o.file = f
		if st, err := f.Stat(); err == nil {
			if st.IsDir() {
				return nil, inputf(p, 0, "is a directory; give BAM, SAM or FASTQ files")
			}
			o.size = st.Size()
		}
		src = f
	}
	o.count = &readsCountingReader{r: src}
	in, err := reads.Open(o.count, r.c.threads)
	if err != nil {
		if o.file != nil {
			o.file.Close()
		}
		return nil, readsInputErr(readsDisplayName(p), err)
	}
	o.in = in
	return o, nil
}

// progressBar returns a bar over the compressed bytes of o, or nil.
func (r *readsRun) progressBar(o *readsInput, what string) *progressbar.ProgressBar {
	if !r.c.progress {
		return nil
	}
	return progressbar.NewOptions64(o.size,
		progressbar.OptionSetWriter(r.a.stderr),
		progressbar.OptionSetDescription(what),
		progressbar.OptionShowBytes(true),
		progressbar.OptionShowCount(),
		progressbar.OptionThrottle(200*time.Millisecond),
		progressbar.OptionSetWidth(30),
		progressbar.OptionClearOnFinish(),
	)
}

// tick updates the bar every readsProgressEvery records.
const readsProgressEvery = 1 << 16

func readsTick(bar *progressbar.ProgressBar, o *readsInput, name string, records int64) {
	if bar == nil {
		return
	}
	bar.Describe(fmt.Sprintf("%s: %d records", name, records))
	bar.Set64(o.count.n.Load())
}

type readsAlignmentReader interface {
	Read(*reads.Record) error
	Header() *reads.Header
}

func (r *readsRun) countAlignments(o *readsInput, allowSorted bool) error {
	name := readsDisplayName(o.path)
	var rd readsAlignmentReader
	var err error
	if o.in.Format == reads.FormatBAM {
		rd, err = reads.NewBAMReader(o.in)
	} else {
		rd, err = reads.NewSAMReader(o.in)
	}
	if err != nil {
		return readsInputErr(name, err)
	}
	h := rd.Header()
	sortedMode := allowSorted && (r.c.mode == "sorted" || r.c.mode == "auto" && h.Coordinate)
	var counter dedup.Counter = r.hashed
	if sortedMode {
		r.sorted = dedup.NewSorted(dedup.Options{OpticalDistance: r.c.optical})
		counter = r.sorted
	}
	// Library of each read group, resolved once.
	rgLib := map[string]int{}
	noRG := -1
	libOf := func(rg []byte) int {
		if rg == nil || r.c.by == "file" {
			if noRG < 0 {
				noRG = r.library(o.name)
			}
			return noRG
		}
		if i, ok := rgLib[string(rg)]; ok {
			return i
		}
		id := string(rg)
		lb, known := h.Library[id]
		n := id
		if r.c.by == "library" && lb != "" {
			n = lb
		}
		i := r.library(n)
		rgLib[id] = i
		if !known {
			r.libNote[i] = append(r.libNote[i], fmt.Sprintf("read group %q is used by records but not declared in the header of %s", id, name))
		}
		return i
	}
	bar := r.progressBar(o, name)
	var rec reads.Record
	var n int64
	lastRef, lastPos := int32(-1), int32(-1)
	tail := false
	for {
		err := rd.Read(&rec)
		if err == io.EOF {
			break
		}
		if err != nil {
			return readsInputErr(name, err)
		}
		n++
		if n%readsProgressEvery == 0 {
			readsTick(bar, o, name, n)
		}
		lib := libOf(rec.RG)
		r.libs[lib].records++
		if sortedMode {
			if rec.Ref < 0 {
				tail = true
			} else {
				if tail || rec.Ref < lastRef || rec.Ref == lastRef && rec.Pos < lastPos {
					if r.c.mode == "auto" && o.path != "-" {
						return errReadsDisorder
					}
					why := "although --mode sorted was given"
					if r.c.mode == "auto" {
						why = "although the header says SO:coordinate (standard input cannot be read twice)"
					}
					return inputf(name, 0, "record %d: not in coordinate order (%s after %s) %s; sort the file (samtools sort) or use --mode hashed",
						n, readsLocus(h, rec.Ref, rec.Pos), readsLocus(h, lastRef, lastPos), why)
				}
				lastRef, lastPos = rec.Ref, rec.Pos
				counter.Advance(rec.Ref, int64(rec.Pos))
			}
		}
		f, ok := r.keyer.Alignment(&rec, lib)
		if !ok {
			continue
		}
		counter.SetLeadClip(r.keyer.MaxLeadClip)
		counter.Add(f)
	}
	if bar != nil {
		bar.Finish()
	}
	if r.sorted != nil && r.sorted.Late > 0 {
		r.note("%d fragments had a leading clip longer than the sorted window allowed; up to that many molecules may be counted twice (use --mode hashed for exact counts)", r.sorted.Late)
	}
	return nil
}

func readsLocus(h *reads.Header, ref, pos int32) string {
	if ref < 0 || int(ref) >= len(h.Refs) {
		return "unmapped"
	}
	return fmt.Sprintf("%s:%d", h.Refs[ref], pos+1)
}

// countFASTQ counts one FASTQ file or a pair of mate files (o2 non-nil),
// each inflating ahead in its own goroutine
// (reads.Open) so that two mates' files use two cores.
func (r *readsRun) countFASTQ(o1, o2 *readsInput) error {
	n1 := readsDisplayName(o1.path)
	lib := r.library(o1.name)
	L := r.libs[lib]
	bar := r.progressBar(o1, n1)
	var rec1, rec2 reads.FASTQRecord
	rec1 = o1.first
	var n2 string
	if o2 != nil {
		n2 = readsDisplayName(o2.path)
		rec2 = o2.first
	}
	var pairs int64
	for {
		pairs++
		if o2 != nil && !bytes.Equal(reads.MateName(rec1.Name), reads.MateName(rec2.Name)) {
			return inputf(n2, o2.fq.Line()-3, "read name %q does not match %q at line %d of %s: the mate files are out of step (give R1 and R2 of the same run, unfiltered or filtered together)",
				rec2.Name, rec1.Name, o1.fq.Line()-3, n1)
		}
		var f reads.Fragment
		if o2 != nil {
			f = r.keyer.FASTQ(&rec1, &rec2, lib)
			L.records += 2
		} else {
			f = r.keyer.FASTQ(&rec1, nil, lib)
			L.records++
		}
		r.hashed.Add(f)
		if pairs%readsProgressEvery == 0 {
			readsTick(bar, o1, n1, pairs)
		}
		e1 := o1.fq.Read(&rec1)
		var e2 error = io.EOF
		if o2 != nil {
			e2 = o2.fq.Read(&rec2)
		}
		if e1 != nil && e1 != io.EOF {
			return readsInputErr(n1, e1)
		}
		if e2 != nil && e2 != io.EOF {
			return readsInputErr(n2, e2)
		}
		if e1 == io.EOF {
			if err := o1.in.CheckEnd(); err != nil {
				return readsInputErr(n1, err)
			}
		}
		if o2 != nil {
			if e2 == io.EOF {
				if err := o2.in.CheckEnd(); err != nil {
					return readsInputErr(n2, err)
				}
			}
			if e1 == io.EOF && e2 != io.EOF {
				return inputf(n2, o2.fq.Line()-3, "has more records than %s (%d): mate files must have the same reads in the same order", n1, pairs)
			}
			if e2 == io.EOF && e1 != io.EOF {
				return inputf(n1, o1.fq.Line()-3, "has more records than %s (%d): mate files must have the same reads in the same order", n2, pairs)
			}
		}
		if e1 == io.EOF {
			break
		}
	}
	if bar != nil {
		bar.Finish()
	}
	return nil
}

// samples combines the counters' results into one sample per library.
func (r *readsRun) samples() ([]sampleInput, error) {
	n := len(r.libs)
	res := r.hashed.Results(n)
	if r.sorted != nil {
		for i, s := range r.sorted.Results(n) {
			h := &res[i]
			for t, u := range s.Freq {
				h.Freq[t] += u
			}
			h.Fragments += s.Fragments
			h.OpticalDups += s.OpticalDups
			h.Molecules += s.Molecules
		}
	}
	var notes []string
	notes = append(notes, r.notes...)
	if sh := r.hashed.Shift(); sh > 0 {
		notes = append(notes, fmt.Sprintf("memory budget --max-memory %s reached: counted only the molecules whose key hash falls in the lowest 1/%d of the hash range and multiplied their frequency counts by %d (an unbiased scaled copy; estimates are approximate)",
			r.c.maxMemory, uint64(1)<<sh, uint64(1)<<sh))
	}
	out := make([]sampleInput, 0, n)
	for i, l := range r.libs {
		counts, err := complexity.FromMap(res[i].Freq)
		if err != nil {
			return nil, inputf(l.name, 0, "frequency counts: %v", err)
		}
		out = append(out, sampleInput{
			name:   l.name,
			counts: counts,
			extra: []column{
				{key: "records", value: intCell(l.records)},
				{key: "used_fragments", value: intCell(res[i].Fragments)},
				{key: "optical_dups", value: intCell(res[i].OpticalDups)},
			},
			notes: append(append([]string(nil), notes...), r.libNote[i]...),
		})
	}
	return out, nil
}
