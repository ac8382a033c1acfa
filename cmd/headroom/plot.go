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
		// A sample without a curve beyond its reads (too few reads, one
		// unit) has nothing to show and would take a slot from others.
		if len(e.rep.Points) > 0 && e.rep.Reads > 0 && e.rep.Curve.Model != nil {
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

func renderPlot(path string, s *shared, est []estimated) ([]byte, string, error) {
	ext := strings.ToLower(filepath.Ext(path))
	if ext != ".svg" && ext != ".png" {
		return nil, "", usagef("--plot %s: use a file name ending in .svg or .png", path)
	}
	var b bytes.Buffer
	note, err := drawPlot(&b, ext, s, est, 9*vg.Inch, 5.5*vg.Inch)
	return b.Bytes(), note, err
}

// legendEntry is one line of the plot's legend.
type legendEntry struct {
	name  string
	thumb plot.Thumbnailer
}

// plotFrame is the state drawPlot's steps share: the plot, the axis range
// the curves span and the legend so far.
type plotFrame struct {
	p                *plot.Plot
	xmin, xmax, ymax float64
	yfloor           float64 // > 0 on a log y axis
	logY             bool
	legend           []legendEntry
}

// drawPlot renders into w; format is ".svg" or ".png". It returns the note
// on which samples are shown ("" when all are).
func drawPlot(w *bytes.Buffer, format string, s *shared, est []estimated, width, height vg.Length) (string, error) {
	idx, note := plotSubset(est)
	f := newPlotFrame(note)
	f.chooseYScale(est, idx)
	for k, i := range idx {
		f.addSample(est[i], palette[k%len(palette)])
	}
	if len(idx) == 0 {
		f.p.Title.Text = "No sample has a curve to draw"
		f.xmin, f.xmax, f.ymax = 1, 10, 1
	}
	f.addTarget(s)
	f.setAxes()
	return note, f.render(w, format, width, height, f.keyLegend(s, len(idx) > 0))
}

// newPlotFrame starts the plot: title, labels, log depth axis, grid.
func newPlotFrame(note string) *plotFrame {
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
	return &plotFrame{p: p, xmin: math.Inf(1), xmax: math.Inf(-1)}
}

// chooseYScale: the curves start at plotFromFraction of each sample's
// depth (the shallowest part of a rarefaction curve tells nothing), and
// libraries of very different size get a log y axis: a linear one would
// flatten the small ones onto zero.
func (f *plotFrame) chooseYScale(est []estimated, idx []int) {
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
	f.logY = peakMin > 0 && !math.IsInf(peakMin, 1) && peakMax/peakMin > plotLogYRatio
	if f.logY {
		f.yfloor = floor / 1.5
	}
}

// addSample draws one sample: solid rarefaction, dashed extrapolation,
// the shaded interval and a dot at the observed depth.
func (f *plotFrame) addSample(e estimated, col color.NRGBA) {
	var rare, extra, band, upper plotter.XYs
	for _, pt := range e.rep.Points {
		if math.IsNaN(pt.Distinct) || pt.Reads <= 0 || pt.Reads < plotFromFraction*float64(e.rep.Reads) {
			continue
		}
		xy := plotter.XY{X: pt.Reads, Y: pt.Distinct}
		f.xmin, f.xmax = math.Min(f.xmin, pt.Reads), math.Max(f.xmax, pt.Reads)
		f.ymax = math.Max(f.ymax, pt.Distinct)
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
			band = append(band, plotter.XY{X: pt.Reads, Y: math.Max(pt.Lo, f.yfloor)})
			upper = append(upper, plotter.XY{X: pt.Reads, Y: pt.Hi})
			f.ymax = math.Max(f.ymax, pt.Hi)
		}
	}
	if len(band) > 1 {
		for j := len(upper) - 1; j >= 0; j-- {
			band = append(band, upper[j])
		}
		if poly, err := plotter.NewPolygon(band); err == nil {
			fill := col
			fill.A = 0x38
			poly.Color = fill
			poly.LineStyle.Width = 0
			f.p.Add(poly)
		}
	}
	for _, seg := range []struct {
		xy     plotter.XYs
		dashed bool
	}{{rare, false}, {extra, true}} {
		if len(seg.xy) < 2 {
			continue
		}
		if l, err := plotter.NewLine(seg.xy); err == nil {
			l.Color = col
			l.Width = vg.Points(1.8)
			if seg.dashed {
				l.Dashes = []vg.Length{vg.Points(6), vg.Points(3)}
			}
			f.p.Add(l)
		}
	}
	if obs, err := plotter.NewScatter(plotter.XYs{{X: float64(e.rep.Reads), Y: float64(e.rep.Distinct)}}); err == nil {
		obs.GlyphStyle.Color = col
		obs.GlyphStyle.Radius = vg.Points(3.5)
		obs.GlyphStyle.Shape = draw.CircleGlyph{}
		f.p.Add(obs)
		f.xmin = math.Min(f.xmin, float64(e.rep.Reads))
		f.xmax = math.Max(f.xmax, float64(e.rep.Reads))
	}
	thumb, _ := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 0}})
	thumb.Color = col
	thumb.Width = vg.Points(2.5)
	f.legend = append(f.legend, legendEntry{e.in.name, thumb})
}

