#!/usr/bin/python3
"""Generate testdata/demo/qc_run.bam: an invented core-facility QC pass.

Scenario (invented): the sequencing core of a made-up institute ran a
shallow QC lane of five libraries on an invented reference ("contig1" ..
"contig4", random sequence) before deciding which to sequence deeply.

  LIB-01  high complexity (a pool of 3,000,000 molecules)
  LIB-02  moderate complexity (60,000 molecules)
  LIB-03  low input, nearly exhausted (6,000 molecules)
  LIB-04  UMI library (30,000 molecules, 8-base UMIs in RX)
  LIB-05  sequenced on two lanes: two read groups, one library (150,000)

Reads are drawn from each library's pool with PCR amplification bias (each
molecule's weight is gamma-distributed), so duplicates follow a realistic
frequency pattern. Copies of a molecule are clipped differently, are read
from either strand, and some sit next to an earlier copy on the flow cell
(optical duplicates). Some records are secondary, supplementary, QC-failed,
unmapped, or have an unmapped mate, as in real aligner output. As a current
aligner and mate-fixing step write them, every pair carries the mate's
CIGAR (MC) and the header has @HD VN:1.6 SO:coordinate, @SQ with lengths,
one @RG per lane and library, and an @PG line, so headroom's notes speak
about the libraries, not about the file.

Usage: /usr/bin/python3 scripts/demo_bam.py [OUT.bam] [--seed N]
Then:  headroom reads testdata/demo/qc_run.bam
"""
import os
import random
import sys
import zlib

import numpy as np
import pysam

pysam.set_verbosity(0)

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from reads_fixtures import Gen, write  # noqa: E402  (record builder shared with the fixtures)

LIBRARIES = [
    # name, read groups, pool size, read pairs, UMI?
    ("LIB-01", ["NGC0427.L1.LIB-01"], 3_000_000, 9000, False),
    ("LIB-02", ["NGC0427.L1.LIB-02"], 60_000, 9000, False),
    ("LIB-03", ["NGC0427.L1.LIB-03"], 6_000, 8000, False),
    ("LIB-04", ["NGC0427.L1.LIB-04"], 30_000, 7000, True),
    ("LIB-05", ["NGC0427.L1.LIB-05", "NGC0427.L2.LIB-05"], 150_000, 7000, False),
]


def main():
    args = sys.argv[1:]
    seed = 427
    if "--seed" in args:
        i = args.index("--seed")
        seed = int(args[i + 1])
        del args[i:i + 2]
    out = args[0] if args else os.path.join(os.path.dirname(__file__), "..", "testdata", "demo", "qc_run.bam")
    os.makedirs(os.path.dirname(os.path.abspath(out)), exist_ok=True)
    g = Gen(seed)
    g.no_mc = 0.0  # MC on every pair, as current pipelines write
    g.refs = [("contig1", 4_000_000), ("contig2", 3_000_000), ("contig3", 2_000_000), ("contig4", 1_000_000)]
    g.seq = {}  # the demo's SEQ is random; no reference sequence is needed
    rng = np.random.default_rng(seed)
    total = sum(l for _, l in g.refs)
    for lib, rgs, pool, pairs, umi in LIBRARIES:
        # The pool: each molecule has a position, a length and a PCR weight.
        weights = rng.gamma(shape=1.5, scale=1.0, size=pool)
        picks = rng.choice(pool, size=pairs, p=weights / weights.sum())
        mols = {}
        for m in picks:
            mols[m] = mols.get(m, 0) + 1
        for m, ncopy in sorted(mols.items()):
            r = random.Random(seed * 1_000_003 + int(m) + zlib.crc32(lib.encode()) % 9973)
            x = r.randrange(total - 2000)
            ref_i = 0
            while x >= g.refs[ref_i][1] - 1200:
                x -= g.refs[ref_i][1]
                ref_i = (ref_i + 1) % len(g.refs)
                if x < 0:
                    x = 600
            start = max(600, x)
            flen = int(r.gauss(330, 70))
            flen = min(max(flen, 160), 700)
            left, right = start, start + flen - 1
            mref_i = ref_i
            if r.random() < 0.01:  # chimeric pair: mate on another contig
                mref_i = (ref_i + 1) % len(g.refs)
                right = r.randint(600, g.refs[mref_i][1] - 800)
            u = "".join(r.choice("ACGT") for _ in range(8)) if umi else None
            spots = []
            for c in range(ncopy):
                if spots and g.r.random() < 0.25:
                    lane, tile, sx, sy = g.r.choice(spots)
                    spot = (lane, tile, max(0, sx + g.r.randint(-60, 60)), max(0, sy + g.r.randint(-60, 60)))
                else:
                    spot = (1 if rgs[0].startswith("NGC0427.L1") else 2, g.r.choice([1101, 1102, 1103, 1201, 1202, 2101, 2102]),
                            g.r.randint(1000, 32000), g.r.randint(1000, 32000))
                qname, spot = g.name(spot)
                qname = qname.replace("SIM", "NGC", 1)
                spots.append(spot)
                rg = g.r.choice(rgs)
                if len(rgs) > 1:
                    lane = 1 + rgs.index(rg)
                    f = qname.split(":")
                    f[3] = str(lane)
                    qname = ":".join(f)
                g.add_pair(qname, rg, ref_i, left, mref_i, right, u)
    recs = g.records
    key = lambda x: (x["ref"] if x["ref"] >= 0 else 1 << 30, x["pos"])
    srt = sorted(recs, key=key)
    hdr_refs = g.refs
    tmp = out + ".tmp.bam"
    write(tmp, g, srt, "coordinate", "wb")
    # Replace the fixtures' read groups with the demo's.
    with pysam.AlignmentFile(tmp, "rb") as f:
        h = f.header.to_dict()
    h["RG"] = [{"ID": rg, "LB": lib, "SM": lib.replace("LIB", "SAMPLE"), "PL": "ILLUMINA", "PU": rg, "CN": "NGC"}
               for lib, rgs, _, _, _ in LIBRARIES for rg in rgs]
    h["HD"] = {"VN": "1.6", "SO": "coordinate"}
    h["PG"] = [{"ID": "demo_bam.py", "PN": "demo_bam.py", "VN": "2", "CL": "scripts/demo_bam.py --seed %d" % seed,
                "DS": "simulated QC pass, invented data"}]
    h["SQ"] = [{"SN": n, "LN": l} for n, l in hdr_refs]
    with pysam.AlignmentFile(tmp, "rb") as f, pysam.AlignmentFile(out, "wb", header=h) as o:
        for a in f.fetch(until_eof=True):
            o.write(a)
    os.remove(tmp)
    print("wrote %s: %d records, %d bytes" % (out, len(recs), os.path.getsize(out)))


if __name__ == "__main__":
    main()
