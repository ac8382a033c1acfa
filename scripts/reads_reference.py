#!/usr/bin/python3
"""Reference molecule frequency counts, computed with pysam (Debian python3-pysam).

An implementation of DESIGN.md "Reads: what counts as one molecule" that
shares no code with headroom: pysam parses BAM/SAM/FASTQ (htslib), pysam's
reference_end gives the reference-consumed length, and everything else is
written here from the rules. Its output is the golden file the Go tests
compare headroom's --save-counts and summary columns against.

Usage:
  /usr/bin/python3 scripts/reads_reference.py [--cases testdata/reads/reference_cases.tsv] > testdata/reads/reference_golden.tsv
  /usr/bin/python3 scripts/reads_reference.py --cases CASES --dir DIR    (other fixtures, e.g. real files)

CASES lines: case name, a tab, the headroom reads arguments (file paths
relative to DIR, which defaults to the folder of CASES). Output lines:
  counts  CASE SAMPLE TIMES_SEEN UNITS
  columns CASE SAMPLE RECORDS USED_FRAGMENTS OPTICAL_DUPS
"""
import gzip
import os
import re
import sys
from collections import OrderedDict

import pysam

pysam.set_verbosity(0)  # no index warnings: the files are read from start to end

SKIP = 0x4 | 0x100 | 0x200 | 0x800
CIGAR_RE = re.compile(r"(\d+)([MIDNSHP=X])")
REF_OPS = set("MDN=X")  # SAM spec 1.4.6: operations that consume the reference


def parse_cigar(s):
    if s == "*":
        return []
    ops = CIGAR_RE.findall(s)
    if "".join(a + b for a, b in ops) != s:
        raise ValueError("bad CIGAR %r" % s)
    return [(int(a), b) for a, b in ops]


def unclipped5_text(pos, cigar, rev):
    """5' end from a text CIGAR (used for the mate, from MC)."""
    if not rev:
        lead = 0
        for n, op in cigar:
            if op not in "SH":
                break
            lead += n
        return pos - lead
    reflen = sum(n for n, op in cigar if op in REF_OPS) or 1
    trail = 0
    for n, op in reversed(cigar):
        if op not in "SH":
            break
        trail += n
    return pos + reflen - 1 + trail


def unclipped5_read(a):
    """5' end of a pysam AlignedSegment, from pysam's own coordinates."""
    ct = a.cigartuples or []
    if not a.is_reverse:
        lead = 0
        for op, n in ct:
            if op not in (4, 5):  # S, H
                break
            lead += n
        return a.reference_start - lead
    end = a.reference_end  # one past the last reference base, computed by htslib
    if end is None or end == a.reference_start:
        end = a.reference_start + 1
    trail = 0
    for op, n in reversed(ct):
        if op not in (4, 5):
            break
        trail += n
    return end - 1 + trail


def spot(name):
    """(lane, tile, x, y) of an Illumina name ...:lane:tile:x:y[:UMI], or None."""
    if name.endswith("/1") or name.endswith("/2"):
        name = name[:-2]
    f = name.split(":")
    if len(f) in (5, 7):
        v = f[-4:]
    elif len(f) == 8:
        v = f[3:7]
    else:
        return None
    if not all(x.isdigit() for x in v):
        return None
    return tuple(int(x) for x in v)


def name_umi(name):
    if name.endswith("/1") or name.endswith("/2"):
        name = name[:-2]
    if name.count(":") == 7:
        return name.rsplit(":", 1)[1]
    if "_" in name and not name.endswith("_"):
        return name.rsplit("_", 1)[1]
    return None


def clusters(spots, dist):
    """Single-linkage clusters of one molecule's reads (None = no spot)."""
    n = len(spots)
    if dist <= 0:
        return n
    parent = list(range(n))

    def find(i):
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    for i in range(n):
        for j in range(i + 1, n):
            a, b = spots[i], spots[j]
            if a is None or b is None or a[:2] != b[:2]:
                continue
            if abs(a[2] - b[2]) <= dist and abs(a[3] - b[3]) <= dist:
                parent[find(i)] = find(j)
    return len({find(i) for i in range(n)})


