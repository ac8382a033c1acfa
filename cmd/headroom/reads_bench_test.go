package main

import (
	"io"
	"os"
	"strings"
	"testing"
)

// BenchmarkReadsFile runs `headroom reads` in-process on the files named
// by HEADROOM_BENCH_READS (space-separated; scripts/bench_reads.sh makes
// them), so that pprof sees the whole command:
//
//	HEADROOM_BENCH_READS=/tmp/headroom-bench/bench.bam go test ./cmd/headroom \
//	    -run '^$' -bench ReadsFile -benchtime 1x -cpuprofile /tmp/reads.cpu
func BenchmarkReadsFile(b *testing.B) {
	files := strings.Fields(os.Getenv("HEADROOM_BENCH_READS"))
	if len(files) == 0 {
		b.Skip("set HEADROOM_BENCH_READS to BAM/SAM/FASTQ files (see scripts/bench_reads.sh)")
	}
	args := append([]string{"reads", "--bootstrap", "0", "--progress", "never"}, files...)
	for i := 0; i < b.N; i++ {
		if code := run(args, nil, io.Discard, os.Stderr); code != 0 {
			b.Fatalf("exit %d", code)
		}
	}
}
