#!/usr/bin/python3
"""Generate the UMI and single-cell read fixtures of testdata/reads/ with pysam
(Debian python3-pysam).

Invented scenarios:
  umi_bx.bam    an amplicon panel (Lab of Invented Assays, library AMP-1):
                12 amplicons, 250 to 400 molecules each, UMIs of 10 bases in
                the BX tag (no RX), 5% of reads with a one-base UMI error,
                a few UMIs with an N; coordinate-sorted, single-end.
  cells_ub.bam  a single-cell library (CELLS-9): 16 cells, 30 gene positions,
                cell barcode CB and UMI UB (10 bases), 4% of reads with a
                one-base UMI error, 2% of records without CB; pairs with MC;
                unsorted (SO:unsorted, so headroom hashes).
The expected molecules are not written here: scripts/reads_reference.py
computes them from the files by the DESIGN.md rules (directional adjacency
written there from Smith, Heger & Sudbery 2017), and that is the golden.

Usage: /usr/bin/python3 scripts/reads_umi_fixtures.py [OUTDIR] [--seed N]
"""
import os
import random
import sys

import pysam

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from reads_fixtures import segment  # noqa: E402  (record builder shared with the fixtures)

BASES = "ACGT"


def umi(r, n=10):
    return "".join(r.choice(BASES) for _ in range(n))


def one_error(r, u):
    i = r.randrange(len(u))
    return u[:i] + r.choice([b for b in BASES if b != u[i]]) + u[i + 1:]


def copies(r):
    """Reads of one molecule: 1 + a geometric number (mean about 3)."""
    n = 1
    while r.random() < 0.68:
        n += 1
    return n


def spot(r):
    return (r.randint(1, 2), r.choice([1101, 1102, 1201]), r.randint(1000, 30000), r.randint(1000, 30000))


def amplicon(r):
    refs = [("amp", 20000)]
    recs = []
    serial = 0
    for a in range(12):
        pos = 500 + a * 1500
        for m in range(r.randint(250, 400)):
            u = umi(r)
            if r.random() < 0.01:
                u = u[:4] + "N" + u[5:]  # a UMI that is matched exactly only
            rev = r.random() < 0.5
            for c in range(copies(r)):
                serial += 1
                uu = one_error(r, u) if r.random() < 0.05 else u
                lane, tile, x, y = spot(r)
                name = "INV%06d:3:FCA01:%d:%d:%d:%d" % (serial, lane, tile, x, y)
                clip = r.choice([0, 0, 0, 3])
                cig = [(4, clip), (0, 100 - clip)] if clip and not rev else ([(0, 100 - clip), (4, clip)] if clip else [(0, 100)])
                p = pos + (clip if not rev else 0)
                recs.append(dict(qname=name, flag=16 if rev else 0, ref=0, pos=p, cigar=cig, mref=-1, mpos=-1,
                                 tags=[("RG", "amp1"), ("BX", uu)]))
    recs.sort(key=lambda x: (x["ref"], x["pos"], x["qname"]))
    hdr = {"HD": {"VN": "1.6", "SO": "coordinate"}, "SQ": [{"SN": n, "LN": l} for n, l in refs],
           "RG": [{"ID": "amp1", "LB": "AMP-1", "SM": "panel", "PL": "ILLUMINA"}],
           "PG": [{"ID": "reads_umi_fixtures.py", "PN": "reads_umi_fixtures.py"}]}
    return hdr, recs


def cells(r):
    refs = [("chr1", 300000), ("chr2", 200000)]
    barcodes = sorted({umi(r, 16) for _ in range(16)})
    genes = [(r.randrange(2), r.randrange(1000, 190000)) for _ in range(30)]
    recs = []
    serial = 0
    for cb in barcodes:
        for ref, pos in genes:
            for m in range(r.randint(2, 12)):
                u = umi(r)
                ins = r.randint(200, 400)
                for c in range(copies(r)):
                    serial += 1
                    uu = one_error(r, u) if r.random() < 0.04 else u
                    lane, tile, x, y = spot(r)
                    name = "INV%06d:5:FCC02:%d:%d:%d:%d" % (serial, lane, tile, x, y)
                    tags = [("RG", "c9")]
                    if r.random() >= 0.02:
                        tags.append(("CB", cb))
                    tags.append(("UB", uu))
                    mpos = pos + ins - 90
                    r1 = dict(qname=name, flag=0x1 | 0x2 | 0x20 | 0x40, ref=ref, pos=pos, cigar=[(0, 90)], mref=ref, mpos=mpos,
                              tags=tags + [("MC", "90M")])
                    r2 = dict(qname=name, flag=0x1 | 0x2 | 0x10 | 0x80, ref=ref, pos=mpos, cigar=[(0, 90)], mref=ref, mpos=pos,
                              tags=tags + [("MC", "90M")])
                    recs += [r1, r2]
    r.shuffle(recs)
    hdr = {"HD": {"VN": "1.6", "SO": "unsorted"}, "SQ": [{"SN": n, "LN": l} for n, l in refs],
           "RG": [{"ID": "c9", "LB": "CELLS-9", "SM": "organoid", "PL": "ILLUMINA"}],
           "PG": [{"ID": "reads_umi_fixtures.py", "PN": "reads_umi_fixtures.py"}]}
    return hdr, recs


def write(path, hdr, recs):
    with pysam.AlignmentFile(path, "wb", header=hdr) as out:
        for x in recs:
            out.write(segment(out.header, dict(x, mapq=60)))


def main():
    args = sys.argv[1:]
    seed = 12
    if "--seed" in args:
        i = args.index("--seed")
        seed = int(args[i + 1])
        del args[i:i + 2]
    here = os.path.dirname(os.path.abspath(__file__))
    outdir = args[0] if args else os.path.join(here, "..", "testdata", "reads")
    r = random.Random(seed)
    write(os.path.join(outdir, "umi_bx.bam"), *amplicon(r))
    write(os.path.join(outdir, "cells_ub.bam"), *cells(r))


if __name__ == "__main__":
    main()
