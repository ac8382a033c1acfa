package main

import (
	"math"

	"gonum.org/v1/plot"
)

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
