#!/bin/sh
# Fetch real alignment files from Debian packages into testdata/external/
# (git-ignored: a .gitignore of "*" is written there) for the tests that
# compare headroom with the pysam reference on real data
# (cmd/headroom/reads_external_test.go, cases testdata/reads/external_cases.tsv).
#
#   covtobed-examples   panel BAMs (paired, read groups), duplicates.bam, and
#                       small BAMs whose headers claim coordinate order
#   drop-seq-testdata   small SAM.gz/BAM files (census-seq pileup tests with
#                       MC tags, UMI-sharing metrics, queryname-sorted BAMs)
#
# Needs: apt-get (after apt-get update) and dpkg; about 180 MB of downloads
# in a temporary folder, about 40 MB kept.
# Usage: sh scripts/fetch_real_data.sh [DEST]   (default testdata/external)
set -eu
here=$(cd "$(dirname "$0")/.." && pwd)
dest=${1:-$here/testdata/external}
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
mkdir -p "$dest/covtobed" "$dest/dropseq"
printf '*\n' > "$dest/.gitignore"
cd "$tmp"
apt-get download covtobed-examples drop-seq-testdata
mkdir x
for d in ./*.deb; do dpkg -x "$d" x; done
cov=x/usr/share/doc/covtobed-examples/examples
for f in duplicates.bam mp.bam panel_01.bam panel_02.bam demo.bam nano.bam stranded.bam \
	mini-sorted.bam mini-unsorted.bam filtered_unsorted.bam; do
	cp "$cov/$f" "$dest/covtobed/$f"
done
ds=x/usr/share/doc/drop-seq/examples
cp "$ds/org/broadinstitute/dropseq/censusseq/genomic_pileup_test.sam.gz" \
	"$ds/org/broadinstitute/dropseq/censusseq/softclip_pileup_test.sam.gz" \
	"$ds/org/broadinstitute/dropseq/metrics/compute_umi_sharing.mapped.sam.gz" \
	"$ds/org/broadinstitute/dropseq/metrics/compute_umi_sharing.unmapped.sam.gz" \
	"$ds/org/broadinstitute/dropseq/barnyard/digitalallelecounts/sampleassignment/hek_5_cell_2_snp_testdata.sam.gz" \
	"$ds/org/broadinstitute/dropseq/utils/paired_reads_tagged.bam" \
	"$ds/org/broadinstitute/dropseq/utils/unmapped_paired_reads.bam" \
	"$ds/ref/FilterBam.sam.gz" \
	"$dest/dropseq/"
dpkg-deb -f covtobed-examples_*.deb Package Version | tr '\n' ' ' > "$dest/VERSIONS"
echo >> "$dest/VERSIONS"
dpkg-deb -f drop-seq-testdata_*.deb Package Version | tr '\n' ' ' >> "$dest/VERSIONS"
echo >> "$dest/VERSIONS"
echo "fetched into $dest:"
cat "$dest/VERSIONS"
