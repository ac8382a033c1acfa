package complexity_test

import (
	"os"
	"slices"
	"strconv"
	"syscall"
	"testing"
	"time"

	"headroom/amplicon"
	"headroom/complexity"
)

// BenchmarkAnalyzeTable runs Analyze, as `headroom taxa` does (depths 2x,
// 10x, 100x, one thread), over the first $HEADROOM_BENCH_SAMPLES samples
// (default 200) of the table named by $HEADROOM_BENCH_TABLE (made by
// scripts/bench_taxa.sh); it is skipped when the variable is unset. It
// reports wall and CPU (user+sys of the process, getrusage) ms per sample,
// one goroutine; on a shared machine the CPU figure is the one to compare.
// median-ms/sample is the median over the samples of one Analyze call's
// wall time (the first iteration's), what a typical sample costs. The
// cost of a bootstrap replicate is (boot=20 − boot=0)/20.
//
//	HEADROOM_BENCH_TABLE=/tmp/headroom-bench-taxa/dense_2000x20000.tsv \
//	    go test ./complexity -run '^$' -bench AnalyzeTable -cpuprofile cpu.out
func BenchmarkAnalyzeTable(b *testing.B) {
	path := os.Getenv("HEADROOM_BENCH_TABLE")
	if path == "" {
		b.Skip("set HEADROOM_BENCH_TABLE to a table file (see scripts/bench_taxa.sh)")
	}
	f, err := os.Open(path)
	if err != nil {
		b.Fatal(err)
	}
	t, err := amplicon.Read(f, amplicon.Options{})
	f.Close()
	if err != nil {
		b.Fatal(err)
	}
	ns := 200
	if s := os.Getenv("HEADROOM_BENCH_SAMPLES"); s != "" {
		if ns, err = strconv.Atoi(s); err != nil || ns < 1 {
			b.Fatalf("HEADROOM_BENCH_SAMPLES=%q: want a positive count", s)
		}
	}
	samples := t.Samples[:min(ns, len(t.Samples))]
	opts := func(c complexity.Counts, boot int) complexity.Options {
		n := float64(c.Reads())
		return complexity.Options{Depths: []float64{2 * n, 10 * n, 100 * n}, Bootstrap: boot, Seed: 1, Threads: 1, Gates: complexity.NoGates()}
	}
	for _, bc := range []struct {
		name string
		boot int
	}{{"boot=0", 0}, {"boot=20", 20}} {
		b.Run(bc.name, func(b *testing.B) {
			cpu0 := cpuTime()
			each := make([]float64, len(samples))
			for i := 0; i < b.N; i++ {
				for k, s := range samples {
					t0 := time.Now()
					complexity.Analyze(s.Counts, opts(s.Counts, bc.boot))
					if i == 0 {
						each[k] = float64(time.Since(t0).Nanoseconds()) / 1e6
					}
				}
			}
			per := float64(b.N * len(samples))
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/1e6/per, "ms/sample")
			b.ReportMetric(float64((cpuTime()-cpu0).Nanoseconds())/1e6/per, "cpu-ms/sample")
			slices.Sort(each)
			b.ReportMetric(each[len(each)/2], "median-ms/sample")
		})
	}
}

// cpuTime is the process's user+sys CPU time so far (getrusage).
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
