package dedup

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"runtime/debug"
	"sort"
	"strings"

	"headroom/complexity"
	"headroom/reads"
)

// Input is one stream of reads to count: BAM, SAM or FASTQ, plain, gzip
// or BGZF (reads.Open recognises which).
type Input struct {
	// Name names the input in errors and notes: a path, or "stdin".
	Name string
	// Sample names the library of records that name none (no read group,
	// FASTQ, or By is ByFile); "" means Name.
	Sample string
	// R is the stream.
	R io.Reader
	// Reopen returns the stream again from its start, for a sorted pass
	// that found the records out of order and counts again by hashing;
	// nil when the stream cannot be read twice (standard input).
	Reopen func() (io.Reader, error)
}

// By says what one summary row (Library) is.
type By int

// Ways of grouping records into libraries.
const (
	ByLibrary   By = iota // @RG LB of the record's read group (read groups sharing LB are one library)
	ByReadGroup           // @RG ID
	ByFile                // the input (Input.Sample)
	ByCell                // the cell barcode (Key.CellTag) within each library
)

// Mode says how molecules are counted.
type Mode int

// Counting modes.
const (
	ModeAuto   Mode = iota // Sorted when the header says coordinate-sorted and there is one alignment input, else Hashed
	ModeSorted             // Sorted, an error when the records are not in order
	ModeHashed             // Hashed
)

// Library is one summary row: a library's frequency counts and tallies.
type Library struct {
	Name   string
	Counts complexity.Counts
	// Records read (both mates of a FASTQ pair).
	Records int64
	// Sequenced is the reads the run delivered for the library: primary
	// records with a pair counted once (read pairs for paired data), one
	// per FASTQ record or mate pair; unmapped and QC-failed reads are in
	// it, secondary and supplementary alignments are not.
	Sequenced int64
	// UsedFragments is the fragments counted, before optical collapse.
	UsedFragments int64
	// OpticalDups is the reads removed as optical duplicates.
	OpticalDups int64
	// Notes are the run's notes followed by this library's own.
	Notes []string
}

// ErrDisorder reports coordinate-sorted input whose records are not.
var ErrDisorder = errors.New("dedup: records out of coordinate order")

// errorDominated is the per-base error rate of FASTQ key bases, estimated
// from the keys merged, above which a note says the data look
// error-dominated: 0.5% in the leading bases, past what the benchmark's
// 1% read-wide rate puts there (about 0.35%; BENCHMARKS.md "FASTQ keys
// and sequencing errors").
const errorDominated = 0.005

// progressEvery is the number of records between Progress calls.
const progressEvery = 1 << 16

// Count reads every input and returns one Library per library, in the
// order they were first seen: alignment inputs first, then FASTQ. FASTQ
// files whose first read names agree (reads.MateName) are the two mates
// of one library, in any order (the file whose first record says mate 2,
// reads.MateNumber, is read second); a file whose first two records are
// the mates of one name is interleaved. Inputs sharing a Sample (lanes of
// one sample) are one library. When a coordinate-sorted pass finds records
// out of order (ModeAuto) and every input can be reopened, Count counts
// again by hashing and says so in the notes.
//
// Errors name their input: a *reads.FileError, usually holding a
// *reads.ParseError with the line or record.
func Count(inputs []Input, opt Options) ([]Library, error) {
	libs, err := count(inputs, opt, false)
	if errors.Is(err, ErrDisorder) {
		for i := range inputs {
			if inputs[i].R, err = inputs[i].Reopen(); err != nil {
				return nil, &reads.FileError{File: inputs[i].Name, Err: err}
			}
		}
		libs, err = count(inputs, opt, true)
	}
	return libs, err
}

// library is one summary row being counted.
type library struct {
	name    string
	records int64
	// sequenced counts reads as a run delivers them: primary records,
	// a pair once (its read 1, or an unpaired record); FASTQ: one per
	// record or pair.
	sequenced int64
	notes     []string
	cells     map[string]int // ByCell: the row of each cell of this library
	parent    string         // ByCell: a cell row's library
	cell      string         // ByCell: a cell row's barcode
	isCell    bool
	// patterned: the optical distance was set for a patterned flow cell
	patterned bool
}

