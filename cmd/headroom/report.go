package main

import (
	"bytes"
	_ "embed"
	"fmt"
	"html/template"
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
