#!/bin/sh
# Resource bound of the sorted-BAM path: peak memory must not grow with the
# length of the stream. Generates (once, into $BENCH_DIR, default
# /tmp/headroom-bench) coordinate-sorted paired BAMs of 1.1M and 4.4M pairs
# from the same simulated library design (scripts/bench_reads_gen.go), pipes
# each through standard input (`headroom reads -`, so nothing can seek or
# size the file) and reports peak RSS (/usr/bin/time -v) and records/s.
#
# Needs: go, /usr/bin/time (Debian package "time"); about 1 GB of disk.
# Usage: sh scripts/bench_memory_stdin.sh
set -eu
here=$(cd "$(dirname "$0")/.." && pwd)
dir=${BENCH_DIR:-/tmp/headroom-bench}
mkdir -p "$dir" "$dir/x4"
[ -x /usr/bin/time ] || { echo "bench_memory_stdin.sh: /usr/bin/time missing: apt-get install time" >&2; exit 1; }
(cd "$here" && go build -o "$dir/headroom" ./cmd/headroom)
if [ ! -s "$dir/bench.bam" ]; then
	(cd "$here" && go run scripts/bench_reads_gen.go -pairs 1100000 -fastq=false -out "$dir")
fi
if [ ! -s "$dir/x4/bench.bam" ]; then
	(cd "$here" && go run scripts/bench_reads_gen.go -pairs 4400000 -fastq=false -out "$dir/x4")
fi
# The same with 2% of the molecules' reverse mates on another reference
# (chimeric/discordant pairs), which a window keyed on the mate's end
# would hold until the stream reached that reference.
for n in 1 4; do
	mkdir -p "$dir/c$n"
	if [ ! -s "$dir/c$n/bench.bam" ]; then
		(cd "$here" && go run scripts/bench_reads_gen.go -pairs $((n * 1100000)) -fastq=false -chimeric 0.02 -out "$dir/c$n")
	fi
done
echo "input            size_MB  wall_s  peak_rss_MB"
for f in "$dir/bench.bam" "$dir/x4/bench.bam" "$dir/c1/bench.bam" "$dir/c4/bench.bam"; do
	/usr/bin/time -v -o "$dir/mem.txt" sh -c "\"$dir/headroom\" reads --bootstrap 0 --progress never - < \"$f\" > /dev/null"
	awk -F': ' -v f="$f" -v sz="$(du -m "$f" | cut -f1)" '
		/Elapsed \(wall clock\)/ { n = split($2, p, ":"); w = 0; for (i = 1; i <= n; i++) w = w * 60 + p[i] }
		/Maximum resident/ { m = $2 }
		END { l = (f ~ /x4|c4/ ? "4x" : "1x") (f ~ /\/c[14]\// ? " 2% chimeric" : ""); printf "%-16s %7d %7.2f %12.1f\n", l, sz, w, m / 1024 }' "$dir/mem.txt"
done
