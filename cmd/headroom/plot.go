package main

import (
	"bytes"
	"fmt"
	"image/color"
	"math"
	"path/filepath"
	"sort"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"

	"headroom/complexity"
)

// palette is our own set of eight hues chosen to stay apart for the common
// colour-vision deficiencies (no red/green pair at equal lightness; the
// lightness alternates dark/light along the list) and in greyscale print.
var palette = []color.NRGBA{
	{0x1b, 0x4f, 0x8a, 0xff}, // deep blue
	{0xe6, 0x8a, 0x00, 0xff}, // amber
	{0x4c, 0xa3, 0xdd, 0xff}, // sky
	{0x8c, 0x2d, 0x5a, 0xff}, // plum
	{0x2e, 0x8b, 0x6e, 0xff}, // sea green
	{0xd9, 0x5f, 0x3b, 0xff}, // brick
	{0x6b, 0x5b, 0xa8, 0xff}, // violet
	{0x55, 0x55, 0x55, 0xff}, // slate
}

// plotFromFraction is where curves start, as a share of each sample's
// depth; plotLogYRatio is the spread of curve heights beyond which the y
// axis turns logarithmic.
const (
	plotFromFraction = 0.02
	plotLogYRatio    = 30
)

// plotMaxCurves is how many samples one plot shows before it becomes a
// tangle; beyond it the plot shows a spread of samples and says so.
const plotMaxCurves = 8

// plotSubset picks which samples to draw: all when few, otherwise samples
// spread evenly over the order of their total estimate (so the least and
// most complex libraries are both shown), in input order.
func plotSubset(est []estimated) (idx []int, note string) {
	var usable []int
	for i, e := range est {
		if len(e.rep.Points) > 0 && e.rep.Reads > 0 {
			usable = append(usable, i)
		}
	}
	if len(usable) <= plotMaxCurves {
		return usable, ""
	}
	// Sort usable by distinct at the deepest point; take evenly spaced ranks.
	key := func(i int) float64 {
		p := est[i].rep.Points
		v := p[len(p)-1].Distinct
		if math.IsNaN(v) {
			return float64(est[i].rep.Distinct)
		}
		return v
	}
	sorted := append([]int(nil), usable...)
	sort.SliceStable(sorted, func(a, b int) bool { return key(sorted[a]) < key(sorted[b]) })
	pick := map[int]bool{}
	for k := 0; k < plotMaxCurves; k++ {
		pick[sorted[k*(len(sorted)-1)/(plotMaxCurves-1)]] = true
	}
	for _, i := range usable {
		if pick[i] {
			idx = append(idx, i)
		}
	}
	return idx, fmt.Sprintf("showing %d of %d samples, spread over their complexity", len(idx), len(usable))
}

// depthTicks labels a log axis in reads with k/M/G suffixes.
type depthTicks struct{}

func (depthTicks) Ticks(min, max float64) []plot.Tick {
	var ts []plot.Tick
	for e := math.Floor(math.Log10(min)); e <= math.Ceil(math.Log10(max)); e++ {
		for _, m := range []float64{1, 2, 5} {
			v := m * math.Pow(10, e)
			if v < min*0.999 || v > max*1.001 {
				continue
			}
			label := ""
			if m == 1 || (max/min < 1e3) {
				label = human(v)
			}
			ts = append(ts, plot.Tick{Value: v, Label: label})
		}
	}
	return ts
}

// countTicks labels a linear axis of distinct units with k/M suffixes.
type countTicks struct{}

func (countTicks) Ticks(min, max float64) []plot.Tick {
	ts := plot.DefaultTicks{}.Ticks(min, max)
	for i := range ts {
		if ts[i].Label != "" {
			ts[i].Label = human(ts[i].Value)
		}
	}
	return ts
}

// renderPlot draws the saturation plot of the samples and encodes it as
// SVG or PNG by the file's extension.
func renderPlot(path string, s *shared, est []estimated) ([]byte, string, error) {
	ext := strings.ToLower(filepath.Ext(path))
	if ext != ".svg" && ext != ".png" {
		return nil, "", usagef("--plot %s: use a file name ending in .svg or .png", path)
	}
	var b bytes.Buffer
	note, err := drawPlot(&b, ext, s, est, 9*vg.Inch, 5.5*vg.Inch)
	return b.Bytes(), note, err
}

