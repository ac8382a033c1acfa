package main

import (
	"bytes"
	"fmt"
	"strings"
	"unicode/utf8"
)

// textWidth is the widest line the text view writes: a terminal of 150
// columns shows it without wrapping.
const textWidth = 150

// textNameMax bounds the sample column; longer names are cut with "…"
// (the TSV and JSON keep them whole).
const textNameMax = 28

// writeText renders the summary for people (--format text): an aligned
// table of the columns read first (sample, reads, duplicates and distinct
// now, each --at depth with its interval, each reach target, verdict),
// numbers in human units, notes as numbered footnotes said once, then the
// plan when there is one.
func writeText(s *shared, info runInfo, est []estimated, pl *plan) []byte {
	var b bytes.Buffer
	fmt.Fprintf(&b, "headroom %s: %d sample(s)", info.command, len(est))
	if s.bootstrap > 0 {
		fmt.Fprintf(&b, ", intervals at %.0f%%", 100*s.level)
	} else {
		b.WriteString(", no intervals (--bootstrap 0)")
	}
	b.WriteString("\n\n")

	notes := footnotes{}
	for _, n := range info.notes {
		notes.number(n)
	}
	head := []string{"sample", "reads", "dup", "distinct"}
	right := []bool{false, true, true, true}
	for _, d := range s.depths {
		head = append(head, d.label)
		right = append(right, true)
	}
	for _, r := range s.reaches {
		head = append(head, "reads to "+r.label)
		right = append(right, true)
	}
	head = append(head, "verdict", "notes")
	right = append(right, false, false)
	rows := make([][]string, len(est))
	short := make([][]string, len(est)) // the same without intervals
	for i, e := range est {
		r := e.rep
		row := []string{cutName(e.in.name), human(float64(r.Reads)), percent(r.DupFraction), human(float64(r.Distinct))}
		sh := append([]string(nil), row...)
		for _, p := range r.Predictions[:len(s.depths)] {
			row = append(row, withInterval(p.Distinct, p.Lo, p.Hi))
			sh = append(sh, human(p.Distinct))
		}
		for _, a := range e.reach {
			row = append(row, withInterval(a.reads, a.lo, a.hi))
			sh = append(sh, human(a.reads))
		}
		v := string(r.Verdict)
		var marks []string
		for _, n := range sampleNotes(e) {
			marks = append(marks, fmt.Sprint(notes.number(n)))
		}
		m := ""
		if len(marks) > 0 {
			m = "[" + strings.Join(marks, ",") + "]"
		}
		rows[i] = append(row, v, m)
		short[i] = append(sh, v, m)
	}
	table := alignTable(head, rows, right)
	if maxLineWidth(table) > textWidth {
		table = alignTable(head, short, right)
		fmt.Fprintf(&b, "(intervals left out to fit %d columns; they are in --format tsv or json)\n", textWidth)
	}
	b.WriteString(table)
	if len(notes.list) > 0 {
		b.WriteString("\nnotes:\n")
		for k, n := range notes.list {
			b.WriteString(wrapNote(fmt.Sprintf("[%d] ", k+1), n))
		}
	}
	if pl != nil {
		b.WriteString("\n")
		b.WriteString(planText(pl))
	}
	return b.Bytes()
}

// planText renders the plan for people, after the summary.
func planText(pl *plan) string {
	var b strings.Builder
	goal := "the most distinct units for the pool"
	if pl.goal == "reach" {
		goal = "each sample to " + pl.target
	}
	fmt.Fprintf(&b, "next run: %s reads for the pool, for %s\n\n", human(float64(pl.budget)), goal)
	head := []string{"sample", "reads now", "reads next", "pool share", "distinct after", "gain", "dup after", "action"}
	right := []bool{false, true, true, true, true, true, true, false}
	var rows [][]string
	for _, r := range pl.rows {
		rows = append(rows, []string{cutName(r.name), human(float64(r.readsNow)), human(float64(r.readsNext)), percent(r.poolShare),
			withInterval(r.distinctAfter, r.lo, r.hi), "+" + human(r.distinctAfter-float64(r.distinctNow)), percent(r.dupAfter), r.action})
	}
	b.WriteString(alignTable(head, rows, right))
	var notes []string
	notes = append(notes, pl.notes...)
	for _, r := range pl.rows {
		for _, n := range r.notes {
			notes = append(notes, r.name+": "+n)
		}
	}
	for _, n := range notes {
		b.WriteString(wrapNote("  - ", n))
	}
	return b.String()
}

// footnotes numbers notes in the order first seen, each text once.
type footnotes struct {
	list []string
	num  map[string]int
}

func (f *footnotes) number(n string) int {
	if f.num == nil {
		f.num = map[string]int{}
	}
	if k, ok := f.num[n]; ok {
		return k
	}
	f.list = append(f.list, n)
	f.num[n] = len(f.list)
	return len(f.list)
}

func cutName(s string) string {
	if utf8.RuneCountInString(s) <= textNameMax {
		return s
	}
	r := []rune(s)
	return string(r[:textNameMax-1]) + "…"
}

// alignTable pads columns to their widest cell (in runes), numbers to the
// right.
func alignTable(head []string, rows [][]string, right []bool) string {
	w := make([]int, len(head))
	for k, h := range head {
		w[k] = utf8.RuneCountInString(h)
	}
	for _, r := range rows {
		for k, c := range r {
			w[k] = max(w[k], utf8.RuneCountInString(c))
		}
	}
	var b strings.Builder
	line := func(cells []string) {
		var l strings.Builder
		for k, c := range cells {
			if k > 0 {
				l.WriteString("  ")
			}
			pad := strings.Repeat(" ", w[k]-utf8.RuneCountInString(c))
			if right[k] {
				l.WriteString(pad + c)
			} else {
				l.WriteString(c + pad)
			}
		}
		b.WriteString(strings.TrimRight(l.String(), " ") + "\n")
	}
	line(head)
	for _, r := range rows {
		line(r)
	}
	return b.String()
}

func maxLineWidth(s string) int {
	m := 0
	for _, l := range strings.Split(s, "\n") {
		m = max(m, utf8.RuneCountInString(l))
	}
	return m
}

// wrapNote wraps a note to the text width, continuation lines indented
// under the first word after the mark.
func wrapNote(mark, text string) string {
	var b strings.Builder
	indent := strings.Repeat(" ", utf8.RuneCountInString(mark))
	line := mark
	n := utf8.RuneCountInString(line)
	for _, word := range strings.Fields(text) {
		wl := utf8.RuneCountInString(word)
		if n > len(indent) && n+1+wl > textWidth {
			b.WriteString(line + "\n")
			line, n = indent, len(indent)
		}
		if n > len(indent) {
			line += " "
			n++
		}
		line += word
		n += wl
	}
	b.WriteString(line + "\n")
	return b.String()
}