class Sample:
    def __init__(self):
        self.records = 0
        self.mols = OrderedDict()  # (position key, UMI) -> list of spots

    def add(self, key, sp):
        # key ends with the UMI ("" when none)
        self.mols.setdefault(key, []).append(sp)


def umi_bases(umi):
    """The UMI as bases for error collapsing, or None when it is matched
    exactly only: other letters than ACGT (N...), none, or over 28 bases.
    '-' and '+' joining dual UMIs are not bases."""
    b = umi.upper().replace("-", "").replace("+", "")
    if not b or len(b) > 28 or set(b) - set("ACGT"):
        return None
    return b


def hamming1(a, b):
    return len(a) == len(b) and sum(x != y for x, y in zip(a, b)) == 1


def directional(umis):
    """Directional adjacency (Smith, Heger & Sudbery 2017, Genome Research
    27:491): a -> b when a and b differ at one base and
    count(a) >= 2 count(b) - 1. UMIs taken from the most reads down (ties:
    shorter, then alphabetical); each not yet taken starts a molecule and
    takes every UMI reachable from it along edges not yet taken.
    umis: {bases: (count, spots)}. Returns [(reads, spots)] and the number
    of UMIs merged."""
    order = sorted(umis, key=lambda u: (-umis[u][0], len(u), u))
    taken = set()
    out = []
    merged = 0
    for u in order:
        if u in taken:
            continue
        taken.add(u)
        todo = [u]
        n, spots = 0, []
        while todo:
            a = todo.pop(0)
            n += umis[a][0]
            spots += umis[a][1]
            for b in order:
                if b not in taken and hamming1(a, b) and umis[a][0] >= 2 * umis[b][0] - 1:
                    taken.add(b)
                    merged += 1
                    todo.append(b)
        out.append((n, spots))
    return out, merged


def parse_args(args):
    o = {"by": "library", "umi_tags": ["RX"], "umi_name": False, "cell": None, "umi_errors": 1,
         "min_mapq": 0, "optical": 100, "key_bases": 16, "files": []}
    i = 0
    while i < len(args):
        a = args[i]
        if a in ("--by", "--umi-tag", "--cell-tag", "--umi-errors", "--min-mapq", "--optical-distance", "--key-bases", "--mode"):
            v = args[i + 1]
            i += 2
            if a == "--by":
                o["by"] = v
                if v == "cell" and o["cell"] is None:
                    o["cell"] = "CB"
            elif a == "--umi-tag":
                src = v.split(",")
                o["umi_tags"] = [t for t in src if t not in ("name", "none")]
                o["umi_name"] = "name" in src
            elif a == "--cell-tag":
                o["cell"] = v
            elif a == "--umi-errors":
                o["umi_errors"] = int(v)
            elif a == "--min-mapq":
                o["min_mapq"] = int(v)
            elif a == "--optical-distance":
                o["optical"] = int(v)
            elif a == "--key-bases":
                o["key_bases"] = int(v)
            continue
        o["files"].append(a)
        i += 1
    return o


def is_fastq(path):
    """FASTQ: the decompressed text starts with '@' but not with a SAM header tag."""
    with open(path, "rb") as f:
        magic = f.read(2)
    opener = gzip.open if magic == b"\x1f\x8b" else open
    with opener(path, "rb") as f:
        head = f.read(4)
    return head[:1] == b"@" and not (len(head) == 4 and head[1:3].isupper() and head[3:4] == b"\t")


