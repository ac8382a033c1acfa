#!/usr/bin/python3
"""Write testdata/bad/: malformed inputs for every reader and the manifest
cases.tsv that cmd/headroom/badinput_test.go runs.

    /usr/bin/python3 scripts/gen_bad_corpus.py

Standard library only. Every file is invented and built here from the
format's specification (BAM and BGZF: SAM specification sections 4.1-4.2;
gzip: RFC 1952; BIOM 1.0: the biom-format.org JSON description; HDF5: the
file signature of the HDF5 file format specification; BIOM 2.1 files are
copied or cut from testdata/taxa/biom2/, written by
scripts/biom2_fixtures.py with python3-biom-format and python3-h5py). Output is
deterministic: re-running the script rewrites identical files.

Manifest columns (tab-separated, one header line, '#' lines are comments):

    name    case name (also the test name)
    stdin   '-' for none, a corpus file fed on standard input, or '%NAME' a
            stream the test generates (endless input)
    args    the command line, split on spaces: '@FILE' is testdata/bad/FILE,
            '%GEN' a file the test generates at run time (too large to commit);
            the test adds --bootstrap 0 --progress never and the output flags
            -o/--save-counts/--curve (each pointing at an existing file) itself
    exit    expected exit status (1 bad input, 2 usage)
    want    a fragment the one error line must contain (file:line, record,
            column and the advice)
    what    what is wrong and where the input comes from
"""

import gzip
import json
import os
import struct
import zlib

OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "testdata", "bad")

files = {}  # name -> bytes
cases = []  # (name, stdin, args, exit, want, what)


def put(name, data):
    if isinstance(data, str):
        data = data.encode()
    assert name not in files, name
    files[name] = data


def case(name, args, exit_, want, what, stdin="-"):
    cases.append((name, stdin, args, str(exit_), want, what))


# ---------------------------------------------------------------- BGZF / gzip

BGZF_EOF = bytes.fromhex("1f8b08040000000000ff0600424302001b0003000000000000000000")


def bgzf_block(data):
    """One BGZF block (SAM specification 4.1): gzip member with a BC extra field."""
    c = zlib.compressobj(6, zlib.DEFLATED, -15)
    cdata = c.compress(data) + c.flush()
    bsize = 12 + 6 + len(cdata) + 8  # header, extra, data, trailer
    hdr = b"\x1f\x8b\x08\x04\x00\x00\x00\x00\x00\xff\x06\x00BC\x02\x00" + struct.pack("<H", bsize - 1)
    return hdr + cdata + struct.pack("<II", zlib.crc32(data) & 0xFFFFFFFF, len(data))


def bgzf(data, eof=True, block=0xFF00):
    out = b"".join(bgzf_block(data[i:i + block]) for i in range(0, len(data), block))
    return out + (BGZF_EOF if eof else b"")


def gz(data):
    return gzip.compress(data, compresslevel=6, mtime=0)


# ---------------------------------------------------------------- BAM

HEADER_TEXT = "@HD\tVN:1.6\tSO:coordinate\n@SQ\tSN:chr1\tLN:100000\n@RG\tID:rg1\tLB:LIB-BAD\n"
CIGAR_OPS = "MIDNSHP=X"


def bam_header(text=HEADER_TEXT, refs=(("chr1", 100000),), l_text=None):
    t = text.encode()
    out = b"BAM\x01" + struct.pack("<i", len(t) if l_text is None else l_text) + t
    out += struct.pack("<i", len(refs))
    for n, ln in refs:
        nb = n.encode() + b"\x00"
        out += struct.pack("<i", len(nb)) + nb + struct.pack("<i", ln)
    return out


def cigar_ops(cigar):
    ops, num = [], ""
    for ch in cigar:
        if ch.isdigit():
            num += ch
        else:
            ops.append((int(num) << 4) | CIGAR_OPS.index(ch))
            num = ""
    return ops


