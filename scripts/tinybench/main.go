// Command tinybench measures where headroom's extrapolation stops meaning
// anything as samples get small: for samples of N reads (5 … 2000) drawn
// by Poisson sampling from the accuracy benchmark's abundance families
// (internal/sim) at N/S ∈ {0.1, 0.3, 1, 3}, it reports the median
// |relative error| of the prediction at 2x and 10x against the exact
// expectation E[D(mN)] = Σ_u (1 − e^{−p_u m N}), the coverage of the 95%
// interval, and how often no extrapolation was made.
//
//	go run ./scripts/tinybench -reps 40 -seed 1
//
// BENCHMARKS.md ("Tiny samples") holds the table and the threshold chosen
// from it (complexity's minimum for extrapolating).
package main

import (
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
	"sync"

	"headroom/complexity"
	"headroom/internal/sim"
)

type cell struct {
	err2, err10 []float64
	in2, in10   int
	n2, n10     int
	none        int
	total       int
}

func main() {
	reps := flag.Int("reps", 40, "replicates per family, size and ratio")
	seed := flag.Uint64("seed", 1, "seed")
	boot := flag.Int("boot", 50, "bootstrap replicates")
	flag.Parse()
	sizes := []int{5, 10, 20, 50, 100, 200, 500, 2000}
	ratios := []float64{0.1, 0.3, 1, 3}
	res := make([]cell, len(sizes))
	var mu sync.Mutex
	var wg sync.WaitGroup
	jobs := make(chan [2]int)
	for w := 0; w < 2; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range jobs {
				si, rep := j[0], j[1]
				N := float64(sizes[si])
				rng := rand.New(rand.NewPCG(*seed, uint64(si*100000+rep)))
				f := sim.Families[rep%len(sim.Families)]
				ratio := ratios[(rep/len(sim.Families))%len(ratios)]
				S := max(2, int(math.Round(N/ratio)))
				a := f.Gen(rng, S)
				tot := 0.0
				for _, v := range a {
					tot += v
				}
				var b complexity.Builder
				for u := range a {
					a[u] /= tot
					b.AddUnit(sim.Poisson(rng, N*a[u]))
				}
				c, _ := b.Counts()
				if c.Reads() == 0 {
					continue
				}
				n := float64(c.Reads())
				an := complexity.Analyze(c, complexity.Options{Depths: []float64{2 * n, 10 * n}, Bootstrap: *boot, Seed: *seed})
				truth := func(t float64) float64 {
					s := 0.0
					for _, p := range a {
						s += -math.Expm1(-p * t)
					}
					return s
				}
				mu.Lock()
				r := &res[si]
				r.total++
				if an.Curve.Model == nil {
					r.none++
				}
				for k, p := range an.Predictions {
					tr := truth(p.Reads)
					if math.IsNaN(p.Distinct) {
						continue
					}
					e := math.Abs(p.Distinct/tr - 1)
					in := !math.IsNaN(p.Lo) && p.Lo <= tr && tr <= p.Hi
					if k == 0 {
						r.err2 = append(r.err2, e)
						r.n2++
						if in {
							r.in2++
						}
					} else {
						r.err10 = append(r.err10, e)
						r.n10++
						if in {
							r.in10++
						}
					}
				}
				mu.Unlock()
			}
		}()
	}
	for si := range sizes {
		for rep := 0; rep < *reps*len(sim.Families); rep++ {
			jobs <- [2]int{si, rep}
		}
	}
	close(jobs)
	wg.Wait()
	fmt.Printf("Command: `go run ./scripts/tinybench -reps %d -seed %d -boot %d`\n\n", *reps, *seed, *boot)
	fmt.Println("| reads | samples | no extrapolation | median err 2x | coverage 2x | median err 10x | coverage 10x |")
	fmt.Println("|---|---|---|---|---|---|---|")
	for si, r := range res {
		fmt.Printf("| %d | %d | %.0f%% | %.1f%% | %.0f%% | %.1f%% | %.0f%% |\n", sizes[si], r.total, pct(r.none, r.total),
			100*median(r.err2), pct(r.in2, r.n2), 100*median(r.err10), pct(r.in10, r.n10))
	}
}

func pct(a, b int) float64 {
	if b == 0 {
		return math.NaN()
	}
	return 100 * float64(a) / float64(b)
}

func median(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	s := append([]float64(nil), v...)
	sort.Float64s(s)
	return s[len(s)/2]
}
