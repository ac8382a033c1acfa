package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"headroom/complexity"
	"headroom/internal/freqtable"
	"math"
	"strconv"
	"strings"
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

// readsCell formats a depth answered by a reach target: whole reads.
func readsCell(v float64) cell {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nullCell
	}
	t := strconv.FormatFloat(math.Ceil(v), 'f', 0, 64)
	return cell{t, t}
}

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

// summaryKeys returns the summary column names in DESIGN order for the
// given extra keys (inserted before method) and --at labels.
func summaryKeys(extra []string) []string {
	keys := []string{"sample", "reads", "distinct", "dup_fraction", "singletons", "doubletons",
		"sample_coverage", "marginal_yield", "total_est", "total_lo", "total_hi", "total_method", "saturation"}
	keys = append(keys, extra...)
	return append(keys, "method", "backtest_error", "verdict", "notes")
}

// summaryCells returns the cells of summaryKeys for one sample.
func summaryCells(e estimated) []cell {
	r := e.rep
	c := []cell{strCell(e.in.name), intCell(r.Reads), intCell(r.Distinct), fracCell(r.DupFraction),
		intCell(r.Singletons), intCell(r.Doubletons), fracCell(r.SampleCoverage), fracCell(r.MarginalYield),
		countCell(r.Total), countCell(r.TotalLo), countCell(r.TotalHi), optStrCell(r.TotalMethod), fracCell(r.Saturation)}
	for _, x := range e.in.extra {
		c = append(c, x.value)
	}
	method := optStrCell(string(r.Method))
	verdict := nullCell
	if r.Verdict != complexity.VerdictNone {
		verdict = strCell(string(r.Verdict))
	}
	return append(c, method, fracCell(r.BacktestError), verdict, notesCell(sampleNotes(e)))
}

// optStrCell is text, or missing when empty.
func optStrCell(s string) cell {
	if s == "" {
		return nullCell
	}
	return strCell(s)
}

// notesCell holds a list of notes: joined by "; " in TSV (one cell), a
// JSON array of strings (empty when there are none).
func notesCell(notes []string) cell {
	c := cell{json: "[]"}
	if len(notes) == 0 {
		return c
	}
	clean := make([]string, len(notes))
	for i, n := range notes {
		clean[i] = freqtable.CleanName(n)
	}
	c.tsv = strings.Join(clean, "; ")
	j, _ := json.Marshal(clean)
	c.json = string(j)
	return c
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
	for _, r := range s.reaches {
		c := r.column()
		keys = append(keys, c, "lo_"+c, "hi_"+c)
	}
	b.WriteString(strings.Join(keys, "\t"))
	b.WriteByte('\n')
	for _, e := range samples {
		cells := summaryCells(e)
		for _, p := range e.rep.Predictions[:len(s.depths)] {
			cells = append(cells, countCell(p.Distinct), countCell(p.Lo), countCell(p.Hi), fracCell(p.DupFraction))
		}
		for _, r := range e.reach {
			cells = append(cells, readsCell(r.reads), readsCell(r.lo), readsCell(r.hi))
		}
		writeTSVRow(&b, cells)
	}
	return b.Bytes()
}

// writeTSVRow writes one row of cells, tab-separated.
func writeTSVRow(b *bytes.Buffer, cells []cell) {
	for i, c := range cells {
		if i > 0 {
			b.WriteByte('\t')
		}
		b.WriteString(c.tsv)
	}
	b.WriteByte('\n')
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
		for k, p := range e.rep.Predictions[:len(s.depths)] {
			if k > 0 {
				b.WriteByte(',')
			}
			label, _ := json.Marshal(s.depths[k].label)
			fmt.Fprintf(&b, "{\"label\":%s,\"reads\":%s,\"distinct\":%s,\"lo\":%s,\"hi\":%s,\"dup_fraction\":%s}",
				label, countCell(p.Reads).json, countCell(p.Distinct).json, countCell(p.Lo).json,
				countCell(p.Hi).json, fracCell(p.DupFraction).json)
		}
		b.WriteString("],\"reach\":[")
		for k, r := range e.reach {
			if k > 0 {
				b.WriteByte(',')
			}
			label, _ := json.Marshal(r.spec.label)
			fmt.Fprintf(&b, "{\"target\":%s,\"reads\":%s,\"lo\":%s,\"hi\":%s}", label,
				readsCell(r.reads).json, readsCell(r.lo).json, readsCell(r.hi).json)
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

// sampleNotes are every note on one sample: the reader's, the
// estimator's, then the reach targets'.
func sampleNotes(e estimated) []string {
	all := append(append([]string(nil), e.in.notes...), e.rep.Notes...)
	for _, r := range e.reach {
		if r.note != "" {
			all = append(all, r.note)
		}
	}
	return all
}
