package main

import (
	"bytes"
	_ "embed"
	"fmt"
	"html/template"
	"strconv"
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

	// The page shows the columns a person decides by, verdict first; the
	// TSV/JSON summary has them all.
	head := []reportHead{{Text: "sample", Left: true}, {Text: "verdict"}, {Text: "reads"}, {Text: "distinct"},
		{Text: "dup fraction"}, {Text: "coverage"}, {Text: "total (interval)"}, {Text: "saturation"}}
	for _, d := range s.depths {
		head = append(head, reportHead{Text: "distinct at " + d.label + " (interval)"}, reportHead{Text: "dup at " + d.label})
	}
	head = append(head, reportHead{Text: "method", Left: true}, reportHead{Text: "backtest error"})
	interval := func(v, lo, hi float64) string {
		t := human(v)
		if l, h := human(lo), human(hi); t != "" && l != "" && h != "" {
			t += " (" + l + " – " + h + ")"
		}
		return t
	}
	var rows [][]reportCell
	counts := map[complexity.Verdict]int{}
	var notes []reportNote
	for _, e := range est {
		r := e.rep
		v := string(r.Verdict)
		if v == "" {
			v = "—"
		}
		row := []reportCell{{Text: e.in.name, Class: "l"}, {Text: v, Class: "v " + verdictClass(r.Verdict)},
			{Text: human(float64(r.Reads))}, {Text: human(float64(r.Distinct))}, {Text: frac3(r.DupFraction)},
			{Text: frac3(r.SampleCoverage)}, {Text: interval(r.Total, r.TotalLo, r.TotalHi)}, {Text: frac3(r.Saturation)}}
		for _, p := range r.Predictions {
			row = append(row, reportCell{Text: interval(p.Distinct, p.Lo, p.Hi)}, reportCell{Text: frac3(p.DupFraction)})
		}
		row = append(row, reportCell{Text: r.Method, Class: "l"}, reportCell{Text: pct(r.BacktestError)})
		rows = append(rows, row)
		counts[r.Verdict]++
		all := append(append([]string(nil), e.in.notes...), r.Notes...)
		if len(all) > 0 {
			v := string(r.Verdict)
			if v == "" {
				v = "no gates"
			}
			notes = append(notes, reportNote{Name: e.in.name, Verdict: v, Text: strings.Join(all, "; ")})
		}
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
		"Notes": notes, "Settings": settings, "RunNotes": info.notes,
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

// human writes a count for people (report cells, plot ticks): three
// significant digits with k/M/G, trailing zeros dropped: 500, 20k, 1.5M,
// 2.33M, 3G.
func human(v float64) string {
	if v != v || v > 1e300 || v < -1e300 {
		return ""
	}
	if v < 1e4 && v > -1e4 {
		return fmt.Sprintf("%.0f", v)
	}
	for _, u := range []struct {
		d   float64
		suf string
	}{{1e9, "G"}, {1e6, "M"}, {1e3, "k"}} {
		if v >= 0.9995*u.d || v <= -0.9995*u.d {
			x := v / u.d
			prec := 2
			switch {
			case x >= 100 || x <= -100:
				prec = 0
			case x >= 10 || x <= -10:
				prec = 1
			}
			t := strconv.FormatFloat(x, 'f', prec, 64)
			if strings.Contains(t, ".") {
				t = strings.TrimRight(strings.TrimRight(t, "0"), ".")
			}
			return t + u.suf
		}
	}
	return fmt.Sprint(v)
}

// frac3 writes a fraction with three decimals.
func frac3(v float64) string {
	if v != v {
		return ""
	}
	return fmt.Sprintf("%.3f", v)
}

// pct writes a signed relative error as a percentage.
func pct(v float64) string {
	if v != v {
		return ""
	}
	return fmt.Sprintf("%+.1f%%", 100*v)
}