def bam_record(name, flag, ref, pos, cigar="20M", seq="ACGTACGTACGTACGTACGT", mapq=60,
               mate_ref=-1, mate_pos=-1, tlen=0, aux=b"RGZrg1\x00", raw_cigar=None,
               l_read_name=None, l_seq=None, block_size=None, name_nul=True):
    """One BAM alignment record (SAM specification 4.2) with its block_size."""
    nb = name.encode() + (b"\x00" if name_nul else b"")
    ops = raw_cigar if raw_cigar is not None else cigar_ops(cigar)
    codes = {c: i for i, c in enumerate("=ACMGRSVTWYHKDBN")}
    packed = bytearray((len(seq) + 1) // 2)
    for i, b in enumerate(seq):
        packed[i // 2] |= codes[b] << (4 if i % 2 == 0 else 0)
    body = struct.pack("<iiBBHHHiiii", ref, pos, len(nb) if l_read_name is None else l_read_name, mapq,
                       4680, len(ops), flag, len(seq) if l_seq is None else l_seq, mate_ref, mate_pos, tlen)
    body += nb + b"".join(struct.pack("<I", o) for o in ops) + bytes(packed) + b"\x1e" * len(seq) + aux
    return struct.pack("<i", len(body) if block_size is None else block_size) + body


def good_records(n=30):
    # Single-end reads on chr1 in coordinate order, some at the same 5' end.
    return [bam_record("r%03d" % i, 0, 0, 1000 + 37 * (i // 3)) for i in range(n)]


def bam_file(records, header=None, eof=True):
    return bgzf((header if header is not None else bam_header()) + b"".join(records), eof=eof)


good_bam = bam_file(good_records())

put("bam_cut_mid_block.bam", good_bam[:len(good_bam) // 2])
case("bam_cut_mid_block", "reads @bam_cut_mid_block.bam", 1, "truncated",
     "BGZF BAM cut in the middle of its only data block (half the file)")

put("bam_no_eof.bam", good_bam[:-28])
case("bam_no_eof", "reads @bam_no_eof.bam", 1, "end-of-file marker missing",
     "BGZF BAM cut exactly at a block boundary: the 28-byte EOF block is missing")

crc = bytearray(good_bam)
first = struct.unpack("<H", crc[16:18])[0] + 1
crc[first - 8] ^= 0xFF
put("bam_crc.bam", bytes(crc))
case("bam_crc", "reads @bam_crc.bam", 1, "corrupted",
     "BGZF BAM whose first block's CRC32 has one byte flipped")

flip = bytearray(good_bam)
flip[30] ^= 0xFF  # inside the deflate stream of the first block
put("bam_deflate_corrupt.bam", bytes(flip))
case("bam_deflate_corrupt", "reads @bam_deflate_corrupt.bam", 1, "corrupted",
     "BGZF BAM with one byte of the deflate data flipped")

raw = bam_header() + b"".join(good_records())
put("bam_cut_record.bam", bgzf(raw[:-10]))
case("bam_cut_record", "reads @bam_cut_record.bam", 1, "record 30: input ends early",
     "well-formed BGZF whose BAM payload stops 10 bytes before the end of record 30")

put("bam_cut_header.bam", bgzf(bam_header()[:30]))
case("bam_cut_header", "reads @bam_cut_header.bam", 1, "in the BAM header",
     "well-formed BGZF holding only the first 30 bytes of a BAM header")

put("bam_header_text.bam", bam_file(good_records(), header=bam_header(text="@HD\tVN:1.6\tSO:coordinate\n@SQ\tSN:chr1\tLN:zero\n")))
case("bam_header_text", "reads @bam_header_text.bam", 1, "BAM header text, line 2: malformed SAM header line",
     "BAM whose header text has an @SQ line with LN that is not a number")

put("bam_mc.bam", bam_file(good_records(5) + [bam_record("p1", 99, 0, 3000, mate_ref=0, mate_pos=3200, tlen=220,
                                                          aux=b"RGZrg1\x00MCZ20M5\x00")]))
case("bam_mc", "reads @bam_mc.bam", 1, "record 6: malformed BAM record: MC tag (the mate's CIGAR): bad CIGAR",
     "BAM pair whose MC tag ends in a number")

put("bam_ltext_negative.bam", bam_file(good_records(), header=bam_header(l_text=-5)))
case("bam_ltext_negative", "reads @bam_ltext_negative.bam", 1, "header text length -5 is invalid",
     "BAM header with l_text = -5")

# l_text of almost 1 GiB in a 60-byte file: must fail at once, without
# allocating what l_text promises.
put("bam_ltext_huge.bam", bgzf(b"BAM\x01" + struct.pack("<i", (1 << 30) - 1) + b"@HD\tVN:1.6\n"))
case("bam_ltext_huge", "reads @bam_ltext_huge.bam", 1, "in the BAM header",
     "BAM header with l_text 2^30-1 and 11 bytes of text: truncated, and memory must not follow l_text")

recs = good_records(3)
recs[1] = struct.pack("<i", 10) + b"\x00" * 10
put("bam_block_size.bam", bam_file(recs))
case("bam_block_size", "reads @bam_block_size.bam", 1, "record 2: malformed BAM record: block_size 10",
     "record 2 has block_size 10, smaller than the 32 bytes of the fixed fields")

recs = good_records(3)
recs[2] = bam_record("r_bad_ref", 0, 5, 2000)
put("bam_ref_index.bam", bam_file(recs))
case("bam_ref_index", "reads @bam_ref_index.bam", 1, "record 3: malformed BAM record: reference index 5",
     "record 3 refers to reference 5 of a header with one reference")

recs = good_records(2)
recs.append(bam_record("r_bad_cigar", 0, 0, 2000, raw_cigar=[(20 << 4) | 12]))
put("bam_cigar_op.bam", bam_file(recs))
case("bam_cigar_op", "reads @bam_cigar_op.bam", 1, "record 3: malformed BAM record: CIGAR operation code 12",
     "record 3 has CIGAR operation code 12 (codes end at 8, X)")

recs = good_records(2)
recs.append(bam_record("r_nonul", 0, 0, 2000, name_nul=False, l_read_name=len("r_nonul")))
put("bam_name_nul.bam", bam_file(recs))
case("bam_name_nul", "reads @bam_name_nul.bam", 1, "record 3: malformed BAM record: read name not NUL-terminated",
     "record 3: the read name lacks its NUL terminator")

recs = good_records(2)
recs.append(bam_record("r_aux", 0, 0, 2000, aux=b"XXq\x01\x02"))
put("bam_aux_type.bam", bam_file(recs))
case("bam_aux_type", "reads @bam_aux_type.bam", 1, "record 3: malformed BAM record: optional field XX has unknown type",
     "record 3 has an optional field of type 'q'")

recs = good_records(2)
recs.append(bam_record("r_lseq", 0, 0, 2000, l_seq=5000))
put("bam_lseq.bam", bam_file(recs))
case("bam_lseq", "reads @bam_lseq.bam", 1, "record 3: malformed BAM record: fields need",
     "record 3 claims l_seq 5000 but its block is much shorter")

recs = good_records(2)
recs.append(bam_record("r_negpos", 0, 0, -7))
put("bam_neg_pos.bam", bam_file(recs))
case("bam_neg_pos", "reads @bam_neg_pos.bam", 1, "record 3: malformed BAM record: negative position",
     "record 3 has pos -7 (only -1, unmapped, is allowed)")

put("bam_empty_bgzf.bam", BGZF_EOF)
case("bam_empty_bgzf", "reads @bam_empty_bgzf.bam", 1, "empty",
     "a BGZF file holding only the EOF block: no BAM header")

put("bam_bad_magic.bam", bgzf(b"BAX\x01" + bam_header()[4:] + b"".join(good_records(3))))
case("bam_bad_magic", "reads @bam_bad_magic.bam", 1, "not BAM, SAM or FASTQ",
     "BGZF whose payload starts with BAX\\1 instead of the BAM magic")

liar = good_records(6)
liar[2], liar[5] = liar[5], liar[2]
put("bam_liar.bam", bam_file(liar))
case("bam_liar_stdin", "reads -", 1, "stdin: record 6: not in coordinate order",
     "header says SO:coordinate but record 6 is behind record 5; on stdin it cannot be re-read hashed",
     stdin="bam_liar.bam")

# ---------------------------------------------------------------- SAM

SAM_HEAD = "@HD\tVN:1.6\tSO:unsorted\n@SQ\tSN:chr1\tLN:10000\n"
SAM_OK = "r1\t0\tchr1\t100\t60\t10M\t*\t0\t0\tACGTACGTAC\tIIIIIIIIII\n"

put("sam_fields.sam", SAM_HEAD + SAM_OK + "r2\t0\tchr1\t100\t60\t10M\n")
case("sam_fields", "reads @sam_fields.sam", 1, "sam_fields.sam:4:",
     "line 4 has 6 of the 11 mandatory fields")

put("sam_pos.sam", SAM_HEAD + "r1\t0\tchr1\tx100\t60\t10M\t*\t0\t0\t*\t*\n")
case("sam_pos", "reads @sam_pos.sam", 1, "sam_pos.sam:3: malformed SAM line: POS",
     "POS is not a number on line 3")

put("sam_mc.sam", SAM_HEAD + SAM_OK + "p1\t99\tchr1\t100\t60\t10M\t=\t300\t210\t*\t*\tMC:Z:10Q\n")
case("sam_mc", "reads @sam_mc.sam", 1, "sam_mc.sam:4: malformed SAM line: MC tag (the mate's CIGAR): bad CIGAR",
     "a pair whose MC tag is not a CIGAR (one mate with a bad MC would count the pair by another rule)")

put("sam_cigar.sam", SAM_HEAD + "r1\t0\tchr1\t100\t60\t10Q\t*\t0\t0\t*\t*\n")
case("sam_cigar", "reads @sam_cigar.sam", 1, "sam_cigar.sam:3: bad CIGAR",
     "CIGAR operation Q on line 3")

put("sam_ref.sam", SAM_HEAD + SAM_OK + "r1\t0\tchr9\t100\t60\t10M\t*\t0\t0\t*\t*\n")
case("sam_ref", "reads @sam_ref.sam", 1, "sam_ref.sam:4:",
     "RNAME chr9 on line 4 is not in the @SQ lines")

put("sam_flag.sam", SAM_HEAD + "r1\tpaired\tchr1\t100\t60\t10M\t*\t0\t0\t*\t*\n")
case("sam_flag", "reads @sam_flag.sam", 1, "sam_flag.sam:3: malformed SAM line: FLAG",
     "FLAG is a word on line 3")

put("sam_mapq.sam", SAM_HEAD + "r1\t0\tchr1\t100\t999\t10M\t*\t0\t0\t*\t*\n")
case("sam_mapq", "reads @sam_mapq.sam", 1, "sam_mapq.sam:3: malformed SAM line: MAPQ",
     "MAPQ 999 on line 3 (at most 255)")

put("sam_header.sam", "@HD\tVN:1.6\tSO:unsorted\n@SQ\tSN:chr1\tLN:zero\n" + SAM_OK)
case("sam_header", "reads @sam_header.sam", 1, "sam_header.sam:2: malformed SAM header line",
     "@SQ LN is not a number in the header")

put("sam_no_header.sam", SAM_OK)
case("sam_no_header", "reads @sam_no_header.sam", 1, "sam_no_header.sam:1: malformed SAM line: reference \"chr1\" is not in the header",
     "a SAM record without any header lines")

sam_gz = gz((SAM_HEAD + SAM_OK * 400).encode())
put("sam_gz_cut.sam.gz", sam_gz[:len(sam_gz) * 2 // 3])
case("sam_gz_cut", "reads @sam_gz_cut.sam.gz", 1, "truncated",
     "gzip SAM cut at two thirds of its compressed length")

g = bytearray(sam_gz)
g[-6] ^= 0x55  # CRC32 in the gzip trailer (RFC 1952 section 2.3.1)
put("sam_gz_crc.sam.gz", bytes(g))
case("sam_gz_crc", "reads @sam_gz_crc.sam.gz", 1, "CRC mismatch",
     "gzip SAM whose trailer CRC32 has one byte changed")

put("sam_gz_garbage.sam.gz", sam_gz + b"this is not gzip")
case("sam_gz_garbage", "reads @sam_gz_garbage.sam.gz", 1, "corrupted",
     "a complete gzip member followed by 16 bytes of text")

case("sam_long_line", "reads %sam_long_line.sam", 1, "sam_long_line.sam:3:",
     "generated at test time: SAM header then a single 10 MB line without tabs")

case("sam_endless_line", "reads -", 1, "stdin:3: malformed SAM line: a line longer than 256 MiB",
     "generated at test time on stdin: a SAM header then 'x' without end; the reader must give up "
     "after its 256 MiB line bound", stdin="%sam_endless")

# ---------------------------------------------------------------- FASTQ

case("fq_endless_line", "reads -", 1, "stdin:1: malformed FASTQ: a record longer than 256 MiB",
     "generated at test time on stdin: '@' then 'A' without end; the reader must give up at its "
     "256 MiB record bound", stdin="%fq_endless")

put("fq_no_quality.fq", "@r1\nACGT\n+\nIIII\n@r2\nACGT\n+\n")
case("fq_no_quality", "reads @fq_no_quality.fq", 1, "fq_no_quality.fq:5:",
     "the second record stops after its '+' line")

put("fq_lengths.fq", "@r1\nACGT\n+\nIII\n")
case("fq_lengths", "reads @fq_lengths.fq", 1, "fq_lengths.fq:4: malformed FASTQ: quality has 3",
     "quality shorter than the sequence")

put("fq_no_at.fq", "@r1\nACGT\n+\nIIII\nr2\nACGT\n+\nIIII\n")
case("fq_no_at", "reads @fq_no_at.fq", 1, "fq_no_at.fq:5:",
     "the second record's header lacks '@'")

put("fq_no_plus.fq", "@r1\nACGT\n+\nIIII\n@r2\nACGT\n-\nIIII\n")
case("fq_no_plus", "reads @fq_no_plus.fq", 1, "fq_no_plus.fq:7:",
     "the second record's third line is '-' instead of '+'")

put("fq_only_header.fq", "@r1\n")
case("fq_only_header", "reads @fq_only_header.fq", 1, "fq_only_header.fq",
     "a FASTQ header line and nothing else")

fq_many = "".join("@read%d\n%s\n+\n%s\n" % (i, "ACGT" * (1 + i % 5), "I" * 4 * (1 + i % 5)) for i in range(3000))
fq_gz = gz(fq_many.encode())
put("fq_gz_cut.fastq.gz", fq_gz[:len(fq_gz) // 2])
case("fq_gz_cut", "reads @fq_gz_cut.fastq.gz", 1, "truncated",
     "gzip FASTQ cut at half its compressed length")

put("fq_bgzf_no_eof.fastq.gz", bgzf(fq_many.encode(), eof=False, block=0x4000))
case("fq_bgzf_no_eof", "reads @fq_bgzf_no_eof.fastq.gz", 1, "end-of-file marker missing",
     "BGZF FASTQ in four blocks without the EOF block")

put("fq_empty.fastq.gz", gz(b""))
case("fq_empty_gz", "reads @fq_empty.fastq.gz", 1, "empty",
     "a gzip member holding zero bytes")

# FASTQ mates and tags (reads): names of the CASAVA 1.8 layout, common practice.
def fq_pairs(first, n, mate):
    return "".join("@INV03:2:FCD11:1:1101:%d:%d %d:N:0:ACGT\n%s\n+\n%s\n"
                   % (1000 + i, 2000 + i, mate, "ACGTTGCA"[i % 8:] + "ACGT" * 4, "I" * (len("ACGTTGCA"[i % 8:]) + 16))
                   for i in range(first, first + n))


put("BAD1_S1_L001_R1_001.fastq", fq_pairs(0, 6, 1))
put("BAD1_S1_L001_R2_001.fastq", fq_pairs(3, 6, 2))
case("fq_mates_unpaired", "reads @BAD1_S1_L001_R1_001.fastq @BAD1_S1_L001_R2_001.fastq", 1,
     "cannot be paired",
     "R1 and R2 files of one sample and lane whose first reads differ (R2 starts three reads later)")

lines1, lines2 = fq_pairs(0, 3, 1).splitlines(True), fq_pairs(0, 3, 2).splitlines(True)
inter = "".join("".join(lines1[4 * i:4 * i + 4]) + "".join(lines2[4 * i:4 * i + 4]) for i in range(3))
put("fq_interleaved_odd.fq", inter + "".join(fq_pairs(3, 1, 1)))
case("fq_interleaved_odd", "reads @fq_interleaved_odd.fq", 1, "fq_interleaved_odd.fq:25: the interleaved file ends with an unpaired record",
     "an interleaved file (mates in turn) with 7 records")

put("fq_cell_tag.fq", fq_pairs(0, 4, 1))
case("fq_cell_tag", "reads --cell-tag CB @fq_cell_tag.fq", 1, "fq_cell_tag.fq: FASTQ has no cell barcodes: --cell-tag CB",
     "--cell-tag given with FASTQ input")
put("reads_freq_table.tsv", "sample\ttimes_seen\tunits\nLIB-1\t1\t5210\nLIB-1\t2\t733\n")
case("reads_freq_table", "reads @reads_freq_table.tsv", 1, "this looks like a frequency table; use headroom counts",
     "a frequency table (headroom counts input) given to headroom reads")
put("reads_taxa_table.tsv", "#OTU ID\tPOND-A\tPOND-B\nASV1\t12\t0\nASV2\t3\t8\n")
case("reads_taxa_table", "reads @reads_taxa_table.tsv", 1, "this looks like a taxon table; use headroom taxa",
     "a taxon table (headroom taxa input) given to headroom reads")
case("reads_umi_tag_bad", "reads --umi-tag R! @fq_cell_tag.fq", 2, "--umi-tag: \"R!\" is not a SAM tag name",
     "--umi-tag with a name outside the SAM tag alphabet [A-Za-z][A-Za-z0-9]")

case("fq_long_line", "reads %fq_long_line.fq", 1, "fq_long_line.fq:7:",
     "generated at test time: a record of a 10 MB sequence and quality (read), then a record without '+'")

PAIR1 = "@r1/1\nACGT\n+\nIIII\n@r2/1\nACGA\n+\nIIII\n"
put("pair_short_1.fq", PAIR1)
put("pair_short_2.fq", "@r1/2\nTTGA\n+\nIIII\n")
case("pair_short", "reads @pair_short_1.fq @pair_short_2.fq", 1, "pair_short_1.fq:5: has more records than",
     "R2 has one record fewer than R1")

put("pair_step_1.fq", PAIR1)
put("pair_step_2.fq", "@r1/2\nACGT\n+\nIIII\n@r3/2\nACGA\n+\nIIII\n")
case("pair_step", "reads @pair_step_1.fq @pair_step_2.fq", 1, "pair_step_2.fq:5: read name",
     "the second record of R2 names r3 where R1 has r2")

put("pair_bad2_1.fq", PAIR1)
put("pair_bad2_2.fq", "@r1/2\nACGT\n+\nIIII\n@r2/2\nACGA\n+\nII\n")
case("pair_bad_mate", "reads @pair_bad2_1.fq @pair_bad2_2.fq", 1, "pair_bad2_2.fq:8:",
     "R2's second record has a quality shorter than its sequence")

put("pair_gzcut_1.fastq.gz", fq_gz[:len(fq_gz) * 3 // 4])
put("pair_gzcut_2.fastq.gz", fq_gz)
case("pair_gz_cut", "reads @pair_gzcut_1.fastq.gz @pair_gzcut_2.fastq.gz", 1, "pair_gzcut_1.fastq.gz:",
     "paired FASTQ whose R1 (gzip) is cut at three quarters; R2 is whole")

case("fq_gzip_bomb", "reads %fq_bomb.fastq.gz", 1, "truncated",
     "generated at test time: 128 copies of one gzip member (1 MiB of identical records each, "
     "about 2 KiB compressed) then a member cut short; must stream and fail at the end")

# ---------------------------------------------------------------- format sniffing

put("random.bin", bytes((i * 197 + 13) % 256 for i in range(4096)))
case("random_bytes", "reads @random.bin", 1, "not BAM, SAM or FASTQ",
     "4 KiB of pseudo-random bytes ((197 i + 13) mod 256)")

put("cram.cram", b"CRAM\x03\x00" + bytes(26))
case("cram", "reads @cram.cram", 1, "convert it to BAM",
     "CRAM 3.0 file definition magic (CRAM specification section 6) and zeros")

put("empty.bam", b"")
case("empty_reads", "reads @empty.bam", 1, "empty",
     "a zero-byte file")

case("missing_reads", "reads @no_such_file.bam", 1, "cannot open",
     "a path that does not exist")

# ---------------------------------------------------------------- taxon tables

put("taxa_proportions.tsv", "taxon\tS1\tS2\nT1\t0.25\t0.5\nT2\t0.75\t0.5\n")
case("taxa_proportions", "taxa @taxa_proportions.tsv", 1, ":2: column 2: sample \"S1\": \"0.25\" is not a whole number",
     "relative abundances instead of read counts")

put("taxa_negative.tsv", "taxon\tS1\tS2\nT1\t3\t-2\n")
case("taxa_negative", "taxa @taxa_negative.tsv", 1, ":2: column 3: sample \"S2\": negative count",
     "a negative count")

put("taxa_word.csv", "taxon,S1,S2\nT1,3,4\nT2,5,NA\n")
case("taxa_word", "taxa @taxa_word.csv", 1, ":3: column 3: sample \"S2\": word \"NA\" in a count cell",
     "CSV with NA in a count cell")

put("taxa_ragged.tsv", "taxon\tS1\tS2\nT1\t3\t4\nT2\t5\n")
case("taxa_ragged", "taxa @taxa_ragged.tsv", 1, ":3: column 2: row has 2 fields but the header (line 1) has 3",
     "a short row")

put("taxa_dup_sample.tsv", "taxon\tS1\tS1\nT1\t3\t4\n")
case("taxa_dup_sample", "taxa @taxa_dup_sample.tsv", 1, ":1: column 3: sample ID \"S1\" repeated",
     "a sample ID given twice in the header")

put("taxa_dup_taxon.tsv", "taxon\tS1\tS2\nT1\t3\t4\nT1\t5\t6\n")
case("taxa_dup_taxon", "taxa @taxa_dup_taxon.tsv", 1, ":3: column 1: taxon ID \"T1\" repeated (first on line 2)",
     "a taxon ID given twice")

put("taxa_empty.tsv", "")
case("taxa_empty", "taxa @taxa_empty.tsv", 1, "empty table",
     "a zero-byte table")

put("taxa_header_only.tsv", "# a comment\ntaxon\tS1\tS2\n")
case("taxa_header_only", "taxa @taxa_header_only.tsv", 1, ":2: empty table",
     "a comment and a header, no data rows")

put("taxa_quote.csv", "taxon,S1,S2\nT1,3,4\n\"T2,5,6\nT3,1,1\n")
case("taxa_quote", "taxa @taxa_quote.csv", 1, "taxa_quote.csv:",
     "CSV with a quoted field that is never closed")

put("taxa_binary.tsv", bytes((i * 89 + 7) % 256 for i in range(2048)))
case("taxa_binary", "taxa @taxa_binary.tsv", 1, "taxa_binary.tsv",
     "2 KiB of pseudo-random bytes given as a table")

tsv_gz = gz(("taxon\tS1\tS2\n" + "".join("T%d\t%d\t%d\n" % (i, i % 7, i % 11) for i in range(3000))).encode())
put("taxa_gz_cut.tsv.gz", tsv_gz[:len(tsv_gz) // 2])
case("taxa_gz_cut", "taxa @taxa_gz_cut.tsv.gz", 1, "taxa_gz_cut.tsv.gz:1477: gzip data ends early",
     "gzip TSV cut at half its compressed length")

put("taxa_hdf5.biom", b"\x89HDF\r\n\x1a\n" + bytes(56))
case("taxa_hdf5", "taxa @taxa_hdf5.biom", 1, "taxa_hdf5.biom: HDF5: superblock gives sizes of offsets 0 and lengths 0",
     "HDF5 format signature (BIOM 2.x files are HDF5) and zeros: a superblock version 0 with no valid sizes")

# BIOM 2.1 (HDF5). The malformed files are written with python3-h5py by
# scripts/biom2_fixtures.py (testdata/taxa/biom2/bad/); the cut ones are
# cut from its biom-format-written small.biom.
BIOM2 = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "testdata", "taxa", "biom2")


def biom2(name):
    with open(os.path.join(BIOM2, name), "rb") as f:
        return f.read()


h5small = biom2("small.biom")
put("taxa_h5_cut.biom", h5small[:len(h5small) // 2])
case("taxa_h5_cut", "taxa @taxa_h5_cut.biom", 1, "taxa_h5_cut.biom: HDF5 object /",
     "BIOM 2.1 file (biom-format) cut at half its length: an object lies beyond the end")
put("taxa_h5_superblock.biom", h5small[:40])
case("taxa_h5_superblock", "taxa @taxa_h5_superblock.biom", 1, "taxa_h5_superblock.biom: HDF5: ",
     "BIOM 2.1 file cut inside its superblock")
for name, want, what in (
        ("no_sample_indptr", "HDF5 object /sample/matrix/indptr: no such object", "BIOM 2.1 without sample/matrix/indptr"),
        ("no_observation_indptr", "HDF5 object /observation/matrix/indptr: no such object", "BIOM 2.1 without observation/matrix/indptr"),
        ("fraction", "/sample/matrix/data: entry 1 (sample \"pond-B\", taxon \"ASV1\"): \"2.5\" is not a whole number",
         "BIOM 2.1 whose float64 data holds 2.5"),
        ("indptr_decreasing", "/sample/matrix/indptr: entries 1 and 2 are 1 and 0", "BIOM 2.1 whose sample indptr falls"),
        ("indptr_beyond", "/sample/matrix/indptr: last entry", "BIOM 2.1 whose sample indptr ends beyond data"),
        ("inflate", "/sample/matrix/data: chunk 0 does not inflate", "BIOM 2.1 with a damaged deflate chunk"),
        ("dense", "HDF5 object /sample: HDF5 feature not supported: dense link storage",
         "BIOM 2.1 in the newest HDF5 format with 13 members in /sample (dense link storage, not read)"),
):
    put("taxa_h5_%s.biom" % name, biom2(os.path.join("bad", name + ".biom")))
    case("taxa_h5_" + name, "taxa @taxa_h5_%s.biom" % name, 1, want, what)
put("taxa_h5_not_biom.h5", biom2(os.path.join("bad", "not_biom.h5")))
case("taxa_h5_not_biom", "taxa @taxa_h5_not_biom.h5", 1, "an HDF5 file, but not a BIOM 2.1 table: it has no /observation group",
     "HDF5 file (h5py) with one dataset, not BIOM")

# Files for another subcommand given to taxa: named, with the subcommand.
SAM_REC = "r1\t0\tchr1\t100\t60\t8M\t*\t0\t0\tACGTACGT\tIIIIIIII\n"
put("taxa_wrong_bam.bam", bgzf_block(b"BAM\x01" + struct.pack("<i", 0) + struct.pack("<i", 0)) + BGZF_EOF)
case("taxa_wrong_bam", "taxa @taxa_wrong_bam.bam", 1, "taxa_wrong_bam.bam: this is a BAM file (aligned reads), not a taxon count table: use headroom reads",
     "a BAM file (BGZF, magic BAM\\1, no references) given to taxa")
put("taxa_wrong_sam.sam", "@HD\tVN:1.6\tSO:unsorted\n@SQ\tSN:chr1\tLN:1000\n" + SAM_REC)
case("taxa_wrong_sam", "taxa @taxa_wrong_sam.sam", 1, "this is a SAM file (aligned reads), not a taxon count table: use headroom reads",
     "a SAM file with header given to taxa")
put("taxa_wrong_sam_nohead.sam", SAM_REC)
case("taxa_wrong_sam_nohead", "taxa @taxa_wrong_sam_nohead.sam", 1, "SAM file without header",
     "one SAM alignment line, no header, given to taxa")
put("taxa_wrong_fastq.fq", "@read1\nACGTACGT\n+\nIIIIIIII\n@read2\nACGTTT\n+\nIIIIII\n")
case("taxa_wrong_fastq", "taxa @taxa_wrong_fastq.fq", 1, "this is a FASTQ file (reads), not a taxon count table: use headroom reads",
     "a FASTQ file given to taxa")
put("taxa_wrong_counts.tsv", "sample\ttimes_seen\tunits\nLIB-1\t1\t40\nLIB-1\t2\t9\n")
case("taxa_wrong_counts", "taxa @taxa_wrong_counts.tsv", 1, "use headroom counts",
     "a frequency-count table (headroom's own header) given to taxa")


def biom(data, shape=(2, 2), rows=("T1", "T2"), cols=("S1", "S2"), mtype="dense"):
    d = {"id": "x", "format": "Biological Observation Matrix 1.0.0", "type": "OTU table",
         "shape": list(shape), "rows": [{"id": r, "metadata": None} for r in rows],
         "columns": [{"id": c, "metadata": None} for c in cols], "matrix_type": mtype, "data": data}
    return json.dumps(d, separators=(",", ":"))


full = biom([[1, 2], [3, 4]])
put("biom_cut.biom", full[:len(full) - 9])
case("biom_cut", "taxa @biom_cut.biom", 1, "truncated BIOM JSON",
     "BIOM 1.0 JSON cut 9 bytes before its end")

put("biom_syntax.biom", full.replace("[3,4]", "[3}"))
case("biom_syntax", "taxa @biom_syntax.biom", 1, ":1: column",
     "BIOM 1.0 JSON with '}' closing an array")

put("biom_frac.biom", biom([[0, 0, 1.5]], mtype="sparse"))
case("biom_frac", "taxa @biom_frac.biom", 1, "\"1.5\" is not a whole number",
     "sparse BIOM with the value 1.5")

put("biom_neg.biom", biom([[1, 2], [3, -4]]))
case("biom_neg", "taxa @biom_neg.biom", 1, "negative count",
     "dense BIOM with -4")

put("biom_index.biom", biom([[0, 0, 1], [5, 1, 2]], mtype="sparse"))
case("biom_index", "taxa @biom_index.biom", 1, "biom_index.biom",
     "sparse BIOM entry at row 5 of a 2-row table")

put("biom_shape.biom", biom([[1, 2, 3], [3, 4, 5]]))
case("biom_shape", "taxa @biom_shape.biom", 1, "biom_shape.biom",
     "dense BIOM rows of 3 values for a shape of 2 columns")

put("biom_dup.biom", '{"shape":[1,2],"matrix_type":"dense","rows":[{"id":"T"}],"columns":[{"id":"A"},{"id":"A"}],"data":[[1,2]]}')
case("biom_dup", "taxa @biom_dup.biom", 1, "sample ID \"A\" repeated",
     "BIOM with two columns of the same ID")

put("biom_deep.biom.gz", gz(('{"shape":[2,2],"data":' + "[" * 20000 + "]" * 20000 + "}").encode()))
case("biom_deep", "taxa @biom_deep.biom.gz", 1, "biom_deep.biom.gz:1: column 23: BIOM JSON syntax error",
     "gzip BIOM whose data array nests 20000 deep")

put("biom_shape_huge.biom", biom([[1, 2], [3, 4]], shape=(1000000000, 1000000000)))
case("biom_shape_huge", "taxa @biom_shape_huge.biom", 1, "want 1000000000",
     "dense BIOM claiming 10^9 x 10^9 with 2 x 2 values: must fail without allocating the shape")

put("taxa_overflow.tsv", "taxon\tS1\nT1\t9000000000000000000\nT2\t9000000000000000000\n")
case("taxa_overflow", "taxa @taxa_overflow.tsv", 1, "taxa_overflow.tsv:3: column 2: counts add up to more than",
     "one sample's counts add up beyond 64-bit integers")

case("taxa_long_line", "taxa %taxa_long_line.tsv", 1, "taxa_long_line.tsv:2: column 2",
     "generated at test time: a data row whose count cell is 10 MB of digits")

# ---------------------------------------------------------------- frequency-count tables

H = "sample\ttimes_seen\tunits\n"
for name, body, want, what in [
    ("counts_empty", "", "empty file", "a zero-byte table"),
    ("counts_no_header", "A\t1\t100\n", ":1: missing header", "data without the header line"),
    ("counts_times0", H + "A\t0\t5\n", ":2: column 2: times_seen", "times_seen 0"),
    ("counts_times_neg", H + "A\t-3\t5\n", ":2: column 2: times_seen", "times_seen -3"),
    ("counts_frac", H + "A\t1\t2.5\n", ":2: column 3: units must be a whole number", "units 2.5"),
    ("counts_units_neg", H + "A\t1\t-2\n", ":2: column 3: units", "units -2"),
    ("counts_repeat", H + "A\t1\t5\nA\t2\t1\nA\t1\t3\n", ":4: column 2: this (sample, times_seen) pair was already given",
     "the pair (A, 1) twice"),
    ("counts_huge", H + "A\t1\t99999999999999999999\n", ":2: column 3: number too large", "units beyond 64 bits"),
    ("counts_overflow", H + "A\t4611686018427387904\t3\n", ":2: column 3: total reads", "reads overflow 64 bits"),
    ("counts_fields", H + "A\t1\n", ":2: expected 3 tab-separated fields", "a row of two fields"),
    ("counts_header_only", H, "no rows", "a header and nothing else"),
    ("counts_binary", bytes((i * 61 + 3) % 256 for i in range(1024)), "counts_binary.tsv",
     "1 KiB of pseudo-random bytes"),
]:
    put(name + ".tsv", body)
    case(name, "counts @%s.tsv" % name, 1, want, what)

put("perunit_word.txt", "3\n1\nmany\n2\n")
case("perunit_word", "counts --per-unit @perunit_word.txt", 1, "perunit_word.txt:3: column 1",
     "per-unit counts with a word on line 3")

put("perunit_neg.txt", "3\n-1\n")
case("perunit_neg", "counts --per-unit @perunit_neg.txt", 1, "perunit_neg.txt:2: column 1",
     "per-unit counts with -1 on line 2")

counts_gz = gz((H + "".join("S%d\t%d\t%d\n" % (i % 3, i + 1, i % 13 + 1) for i in range(3000))).encode())
put("counts_gz_cut.tsv.gz", counts_gz[:len(counts_gz) // 2])
case("counts_gz_cut", "counts @counts_gz_cut.tsv.gz", 1, "counts_gz_cut.tsv.gz:1486: gzip data ends early",
     "a gzip frequency-count table cut at half its compressed length")

put("counts_gz_crc.tsv.gz", counts_gz[:-8] + bytes([counts_gz[-8] ^ 1]) + counts_gz[-7:])
case("counts_gz_crc", "counts @counts_gz_crc.tsv.gz", 1, "counts_gz_crc.tsv.gz:3002: gzip data is damaged",
     "a gzip frequency-count table whose trailer CRC32 has one bit flipped")

perunit_gz = gz("".join("%d\n" % (i * 7919 % 1000) for i in range(5000)).encode())
put("perunit_gz_cut.txt.gz", perunit_gz[:len(perunit_gz) // 2])
case("perunit_gz_cut", "counts --per-unit @perunit_gz_cut.txt.gz", 1, "perunit_gz_cut.txt.gz:531: gzip data ends early",
     "gzip per-unit counts cut at half their compressed length")

case("counts_long_line", "counts %counts_long_line.tsv", 1, "counts_long_line.tsv:2",
     "generated at test time: a 10 MB sample name on line 2")

put("counts_a.tsv", H + "A\t1\t100\nA\t2\t30\n")
put("counts_a_again.tsv", H + "A\t1\t7\nA\t3\t2\n")
case("counts_sample_twice", "counts @counts_a.tsv @counts_a_again.tsv", 1, "counts_a_again.tsv: sample \"A\" is also in",
     "the same sample in two files (merge adds shards)")

case("merge_same_shard", "merge @counts_a.tsv @counts_a.tsv", 1, "identical to",
     "the same shard given twice")

case("merge_bad_table", "merge @counts_a.tsv @counts_frac.tsv", 1, "counts_frac.tsv:2: column 3",
     "merge: the second shard has units 2.5")

# ---------------------------------------------------------------- command line (exit 2)

for name, args, want, what in [
    ("flag_unknown_command", "frobnicate", "unknown command", "no such subcommand"),
    ("flag_unknown", "counts --no-such-flag @counts_a.tsv", "no-such-flag", "an undefined flag"),
    ("flag_at_unit", "counts --at 10y @counts_a.tsv", "10y", "a depth with an unknown suffix"),
    ("flag_at_negative", "counts --at -5x @counts_a.tsv", "-5x", "a negative multiple"),
    ("flag_threads", "counts --threads -1 @counts_a.tsv", "threads", "negative thread count"),
    ("flag_threads_huge", "counts --threads 100000 @counts_a.tsv", "between 1 and 1024", "a thread count no machine has"),
    ("flag_bootstrap_huge", "counts --bootstrap 1000000000 @counts_a.tsv", "between 0 and 100000",
     "a replicate count that would need gigabytes"),
    ("flag_at_many", "counts --at " + ",".join("%dx" % (i + 2) for i in range(1001)) + " @counts_a.tsv",
     "give at most 1000", "1001 depths in --at"),
    ("flag_level", "counts --level 1.5 @counts_a.tsv", "level", "confidence level above 1"),
    ("flag_format", "counts --format xml @counts_a.tsv", "xml", "an unknown summary format"),
    ("flag_bootstrap", "counts --bootstrap -3 @counts_a.tsv", "bootstrap", "negative replicates"),
    ("flag_progress", "counts --progress sometimes @counts_a.tsv", "progress", "an unknown progress mode"),
    ("flag_target", "counts --target lots @counts_a.tsv", "lots", "a target that is not a depth"),
    ("flag_no_files", "counts", "", "no input file"),
    ("flag_outputs_same", "counts --plot x.svg --report x.svg @counts_a.tsv", "--plot and --report both write to x.svg",
     "two outputs of one file name"),
    ("flag_taxa_advise_same", "taxa --advise-depth x.tsv --curve x.tsv @taxa_empty.tsv", "--curve and --advise-depth both write to x.tsv",
     "taxa: the depth advice and the curve to one file"),
    ("flag_by", "reads --by lane @empty.bam", "lane", "an unknown --by unit"),
    ("flag_mode", "reads --mode fast @empty.bam", "fast", "an unknown counting mode"),
    ("flag_max_memory", "reads --max-memory lots @empty.bam", "lots", "a memory size that is not a size"),
    ("flag_mapq", "reads --min-mapq -1 @empty.bam", "mapq", "a negative mapping quality"),
    ("flag_stdin_twice", "reads - -", "", "standard input named twice"),
    ("flag_taxa_two", "taxa @taxa_empty.tsv @taxa_empty.tsv", "", "two tables"),
    ("flag_taxa_layout", "taxa --samples-as-rows --taxa-as-rows @taxa_empty.tsv", "", "contradicting layouts"),
    ("flag_taxa_coverage", "taxa --reach coverage:1.5 @taxa_empty.tsv", "coverage must be between 0 and 1", "coverage target above 1"),
    ("flag_version_args", "version extra", "no arguments", "version with an argument"),
]:
    case(name, args, 2, want, what)



# ---------------------------------------------------------------- decisions
# --reach targets, --plan/--budget/--pool (DESIGN.md "Decisions") and the
# checks of outputs made before any input is read.

put("pool_unknown.tsv", "sample\tshare\nA\t1\nZ\t2\n")
put("pool_missing.tsv", "sample\tshare\n")
put("pool_share_neg.tsv", "sample\tshare\nA\t-1\n")
put("pool_share_word.tsv", "sample\tshare\nA\thalf\n")
put("pool_no_header.tsv", "A\t1\n")
for name, args, exit_, want, what in [
    ("reach_unknown", "counts --reach speed:3 @counts_a.tsv", 2, "unknown kind", "a target kind that does not exist"),
    ("reach_no_colon", "counts --reach 0.3 @counts_a.tsv", 2, "KIND:VALUE", "a target without its kind"),
    ("reach_dup_range", "counts --reach dup:1.2 @counts_a.tsv", 2, "between 0 and 1", "a duplicate fraction above 1"),
    ("reach_coverage_zero", "counts --reach coverage:0 @counts_a.tsv", 2, "between 0 and 1", "coverage 0"),
    ("reach_distinct_neg", "counts --reach distinct:-5 @counts_a.tsv", 2, "distinct", "a negative distinct target"),
    ("reach_repeat", "counts --reach dup:0.3,dup:0.3 @counts_a.tsv", 2, "given twice", "one target twice"),
    ("plan_no_budget", "counts --plan @never_plan.tsv @counts_a.tsv", 2, "--plan needs --budget", "a plan without a budget"),
    ("budget_no_plan", "counts --budget 10M @counts_a.tsv", 2, "--budget is for --plan", "a budget without a plan"),
    ("budget_zero", "counts --plan @never_plan.tsv --budget 0 @counts_a.tsv", 2, "--budget", "a budget of 0 reads"),
    ("budget_negative", "counts --plan @never_plan.tsv --budget -5 @counts_a.tsv", 2, "--budget", "a negative budget"),
    ("plan_goal", "counts --plan @never_plan.tsv --budget 1M --plan-goal fastest @counts_a.tsv", 2, "most or reach", "an unknown plan goal"),
    ("pool_unknown", "counts --plan @never_plan.tsv --budget 1M --pool @pool_unknown.tsv @counts_a.tsv", 1,
     "pool_unknown.tsv:3: sample \"Z\" is not in this run", "a pool share for a sample the run does not have"),
    ("pool_missing", "counts --plan @never_plan.tsv --budget 1M --pool @pool_missing.tsv @counts_a.tsv", 1,
     "pool_missing.tsv: no share for", "a pool table without the run's sample"),
    ("pool_share_neg", "counts --plan @never_plan.tsv --budget 1M --pool @pool_share_neg.tsv @counts_a.tsv", 1,
     "pool_share_neg.tsv:2: column 2", "a negative pool share"),
    ("pool_share_word", "counts --plan @never_plan.tsv --budget 1M --pool @pool_share_word.tsv @counts_a.tsv", 1,
     "pool_share_word.tsv:2: column 2", "a pool share that is a word"),
    ("pool_no_header", "counts --plan @never_plan.tsv --budget 1M --pool @pool_no_header.tsv @counts_a.tsv", 1,
     "pool_no_header.tsv:1: the pool table needs a header", "a pool table without its header"),
    ("pool_no_plan", "counts --pool @pool_unknown.tsv @counts_a.tsv", 2, "--pool is for --plan", "pool shares without a plan"),
    ("out_two_stdout", "counts --curve - --save-counts - @counts_a.tsv", 2, "at most one output may be '-'", "two outputs on standard output"),
    ("out_missing_dir", "counts -o /nonexistent-headroom-dir/out.tsv @counts_a.tsv", 2, "does not exist",
     "an output in a folder that does not exist (refused before reading)"),
    ("out_twice", "counts --plot a.png --plot b.svg @counts_a.tsv", 2, "--plot given twice", "one output flag given twice"),
    ("out_plan_is_input", "counts --plan @counts_a.tsv --budget 1M @counts_a.tsv", 2, "also an input", "the plan would replace the input"),
]:
    case(name, args, exit_, want, what)


def main():
    os.makedirs(OUT, exist_ok=True)
    for name in os.listdir(OUT):
        if name != "README.md":
            os.remove(os.path.join(OUT, name))
    for name, data in sorted(files.items()):
        with open(os.path.join(OUT, name), "wb") as f:
            f.write(data)
    with open(os.path.join(OUT, "cases.tsv"), "w") as f:
        f.write("# generated by scripts/gen_bad_corpus.py; run by cmd/headroom/badinput_test.go\n")
        f.write("name\tstdin\targs\texit\twant\twhat\n")
        for c in cases:
            for v in c:
                assert "\t" not in v and "\n" not in v, c
            f.write("\t".join(c) + "\n")
    total = sum(len(d) for d in files.values())
    print("%d files, %d bytes, %d cases" % (len(files), total, len(cases)))


main()
