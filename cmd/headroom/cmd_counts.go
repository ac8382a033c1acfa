package main

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"

	"headroom/internal/freqtable"
)

func init() {
	register(subcommand{name: "counts", summary: "estimate from frequency-count tables (or per-unit counts)", run: runCounts})
}

const countsAbout = `Estimates from frequency-count tables: tab-separated files with the header
"sample<TAB>times_seen<TAB>units", one row per sample and frequency (units =
how many distinct units were seen exactly times_seen times). Several samples
may share a file; files may be gzip-compressed; '-' reads standard input.
With --per-unit, each FILE holds one count per line per unit, and the sample
is named after the file.

Writes one summary row per sample (TSV or JSON) to stdout or -o FILE, and on
request the curve (--curve), plot (--plot), HTML report (--report) and the
counts themselves (--save-counts).`

func runCounts(a *app, args []string) error {
	c := newCommand("counts", "headroom counts [flags] FILE...", countsAbout,
		"headroom counts --at 10x,50M --bootstrap 200 --report qc.html testdata/demo/qc-pass.counts.tsv")
	perUnit := c.flags(groupInputs).Bool("per-unit", false, "each FILE is one count per line per unit; the sample is named after the file")
	s := addShared(c, "yield:0.1")
	if help, err := c.parse(a, args); help || err != nil {
		return err
	}
	if err := s.check(); err != nil {
		return err
	}
	files := c.args()
	if len(files) == 0 {
		return c.usageErr("no input files")
	}
	if err := s.checkOutputs(files); err != nil {
		return err
	}
	var samples []sampleInput
	from := map[string]string{}
	stdinUsed := false
	for _, f := range files {
		if f == "-" {
			if stdinUsed {
				return c.usageErr("'-' (standard input) given twice")
			}
			stdinUsed = true
		}
		got, err := readCountsFile(a, f, *perUnit)
		if err != nil {
			return err
		}
		for _, g := range got {
			if prev, ok := from[g.name]; ok {
				return inputf(displayName(f), 0, "sample %q is also in %s; give each sample once, or add shards first with 'headroom merge'", g.name, displayName(prev))
			}
			from[g.name] = f
			samples = append(samples, g)
		}
	}
	return a.estimateAndWrite(s, runInfo{command: "counts", inputs: files}, samples)
}

// openInput opens a named input ('-' = stdin), refusing directories and
// missing files with a message that says what to do.
func openInput(a *app, f string) (io.ReadCloser, error) {
	if f == "-" {
		return io.NopCloser(a.stdin), nil
	}
	st, err := os.Stat(f)
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return nil, inputf(f, 0, "no such file; check the path")
		}
		return nil, inputf(f, 0, "cannot read: %v", unwrapPath(err))
	}
	if st.IsDir() {
		return nil, inputf(f, 0, "is a directory; give the file(s) inside it")
	}
	fh, err := os.Open(f)
	if err != nil {
		return nil, inputf(f, 0, "cannot open: %v", unwrapPath(err))
	}
	return fh, nil
}

func readCountsFile(a *app, f string, perUnit bool) ([]sampleInput, error) {
	r, err := openInput(a, f)
	if err != nil {
		return nil, err
	}
	defer r.Close()
	if perUnit {
		c, err := freqtable.ReadPerUnit(r)
		if err != nil {
			return nil, inputError(f, err)
		}
		name := "stdin"
		if f != "-" {
			name = strings.TrimSuffix(filepath.Base(f), filepath.Ext(f))
		}
		return []sampleInput{{name: name, counts: c}}, nil
	}
	got, err := freqtable.Read(r)
	if err != nil {
		return nil, inputError(f, err)
	}
	out := make([]sampleInput, len(got))
	for i, g := range got {
		out[i] = sampleInput{name: g.Name, counts: g.Counts}
	}
	return out, nil
}