// drawPlot renders into w; format is ".svg" or ".png".
func drawPlot(w *bytes.Buffer, format string, s *shared, est []estimated, width, height vg.Length) (string, error) {
	idx, note := plotSubset(est)
	p := plot.New()
	p.Title.Text = "Expected distinct units by sequencing depth"
	if note != "" {
		p.Title.Text += " (" + note + ")"
	}
	p.Title.TextStyle.Font.Size = vg.Points(12)
	p.X.Label.Text = "reads (log scale)"
	p.Y.Label.Text = "distinct units"
	p.X.Scale = plot.LogScale{}
	p.X.Tick.Marker = depthTicks{}
	p.Y.Tick.Marker = countTicks{}
	p.Add(plotter.NewGrid())

	// The curves start at plotFromFraction of each sample's depth: the
	// shallowest part of a rarefaction curve tells nothing. Libraries of
	// very different size get a log y axis: a linear one would flatten the
	// small ones onto zero.
	peakMin, peakMax, floor := math.Inf(1), 0.0, math.Inf(1)
	for _, i := range idx {
		peak := 0.0
		for _, pt := range est[i].rep.Points {
			if !math.IsNaN(pt.Distinct) && pt.Reads >= plotFromFraction*float64(est[i].rep.Reads) {
				peak = math.Max(peak, pt.Distinct)
				floor = math.Min(floor, math.Max(1, pt.Distinct))
			}
		}
		peakMin, peakMax = math.Min(peakMin, peak), math.Max(peakMax, peak)
	}
	logY := peakMin > 0 && !math.IsInf(peakMin, 1) && peakMax/peakMin > plotLogYRatio
	yfloor := 0.0
	if logY {
		yfloor = floor / 1.5
	}
	clampY := func(v float64) float64 { return math.Max(v, yfloor) }
	xmin, xmax := math.Inf(1), math.Inf(-1)
	ymax := 0.0
	type legendEntry struct {
		name  string
		thumb plot.Thumbnailer
	}
	var legend []legendEntry
	for k, i := range idx {
		e := est[i]
		col := palette[k%len(palette)]
		var rare, extra, band plotter.XYs
		var upper plotter.XYs
		for _, pt := range e.rep.Points {
			if math.IsNaN(pt.Distinct) || pt.Reads <= 0 || pt.Reads < plotFromFraction*float64(e.rep.Reads) {
				continue
			}

			xy := plotter.XY{X: pt.Reads, Y: pt.Distinct}
			xmin, xmax = math.Min(xmin, pt.Reads), math.Max(xmax, pt.Reads)
			ymax = math.Max(ymax, pt.Distinct)
			switch pt.Kind {
			case complexity.KindRarefied:
				rare = append(rare, xy)
			case complexity.KindObserved:
				rare = append(rare, xy)
				extra = append(extra, xy)
			default:
				extra = append(extra, xy)
			}
			if !math.IsNaN(pt.Lo) && !math.IsNaN(pt.Hi) {
				band = append(band, plotter.XY{X: pt.Reads, Y: clampY(pt.Lo)})
				upper = append(upper, plotter.XY{X: pt.Reads, Y: pt.Hi})
				ymax = math.Max(ymax, pt.Hi)
			}
		}
		if len(band) > 1 {
			for j := len(upper) - 1; j >= 0; j-- {
				band = append(band, upper[j])
			}
			poly, err := plotter.NewPolygon(band)
			if err == nil {
				fill := col
				fill.A = 0x38
				poly.Color = fill
				poly.LineStyle.Width = 0
				p.Add(poly)
			}
		}
		if len(rare) > 1 {
			l, err := plotter.NewLine(rare)
			if err == nil {
				l.Color = col
				l.Width = vg.Points(1.8)
				p.Add(l)
			}
		}
		if len(extra) > 1 {
			l, err := plotter.NewLine(extra)
			if err == nil {
				l.Color = col
				l.Width = vg.Points(1.8)
				l.Dashes = []vg.Length{vg.Points(6), vg.Points(3)}
				p.Add(l)
			}
		}
		obs, err := plotter.NewScatter(plotter.XYs{{X: float64(e.rep.Reads), Y: float64(e.rep.Distinct)}})
		if err == nil {
			obs.GlyphStyle.Color = col
			obs.GlyphStyle.Radius = vg.Points(3.5)
			obs.GlyphStyle.Shape = draw.CircleGlyph{}
			p.Add(obs)
			xmin = math.Min(xmin, float64(e.rep.Reads))
			xmax = math.Max(xmax, float64(e.rep.Reads))
		}
		thumb, _ := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 0}})
		thumb.Color = col
		thumb.Width = vg.Points(2.5)
		legend = append(legend, legendEntry{e.in.name, thumb})
	}
	if len(idx) == 0 {
		p.Title.Text = "No sample has a curve to draw"
		xmin, xmax, ymax = 1, 10, 1
	}
	// The target depth, when it is the same for every sample (absolute).
	if s.targetDepth != nil && s.targetDepth.absolute > 0 {
		t := s.targetDepth.absolute
		xmin, xmax = math.Min(xmin, t), math.Max(xmax, t)
		vl, err := plotter.NewLine(plotter.XYs{{X: t, Y: math.Max(yfloor, 0)}, {X: t, Y: ymax * 1.5}})
		if err == nil {
			vl.Color = color.NRGBA{0x33, 0x33, 0x33, 0xff}
			vl.Width = vg.Points(1)
			vl.Dashes = []vg.Length{vg.Points(2), vg.Points(2)}
			p.Add(vl)
			legend = append(legend, legendEntry{"target " + s.targetDepth.label, vl})
		}
	}
	p.X.Min, p.X.Max = xmin, xmax
	p.Y.Min, p.Y.Max = 0, ymax*1.05
	if logY {
		p.Y.Scale = plot.LogScale{}
		p.Y.Tick.Marker = depthTicks{}
		p.Y.Label.Text = "distinct units (log scale)"
		p.Y.Min, p.Y.Max = yfloor, ymax*1.5
	}

	// Legend in its own column right of the plot, so it covers no curve.
	solid, _ := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 0}})
	solid.Color = color.Black
	dashed, _ := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 0}})
	dashed.Color = color.Black
	dashed.Dashes = []vg.Length{vg.Points(6), vg.Points(3)}
	dot, _ := plotter.NewScatter(plotter.XYs{{X: 0, Y: 0}})
	dot.GlyphStyle.Shape = draw.CircleGlyph{}
	dot.GlyphStyle.Radius = vg.Points(3.5)
	leg := plot.NewLegend()
	leg.Top = true
	leg.Left = true
	leg.TextStyle.Font.Size = vg.Points(9)
	leg.Padding = vg.Points(2.5)
	for _, e := range legend {
		leg.Add(e.name, e.thumb)
	}
	leg.Add("rarefied (solid)", solid)
	leg.Add("extrapolated (dashed)", dashed)
	leg.Add("observed depth", dot)
	if len(idx) > 0 {
		shade, _ := plotter.NewPolygon(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 0}, {X: 1, Y: 1}})
		shade.Color = color.NRGBA{0x55, 0x55, 0x55, 0x38}
		shade.LineStyle.Width = 0
		leg.Add(fmt.Sprintf("%.0f%% interval", s.level*100), shade)
	}

	var cw vg.CanvasWriterTo
	if format == ".svg" {
		cw = vgsvg.New(width, height)
	} else {
		cw = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(width, height), vgimg.UseDPI(144))}
	}
	dc := draw.New(cw.(vg.CanvasSizer))
	legendWidth := 1.9 * vg.Inch
	plotArea := draw.Crop(dc, 0, -legendWidth, 0, 0)
	legendArea := draw.Crop(dc, width-legendWidth+vg.Points(6), 0, 0, -vg.Points(24))
	p.Draw(plotArea)
	leg.Draw(legendArea)
	_, err := cw.WriteTo(w)
	return note, err
}
