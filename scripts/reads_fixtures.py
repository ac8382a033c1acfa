#!/usr/bin/python3
"""Generate the read fixtures of testdata/reads/ with pysam (Debian python3-pysam).

An invented scenario: a few libraries sequenced on an invented reference,
with PCR duplicates that are clipped differently, copies read from either
strand (R1/R2 swapped), optical duplicates, UMIs, pairs without MC, mates
on other references, mates unmapped, secondary/supplementary/QC-failed/
unmapped records, duplicate-flagged records and a single-end library.

Writes (deterministic for a given seed):
  sorted.bam        coordinate-sorted BAM (@HD SO:coordinate)
  unsorted.bam      the same records shuffled (@HD SO:unsorted)
  liar.bam          the same records shuffled, header claiming SO:coordinate
  sorted.sam        the same records as SAM text
  sorted.sam.gz     that SAM gzip-compressed
  pairs_R1.fastq.gz the paired reads, R1 gzip-compressed
  pairs_R2.fastq.gz R2, BGZF-compressed (pysam.tabix_compress)
  single.fastq      single-end reads, plain text, UMIs in the names

Usage: /usr/bin/python3 scripts/reads_fixtures.py [OUTDIR] [--seed N]
"""
import gzip
import io
import os
import random
import sys

import pysam

BASES = "ACGT"
COMP = str.maketrans("ACGT", "TGCA")


def revcomp(s):
    return s.translate(COMP)[::-1]


