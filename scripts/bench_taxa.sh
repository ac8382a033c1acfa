#!/bin/sh
# Scale benchmark for `headroom taxa`: a dense TSV of 2,000 samples x
# 20,000 taxa (taxa as rows, zeros written out), timed against an awk
# program that sums every column of the same file, in one run.
#
#   sh scripts/bench_taxa.sh            # generate (once), then time
#   SAMPLES=500 TAXA=5000 sh scripts/bench_taxa.sh
#
# The table is written to /tmp (BENCH_DIR) by Debian's python3-numpy: each
# taxon has a log-normal share (sigma 2.5), each sample a depth uniform in
# 5,000-100,000 reads and log-normal noise per cell (sigma 1); cells are
# Poisson draws, seed fixed. Target: headroom --bootstrap 0 <= 0.5x awk.
set -eu
root=$(cd "$(dirname "$0")/.." && pwd)
dir=${BENCH_DIR:-/tmp/headroom-bench-taxa}
samples=${SAMPLES:-2000}
taxa=${TAXA:-20000}
table="$dir/dense_${samples}x${taxa}.tsv"
mkdir -p "$dir"
if [ ! -s "$table" ]; then
	echo "bench_taxa: generating $table" >&2
	/usr/bin/python3 - "$table" "$samples" "$taxa" <<'PY'
import sys
import numpy as np
path, ns, nt = sys.argv[1], int(sys.argv[2]), int(sys.argv[3])
rng = np.random.RandomState(4242)
share = np.exp(rng.normal(0, 2.5, nt))
share /= share.sum()
depth = rng.uniform(5000, 100000, ns)
with open(path, "w") as f:
    f.write("#OTU ID\t" + "\t".join("POND-%04d" % (j + 1) for j in range(ns)) + "\n")
    for i in range(nt):
        lam = share[i] * depth * np.exp(rng.normal(0, 1, ns) - 0.5)
        row = rng.poisson(lam)
        f.write("ASV%05d\t" % (i + 1) + "\t".join(map(str, row.tolist())) + "\n")
PY
fi
bin="$dir/headroom"
(cd "$root" && go build -o "$bin" ./cmd/headroom)
size=$(wc -c <"$table")
echo "table: $table ($samples samples x $taxa taxa, $size bytes)"
echo "machine: $(nproc) cores; $(go version | cut -d' ' -f3); awk = $(readlink -f "$(command -v awk)")"

now() { date +%s.%N; }
cat "$table" >/dev/null # warm the page cache for both

t0=$(now)
awk -F'\t' 'NR > 1 { for (i = 2; i <= NF; i++) s[i] += $i } END { for (i in s) n++; print n " column sums" }' "$table" >/dev/null
t1=$(now)
"$bin" taxa --bootstrap 0 -o "$dir/summary0.tsv" "$table"
t2=$(now)
rss0=$( { /usr/bin/time -f %M "$bin" taxa --bootstrap 0 -o /dev/null "$table"; } 2>&1 | tail -n 1)
t3=$(now)
"$bin" taxa --bootstrap 200 -o "$dir/summary200.tsv" "$table"
t4=$(now)
# The reader alone (amplicon.Read: parse and per-sample accumulation).
read_ns=$(cd "$root" && HEADROOM_BENCH_TABLE="$table" go test ./amplicon -run '^$' -bench BenchmarkReadTable -benchtime 3x |
	awk '/^BenchmarkReadTable/ { print $3 }')

awk_s=$(echo "$t1 - $t0" | bc -l)
hr_s=$(echo "$t2 - $t1" | bc -l)
boot_s=$(echo "$t4 - $t3" | bc -l)
printf 'awk column sums:          %6.2f s\n' "$awk_s"
printf 'headroom --bootstrap 0:   %6.2f s  (%.2fx awk; target <= 0.5x), max RSS %s KiB\n' "$hr_s" "$(echo "$hr_s / $awk_s" | bc -l)" "$rss0"
printf 'headroom --bootstrap 200: %6.2f s\n' "$boot_s"
if [ -n "$read_ns" ]; then
	printf 'table reader alone:       %6.2f s  (%.2fx awk; go test -bench BenchmarkReadTable)\n' "$(echo "$read_ns / 1000000000" | bc -l)" "$(echo "$read_ns / 1000000000 / $awk_s" | bc -l)"
else
	echo "table reader alone: go test -bench BenchmarkReadTable failed" >&2
fi
echo "samples in summary: $(($(wc -l <"$dir/summary0.tsv") - 1))"