// run is the state of one counting pass over all inputs.
type run struct {
	opt    Options
	rewind bool // every input can be reopened
	hashed bool // counting by hashing after a sorted pass found disorder
	libs   []*library
	libIdx map[string]int
	// rank orders the libraries the way the headers declare their read
	// groups (first input first); libraries no header names follow in
	// the order first seen.
	rank    map[string]int
	notes   []string
	noteSet map[string]bool
	sorted  *Sorted
	hash    *Hashed
	keyer   reads.Keyer
}

func (r *run) note(format string, args ...any) {
	n := fmt.Sprintf(format, args...)
	if !r.noteSet[n] {
		r.noteSet[n] = true
		r.notes = append(r.notes, n)
	}
}

func (r *run) library(name string) int {
	if i, ok := r.libIdx[name]; ok {
		return i
	}
	r.libs = append(r.libs, &library{name: name})
	r.libIdx[name] = len(r.libs) - 1
	return len(r.libs) - 1
}

// cellRow returns the row of a cell of library lib (ByCell).
func (r *run) cellRow(lib int, cell []byte) int {
	l := r.libs[lib]
	if i, ok := l.cells[string(cell)]; ok {
		return i
	}
	if l.cells == nil {
		l.cells = map[string]int{}
	}
	name := l.name + "\x00" + string(cell)
	if cell == nil {
		name = l.name + "\x00\x01"
	}
	i := r.library(name)
	c := r.libs[i]
	c.parent, c.cell, c.isCell = l.name, string(cell), true
	l.cells[string(cell)] = i
	return i
}

func (r *run) libNote(lib int, format string, args ...any) {
	r.libs[lib].notes = append(r.libs[lib].notes, fmt.Sprintf(format, args...))
}

// source is one input after sniffing.
type source struct {
	Input
	index int
	in    *reads.Input
	fq    *reads.FASTQReader
	first string // the first FASTQ read name (reads.MateName), copied
	mate  int    // the mate number of the first record (reads.MateNumber)
	inter bool   // interleaved: the first two records are mates
}

func (s *source) sample() string {
	if s.Sample != "" {
		return s.Sample
	}
	return s.Name
}

func (s *source) fail(err error) error {
	var fe *reads.FileError
	if errors.As(err, &fe) {
		return err
	}
	return &reads.FileError{File: s.Name, Err: err}
}

func count(inputs []Input, opt Options, hashed bool) ([]Library, error) {
	r := &run{opt: opt, hashed: hashed, libIdx: map[string]int{}, noteSet: map[string]bool{}, rewind: true}
	r.keyer.Opt = opt.Key
	r.keyer.Opt.OpticalNames = opt.OpticalDistance > 0
	r.hash = NewHashed(opt)
	for _, in := range inputs {
		r.rewind = r.rewind && in.Reopen != nil
	}
	var opened []*source
	defer func() {
		for _, s := range opened {
			s.in.Close()
		}
	}()
	var alignments, fastqs []*source
	for i, in := range inputs {
		s := &source{Input: in, index: i}
		ri, err := reads.Open(in.R, opt.Threads)
		if err != nil {
			return nil, s.fail(err)
		}
		s.in = ri
		opened = append(opened, s)
		if ri.Format != reads.FormatFASTQ {
			alignments = append(alignments, s)
			continue
		}
		if opt.Key.CellTag != (reads.Tag{}) {
			return nil, s.fail(fmt.Errorf("FASTQ has no cell barcodes: --cell-tag %s needs aligned input (BAM or SAM)", opt.Key.CellTag))
		}
		s.fq = reads.NewFASTQReader(ri)
		first, err := s.fq.Peek(0)
		if err == io.EOF {
			return nil, s.fail(errors.New("no FASTQ records"))
		}
		if err != nil {
			return nil, s.fail(err)
		}
		s.first, s.mate = mateName(string(first.Name)), reads.MateNumber(first.Name, first.Comment)
		second, err := s.fq.Peek(1)
		if err != nil && err != io.EOF {
			return nil, s.fail(err)
		}
		if err == nil && mateName(string(second.Name)) == s.first {
			m2 := reads.MateNumber(second.Name, second.Comment)
			s.inter = s.mate == 1 && m2 == 2 || s.mate == 0 && m2 == 0
		}
		fastqs = append(fastqs, s)
	}
	allowSorted := len(alignments) == 1 && !hashed
	if !allowSorted || opt.Mode == ModeHashed || len(fastqs) > 0 {
		// The hash tables are large pointer-free arrays that the collector
		// never scans, and segments outgrown by a doubling are garbage at
		// once: a low GC target frees them sooner for little CPU, keeping
		// the peak near the live size (peak RSS of --mode hashed over 1.17M
		// molecules: 60 MB at the default of 100, 43 MB at 25; BENCHMARKS.md).
		// The sorted window is small, and a low target would only cost CPU.
		defer debug.SetGCPercent(debug.SetGCPercent(25))
	}
	if len(alignments) > 1 && opt.Mode != ModeHashed {
		r.note("%d alignment files: counted by hashing, so a library spread over files is one set of molecules", len(alignments))
	}
	for _, s := range alignments {
		if err := r.countAlignments(s, allowSorted); err != nil {
			return nil, err
		}
	}
	if err := r.countFASTQs(fastqs); err != nil {
		return nil, err
	}
	if hashed {
		r.note("the header says coordinate-sorted but the records are not: counted by hashing instead")
	}
	for lib, n := range r.keyer.NoMC {
		if n > 0 {
			r.libNote(lib, "%d pairs lack the MC tag: the mate's 5' end was taken as PNEXT, ignoring its clipping (approximate; add MC with samtools fixmate -m)", n)
		}
	}
	r.tagNotes()
	return r.results()
}

