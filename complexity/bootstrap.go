package complexity

import (
	"fmt"
	"sync"
)

// replicates are the bootstrap curves: replicate b's curve (Model nil when
// it could not be fitted), the factor scale[b] = N_b/N that maps a depth
// of the observed sample onto the replicate's own depth (each replicate is
// anchored at its own reads N_b, so depth t of the sample is depth
// t·scale[b] of replicate b), and its limit (missing when unbounded).
type replicates struct {
	curves []Curve
	scale  []float64
	limits []float64
}

// bootstrap fits the chosen curve to Options.Bootstrap resampled tables
// (resample, the nonparametric bootstrap of Efron 1979 over units) and
// notes how many could not be fitted. Nothing happens without a curve to
// refit or for a saturated one.
func (a *analysis) bootstrap(r *Report) {
	B := a.opt.Bootstrap
	if B <= 0 || !a.kind.bootstrapped() {
		return
	}
	a.reps = refitReplicates(a.c, a.cv.Model, r.Method, a.maxT, B, a.opt.Seed, a.threads, a.opt.Progress)
	failed := 0
	for _, cv := range a.reps.curves {
		if cv.Model == nil {
			failed++
		}
	}
	if failed > 0 {
		r.Notes = append(r.Notes, fmt.Sprintf("%d of %d bootstrap replicates had no admissible fit", failed, B))
	}
}

// refitReplicates refits m (method names it in errors) on B resampled
// tables, in parallel over threads goroutines. Replicate b always uses
// stream b of seed, so the result is the same for any thread count.
// progress, when not nil, is called after each replicate.
func refitReplicates(c Counts, m Model, method string, maxT float64, B int, seed uint64, threads int, progress func()) *replicates {
	reps := &replicates{curves: make([]Curve, B), scale: make([]float64, B), limits: make([]float64, B)}
	var wg sync.WaitGroup
	next := make(chan int)
	for w := 0; w < min(threads, B); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for b := range next {
				rc := resample(c, newRand(seed, uint64(b)))
				reps.curves[b] = Curve{Counts: rc}
				reps.scale[b] = float64(rc.Reads()) / float64(c.Reads())
				reps.limits[b] = missing
				rm, err := refit(method, rc, maxT, m)
				if progress != nil {
					progress()
				}
				if err != nil {
					continue
				}
				reps.curves[b].Model = rm
				if lim, ok := rm.Limit(); ok {
					reps.limits[b] = lim
				}
			}
		}()
	}
	for b := 0; b < B; b++ {
		next <- b
	}
	close(next)
	wg.Wait()
	return reps
}

// distinctAt returns each replicate's expected distinct units at depth t
// of the observed sample (missing for replicates that could not be
// fitted), into buf.
func (reps *replicates) distinctAt(t float64, buf []float64) []float64 {
	buf = buf[:0]
	for b, cv := range reps.curves {
		v := missing
		if cv.Model != nil {
			v = cv.Distinct(t * reps.scale[b])
		}
		buf = append(buf, v)
	}
	return buf
}