// addTarget marks the gates' target depth when it is the same for every
// sample (absolute).
func (f *plotFrame) addTarget(s *shared) {
	if s.targetDepth == nil || s.targetDepth.absolute <= 0 {
		return
	}
	t := s.targetDepth.absolute
	f.xmin, f.xmax = math.Min(f.xmin, t), math.Max(f.xmax, t)
	vl, err := plotter.NewLine(plotter.XYs{{X: t, Y: math.Max(f.yfloor, 0)}, {X: t, Y: f.ymax * 1.5}})
	if err == nil {
		vl.Color = color.NRGBA{0x33, 0x33, 0x33, 0xff}
		vl.Width = vg.Points(1)
		vl.Dashes = []vg.Length{vg.Points(2), vg.Points(2)}
		f.p.Add(vl)
		f.legend = append(f.legend, legendEntry{"target " + s.targetDepth.label, vl})
	}
}

// setAxes fits the axes to what was drawn.
func (f *plotFrame) setAxes() {
	p := f.p
	p.X.Min, p.X.Max = f.xmin, f.xmax
	p.Y.Min, p.Y.Max = 0, f.ymax*1.05
	if f.logY {
		p.Y.Scale = plot.LogScale{}
		p.Y.Tick.Marker = depthTicks{}
		p.Y.Label.Text = "distinct units (log scale)"
		p.Y.Min, p.Y.Max = f.yfloor, f.ymax*1.5
	}
}

// keyLegend is the legend: the samples, then what the line styles mean.
func (f *plotFrame) keyLegend(s *shared, any bool) *plot.Legend {
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
	for _, e := range f.legend {
		leg.Add(e.name, e.thumb)
	}
	leg.Add("rarefied (solid)", solid)
	leg.Add("extrapolated (dashed)", dashed)
	leg.Add("observed depth", dot)
	if any {
		shade, _ := plotter.NewPolygon(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 0}, {X: 1, Y: 1}})
		shade.Color = color.NRGBA{0x55, 0x55, 0x55, 0x38}
		shade.LineStyle.Width = 0
		leg.Add(fmt.Sprintf("%.0f%% interval", s.level*100), shade)
	}
	return &leg
}

// render draws the plot with its legend in a column of its own to the
// right, so the legend covers no curve.
func (f *plotFrame) render(w *bytes.Buffer, format string, width, height vg.Length, leg *plot.Legend) error {
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
	f.p.Draw(plotArea)
	leg.Draw(legendArea)
	_, err := cw.WriteTo(w)
	return err
}