def count_alignments(path, o, samples):
    base = os.path.basename(path)
    with pysam.AlignmentFile(path, "r", check_sq=False) as f:
        rgs = {rg["ID"]: rg.get("LB", "") for rg in f.header.to_dict().get("RG", [])}
        for a in f.fetch(until_eof=True):
            rg = a.get_tag("RG") if a.has_tag("RG") else None
            if rg is None or o["by"] == "file":
                lib = base
            elif o["by"] == "library" and rgs.get(rg):
                lib = rgs[rg]
            else:
                lib = rg
            cell = None
            if o["cell"]:
                cell = a.get_tag(o["cell"]) if a.has_tag(o["cell"]) else None
            if o["by"] == "cell":
                lib = (lib, cell)
            s = samples.setdefault(lib, Sample())
            s.records += 1
            if a.flag & SKIP or a.mapping_quality < o["min_mapq"] or a.reference_id < 0:
                continue
            umi = None
            for t in o["umi_tags"]:
                if a.has_tag(t):
                    umi = a.get_tag(t)
                    break
            if umi is None and o["umi_name"]:
                umi = name_umi(a.query_name)
            lib = (lib, cell)  # the cell is part of the molecule
            sp = spot(a.query_name) if o["optical"] > 0 else None
            e = (a.reference_id, unclipped5_read(a), a.is_reverse)
            paired = a.is_paired and not a.mate_is_unmapped and a.next_reference_id >= 0 and a.next_reference_start >= 0
            if not paired:
                s.add(("S", lib) + e + (umi or "",), sp)
                continue
            # Counted on the mate at the lower raw position (RNAME, POS
            # against RNEXT, PNEXT): both records of a pair see both
            # positions, so exactly one of them counts it. On a tie, read 1;
            # when the flags do not say (both or neither set), the forward
            # mate of a pair on opposite strands.
            own, mate = (a.reference_id, a.reference_start), (a.next_reference_id, a.next_reference_start)
            if mate < own:
                continue
            if mate == own:
                if a.is_read1 != a.is_read2:
                    if a.is_read2:
                        continue
                elif a.is_reverse != a.mate_is_reverse and a.is_reverse:
                    continue
            if a.has_tag("MC") and a.get_tag("MC") != "*":
                mend = unclipped5_text(a.next_reference_start, parse_cigar(a.get_tag("MC")), a.mate_is_reverse)
            else:
                mend = a.next_reference_start  # approximation stated in headroom's notes
            m = (a.next_reference_id, mend, a.mate_is_reverse)
            lo, hi = sorted([e, m])
            s.add(("P", lib) + lo + hi + (umi or "",), sp)


def fastq_umi(entry, o):
    for t in o["umi_tags"]:
        for w in (entry.comment or "").split():
            if w.startswith(t + ":Z:"):
                return w[5:]
    if o["umi_name"]:
        return name_umi(entry.name) or ""
    return ""


def key_distance(x, y):
    """Mismatches between two FASTQ keys (a, b), either mate order; None
    when the lengths differ."""
    best = None
    for b0, b1 in ((y[0], y[1]), (y[1], y[0])):
        if len(x[0]) == len(b0) and len(x[1]) == len(b1):
            d = sum(p != q for p, q in zip(x[0], b0)) + sum(p != q for p, q in zip(x[1], b1))
            best = d if best is None else min(best, d)
    return best


def collapse_fastq_keys(mols):
    """Directional adjacency (Smith et al. 2017, as directional() above) over
    FASTQ keys of one library and UMI, with edges between keys within two
    mismatches (the leading bases of both mates, either mate order). Keys
    with other letters than ACGT are matched exactly. mols: {key: spots},
    key = ("F1"/"F2", a, b, umi). Returns [spots] and the number merged."""
    by_umi = OrderedDict()
    exact = []
    for key, spots in mols.items():
        a, b = key[1], key[2] if key[0] == "F2" else ""
        if set(a + b) - set("ACGT") or len(a) > 28 or len(b) > 28:
            exact.append(spots)
            continue
        by_umi.setdefault(key[-1], {})[(a, b)] = spots
    out, merged = list(exact), 0
    for keys in by_umi.values():
        order = sorted(keys, key=lambda k: (-len(keys[k]), len(k[0]), k[0], len(k[1]), k[1]))
        taken = set()
        for k in order:
            if k in taken:
                continue
            taken.add(k)
            todo, spots = [k], []
            while todo:
                x = todo.pop(0)
                spots += keys[x]
                for y in order:
                    if y in taken:
                        continue
                    d = key_distance(x, y)
                    if d is not None and 1 <= d <= 2 and len(keys[x]) >= 2 * len(keys[y]) - 1:
                        taken.add(y)
                        merged += 1
                        todo.append(y)
            out.append(spots)
    return out, merged


