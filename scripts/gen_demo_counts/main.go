// Command gen_demo_counts writes the demo frequency-count tables of an
// invented scenario: the Larkspur Valley genomics core's shallow QC pass
// (about 1–3 M reads each) over six libraries of very different
// complexity, before deciding which deserve a deep run.
//
// Every library is a simulated population of molecules whose relative
// abundances follow the stated family; reads are Poisson samples of that
// population (the random-sampling model the estimators assume). Fixed
// seeds make the output reproducible:
//
//	go run ./scripts/gen_demo_counts > testdata/demo/qc-pass.counts.tsv
package main

import (
	"bufio"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"sort"

	"gonum.org/v1/gonum/stat/distuv"
)

type library struct {
	name      string
	molecules int     // population size
	reads     float64 // expected reads of the QC pass
	weight    func(r *rand.Rand) float64
	why       string
}

func lognormal(sigma float64) func(r *rand.Rand) float64 {
	return func(r *rand.Rand) float64 { return math.Exp(sigma * r.NormFloat64()) }
}

func gamma(shape float64, src rand.Source) func(r *rand.Rand) float64 {
	g := distuv.Gamma{Alpha: shape, Beta: 1, Src: src}
	return func(*rand.Rand) float64 { return g.Rand() }
}

// pcr: each molecule is amplified for the given cycles with its own
// efficiency drawn from Beta(a, b); the weight is the copy number of a
// branching (Galton–Watson) process, so low-input libraries get jackpots.
func pcr(cycles int, a, b float64, src rand.Source) func(r *rand.Rand) float64 {
	eff := distuv.Beta{Alpha: a, Beta: b, Src: src}
	return func(r *rand.Rand) float64 {
		e := eff.Rand()
		copies := 1.0
		for c := 0; c < cycles; c++ {
			if copies < 1e4 {
				k := 0.0
				for i := 0; i < int(copies); i++ {
					if r.Float64() < e {
						k++
					}
				}
				copies += k
			} else {
				copies *= 1 + e
			}
		}
		return copies
	}
}

func main() {
	src := rand.NewPCG(20261201, 7)
	libs := []library{
		{"LVC-WGS-01", 20_000_000, 2_500_000, lognormal(0.4), "high-complexity whole-genome library"},
		{"LVC-WGS-02", 4_000_000, 2_000_000, lognormal(0.8), "good library, some PCR bias"},
		{"LVC-EXO-03", 1_500_000, 3_000_000, gamma(1.5, src), "exome capture, moderately saturated"},
		{"LVC-LOW-04", 150_000, 1_500_000, pcr(14, 2, 2, src), "low-input library, heavy duplication"},
		{"LVC-FFPE-05", 600_000, 1_200_000, lognormal(1.6), "damaged sample, skewed"},
		{"LVC-CHIP-06", 300_000, 1_000_000, gamma(0.4, src), "ChIP library, long tail"},
	}
	w := bufio.NewWriter(os.Stdout)
	defer w.Flush()
	fmt.Fprintln(w, "sample\ttimes_seen\tunits")
	for i, lib := range libs {
		r := rand.New(rand.NewPCG(20261201, uint64(100+i)))
		wts := make([]float64, lib.molecules)
		var sum float64
		for k := range wts {
			wts[k] = lib.weight(r)
			sum += wts[k]
		}
		hist := map[int64]int64{}
		pois := distuv.Poisson{Src: rand.NewPCG(20261201, uint64(200+i))}
		for _, x := range wts {
			pois.Lambda = lib.reads * x / sum
			if k := int64(pois.Rand()); k > 0 {
				hist[k]++
			}
		}
		keys := make([]int64, 0, len(hist))
		for k := range hist {
			keys = append(keys, k)
		}
		sort.Slice(keys, func(a, b int) bool { return keys[a] < keys[b] })
		for _, k := range keys {
			fmt.Fprintf(w, "%s\t%d\t%d\n", lib.name, k, hist[k])
		}
	}
}
