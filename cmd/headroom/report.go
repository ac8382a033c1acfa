package main

import (
	"bytes"
	_ "embed"
	"fmt"
	"html/template"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/plot/vg"

	"headroom/complexity"
)

// reportTemplate is the self-contained HTML report: inline CSS and SVG, no
// scripts, no external assets, readable when printed.
//
//go:embed report.html
var reportTemplate string

type reportCell struct {
	Text  string
	Sub   string // a second, smaller line (an interval)
	Class string
}

type reportHead struct {
	Text string
	Left bool
}

type reportKV struct{ K, V string }

type reportNote struct{ Name, Verdict, Text string }

type reportTally struct {
	Label, Class string
	N            int
}

// renderReport builds the HTML page.
func renderReport(s *shared, info runInfo, est []estimated, pl *plan) ([]byte, error) {
	var svg bytes.Buffer
	note, err := drawPlot(&svg, ".svg", s, est, 10*vg.Inch, 6*vg.Inch)
	if err != nil {
		return nil, err
	}
	plotSVG := svg.String()
	if i := strings.Index(plotSVG, "<svg"); i > 0 {
		plotSVG = plotSVG[i:] // drop the XML prolog: inline SVG has none
	}

	// The page shows the columns a person decides by, verdict first, and
	// fits a 1,300 px page; the TSV/JSON summary has them all.
	head := []reportHead{{Text: "sample", Left: true}, {Text: "verdict"}, {Text: "reads"}, {Text: "dup now"},
		{Text: "distinct"}, {Text: "total"}}
	for _, d := range s.depths {
		head = append(head, reportHead{Text: "distinct at " + d.label})
	}
	for _, r := range s.reaches {
		head = append(head, reportHead{Text: "reads to " + r.label})
	}
	head = append(head, reportHead{Text: "method", Left: true}, reportHead{Text: "backtest"})
	var rows [][]reportCell
	counts := map[complexity.Verdict]int{}
	var notes []reportNote
	var decisions []string
	for _, e := range est {
		r := e.rep
		v := string(r.Verdict)
		if v == "" {
			v = "—"
		}
		row := []reportCell{{Text: e.in.name, Class: "l"}, {Text: v, Class: "v " + verdictClass(r.Verdict)},
			{Text: human(float64(r.Reads))}, {Text: percent(r.DupFraction)}, {Text: human(float64(r.Distinct))},
			intervalCell(r.Total, r.TotalLo, r.TotalHi)}
		for _, p := range r.Predictions[:len(s.depths)] {
			row = append(row, intervalCell(p.Distinct, p.Lo, p.Hi))
		}
		for _, a := range e.reach {
			row = append(row, intervalCell(a.reads, a.lo, a.hi))
		}
		row = append(row, reportCell{Text: string(r.Method), Class: "l"}, reportCell{Text: pct(r.BacktestError)})
		rows = append(rows, row)
		counts[r.Verdict]++
		if all := sampleNotes(e); len(all) > 0 {
			v := string(r.Verdict)
			if v == "" {
				v = "no gates"
			}
			notes = append(notes, reportNote{Name: e.in.name, Verdict: v, Text: strings.Join(all, "; ")})
		}
		decisions = append(decisions, decisionLine(s, info.command, e))
	}
	var tally []reportTally
	for _, v := range []complexity.Verdict{complexity.VerdictFail, complexity.VerdictWarn, complexity.VerdictPass, complexity.VerdictNone} {
		if counts[v] == 0 {
			continue
		}
		label := string(v)
		if v == complexity.VerdictNone {
			label = "no gate set"
		}
		tally = append(tally, reportTally{Label: label, Class: verdictClass(v), N: counts[v]})
	}

	target := "the first --at depth"
	if s.targetDepth != nil {
		target = s.targetDepth.label
	} else if len(s.depths) > 0 {
		target = s.depths[0].label
	}
	settings := []reportKV{
		{"inputs", strings.Join(info.inputs, " ")},
		{"--at", strings.Join(s.at, ",")},
		{"--bootstrap", fmt.Sprint(s.bootstrap)},
		{"--seed", fmt.Sprint(s.seed)},
		{"--level", fmt.Sprint(s.level)},
		{"--target", target},
		{"--max-dup", gateText(s.maxDup)},
		{"--min-distinct", gateText(s.minDistinct)},
		{"--min-coverage", gateText(s.minCoverage)},
		{"--reach", strings.Join(s.reach, ",")},
	}
	if pl != nil {
		settings = append(settings, reportKV{"--budget", s.budget}, reportKV{"--plan-goal", s.planGoal})
		if s.pool != "" {
			settings = append(settings, reportKV{"--pool", s.pool})
		}
	}
	settings = append(settings, info.settings...)
	title := "run"
	if len(info.inputs) == 1 {
		title = info.inputs[0]
	} else if len(info.inputs) > 1 {
		title = fmt.Sprintf("%s and %d more", info.inputs[0], len(info.inputs)-1)
	}
	data := map[string]any{
		"Title": title, "Count": len(est), "Command": info.command, "Version": toolVersion(),
		"TargetText": target, "Tally": tally, "Header": head, "Rows": rows,
		"Plot": template.HTML(plotSVG), "PlotNote": note, "Level": fmt.Sprintf("%.0f%%", s.level*100),
		"Notes": notes, "Settings": settings, "RunNotes": info.notes, "Decisions": decisions,
	}
	if len(est) > reportMaxRows {
		// Thousands of cells or samples: the page summarises their
		// distribution and shows the verdicts that need a look; the TSV
		// and JSON have every row.
		data["Rows"] = distributionRows(s, est)
		data["Header"] = distributionHead(s)
		data["Many"] = fmt.Sprintf("%d samples: the table shows how they are distributed (quantiles over samples), the decision lines and notes the first %d; every sample is in the TSV or JSON summary.", len(est), reportMaxRows)
		if len(decisions) > reportMaxRows {
			data["Decisions"] = decisions[:reportMaxRows]
		}
		if len(notes) > reportMaxRows {
			data["Notes"] = notes[:reportMaxRows]
		}
	}
	if pl != nil {
		data["Plan"] = planReport(pl)
	}
	t, err := template.New("report").Parse(reportTemplate)
	if err != nil {
		return nil, err
	}
	var b bytes.Buffer
	if err := t.Execute(&b, data); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
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

// intervalCell shows a value with its interval on a second, smaller line,
// so that a wide table still fits the page.
func intervalCell(v, lo, hi float64) reportCell {
	full := withInterval(v, lo, hi)
	val, iv, ok := strings.Cut(full, " (")
	if !ok {
		return reportCell{Text: full}
	}
	return reportCell{Text: val, Sub: strings.TrimSuffix(iv, ")")}
}

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

func verdictClass(v complexity.Verdict) string {
	switch v {
	case complexity.VerdictPass, complexity.VerdictWarn, complexity.VerdictFail:
		return string(v)
	}
	return "none"
}

func gateText(v float64) string {
	if v != v { // NaN: unset
		return "not set"
	}
	return fmt.Sprint(v)
}