def count_fastq(p1, p2, o, samples):
    lib = os.path.basename(p1)
    s = samples.setdefault(lib, Sample())
    kb = o["key_bases"]
    cut = (lambda x: x[:kb]) if kb > 0 else (lambda x: x)
    f1 = pysam.FastxFile(p1)
    f2 = pysam.FastxFile(p2) if p2 else None
    it2 = iter(f2) if f2 else None
    for e1 in f1:
        sp = spot(e1.name) if o["optical"] > 0 else None
        umi = fastq_umi(e1, o)
        if it2 is None:
            s.records += 1
            s.add(("F1", cut(e1.sequence), umi), sp)
            continue
        e2 = next(it2)
        s.records += 2
        a, b = sorted([cut(e1.sequence), cut(e2.sequence)])
        s.add(("F2", a, b, umi), sp)


def first_name(path):
    with pysam.FastxFile(path) as f:
        n = next(iter(f)).name
    return n[:-2] if n.endswith(("/1", "/2")) else n


def run_case(args, base_dir):
    o = parse_args(args)
    files = [os.path.join(base_dir, p) for p in o["files"]]
    samples = OrderedDict()
    fq = [p for p in files if is_fastq(p)]
    for p in files:
        if p not in fq:
            count_alignments(p, o, samples)
    i = 0
    while i < len(fq):
        if i + 1 < len(fq) and first_name(fq[i]) == first_name(fq[i + 1]):
            count_fastq(fq[i], fq[i + 1], o, samples)
            i += 2
        else:
            count_fastq(fq[i], None, o, samples)
            i += 1
    out = []
    cell_libs = {name[0] for name in samples if isinstance(name, tuple)}
    for name, s in samples.items():
        freq = {}
        used = optical = 0
        # UMIs of one position, for error collapsing; FASTQ keys apart
        # (their UMIs are matched exactly, their bases collapsed)
        groups = OrderedDict()
        mols = []
        fq = OrderedDict()
        for key, spots in s.mols.items():
            used += len(spots)
            if key[0] in ("F1", "F2"):
                fq[key] = spots
                continue
            b = umi_bases(key[-1]) if o["umi_errors"] > 0 else None
            if b is None:
                mols.append(spots)
            else:
                groups.setdefault(key[:-1], {})[b] = (len(spots), spots)
        merged = 0
        if 0 < o["key_bases"] <= 28:
            ms, _ = collapse_fastq_keys(fq)
            mols += ms
        else:
            mols += list(fq.values())
        for umis in groups.values():
            ms, m = directional(umis)
            merged += m
            mols += [sp for _, sp in ms]
        for spots in mols:
            t = clusters(spots, o["optical"])
            optical += len(spots) - t
            freq[t] = freq.get(t, 0) + 1
        if isinstance(name, tuple):  # --by cell
            lib, cell = name
            name = cell if cell is not None else "no-cell"
            if len(cell_libs) > 1:
                name = lib + "/" + name
        out.append((name, s.records, used, optical, freq))
    return out


def main():
    args = sys.argv[1:]
    here = os.path.dirname(os.path.abspath(__file__))
    cases = os.path.join(here, "..", "testdata", "reads", "reference_cases.tsv")
    base_dir = None
    if "--cases" in args:
        cases = args[args.index("--cases") + 1]
    if "--dir" in args:
        base_dir = args[args.index("--dir") + 1]
    if base_dir is None:
        base_dir = os.path.dirname(os.path.abspath(cases))
    print("# computed by scripts/reads_reference.py with pysam %s from %s" % (pysam.__version__, os.path.basename(cases)))
    with open(cases) as f:
        for line in f:
            line = line.rstrip("\n")
            if not line or line.startswith("#"):
                continue
            case, argline = line.split("\t", 1)
            for name, records, used, optical, freq in run_case(argline.split(), base_dir):
                print("columns\t%s\t%s\t%d\t%d\t%d" % (case, name, records, used, optical))
                for t in sorted(freq):
                    print("counts\t%s\t%s\t%d\t%d" % (case, name, t, freq[t]))


if __name__ == "__main__":
    main()