func mateName(name string) string { return string(reads.MateName([]byte(name))) }

// alignmentReader is what BAM and SAM readers share.
type alignmentReader interface {
	Read(*reads.Record) error
	Header() *reads.Header
}

func (r *run) progress(s *source, records int64, done bool) {
	if r.opt.Progress != nil {
		r.opt.Progress(s.index, records, done)
	}
}

func (r *run) countAlignments(s *source, allowSorted bool) error {
	var rd alignmentReader
	var err error
	if s.in.Format == reads.FormatBAM {
		rd, err = reads.NewBAMReader(s.in)
	} else {
		rd, err = reads.NewSAMReader(s.in)
	}
	if err != nil {
		return s.fail(err)
	}
	h := rd.Header()
	sortedMode := allowSorted && (r.opt.Mode == ModeSorted || r.opt.Mode == ModeAuto && h.Coordinate)
	var counter Counter = r.hash
	if sortedMode {
		r.sorted = NewSorted(Options{OpticalDistance: r.opt.OpticalDistance})
		counter = r.sorted
	}
	libOf := r.readGroups(s, h)
	r.progress(s, 0, false)
	pat := false
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
			return s.fail(err)
		}
		n++
		if n%progressEvery == 0 {
			r.progress(s, n, false)
		}
		if n == 1 {
			pat = r.patterned(s, rec.Name)
		}
		lib := libOf(rec.RG)
		if r.opt.By == ByCell {
			lib = r.cellRow(lib, rec.Tag(r.opt.Key.CellTag))
		}
		if pat && !r.libs[lib].patterned {
			r.libs[lib].patterned = true
			counter.SetDistance(lib, r.opt.PatternedDistance)
		}
		r.libs[lib].records++
		if f := rec.Flags; f&(reads.FlagSecondary|reads.FlagSupplementary) == 0 && (f&reads.FlagPaired == 0 || f&reads.FlagRead2 == 0) {
			r.libs[lib].sequenced++
		}
		if sortedMode {
			if rec.Ref < 0 {
				tail = true
			} else {
				if tail || rec.Ref < lastRef || rec.Ref == lastRef && rec.Pos < lastPos {
					if r.opt.Mode == ModeAuto && r.rewind {
						return ErrDisorder
					}
					why := "although --mode sorted was given"
					if r.opt.Mode == ModeAuto {
						why = "although the header says SO:coordinate (standard input cannot be read twice)"
					}
					return s.fail(&reads.ParseError{Record: n, Err: fmt.Errorf("not in coordinate order (%s after %s) %s; sort the file (samtools sort) or use --mode hashed",
						locus(h, rec.Ref, rec.Pos), locus(h, lastRef, lastPos), why)})
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
	r.progress(s, n, true)
	if r.sorted != nil && r.sorted.Late > 0 {
		r.note("%d fragments had a leading clip longer than the sorted window allowed; up to that many molecules may be counted twice (use --mode hashed for exact counts)", r.sorted.Late)
	}
	return nil
}

// patterned reports whether the optical distance of input s is the
// patterned one, from its first read name, and says so in a note.
func (r *run) patterned(s *source, name []byte) bool {
	if r.opt.PatternedDistance <= 0 || r.opt.OpticalDistance <= 0 {
		return false
	}
	p, fc, tile := reads.Patterned(name)
	if p {
		r.note("%s: read names say a patterned flow cell (flow cell %s, tile %s): optical duplicates within %d px, not %d (--optical-distance sets the distance)",
			s.Name, fc, tile, r.opt.PatternedDistance, r.opt.OpticalDistance)
	}
	return p
}

// readGroups returns the library index of a record's read group, each
// group resolved once.
func (r *run) readGroups(s *source, h *reads.Header) func(rg []byte) int {
	if r.opt.By != ByFile {
		if r.rank == nil {
			r.rank = map[string]int{}
		}
		for _, id := range h.ReadGroups {
			n := id
			if lb := h.Library[id]; r.opt.By != ByReadGroup && lb != "" {
				n = lb
			}
			if _, ok := r.rank[n]; !ok {
				r.rank[n] = len(r.rank)
			}
		}
	}
	rgLib := map[string]int{}
	noRG := -1
	var lastRG []byte // records come in runs of one read group: skip the map
	lastLib := -1
	return func(rg []byte) int {
		if rg == nil || r.opt.By == ByFile {
			if noRG < 0 {
				noRG = r.library(s.sample())
			}
			return noRG
		}
		if lastLib >= 0 && bytes.Equal(rg, lastRG) {
			return lastLib
		}
		if i, ok := rgLib[string(rg)]; ok {
			lastRG, lastLib = append(lastRG[:0], rg...), i
			return i
		}
		id := string(rg)
		lb, known := h.Library[id]
		n := id
		if r.opt.By == ByLibrary && lb != "" {
			n = lb
		}
		i := r.library(n)
		rgLib[id] = i
		lastRG, lastLib = append(lastRG[:0], rg...), i
		if !known {
			r.libNote(i, "read group %q is used by records but not declared in the header of %s", id, s.Name)
		}
		return i
	}
}

func locus(h *reads.Header, ref, pos int32) string {
	if ref < 0 || int(ref) >= len(h.Refs) {
		return "unmapped"
	}
	return fmt.Sprintf("%s:%d", h.Refs[ref], pos+1)
}

// countFASTQs pairs the FASTQ inputs by their first read names and
// counts each file, pair or interleaved file.
func (r *run) countFASTQs(fastqs []*source) error {
	var order []string
	byName := map[string][]*source{}
	for _, s := range fastqs {
		if s.inter {
			order = append(order, "\x00"+s.Name)
			byName["\x00"+s.Name] = []*source{s}
			continue
		}
		if byName[s.first] == nil {
			order = append(order, s.first)
		}
		byName[s.first] = append(byName[s.first], s)
	}
	// Files an instrument named as R1 and R2 of one sample and lane must
	// pair: if they start with different reads, they cannot be read.
	singles := map[reads.FASTQName]*source{}
	for _, k := range order {
		if g := byName[k]; len(g) == 1 && !g[0].inter {
			if n, ok := reads.ParseFASTQName(filepath.Base(g[0].Name)); ok {
				singles[n] = g[0]
			}
		}
	}
	for _, k := range order {
		s1 := byName[k][0]
		n, ok := reads.ParseFASTQName(filepath.Base(s1.Name))
		if !ok || n.Read != 1 || singles[n] != s1 {
			continue
		}
		m := n
		m.Read = 2
		if s2 := singles[m]; s2 != nil {
			return s2.fail(fmt.Errorf("mates cannot be paired: %s and %s are R1 and R2 of sample %s, but %s starts with read %q and %s with %q (give mate files of the same reads, unfiltered or filtered together)",
				s1.Name, s2.Name, n.Sample, s1.Name, s1.first, s2.Name, s2.first))
		}
	}
	for _, k := range order {
		g := byName[k]
		switch {
		case g[0].inter:
			if err := r.countFASTQ(g[0], nil, true); err != nil {
				return err
			}
		case len(g) == 1:
			if g[0].mate != 0 && len(fastqs) > 1 {
				r.libNote(r.library(g[0].sample()), "%s read as single-end: its first read %q says mate %d, but no other input starts with that read",
					g[0].Name, g[0].first, g[0].mate)
			}
			if err := r.countFASTQ(g[0], nil, false); err != nil {
				return err
			}
		case len(g) == 2:
			a, b := g[0], g[1]
			if a.mate != 0 && a.mate == b.mate {
				return b.fail(fmt.Errorf("%s and %s both start with mate %d of read %q: give the other mate's file (or each file once)", a.Name, b.Name, a.mate, a.first))
			}
			if a.mate == 2 || b.mate == 1 {
				a, b = b, a
			}
			if err := r.countFASTQ(a, b, false); err != nil {
				return err
			}
		default:
			return g[2].fail(fmt.Errorf("%d inputs start with the same read %q (%s, %s, %s...): give each mate file once", len(g), g[0].first, g[0].Name, g[1].Name, g[2].Name))
		}
	}
	return nil
}

// countFASTQ counts one FASTQ file, or a pair of mate files (s2 not nil),
// each inflating ahead in its own goroutine (reads.Open) so that two
// mates' files use two cores.
func (r *run) countFASTQ(s1, s2 *source, interleaved bool) error {
	lib := r.library(s1.sample())
	L := r.libs[lib]
	if r.patterned(s1, []byte(s1.first)) && !L.patterned {
		L.patterned = true
		r.hash.SetDistance(lib, r.opt.PatternedDistance)
	}
	r.progress(s1, 0, false)
	var rec1, rec2 reads.FASTQRecord
	var pr *reads.PairReader
	switch {
	case s2 != nil:
		pr = reads.NewPairReader(s1.fq, s2.fq, s1.Name, s2.Name)
	case interleaved:
		pr = reads.NewInterleavedReader(s1.fq, s1.Name)
	}
	var pairs int64
	for {
		var f reads.Fragment
		if pr != nil {
			err := pr.Read(&rec1, &rec2)
			if err == io.EOF {
				break
			}
			if err != nil {
				return err
			}
			f = r.keyer.FASTQ(&rec1, &rec2, lib)
			L.records += 2
			L.sequenced++
		} else {
			err := s1.fq.Read(&rec1)
			if err == io.EOF {
				break
			}
			if err != nil {
				return s1.fail(err)
			}
			f = r.keyer.FASTQ(&rec1, nil, lib)
			L.records++
			L.sequenced++
		}
		r.hash.Add(f)
		pairs++
		if pairs%progressEvery == 0 {
			r.progress(s1, pairs, false)
		}
	}
	r.progress(s1, pairs, true)
	return nil
}

// results combines the counters' results into one Library per library.
func (r *run) results() ([]Library, error) {
	n := len(r.libs)
	res := r.hash.Results(n)
	if r.sorted != nil {
		for i, s := range r.sorted.Results(n) {
			h := &res[i]
			for t, u := range s.Freq {
				h.Freq[t] += u
			}
			h.Fragments += s.Fragments
			h.OpticalDups += s.OpticalDups
			h.Molecules += s.Molecules
			h.UMIMerged += s.UMIMerged
		}
	}
	notes := append([]string(nil), r.notes...)
	if sh := r.hash.Shift(); sh > 0 {
		budget := r.opt.BudgetName
		if budget == "" {
			budget = fmt.Sprintf("of %d bytes", r.opt.MemoryBudget)
		}
		notes = append(notes, fmt.Sprintf("memory budget %s reached: counted only the molecules whose key hash falls in the lowest 1/%d of the hash range and multiplied their frequency counts by %d (an unbiased scaled copy; estimates are approximate)",
			budget, uint64(1)<<sh, uint64(1)<<sh))
	}
	// Cell rows: named by the barcode when all are of one library.
	parents := map[string]bool{}
	for _, l := range r.libs {
		if l.isCell {
			parents[l.parent] = true
		}
	}
	out := make([]Library, 0, n)
	var order []int // header rank, then first seen, of each row of out
	for i, l := range r.libs {
		if r.opt.By == ByCell && !l.isCell {
			continue // a library whose records all went to its cells
		}
		name := l.name
		if l.isCell {
			name = l.cell
			if l.cell == "" {
				name = "no-cell"
			}
			if len(parents) > 1 {
				name = l.parent + "/" + name
			}
		}
		if m := res[i].KeyMerged; m > 0 {
			l.notes = append(l.notes, fmt.Sprintf("%d read keys within two bases of a more abundant key were merged into it as its sequencing errors (directional adjacency over the leading bases of the mates)", m))
			// Share of keys merged, per key base: a rough per-base error
			// rate of the key's bases (a read's key has an error with
			// probability about 2k·e for a pair).
			if f := res[i].Fragments; f > 0 {
				perBase := float64(m) / float64(f) / float64(2*r.opt.Key.KeyBases)
				if perBase > errorDominated {
					l.notes = append(l.notes, fmt.Sprintf("the reads look error-dominated (about %.1f%% errors per base in the key's leading bases, estimated from the keys merged): beyond the rates whose residual bias was measured (up to 1%% per base read-wide: +0.1%% distinct, +0.7%% at 10x; BENCHMARKS.md), so predictions may be high", 100*perBase))
				}
			}
		}
		if res[i].UMIMerged > 0 {
			l.notes = append(l.notes, fmt.Sprintf("%d UMIs one base from a more abundant UMI at the same position were merged into it as its sequencing errors (directional adjacency, Smith et al. 2017; --umi-errors 0 keeps them apart)", res[i].UMIMerged))
		}
		counts, err := complexity.FromMap(res[i].Freq)
		if err != nil {
			return nil, &reads.FileError{File: name, Err: fmt.Errorf("frequency counts: %w", err)}
		}
		key := len(r.rank) + i
		lib := l.name
		if l.isCell {
			lib = l.parent
		}
		if k, ok := r.rank[lib]; ok {
			key = k
		}
		order = append(order, key)
		out = append(out, Library{
			Name:          name,
			Counts:        counts,
			Sequenced:     l.sequenced,
			Records:       l.records,
			UsedFragments: res[i].Fragments,
			OpticalDups:   res[i].OpticalDups,
			Notes:         append(append([]string(nil), notes...), l.notes...),
		})
	}
	// Input order: the headers' read-group order, then first seen (cells
	// of one library stay in the order first seen).
	idx := make([]int, len(out))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return order[idx[a]] < order[idx[b]] })
	sortedOut := make([]Library, len(out))
	for k, i := range idx {
		sortedOut[k] = out[i]
	}
	return sortedOut, nil
}

