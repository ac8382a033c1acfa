#!/usr/bin/python3
"""Build the real-data benchmark's count vectors from unpacked Debian packages.

Usage: /usr/bin/python3 scripts/realdata/build.py ROOT OUTDIR

ROOT is a directory into which the packages listed in scripts/realdata/fetch.sh
were unpacked (dpkg -x); OUTDIR receives one frequency-count table per source,
NAME.counts.tsv ("sample<TAB>times_seen<TAB>units", the format of
`headroom counts`), and sources.tsv (name, kind, package, file, how built,
reads, distinct). Only the Python standard library, numpy and python3-rdata
(for the R data files) are used; no program that estimates library
complexity or diversity is involved.

Each source is one count vector: how many times each distinct unit
(read start site, UMI molecule, barcode, OTU, word, k-mer) occurs in the
full data.
"""
import collections
import gzip
import os
import re
import struct
import sys
import warnings

import numpy as np

ROOT = sys.argv[1] if len(sys.argv) > 1 else "."
OUT = sys.argv[2] if len(sys.argv) > 2 else "."


def p(*parts):
    return os.path.join(ROOT, *parts)


# --- BAM/SAM: 5' start sites -------------------------------------------------

CIG_REF = set("MDN=X")


def bam_records(path):
    """Yield (flag, ref, pos, ref_len, strand_reverse, seq) for each BAM
    record (SAM spec v1, section 4.2), reading BGZF as multi-member gzip."""
    with gzip.open(path, "rb") as f:
        if f.read(4) != b"BAM\1":
            raise SystemExit(f"{path}: not a BAM file")
        (l_text,) = struct.unpack("<i", f.read(4))
        f.read(l_text)
        (n_ref,) = struct.unpack("<i", f.read(4))
        for _ in range(n_ref):
            (l_name,) = struct.unpack("<i", f.read(4))
            f.read(l_name + 4)
        while True:
            h = f.read(4)
            if len(h) < 4:
                return
            (bs,) = struct.unpack("<i", h)
            b = f.read(bs)
            ref, pos, l_rn, _mapq, _bin, n_cig, flag, l_seq = struct.unpack("<iiBBHHHi", b[:20])
            off = 32 + l_rn
            cig = struct.unpack("<%dI" % n_cig, b[off:off + 4 * n_cig])
            rl = sum(c >> 4 for c in cig if "MIDNSHP=X"[c & 15] in CIG_REF)
            off += 4 * n_cig
            seq = b[off:off + (l_seq + 1) // 2]
            yield flag, ref, pos, rl, bool(flag & 16), seq, l_seq


def sam_records(path):
    with gzip.open(path, "rt") as f:
        for line in f:
            if line.startswith("@"):
                continue
            t = line.split("\t")
            flag, pos, cig = int(t[1]), int(t[3]) - 1, t[5]
            rl = sum(int(n) for n, op in re.findall(r"(\d+)([MIDNSHP=X])", cig) if op in CIG_REF)
            yield flag, t[2], pos, rl, bool(flag & 16), t[9], len(t[9])


def starts(records):
    """Count primary mapped reads (not secondary, supplementary, QC-failed;
    of a pair only the first mate) by (reference, 5' end, strand): the
    aligned 5' end, pos for forward reads and pos + reference length - 1
    for reverse ones."""
    c = collections.Counter()
    for flag, ref, pos, rl, rev, _seq, _l in records:
        if flag & (0x4 | 0x100 | 0x800 | 0x200) or (flag & 1 and not flag & 0x40):
            continue
        c[(ref, pos + rl - 1 if rev else pos, rev)] += 1
    return list(c.values())


# --- k-mers -------------------------------------------------------------------

CODE = np.full(256, 255, dtype=np.uint8)
for i, ch in enumerate(b"ACGT"):
    CODE[ch] = i
    CODE[ord(chr(ch).lower())] = i


def kmer_counts(seqs, k):
    """Counts of every k-mer (forward strand, k <= 31) over sequences given
    as bytes; k-mers with a base other than ACGT are skipped."""
    keys = []
    for s in seqs:
        a = CODE[np.frombuffer(s, dtype=np.uint8)]
        if len(a) < k:
            continue
        bad = (a == 255).astype(np.int64)
        v = np.zeros(len(a) - k + 1, dtype=np.uint64)
        a = a.astype(np.uint64) & np.uint64(3)
        for j in range(k):
            v = (v << np.uint64(2)) | a[j:len(a) - k + 1 + j]
        cb = np.concatenate(([0], np.cumsum(bad)))
        ok = (cb[k:] - cb[:-k]) == 0
        keys.append(v[ok])
    _, cnt = np.unique(np.concatenate(keys), return_counts=True)
    return cnt.tolist()


def fasta(path):
    op = gzip.open if path.endswith(".gz") else open
    seq = []
    with op(path, "rb") as f:
        for line in f:
            if line.startswith(b">"):
                if seq:
                    yield b"".join(seq)
                seq = []
            else:
                seq.append(line.strip())
    if seq:
        yield b"".join(seq)


def bam_seqs(path):
    """Read sequences of a BAM (4-bit encoding decoded), primary records."""
    nt = b"=ACMGRSVTWYHKDBN"
    for flag, _r, _p, _rl, _rev, seq, l_seq in bam_records(path):
        if flag & (0x100 | 0x800):
            continue
        out = bytearray(2 * len(seq))
        out[0::2] = bytes(nt[x >> 4] for x in seq)
        out[1::2] = bytes(nt[x & 15] for x in seq)
        yield bytes(out[:l_seq])


# --- words --------------------------------------------------------------------

WORD = re.compile(r"[a-z]+(?:'[a-z]+)*")


def words(texts):
    c = collections.Counter()
    for t in texts:
        c.update(WORD.findall(t.lower()))
    return list(c.values())


def man_texts(dirs):
    """Man page sources with the roff requests (lines starting with . or ')
    and font escapes removed."""
    for d in dirs:
        for name in sorted(os.listdir(d)):
            op = gzip.open if name.endswith(".gz") else open
            with op(os.path.join(d, name), "rt", errors="replace") as f:
                lines = [ln for ln in f if not ln.startswith((".", "'"))]
            yield re.sub(r"\\f[BIRP]|\\\(..|\\.", " ", "".join(lines))


def pod_texts(d):
    for name in sorted(os.listdir(d)):
        if name.endswith(".pod"):
            with open(os.path.join(d, name), errors="replace") as f:
                lines = [ln for ln in f if not ln.startswith("=")]
            yield re.sub(r"[A-Z]<", " ", "".join(lines))


def fortune_texts(d):
    for name in sorted(os.listdir(d)):
        fn = os.path.join(d, name)
        if "." in name or not os.path.isfile(fn) or os.path.islink(fn):
            continue
        with open(fn, errors="replace") as f:
            yield f.read()


# --- tables -------------------------------------------------------------------

def rdata_otu(path, key):
    import rdata
    warnings.simplefilter("ignore")
    obj = rdata.conversion.convert(rdata.parser.parse_file(path))[key]
    a = np.asarray(obj.otu_table, dtype=np.int64)
    return a  # taxa x samples (phyloseq taxa_are_rows) or samples x taxa


def deepest_column(a):
    j = int(np.argmax(a.sum(axis=0)))
    return [int(x) for x in a[:, j] if x > 0], j


def twins(path):
    import csv
    with open(path) as f:
        rows = list(csv.reader(f))
    m = np.array([[int(x) for x in r[1:]] for r in rows[1:]], dtype=np.int64)
    return m  # taxa x samples


def tsv_column(path, col, skip_header=True):
    with gzip.open(path, "rt") as f:
        if skip_header:
            f.readline()
        return [int(line.rstrip("\n").split("\t")[col]) for line in f if line.strip()]


DS = p("usr/share/doc/drop-seq/examples/org/broadinstitute")
COV = p("usr/share/doc/covtobed-examples/examples")
RL = p("usr/lib/R/site-library")

SOURCES = [
    # name, kind, package, file (under ROOT), how built, builder
    ("starts-panel01", "read starts", "covtobed-examples", "usr/share/doc/covtobed-examples/examples/panel_01.bam",
     "5' start sites (reference, aligned 5' end, strand) of primary mapped reads, first mates only",
     lambda: starts(bam_records(os.path.join(COV, "panel_01.bam")))),
    ("starts-panel02", "read starts", "covtobed-examples", "usr/share/doc/covtobed-examples/examples/panel_02.bam",
     "as starts-panel01", lambda: starts(bam_records(os.path.join(COV, "panel_02.bam")))),
    ("umi-molbc", "UMI molecules", "drop-seq-testdata",
     "usr/share/doc/drop-seq/examples/org/broadinstitute/transcriptome/barnyard/downsampled.d35Ngn2plusGlia_E7.molBC.txt.gz",
     "reads per molecule (cell barcode, gene, molecular barcode): column NUM_OBS",
     lambda: tsv_column(os.path.join(DS, "transcriptome/barnyard/downsampled.d35Ngn2plusGlia_E7.molBC.txt.gz"), 3)),
    ("barcodes-viral", "barcode amplicons", "drop-seq-testdata",
     "usr/share/doc/drop-seq/examples/org/broadinstitute/transcriptome/utils/editdistance/170330_pSPBN_GFP_v9_v2_B19EnvA_15P_BCpooled_day5_Final_RVg_barcode.counts.txt.gz",
     "reads per distinct 20-nt viral barcode sequence: column counts",
     lambda: tsv_column(os.path.join(DS, "transcriptome/utils/editdistance/170330_pSPBN_GFP_v9_v2_B19EnvA_15P_BCpooled_day5_Final_RVg_barcode.counts.txt.gz"), 1)),
    ("otu-globalpatterns", "OTU table", "r-bioc-phyloseq", "usr/lib/R/site-library/phyloseq/data/GlobalPatterns.RData",
     "reads per OTU of the deepest sample (column sum) of otu_table",
     lambda: deepest_column(rdata_otu(os.path.join(RL, "phyloseq/data/GlobalPatterns.RData"), "GlobalPatterns"))[0]),
    ("otu-soilrep", "OTU table", "r-bioc-phyloseq", "usr/lib/R/site-library/phyloseq/data/soilrep.RData",
     "reads per OTU, the 56 samples of otu_table pooled",
     lambda: [int(x) for x in rdata_otu(os.path.join(RL, "phyloseq/data/soilrep.RData"), "soilrep").sum(axis=1) if x > 0]),
    ("genera-twins", "OTU table", "r-bioc-dirichletmultinomial", "usr/lib/R/site-library/DirichletMultinomial/extdata/Twins.csv",
     "reads per genus, all 278 samples of Twins.csv pooled",
     lambda: [int(x) for x in twins(os.path.join(RL, "DirichletMultinomial/extdata/Twins.csv")).sum(axis=1) if x > 0]),
    ("words-man", "words", "manpages-dev", "usr/share/man/man2, man3 (manpages-dev files)",
     "lower-cased words [a-z]+('[a-z]+)* of the man pages in sections 2 and 3, roff requests and escapes removed",
     None),
    ("words-perlpod", "words", "perl-doc", "usr/share/perl/5.36.0/pod/*.pod",
     "lower-cased words of the perl-doc pod files, pod commands and formatting codes removed",
     lambda: words(pod_texts(p("usr/share/perl/5.36.0/pod")))),
    ("words-fortunes", "words", "fortunes", "usr/share/games/fortunes/*",
     "lower-cased words of the fortune files (not the .dat indexes)",
     lambda: words(fortune_texts(p("usr/share/games/fortunes")))),
    ("kmers-dm3upstream", "k-mers", "r-bioc-biostrings", "usr/lib/R/site-library/Biostrings/extdata/dm3_upstream2000.fa.gz",
     "12-mers (forward strand, ACGT only) of the 26,454 upstream sequences",
     lambda: kmer_counts(fasta(os.path.join(RL, "Biostrings/extdata/dm3_upstream2000.fa.gz")), 12)),
    ("kmers-qiime500", "k-mers", "r-bioc-phyloseq", "usr/lib/R/site-library/phyloseq/extdata/qiime500-refseq.fasta",
     "10-mers (ACGT only) of the 500 16S reference sequences",
     lambda: kmer_counts(fasta(os.path.join(RL, "phyloseq/extdata/qiime500-refseq.fasta")), 10)),
    ("kmers-ecoli1k", "k-mers", "spades", "usr/share/spades/test_dataset/ecoli_1K_1.fq.gz, ecoli_1K_2.fq.gz",
     "21-mers (as read, ACGT only) of the reads of both FASTQ files",
     None),
]


def fastq_seqs(paths):
    for fn in paths:
        with gzip.open(fn, "rb") as f:
            for i, line in enumerate(f):
                if i % 4 == 1:
                    yield line.strip()


def builder(name):
    if name == "words-man":
        return lambda: words(man_texts([p("usr/share/man/man2"), p("usr/share/man/man3")]))
    if name == "kmers-ecoli1k":
        d = p("usr/share/spades/test_dataset")
        return lambda: kmer_counts(fastq_seqs([os.path.join(d, "ecoli_1K_1.fq.gz"), os.path.join(d, "ecoli_1K_2.fq.gz")]), 21)
    return None


def versions():
    v = {}
    fn = os.path.join(ROOT, "VERSIONS")
    if os.path.exists(fn):
        for line in open(fn):
            t = line.split()
            if len(t) == 4 and t[0] == "Package:" and t[2] == "Version:":
                v[t[1]] = t[3]
    return v


def main():
    os.makedirs(OUT, exist_ok=True)
    only = set(sys.argv[3:])
    ver = versions()
    rows = []
    for name, kind, pkg, fn, how, fn_build in SOURCES:
        if only and name not in only:
            continue
        b = fn_build or builder(name)
        vec = [x for x in b() if x > 0]
        freq = collections.Counter(vec)
        with open(os.path.join(OUT, name + ".counts.tsv"), "w") as f:
            f.write("sample\ttimes_seen\tunits\n")
            for k in sorted(freq):
                f.write(f"{name}\t{k}\t{freq[k]}\n")
        rows.append((name, kind, pkg, ver.get(pkg, "?"), fn, how, sum(vec), len(vec)))
        print(f"{name}: {sum(vec)} units counted, {len(vec)} distinct, f1={freq[1]}", file=sys.stderr)
    with open(os.path.join(OUT, "sources.tsv"), "w") as f:
        f.write("name\tkind\tpackage\tversion\tfile\thow\treads\tdistinct\n")
        for r in rows:
            f.write("\t".join(str(x) for x in r) + "\n")


if __name__ == "__main__":
    main()
