package complexity

import (
	"errors"
	"sort"
)

// extrapolate fits the extrapolation used for depths up to maxT and names
// it for the method column. Initial chain: the deepest admissible bounded
// rational approximant, then the deepest admissible unbounded one; the
// error says nothing was admissible.
func extrapolate(c Counts, maxT float64) (m Model, method string, err error) {
	r, err := FitRFA(c, maxT)
	if err != nil {
		return nil, "", err
	}
	return r, r.Name(), nil
}

// refit refits the method chosen by extrapolate on a bootstrap replicate
// (no re-selection). hint is the model fitted on the original counts.
func refit(method string, c Counts, maxT float64, hint Model) (Model, error) {
	if h, ok := hint.(*RFA); ok {
		for _, r := range RFAApproximants(c) {
			if r.depth <= h.depth && Admissible(r, c, maxT) {
				return r, nil
			}
		}
		return nil, ErrNoAdmissible
	}
	return nil, errors.New("complexity: cannot refit " + method)
}

// interval turns bootstrap replicate values into an interval at level:
// the percentile interval of the replicates.
func interval(point float64, reps []float64, level float64, c Counts, t float64) (lo, hi float64) {
	v := make([]float64, 0, len(reps))
	for _, x := range reps {
		if isFinite(x) {
			v = append(v, x)
		}
	}
	if len(v) < 2 {
		return missing, missing
	}
	sort.Float64s(v)
	a := (1 - level) / 2
	return quantileSorted(v, a), quantileSorted(v, 1-a)
}

// quantileSorted is the linear-interpolation quantile (type 7 of Hyndman &
// Fan 1996) of sorted values.
func quantileSorted(v []float64, p float64) float64 {
	if len(v) == 0 {
		return missing
	}
	h := p * float64(len(v)-1)
	i := int(h)
	if i >= len(v)-1 {
		return v[len(v)-1]
	}
	return v[i] + (h-float64(i))*(v[i+1]-v[i])
}