// tagNotes says when the UMI or cell tag is absent from most fragments:
// molecules are then told apart by position alone. For the default UMI
// source (Options.UMIAsked false) only when the records carry another
// tag that pipelines write UMIs in, since most data have no UMIs at all.
func (r *run) tagNotes() {
	k := &r.keyer
	if k.Fragments == 0 {
		return
	}
	src := r.umiSource()
	if src != "" && 2*k.NoUMI > k.Fragments {
		var best reads.Tag
		var most int64
		for _, t := range reads.CommonUMITags {
			if n := k.OtherUMITags[t]; n > most {
				best, most = t, n
			}
		}
		sampled := min(k.NoUMI, reads.UMISample)
		switch {
		case 2*most > sampled:
			r.note("the UMI %s is absent from %d of %d fragments, but %s is on %.0f%% of them: molecules were told apart by position only (give --umi-tag %s)",
				src, k.NoUMI, k.Fragments, best, 100*float64(most)/float64(sampled), best)
		case r.opt.UMIAsked:
			r.note("the UMI %s is absent from %d of %d fragments: those were told apart by position only", src, k.NoUMI, k.Fragments)
		}
	}
	if c := r.opt.Key.CellTag; c != (reads.Tag{}) && 2*k.NoCell > k.Fragments {
		r.note("the cell tag %s is absent from %d of %d fragments: those are one cell (\"no-cell\" with --by cell)", c, k.NoCell, k.Fragments)
	}
}

// umiSource names where UMIs were looked for, or "" for nowhere.
func (r *run) umiSource() string {
	var parts []string
	for _, t := range r.opt.Key.UMITags {
		parts = append(parts, "tag "+t.String())
	}
	if r.opt.Key.UMIFromName {
		parts = append(parts, "in the read name")
	}
	return strings.Join(parts, " or ")
}
