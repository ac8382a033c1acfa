package main

import (
	"fmt"
	"html/template"
	"math"
	"sort"
	"strings"
)

// Parts of the HTML report: the decision lines, the next-run section and
// the distribution table of runs with many samples.

// unitWord names what a command counts, for sentences.
func unitWord(command string) string {
	switch command {
	case "reads":
		return "molecules"
	case "taxa":
		return "taxa"
	}
	return "units"
}

// decisionLine says in words what the numbers mean for one sample: the
// duplicates now, what the first --at depth beyond this run would add,
// and where the first reach target is met, e.g. "LIB-03: 36% duplicates
// now; 10x the reads would add 2.7k molecules (+63%); yield:0.1 at about
// 25k reads".
func decisionLine(s *shared, command string, e estimated) string {
	r := e.rep
	var parts []string
	if !math.IsNaN(r.DupFraction) {
		parts = append(parts, percent(r.DupFraction)+" duplicates now")
	}
	// The depth people ask about most is 10x; else the first one beyond
	// this run.
	order := make([]int, 0, len(s.depths))
	for k, d := range s.depths {
		if d.multiple == 10 {
			order = append([]int{k}, order...)
		} else {
			order = append(order, k)
		}
	}
	for _, k := range order {
		d, p := s.depths[k], r.Predictions[k]
		if p.Reads <= float64(r.Reads) || math.IsNaN(p.Distinct) || r.Distinct == 0 {
			continue
		}
		gain := p.Distinct - float64(r.Distinct)
		what := d.label + " reads"
		if d.multiple > 0 {
			what = d.label + " the reads"
		}
		parts = append(parts, fmt.Sprintf("%s would add %s %s (%+.0f%%)", what, human(gain), unitWord(command), 100*gain/float64(r.Distinct)))
		break
	}
	for _, a := range e.reach {
		switch {
		case math.IsNaN(a.reads):
			parts = append(parts, a.spec.label+" not reached within 100x")
		case a.spec.kind == "yield":
			parts = append(parts, fmt.Sprintf("more reads stop paying (%s) at about %s reads", a.spec.label, human(a.reads)))
		default:
			parts = append(parts, fmt.Sprintf("%s at about %s reads", a.spec.label, human(a.reads)))
		}
		break
	}
	if len(parts) == 0 {
		parts = append(parts, "nothing to estimate")
	}
	return e.in.name + ": " + strings.Join(parts, "; ")
}

// planView is the plan as the report shows it.
type planView struct {
	Heading string
	Rows    [][]reportCell
	Bars    template.HTML
	Notes   []string
}

// planReport renders the plan table and an inline SVG bar chart of the
// next pool's shares.
func planReport(pl *plan) planView {
	v := planView{Heading: planText(pl)[:strings.Index(planText(pl), "\n")]}
	var svg strings.Builder
	const barH, gap, labelW, barW = 18, 6, 180, 600
	fmt.Fprintf(&svg, `<svg xmlns="http://www.w3.org/2000/svg" width="%d" height="%d" role="img" aria-label="share of the next pool per sample">`,
		labelW+barW+80, len(pl.rows)*(barH+gap)+gap)
	for i, r := range pl.rows {
		v.Rows = append(v.Rows, []reportCell{{Text: r.name, Class: "l"}, {Text: human(float64(r.readsNow))}, {Text: percent(r.shareNow)},
			{Text: human(float64(r.readsNext))}, {Text: percent(r.poolShare)}, intervalCell(r.distinctAfter, r.lo, r.hi),
			{Text: "+" + human(r.distinctAfter-float64(r.distinctNow))}, {Text: percent(r.dupAfter)}, {Text: r.action, Class: "l"}})
		y := gap + i*(barH+gap)
		w := 0.0
		if !math.IsNaN(r.poolShare) {
			w = r.poolShare * barW
		}
		fmt.Fprintf(&svg, `<text x="%d" y="%d" font-size="12" text-anchor="end">%s</text>`, labelW-6, y+barH-5, template.HTMLEscapeString(r.name))
		fmt.Fprintf(&svg, `<rect x="%d" y="%d" width="%.1f" height="%d" fill="#2f6f9f"/>`, labelW, y, w, barH)
		fmt.Fprintf(&svg, `<text x="%.1f" y="%d" font-size="12">%s</text>`, float64(labelW)+w+6, y+barH-5, percent(r.poolShare))
	}
	svg.WriteString("</svg>")
	v.Bars = template.HTML(svg.String())
	v.Notes = append(v.Notes, pl.legend())
	v.Notes = append(v.Notes, pl.notes...)
	for _, r := range pl.rows {
		for _, n := range r.notes {
			v.Notes = append(v.Notes, r.name+": "+n)
		}
	}
	return v
}

// reportMaxRows is how many samples the report lists one by one; past
// it (per-cell runs) the table shows their distribution.
const reportMaxRows = 100

// distributionHead and distributionRows are the summary table of a run
// with many samples: for each quantile over samples, the reads, the
// duplicate fraction, the distinct units and each --at prediction.
func distributionHead(s *shared) []reportHead {
	h := []reportHead{{Text: "over samples", Left: true}, {Text: "reads"}, {Text: "dup now"}, {Text: "distinct"}}
	for _, d := range s.depths {
		h = append(h, reportHead{Text: "distinct at " + d.label})
	}
	return h
}

func distributionRows(s *shared, est []estimated) [][]reportCell {
	cols := make([][]float64, 3+len(s.depths))
	for _, e := range est {
		r := e.rep
		cols[0] = append(cols[0], float64(r.Reads))
		cols[1] = append(cols[1], r.DupFraction)
		cols[2] = append(cols[2], float64(r.Distinct))
		for k, p := range r.Predictions[:len(s.depths)] {
			cols[3+k] = append(cols[3+k], p.Distinct)
		}
	}
	var rows [][]reportCell
	for _, q := range []struct {
		name string
		p    float64
	}{{"minimum", 0}, {"10%", 0.1}, {"median", 0.5}, {"90%", 0.9}, {"maximum", 1}} {
		row := []reportCell{{Text: q.name, Class: "l"}}
		for k, c := range cols {
			v := quantileOf(c, q.p)
			t := human(v)
			if k == 1 {
				t = percent(v)
			}
			row = append(row, reportCell{Text: t})
		}
		rows = append(rows, row)
	}
	return rows
}

// quantileOf is the p-quantile (nearest rank) of the values that are not
// missing; NaN when none is.
func quantileOf(v []float64, p float64) float64 {
	var x []float64
	for _, a := range v {
		if !math.IsNaN(a) {
			x = append(x, a)
		}
	}
	if len(x) == 0 {
		return math.NaN()
	}
	sort.Float64s(x)
	return x[int(math.Round(p*float64(len(x)-1)))]
}