class Gen:
    def __init__(self, seed):
        self.r = random.Random(seed)
        self.refs = [("chrA", 60000), ("chrB", 40000), ("chrC", 25000)]
        self.seq = {n: "".join(self.r.choice(BASES) for _ in range(l)) for n, l in self.refs}
        self.records = []  # dicts describing alignment records
        self.fastq = []  # (name, r1seq, r2seq)
        self.single = []  # (name, seq)
        self.serial = 0
        self.no_mc = 0.08  # share of pairs written without MC (older aligners)

    def name(self, spot=None):
        self.serial += 1
        if spot is None:
            spot = (self.r.randint(1, 4), self.r.choice([1101, 1102, 2101, 2204]),
                    self.r.randint(1000, 30000), self.r.randint(1000, 30000))
        lane, tile, x, y = spot
        return "SIM%05d:7:FCX42:%d:%d:%d:%d" % (self.serial, lane, tile, x, y), spot

    def qual(self, n):
        return "I" * n  # constant: keeps the gzip files small

    def mutate(self, s):
        if self.r.random() < 0.05:  # a sequencing error in this copy
            i = self.r.randrange(len(s))
            s = s[:i] + self.r.choice([b for b in BASES if b != s[i]]) + s[i + 1:]
        return s

    def aligned(self, ref, end5, rev, readlen=100):
        """Return (pos, cigar, seq) of a read whose unclipped 5' end is end5."""
        r = self.r
        lead_h = r.choice([0, 0, 0, 0, 3, 7]) if r.random() < 0.3 else 0
        lead_s = r.choice([0, 0, 1, 2, 5, 9, 14])
        tail_s = r.choice([0, 0, 0, 3, 8])
        tail_h = r.choice([0, 0, 4]) if r.random() < 0.2 else 0
        core = readlen - lead_h - lead_s - tail_s - tail_h
        kind = r.random()
        ops = []
        if kind < 0.1 and core > 20:
            a = r.randint(5, core - 10)
            ops = [(0, a), (1, 2), (0, core - a - 2)]  # insertion
        elif kind < 0.2 and core > 20:
            a = r.randint(5, core - 10)
            ops = [(0, a), (2, r.randint(1, 4)), (0, core - a)]  # deletion
        elif kind < 0.25 and core > 20:
            a = r.randint(5, core - 10)
            ops = [(0, a), (3, r.randint(100, 400)), (0, core - a)]  # skipped region (N)
        else:
            ops = [(0, core)]
        reflen = sum(l for o, l in ops if o in (0, 2, 3))
        # Clips are at the read's 5' end on the forward strand and at its
        # 3' end on the reverse strand (in reference orientation they swap).
        if not rev:
            left_h, left_s, right_s, right_h = lead_h, lead_s, tail_s, tail_h
            pos = end5 + left_h + left_s
        else:
            left_h, left_s, right_s, right_h = tail_h, tail_s, lead_s, lead_h
            pos = end5 - (right_s + right_h) - reflen + 1
        cig = []
        if left_h:
            cig.append((5, left_h))
        if left_s:
            cig.append((4, left_s))
        cig += ops
        if right_s:
            cig.append((4, right_s))
        if right_h:
            cig.append((5, right_h))
        qlen = sum(l for o, l in cig if o in (0, 1, 4))
        seq = "".join(r.choice(BASES) for _ in range(qlen))
        return pos, cig, seq

    def add_library(self, rgs, n_mol, mean_copies, umi=False, paired=True, optical_rate=0.15):
        r = self.r
        for m in range(n_mol):
            ncopy = 1
            while r.random() < 1 - 1.0 / mean_copies:
                ncopy += 1
            ref_i = r.randrange(len(self.refs))
            refname, reflen = self.refs[ref_i]
            flen = r.randint(180, 520)
            start = r.randint(600, reflen - flen - 600)
            left, right = start, start + flen - 1
            mref_i = ref_i
            if paired and r.random() < 0.03:  # mate on another reference
                mref_i = (ref_i + 1 + r.randrange(len(self.refs) - 1)) % len(self.refs)
                right = r.randint(600, self.refs[mref_i][1] - 600)
            u = "".join(r.choice(BASES) for _ in range(8)) if umi else None
            frag = self.seq[refname][start:start + flen]
            spots = []
            for c in range(ncopy):
                if spots and r.random() < optical_rate:
                    lane, tile, x, y = r.choice(spots)
                    spot = (lane, tile, max(0, x + r.randint(-90, 90)), max(0, y + r.randint(-90, 90)))
                else:
                    spot = None
                qname, spot = self.name(spot)
                spots.append(spot)
                rg = r.choice(rgs)
                if u is not None:
                    uu = u
                    if r.random() < 0.05:  # a UMI sequencing error: another key
                        uu = u[:-1] + r.choice([b for b in BASES if b != u[-1]])
                    qname_u = qname
                else:
                    uu, qname_u = None, qname
                if paired:
                    self.add_pair(qname_u, rg, ref_i, left, mref_i, right, uu)
                    r1 = self.mutate(frag[:100])
                    r2 = self.mutate(revcomp(frag[-100:]))
                    if self.records[-1]["swap"]:
                        r1, r2 = r2, r1
                    self.fastq.append((qname_u, r1, r2, uu))
                else:
                    self.add_single(qname_u, rg, ref_i, left if m % 2 == 0 else right, m % 2 == 1, uu)
                    self.single.append((qname_u + ("_" + uu if uu else ""), self.mutate(frag[:100])))

    def base_rec(self, qname, rg, umi):
        tags = []
        if rg is not None:
            tags.append(("RG", rg))
        if umi is not None:
            tags.append(("RX", umi))
        return {"qname": qname, "tags": tags, "mapq": self.r.choice([60, 60, 60, 60, 37, 20, 3, 0])}

    def add_single(self, qname, rg, ref_i, end5, rev, umi):
        pos, cig, seq = self.aligned(ref_i, end5, rev)
        rec = self.base_rec(qname, rg, umi)
        flag = 0x10 if rev else 0
        if self.r.random() < 0.04:
            flag |= 0x400
        rec.update(flag=flag, ref=ref_i, pos=pos, cigar=cig, seq=seq, mref=-1, mpos=-1, swap=False)
        self.records.append(rec)

    def add_pair(self, qname, rg, ref_i, left, mref_i, right, umi):
        r = self.r
        swap = r.random() < 0.5  # R1 is the reverse-strand mate
        a_pos, a_cig, a_seq = self.aligned(ref_i, left, False)
        b_pos, b_cig, b_seq = self.aligned(mref_i, right, True)
        a = self.base_rec(qname, rg, umi)
        b = dict(a)
        b["tags"] = list(a["tags"])
        b["mapq"] = r.choice([60, 60, 60, 20, 0])
        a.update(ref=ref_i, pos=a_pos, cigar=a_cig, seq=a_seq, rev=False)
        b.update(ref=mref_i, pos=b_pos, cigar=b_cig, seq=b_seq, rev=True)
        first, second = (b, a) if swap else (a, b)
        first["r1"], second["r1"] = True, False
        fate = r.random()
        with_mc = r.random() > self.no_mc
        for x, y in ((first, second), (second, first)):
            flag = 0x1 | (0x40 if x["r1"] else 0x80)
            if x["rev"]:
                flag |= 0x10
            if y["rev"]:
                flag |= 0x20
            if x["ref"] == y["ref"]:
                flag |= 0x2
            x["flag"] = flag
            x["mref"], x["mpos"] = y["ref"], y["pos"]
            if with_mc:
                x["tags"].append(("MC", cigar_string(y["cigar"])))
            x["swap"] = swap
        if fate < 0.04:  # QC-failed pair
            first["flag"] |= 0x200
            second["flag"] |= 0x200
        elif fate < 0.08:  # marked duplicate earlier: still counted
            first["flag"] |= 0x400
            second["flag"] |= 0x400
        elif fate < 0.12:  # mate unmapped: the mapped read is a single-end fragment
            um = first if r.random() < 0.5 else second
            mp = second if um is first else first
            um["flag"] = (um["flag"] | 0x4) & ~0x2 & ~0x10
            mp["flag"] = (mp["flag"] | 0x8) & ~0x2 & ~0x20
            um["ref"], um["pos"], um["cigar"] = mp["ref"], mp["pos"], []
            um["mref"], um["mpos"] = mp["ref"], mp["pos"]
            um["tags"] = [t for t in um["tags"] if t[0] != "MC"]
            mp["tags"] = [t for t in mp["tags"] if t[0] != "MC"]
            um["mapq"] = 0
        elif fate < 0.14:  # both unmapped, at the end of a sorted file
            for x in (first, second):
                x["flag"] = (x["flag"] | 0x4 | 0x8) & ~0x2 & ~0x10 & ~0x20
                x["ref"], x["pos"], x["cigar"], x["mref"], x["mpos"] = -1, -1, [], -1, -1
                x["tags"] = [t for t in x["tags"] if t[0] != "MC"]
                x["mapq"] = 0
        self.records.append(first)
        self.records.append(second)
        if fate > 0.9:  # an extra secondary or supplementary alignment of R1
            extra = dict(first)
            extra["tags"] = list(first["tags"])
            extra["flag"] = first["flag"] | (0x100 if r.random() < 0.5 else 0x800)
            extra["pos"] = r.randint(600, self.refs[first["ref"]][1] - 800)
            extra["cigar"] = [(4, 30), (0, 70)]
            extra["seq"] = "A" * 100
            self.records.append(extra)


