#!/bin/sh
# Compare two builds' `headroom reads` output, byte for byte, on the
# fixtures of testdata/reads, the demo BAM and (when present) the files of
# scripts/bench_reads.sh, for --threads 1, 2 and 3, with and without UMI
# and optical options. For changes meant to leave every answer as it was.
#
#   sh scripts/reads_identical.sh OLD_BINARY NEW_BINARY
set -eu
old=$1 new=$2
root=$(cd "$(dirname "$0")/.." && pwd)
bench=${BENCH_DIR:-/tmp/headroom-bench}
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
t=$root/testdata/reads
set -- "$t/sorted.bam" "$t/unsorted.bam" "$t/liar.bam" "$t/sorted.sam" "$t/sorted.sam.gz" "$t/umi_bx.bam" "$t/cells_ub.bam" \
	"$t/single.fastq" "$t/pairs_R1.fastq.gz $t/pairs_R2.fastq.gz" "$root/testdata/demo/qc_run.bam"
if [ -s "$bench/bench.bam" ]; then
	set -- "$@" "$bench/bench.bam" "$bench/bench_R1.fastq.gz $bench/bench_R2.fastq.gz"
fi
bad=0 n=0
for files in "$@"; do
	for th in 1 2 3; do
		for opts in "" "--mode hashed --optical-distance 0" "--bootstrap 20 --seed 3 --format json"; do
			# shellcheck disable=SC2086
			"$old" reads --progress never --threads $th $opts $files >"$tmp/a" 2>"$tmp/ea" || true
			# shellcheck disable=SC2086
			"$new" reads --progress never --threads $th $opts $files >"$tmp/b" 2>"$tmp/eb" || true
			n=$((n + 1))
			if ! cmp -s "$tmp/a" "$tmp/b" || ! cmp -s "$tmp/ea" "$tmp/eb"; then
				echo "DIFFERENT: $files --threads $th $opts"
				bad=$((bad + 1))
			fi
		done
	done
done
echo "$n runs, $bad different"
[ "$bad" = 0 ]
