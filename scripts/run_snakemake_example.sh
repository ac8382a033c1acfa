#!/usr/bin/env bash
# Runs the README's Snakemake example (examples/snakemake/Snakefile) on the
# demo BAM in a scratch folder and checks that it produced a gate table
# with one row per library. Needs snakemake and samtools (Debian packages);
# exits 0 with a message when they are absent.
set -euo pipefail
cd "$(dirname "$0")/.."
for tool in snakemake samtools; do
  if ! command -v "$tool" >/dev/null; then
    echo "run_snakemake_example: $tool not installed (apt-get install snakemake samtools); skipped"
    exit 0
  fi
done
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/headroom" ./cmd/headroom
cp testdata/demo/qc_run.bam "$work/demo.bam"
(cd "$work" && snakemake -s "$OLDPWD/examples/snakemake/Snakefile" --cores 2 --quiet \
  --config bam="$work/demo.bam" headroom="$work/headroom" out="$work/results")
rows=$(($(wc -l < "$work/results/gate.tsv") - 1))
libs=$(samtools view -H "$work/demo.bam" | awk -F'\t' '$1=="@RG"{for(i=2;i<=NF;i++) if ($i ~ /^LB:/) print $i}' | sort -u | wc -l)
if [ "$rows" -ne "$libs" ]; then
  echo "run_snakemake_example: gate.tsv has $rows rows, expected $libs libraries"; exit 1
fi
test -s "$work/results/report.html"
echo "run_snakemake_example: ok ($rows libraries gated)"