def cigar_string(cig):
    return "".join("%d%s" % (l, "MIDNSHP=X"[o]) for o, l in cig) if cig else "*"


def header(g, so):
    return {
        "HD": {"VN": "1.6", "SO": so},
        "SQ": [{"SN": n, "LN": l} for n, l in g.refs],
        "RG": [
            {"ID": "lane1.A", "LB": "LIB-A", "SM": "S1", "PL": "ILLUMINA"},
            {"ID": "lane2.A", "LB": "LIB-A", "SM": "S1", "PL": "ILLUMINA"},
            {"ID": "lane1.B", "LB": "LIB-B", "SM": "S2", "PL": "ILLUMINA"},
            {"ID": "lane1.U", "LB": "LIB-U", "SM": "S3", "PL": "ILLUMINA"},
            {"ID": "lane1.S", "LB": "LIB-S", "SM": "S4", "PL": "ILLUMINA"},
            {"ID": "lane1.N", "SM": "S5", "PL": "ILLUMINA"},
        ],
        "PG": [{"ID": "reads_fixtures.py", "PN": "reads_fixtures.py"}],
    }


def segment(header, x):
    """The pysam record of one record dict (also used by reads_umi_fixtures.py)."""
    a = pysam.AlignedSegment(header)
    a.query_name = x["qname"]
    a.flag = x["flag"]
    a.reference_id = x["ref"]
    a.reference_start = x["pos"]
    a.mapping_quality = x["mapq"]
    if x["cigar"]:
        a.cigartuples = x["cigar"]
    a.next_reference_id = x["mref"]
    a.next_reference_start = x["mpos"]
    # Most records carry SEQ '*' to keep the fixtures small; one in
    # ten carries bases and qualities, to exercise those fields.
    if x.get("seq") and sum(map(ord, x["qname"])) % 10 == 0:
        a.query_sequence = x["seq"]
        a.query_qualities = pysam.qualitystring_to_array("I" * len(x["seq"]))
    a.set_tags(x["tags"])
    return a


