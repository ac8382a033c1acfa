package main

import (
	"bytes"
	"fmt"
	"html/template"
	"strconv"
	"strings"

	"gonum.org/v1/plot/vg"

	"headroom/complexity"
)

// reportTemplate is the self-contained HTML report: inline CSS and SVG, no
// scripts, no external assets, readable when printed.
const reportTemplate = `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>headroom report: {{.Title}}</title>
<style>
body { font-family: system-ui, -apple-system, "Segoe UI", Roboto, "DejaVu Sans", sans-serif; margin: 2em auto; max-width: 1200px; padding: 0 1em; color: #1d232a; line-height: 1.45; }
h1 { font-size: 1.5em; margin-bottom: 0.2em; }
h2 { font-size: 1.15em; margin-top: 1.8em; border-bottom: 1px solid #d4d9de; padding-bottom: 0.2em; }
.sub { color: #56606b; margin-top: 0; }
.verdicts { display: flex; gap: 0.8em; flex-wrap: wrap; margin: 1em 0; }
.chip { padding: 0.35em 0.8em; border-radius: 0.3em; font-weight: 600; border: 1px solid; }
.pass { background: #e3f1fb; border-color: #1b4f8a; color: #123a66; }
.warn { background: #fff1d6; border-color: #b36b00; color: #6e4200; }
.fail { background: #f9e0e6; border-color: #8c2d5a; color: #5c1639; }
.none { background: #eef0f2; border-color: #9aa3ad; color: #3b434c; }
table { border-collapse: collapse; font-size: 0.88em; margin: 0.5em 0; }
th, td { border: 1px solid #d4d9de; padding: 0.3em 0.55em; text-align: right; white-space: nowrap; }
th { background: #f3f5f7; }
td.l, th.l { text-align: left; }
td.v { font-weight: 700; text-align: center; }
.scroll { overflow-x: auto; }
.plot svg { width: 100%; height: auto; max-width: 1100px; }
.caution { background: #fbf7ea; border-left: 4px solid #b36b00; padding: 0.6em 1em; }
dl.settings { display: grid; grid-template-columns: max-content auto; gap: 0.15em 1.2em; }
dl.settings dt { color: #56606b; }
dl.settings dd { margin: 0; font-family: ui-monospace, "DejaVu Sans Mono", monospace; }
ul.notes li { margin-bottom: 0.3em; }
.small { font-size: 0.85em; color: #56606b; }
</style>
</head>
<body>
<h1>headroom report: {{.Title}}</h1>
<p class="sub">{{.Count}} sample(s) from <code>headroom {{.Command}}</code>, version {{.Version}}. Gates at {{.TargetText}}.</p>
<div class="verdicts">
{{range .Tally}}<span class="chip {{.Class}}">{{.Label}}: {{.N}}</span>
{{end}}</div>
<p class="caution"><strong>Caution.</strong> These predictions are estimates that assume deeper sequencing draws reads at random from the same library as this run. A re-prepared library, another protocol, contamination or lane effects are outside what they can know. Where they inform decisions about clinical samples, local laboratory procedures and accredited QC rules prevail.</p>

<h2>Summary</h2>
<div class="scroll"><table>
<tr>{{range .Header}}<th{{if .Left}} class="l"{{end}}>{{.Text}}</th>{{end}}</tr>
{{range .Rows}}<tr>{{range .}}<td{{if .Class}} class="{{.Class}}"{{end}}>{{.Text}}</td>{{end}}</tr>
{{end}}</table></div>

<h2>Saturation curves</h2>
<div class="plot">{{.Plot}}</div>
{{if .PlotNote}}<p class="small">{{.PlotNote}}.</p>{{end}}
<p class="small">Solid: exact rarefaction below the observed depth (dot). Dashed: extrapolation. Shaded: the {{.Level}} interval.</p>

{{if .RunNotes}}<h2>Notes on the whole run</h2>
<ul class="notes">
{{range .RunNotes}}<li>{{.}}</li>
{{end}}</ul>
{{end}}
<h2>Notes per sample</h2>
<ul class="notes">
{{range .Notes}}<li><strong>{{.Name}}</strong> ({{.Verdict}}): {{.Text}}</li>
{{else}}<li>No notes.</li>
{{end}}</ul>

<h2>Settings</h2>
<dl class="settings">
{{range .Settings}}<dt>{{.K}}</dt><dd>{{.V}}</dd>
{{end}}</dl>

<h2>Methods</h2>
<p>For each sample headroom counts how many distinct units were seen exactly <i>j</i> times (<i>n<sub>j</sub></i>). Below the observed depth the curve is exact rarefaction without replacement (Hurlbert 1971) with its variance (Heck, van Belle &amp; Simberloff 1975). Above it the expected new units follow the Good–Toulmin series (Good &amp; Toulmin 1956), which diverges beyond twice the observed depth; headroom stabilises it by rational-function (Padé) approximation in continued-fraction form computed by the quotient–difference algorithm (Rutishauser 1954; Baker &amp; Graves-Morris 1996) and weighs it against Poisson-mixture fits (zero-truncated negative binomial; Poisson–lognormal) by admissibility and by a self-backtest: the observed counts are thinned to 10% of the reads, refitted, and asked to predict what was observed (column <code>backtest_error</code>). The method column names what was used. Intervals come from a bootstrap of the units (seeded, reproducible). Totals are the curve's limit where it is bounded, otherwise Chao1 bias-corrected with its log-normal interval (Chao 1984, 1987); sample coverage is the Chao &amp; Jost (2012) estimate.</p>
<p class="small">References: Good IJ, Toulmin GH (1956) Biometrika 43:45–63. Hurlbert SH (1971) Ecology 52:577–586. Heck KL, van Belle G, Simberloff D (1975) Ecology 56:1459–1461. Rutishauser H (1954) ZAMP 5:233–251. Baker GA, Graves-Morris P (1996) Padé Approximants, 2nd ed., Cambridge. Chao A (1984) Scand J Stat 11:265–270. Chao A (1987) Biometrics 43:783–791. Chao A, Lee SM (1992) JASA 87:210–217. Shen TJ, Chao A, Lin CF (2003) Ecology 84:798–804. Chao A, Jost L (2012) Ecology 93:2533–2547. Lander ES, Waterman MS (1988) Genomics 2:231–239.</p>
</body>
</html>
`

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
func renderReport(s *shared, info runInfo, est []estimated) ([]byte, error) {
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
		row = append(row, reportCell{Text: methodText(r), Class: "l"}, reportCell{Text: pct(r.BacktestError)})
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
