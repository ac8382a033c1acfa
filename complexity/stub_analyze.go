package complexity

// Analyze estimates everything Report holds for one sample.
func Analyze(c Counts, opt Options) Report {
	r := Report{Reads: c.Reads(), Distinct: c.Distinct(), Singletons: c.Units(1), Doubletons: c.Units(2)}
	r.DupFraction, r.SampleCoverage, r.MarginalYield = missing, missing, missing
	r.Total, r.TotalLo, r.TotalHi, r.Saturation, r.BacktestError = missing, missing, missing, missing, missing
	for _, t := range opt.Depths {
		r.Predictions = append(r.Predictions, Prediction{Reads: t, Distinct: missing, Lo: missing, Hi: missing, DupFraction: missing, Coverage: missing})
	}
	return r
}
