package main

import (
	"bytes"
	"crypto/sha256"
	"fmt"
	"io"
	"sort"
	"strings"

	"headroom/complexity"
	"headroom/internal/freqtable"
)

func init() {
	register(subcommand{name: "merge", summary: "add frequency-count tables of shards of the same samples", run: runMerge})
}

const mergeAbout = `Adds frequency-count tables (sample<TAB>times_seen<TAB>units) of shards of the
same samples, for example one table per chromosome written with --save-counts:
units of equal (sample, times_seen) are summed. This is exact only when every
molecule falls in exactly one shard: scatter by chromosome with whole pairs.
Lanes of one library are not such shards (one molecule is read on several
lanes): count them together instead. Shards may be gzip-compressed.

It refuses inputs that look like different runs: a file whose samples differ
from the first file's (unless --partial), or the same shard given twice.

Writes one frequency-count table to stdout or -o FILE (atomically).`

func runMerge(a *app, args []string) error {
	c := newCommand("merge", "headroom merge [flags] FILE...", mergeAbout,
		"headroom merge -o lib.counts.tsv chr1.counts.tsv chr2.counts.tsv chrX.counts.tsv",
		"headroom counts --max-dup 0.5 --target 100M --strict lib.counts.tsv")
	partial := c.flags(groupInputs).Bool("partial", false, "allow shards that hold different sets of samples")
	output := c.flags(groupOutputs).StringP("output", "o", "", "write the merged table to `FILE` (default stdout), atomically")
	if help, err := c.parse(a, args); help || err != nil {
		return err
	}
	files := c.args()
	if len(files) == 0 {
		return c.usageErr("no input files")
	}
	if err := checkOutputs([][2]string{{"-o", *output}}, files); err != nil {
		return err
	}
	var (
		order    []string
		sums     = map[string]complexity.Counts{}
		first    map[string]bool
		seenHash = map[[32]byte]string{}
	)
	for i, f := range files {
		r, err := openInput(a, f)
		if err != nil {
			return err
		}
		hash := sha256.New()
		got, err := freqtable.Read(io.TeeReader(r, hash))
		r.Close()
		if err != nil {
			return inputError(f, err)
		}
		var h [32]byte
		copy(h[:], hash.Sum(nil))
		if prev, ok := seenHash[h]; ok {
			return inputf(displayName(f), 0, "identical to %s: the same shard given twice would count its molecules twice", displayName(prev))
		}
		seenHash[h] = f
		names := map[string]bool{}
		for _, s := range got {
			names[s.Name] = true
			prev, ok := sums[s.Name]
			if !ok {
				order = append(order, s.Name)
				sums[s.Name] = s.Counts
				continue
			}
			sum, err := prev.Add(s.Counts)
			if err != nil {
				return inputf(displayName(f), 0, "sample %q: merged reads overflow 64-bit integers", s.Name)
			}
			sums[s.Name] = sum
		}
		if i == 0 {
			first = names
			continue
		}
		if !*partial {
			if extra, missing := setDiff(names, first), setDiff(first, names); len(extra)+len(missing) > 0 {
				var why []string
				if len(missing) > 0 {
					why = append(why, "lacks "+quoteList(missing))
				}
				if len(extra) > 0 {
					why = append(why, "has "+quoteList(extra)+" not in "+displayName(files[0]))
				}
				return inputf(displayName(f), 0, "looks like a different run than %s: it %s; use --partial if shards really hold different samples",
					displayName(files[0]), strings.Join(why, " and "))
			}
		}
	}
	out := make([]freqtable.Sample, 0, len(order))
	for _, n := range order {
		out = append(out, freqtable.Sample{Name: n, Counts: sums[n]})
	}
	var b bytes.Buffer
	freqtable.Write(&b, out) // to memory: cannot fail
	var o outputs
	o.add(*output, b.Bytes())
	if err := refuseOverwritingInputs(o.files, files); err != nil {
		return err
	}
	return o.commit(a.stdout)
}

func setDiff(a, b map[string]bool) []string {
	var d []string
	for k := range a {
		if !b[k] {
			d = append(d, k)
		}
	}
	sort.Strings(d)
	return d
}

func quoteList(s []string) string {
	const show = 3
	q := make([]string, 0, show)
	for i, x := range s {
		if i == show {
			q = append(q, fmt.Sprintf("and %d more", len(s)-show))
			break
		}
		q = append(q, fmt.Sprintf("%q", x))
	}
	return "sample(s) " + strings.Join(q, ", ")
}