def write(path, g, recs, so, mode):
    with pysam.AlignmentFile(path, mode, header=header(g, so)) as out:
        for x in recs:
            out.write(segment(out.header, x))


def main():
    args = sys.argv[1:]
    seed = 20261201
    if "--seed" in args:
        i = args.index("--seed")
        seed = int(args[i + 1])
        del args[i:i + 2]
    outdir = args[0] if args else os.path.join(os.path.dirname(__file__), "..", "testdata", "reads")
    os.makedirs(outdir, exist_ok=True)
    g = Gen(seed)
    g.add_library(["lane1.A", "lane2.A"], 300, 2.5)
    g.add_library(["lane1.B"], 150, 6.0, optical_rate=0.4)
    g.add_library(["lane1.U"], 200, 3.0, umi=True)
    g.add_library(["lane1.S"], 200, 2.0, paired=False)
    g.add_library(["lane1.N"], 60, 2.0)
    g.add_library([None], 60, 2.0)
    recs = g.records
    # Mapped reads whose clipping would put them before the start are
    # impossible by construction (starts >= 600), so every POS is >= 0.
    key = lambda x: (x["ref"] if x["ref"] >= 0 else 1 << 30, x["pos"])
    srt = sorted(recs, key=key)
    write(os.path.join(outdir, "sorted.bam"), g, srt, "coordinate", "wb")
    write(os.path.join(outdir, "sorted.sam"), g, srt, "coordinate", "w")
    with open(os.path.join(outdir, "sorted.sam"), "rb") as f, gzip.GzipFile(os.path.join(outdir, "sorted.sam.gz"), "wb", mtime=0) as z:
        z.write(f.read())
    shuf = list(recs)
    random.Random(seed + 1).shuffle(shuf)
    write(os.path.join(outdir, "unsorted.bam"), g, shuf, "unsorted", "wb")
    write(os.path.join(outdir, "liar.bam"), g, shuf, "coordinate", "wb")
    # Paired FASTQ of the same molecules: R1 gzip, R2 BGZF.
    r2plain = os.path.join(outdir, "pairs_R2.fastq")
    with io.TextIOWrapper(gzip.GzipFile(os.path.join(outdir, "pairs_R1.fastq.gz"), "wb", mtime=0)) as f1, open(r2plain, "w") as f2:
        for name, s1, s2, umi in g.fastq:
            c = " RX:Z:%s" % umi if umi else ""
            f1.write("@%s/1%s\n%s\n+\n%s\n" % (name, c, s1, g.qual(len(s1))))
            f2.write("@%s/2%s\n%s\n+\n%s\n" % (name, c, s2, g.qual(len(s2))))
    pysam.tabix_compress(r2plain, r2plain + ".gz", force=True)
    os.remove(r2plain)
    with open(os.path.join(outdir, "single.fastq"), "w") as f:
        for name, s in g.single:
            f.write("@%s\n%s\n+\n%s\n" % (name, s, g.qual(len(s))))
    print("wrote %d alignment records, %d pairs, %d single reads to %s" % (len(recs), len(g.fastq), len(g.single), outdir))


if __name__ == "__main__":
    main()
