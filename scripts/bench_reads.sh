#!/bin/sh
# Benchmark `headroom reads` against `gzip -dc` of the same files.
#
# Generates (once, into $BENCH_DIR, default /tmp/headroom-bench) a
# coordinate-sorted paired BAM of 2.2M records and the same 1.1M read pairs
# as two gzip FASTQ files, plus a BAM twice that size, with
# scripts/bench_reads_gen.go. Then, alternating runs ($RUNS each, default
# 5), it times:
#   BAM:   gzip -dc bench.bam            vs  headroom reads bench.bam
#   FASTQ: gzip -dc R1.fastq.gz R2...    vs  headroom reads R1 R2
# and reports median wall and CPU seconds, the ratio of the medians, and
# peak RSS (/usr/bin/time -v) of the sorted BAM and of the BAM twice the
# size, and the hash table's bytes per distinct molecule: peak RSS of
# --mode hashed minus --mode sorted (optical detection off), divided by the
# distinct molecules, for both sizes.
#
# Needs: go, gzip, /usr/bin/time (Debian package "time").
# Usage: sh scripts/bench_reads.sh      (RUNS=5 BENCH_DIR=/tmp/headroom-bench)
set -eu
here=$(cd "$(dirname "$0")/.." && pwd)
dir=${BENCH_DIR:-/tmp/headroom-bench}
runs=${RUNS:-5}
mkdir -p "$dir" "$dir/x2"
[ -x /usr/bin/time ] || { echo "bench_reads.sh: /usr/bin/time missing: apt-get install time" >&2; exit 1; }
(cd "$here" && go build -o "$dir/headroom" ./cmd/headroom)
hr="$dir/headroom"
if [ ! -s "$dir/bench.bam" ] || [ ! -s "$dir/bench_R2.fastq.gz" ]; then
	(cd "$here" && go run scripts/bench_reads_gen.go -pairs 1100000 -out "$dir")
fi
if [ ! -s "$dir/x2/bench.bam" ]; then
	(cd "$here" && go run scripts/bench_reads_gen.go -pairs 2200000 -fastq=false -out "$dir/x2")
fi

# measure NAME CMD...: one run; appends "wall cpu rss_kb" to $dir/NAME.times
measure() {
	name=$1
	shift
	/usr/bin/time -v -o "$dir/time.txt" "$@" > "$dir/out.$name" 2> /dev/null
	awk -F': ' '
		/Elapsed \(wall clock\)/ { n = split($2, p, ":"); w = 0; for (i = 1; i <= n; i++) w = w * 60 + p[i] }
		/User time/ { u = $2 } /System time/ { s = $2 } /Maximum resident/ { m = $2 }
		END { printf "%.2f %.2f %d\n", w, u + s, m }' "$dir/time.txt" >> "$dir/$name.times"
}

median() { # column FILE
	sort -n -k"$1","$1" "$2" | awk -v c="$1" '{ v[NR] = $c } END { if (NR % 2) print v[(NR + 1) / 2]; else printf "%.2f\n", (v[NR / 2] + v[NR / 2 + 1]) / 2 }'
}

rm -f "$dir"/*.times
bam="$dir/bench.bam"
r1="$dir/bench_R1.fastq.gz"
r2="$dir/bench_R2.fastq.gz"
i=0
while [ $i -lt "$runs" ]; do
	measure gzip_bam gzip -dc "$bam"
	measure hr_bam "$hr" reads --bootstrap 0 --progress never "$bam"
	measure gzip_fq gzip -dc "$r1" "$r2"
	measure hr_fq "$hr" reads --bootstrap 0 --progress never "$r1" "$r2"
	i=$((i + 1))
done
measure hr_bam_x2 "$hr" reads --bootstrap 0 --progress never "$dir/x2/bench.bam"
# Hash-table cost: --mode hashed minus --mode sorted, optical detection off
# (with it on, each duplicate read also keeps its flow-cell spot).
for sz in x1 x2; do
	f=$bam
	[ $sz = x2 ] && f=$dir/x2/bench.bam
	measure sorted_off_$sz "$hr" reads --bootstrap 0 --progress never --mode sorted --optical-distance 0 "$f"
	measure hashed_off_$sz "$hr" reads --bootstrap 0 --progress never --mode hashed --optical-distance 0 "$f"
done
measure hashed_on_x1 "$hr" reads --bootstrap 0 --progress never --mode hashed "$bam"
echo "headroom reads benchmark ($runs alternating runs, medians; $(nproc) cores; load now: $(cut -d' ' -f1-3 /proc/loadavg))"
printf '%-8s %10s %10s %8s %10s %10s %8s %8s\n' input gzip_wall hr_wall ratio gzip_cpu hr_cpu cpu_rat hr_rssMB
for k in bam fq; do
	gw=$(median 1 "$dir/gzip_$k.times")
	hw=$(median 1 "$dir/hr_$k.times")
	gc=$(median 2 "$dir/gzip_$k.times")
	hc=$(median 2 "$dir/hr_$k.times")
	rss=$(median 3 "$dir/hr_$k.times")
	awk -v k="$k" -v gw="$gw" -v hw="$hw" -v gc="$gc" -v hc="$hc" -v rss="$rss" 'BEGIN {
		printf "%-8s %10.2f %10.2f %8.2f %10.2f %10.2f %8.2f %8.1f\n", k, gw, hw, hw / gw, gc, hc, hc / gc, rss / 1024 }'
done
awk -v a="$(median 3 "$dir/hr_bam.times")" -v b="$(cut -d' ' -f3 "$dir/hr_bam_x2.times")" 'BEGIN {
	printf "peak RSS: sorted BAM %.1f MB; sorted BAM twice the size %.1f MB\n", a / 1024, b / 1024 }'
for sz in x1 x2; do
	d=$(awk -F'\t' 'NR == 2 { print $3 }' "$dir/out.hashed_off_$sz")
	awk -v sz=$sz -v s="$(cut -d' ' -f3 "$dir/sorted_off_$sz.times")" -v h="$(cut -d' ' -f3 "$dir/hashed_off_$sz.times")" -v d="$d" 'BEGIN {
		printf "hashed %s: %d distinct molecules, peak RSS %.1f MB vs sorted %.1f MB: %.1f bytes per molecule\n", sz, d, h / 1024, s / 1024, (h - s) * 1024 / d }'
done
awk -v h="$(cut -d' ' -f3 "$dir/hashed_on_x1.times")" 'BEGIN { printf "hashed x1 with optical detection on: peak RSS %.1f MB\n", h / 1024 }'
echo "raw runs (wall cpu rss_kb) in $dir/*.times"
