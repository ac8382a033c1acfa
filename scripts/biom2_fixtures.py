#!/usr/bin/python3
"""Write testdata/taxa/biom2/: BIOM 2.1 (HDF5) tables and the same tables
as BIOM 1.0 JSON and TSV, for amplicon's HDF5 reader tests.

    apt-get install -y python3-biom-format python3-h5py
    /usr/bin/python3 scripts/biom2_fixtures.py

The external references are Debian's python3-biom-format (biom.Table:
to_hdf5, to_json, to_tsv) and python3-h5py (over the HDF5 C library); the
BIOM 2.1 layout follows the BIOM format specification, version 2.1
(groups observation/ and sample/, each with ids, matrix/data,
matrix/indices, matrix/indptr; observation/matrix is CSR by observation,
sample/matrix CSC). Every table is invented (made-up pond samples and
amplicon sequence variants) from a fixed seed.

For each table NAME the script writes NAME.biom (BIOM 2.1), NAME.json
(BIOM 1.0 JSON) and NAME.tsv (biom's classic TSV). The Go test reads all
three and requires equal per-sample counts. Variants written directly
with h5py (prefix h5-) exercise HDF5 features that biom-format does not
choose itself: old-style (symbol table) and new-style (link message)
groups, layout versions, chunk indexes, shuffle and Fletcher-32 filters,
big-endian and integer datatypes, fixed-length strings.

bad/ holds malformed BIOM 2.1 files for the bad-input corpus
(scripts/gen_bad_corpus.py copies them into testdata/bad/). The script
also writes the seed corpus of internal/hdf5's FuzzHDF5 (tiny tables in
each supported structure, cut and flipped).

Deterministic in content; HDF5 files written by biom-format carry a
creation date attribute, so re-running changes those bytes only.
"""

import os
import shutil

import h5py
import numpy as np
from biom.table import Table

OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "testdata", "taxa", "biom2")
VLEN = h5py.special_dtype(vlen=str)


def table(seed, n_obs, n_samp, density=0.4, empty=(), taxonomy=True):
    """A sparse invented count table; columns listed in empty have no reads."""
    rng = np.random.default_rng(seed)
    data = rng.negative_binomial(1, 0.05, size=(n_obs, n_samp)).astype(float)
    data[rng.random((n_obs, n_samp)) > density] = 0
    for j in empty:
        data[:, j] = 0
    obs = ["ASV%04d" % i for i in range(n_obs)]
    samp = ["pond-%s%02d" % ("ABCD"[j % 4], j) for j in range(n_samp)]
    md = None
    if taxonomy:
        md = [{"taxonomy": ["k__Bacteria", "p__Phylum%d" % (i % 3), "g__Genus%d" % (i % 7)]} for i in range(n_obs)]
    return Table(data, obs, samp, observation_metadata=md, table_id="invented pond survey")


def write_all(name, t, compress):
    with h5py.File(os.path.join(OUT, name + ".biom"), "w") as f:
        t.to_hdf5(f, "headroom fixture script", compress=compress)
    with open(os.path.join(OUT, name + ".json"), "w") as f:
        f.write(t.to_json("headroom fixture script"))
    with open(os.path.join(OUT, name + ".tsv"), "w") as f:
        f.write(t.to_tsv())


def write_h5(name, t, libver="earliest", ids_fixed=False, data_dtype="<f8", idx_dtype="<i4", ids_in=None, **dskw):
    """The BIOM 2.1 layout written with h5py directly (dataset options dskw)."""
    path = os.path.join(OUT, name + ".biom")
    with h5py.File(path, "w", libver=libver) as f:
        write_layout(f, t, ids_fixed, data_dtype, idx_dtype, **dskw)
    with open(os.path.join(OUT, name + ".tsv"), "w") as f:
        f.write(t.to_tsv())
    return path


def write_layout(f, t, ids_fixed=False, data_dtype="<f8", idx_dtype="<i4", skip=(), **dskw):
    f.attrs["id"] = "invented pond survey"
    f.attrs["type"] = "OTU table"
    f.attrs["format-url"] = "http://biom-format.org"
    f.attrs["format-version"] = np.array([2, 1], dtype="<i8")
    f.attrs["generated-by"] = "headroom fixture script"
    f.attrs["creation-date"] = "2026-01-01T00:00:00"
    f.attrs["shape"] = np.array(t.shape, dtype="<i8")
    f.attrs["nnz"] = t.nnz
    for axis, order in (("observation", "csr"), ("sample", "csc")):
        m = t.matrix_data.asformat(order)
        m.sort_indices()
        g = f.create_group(axis)
        g.create_group("metadata")
        g.create_group("group-metadata")
        ids = list(t.ids(axis=axis))
        if ids_fixed:
            g.create_dataset("ids", data=np.array([i.encode() for i in ids], dtype="S%d" % max(len(i) for i in ids)))
        else:
            g.create_dataset("ids", data=ids, dtype=VLEN)
        for name, values, dt in (("data", m.data, data_dtype), ("indices", m.indices, idx_dtype), ("indptr", m.indptr, idx_dtype)):
            if "%s/matrix/%s" % (axis, name) in skip:
                continue
            kw = dict(dskw)
            if "dcpl" in kw:
                kw["dcpl"] = kw["dcpl"]()  # a fresh property list per dataset
            if kw.get("chunks"):
                if len(values) == 0:
                    kw.pop("chunks")
                else:
                    kw["chunks"] = (min(kw["chunks"][0], len(values)),)
            g.create_dataset("matrix/" + name, data=np.asarray(values).astype(dt), **kw)


def main():
    if os.path.isdir(OUT):
        shutil.rmtree(OUT)
    os.makedirs(os.path.join(OUT, "bad"))

    # Written by biom-format itself: contiguous, and chunked with gzip.
    write_all("small", table(1, 12, 5, empty=(3,)), compress=False)
    write_all("small_gzip", table(2, 12, 5), compress=True)
    write_all("one_sample", table(3, 30, 1), compress=True)
    write_all("many_samples", table(4, 40, 120, density=0.2, empty=(7, 50)), compress=True)
    write_all("no_metadata", table(5, 8, 3, taxonomy=False), compress=False)
    # No non-zero cell: zero-length data and indices datasets.
    write_all("all_zero", Table(np.zeros((3, 2)), ["ASV1", "ASV2", "ASV3"], ["pond-A", "pond-B"]), compress=True)

    # Written with h5py: old- and new-style groups, layouts, filters, types.
    t = table(6, 50, 9, empty=(0, 8))
    write_h5("h5-earliest-contiguous", t)
    write_h5("h5-earliest-chunked", t, chunks=(7,))
    write_h5("h5-earliest-gzip-shuffle", t, chunks=(16,), compression="gzip", shuffle=True)
    write_h5("h5-earliest-fletcher", t, chunks=(16,), fletcher32=True, compression="gzip")
    write_h5("h5-latest-contiguous", t, libver="latest")
    write_h5("h5-latest-chunked", t, libver="latest", chunks=(7,))
    write_h5("h5-latest-gzip-shuffle", t, libver="latest", chunks=(16,), compression="gzip", shuffle=True)
    write_h5("h5-latest-single-chunk", t, libver="latest", chunks=(1024,), compression="gzip")
    # More than 1024 chunks: a paged fixed array chunk index.
    write_h5("h5-latest-paged", table(9, 60, 40, density=0.5), libver="latest", chunks=(1,))
    write_h5("h5-bigendian", t, data_dtype=">f8", idx_dtype=">i8", libver="latest", chunks=(5,))
    write_h5("h5-int-counts", t, data_dtype="<u4", idx_dtype="<i8")
    write_h5("h5-float32", t, data_dtype="<f4", chunks=(9,), compression="gzip")
    write_h5("h5-fixed-ids", t, ids_fixed=True, libver="latest")
    write_h5("h5-v108", t, libver=("v108", "v108"), chunks=(7,), compression="gzip")  # superblock 2

    def compact():
        p = h5py.h5p.create(h5py.h5p.DATASET_CREATE)
        p.set_layout(h5py.h5d.COMPACT)
        return p

    def early():
        p = h5py.h5p.create(h5py.h5p.DATASET_CREATE)
        p.set_alloc_time(h5py.h5d.ALLOC_TIME_EARLY)
        return p

    write_h5("h5-compact", t, libver="latest", dcpl=compact)
    # Chunked, unfiltered, allocated early, fixed size: the implicit index.
    write_h5("h5-latest-implicit", t, libver="latest", chunks=(6,), dcpl=early)

    # Malformed, for the bad-input corpus.
    bad = os.path.join(OUT, "bad")
    small = table(7, 6, 3)
    for name, skip in (("no_sample_indptr", ("sample/matrix/indptr",)),
                       ("no_observation_indptr", ("observation/matrix/indptr",))):
        with h5py.File(os.path.join(bad, name + ".biom"), "w") as f:
            write_layout(f, small, skip=skip)
    frac = Table(np.array([[1.0, 2.5], [0.0, 3.0]]), ["ASV1", "ASV2"], ["pond-A", "pond-B"])
    with h5py.File(os.path.join(bad, "fraction.biom"), "w") as f:
        write_layout(f, frac)
    with h5py.File(os.path.join(bad, "indptr_decreasing.biom"), "w") as f:
        write_layout(f, small)
        p = f["sample/matrix/indptr"]
        v = p[...]
        assert v[1] >= 1
        v[2] = v[1] - 1  # indptr[2] < indptr[1]: not monotone
        p[...] = v
    with h5py.File(os.path.join(bad, "indptr_beyond.biom"), "w") as f:
        write_layout(f, small)
        p = f["sample/matrix/indptr"]
        v = p[...]
        v[-1] = v[-1] + 5
        p[...] = v
    with h5py.File(os.path.join(bad, "not_biom.h5"), "w") as f:
        f.create_dataset("temperature", data=np.arange(10.0))
        f["temperature"].attrs["units"] = "kelvin"
    # Newest-format groups of more than 8 members and objects of more
    # than 8 attributes use dense storage (fractal heaps): refused.
    with h5py.File(os.path.join(bad, "dense.biom"), "w", libver="latest") as f:
        write_layout(f, small)
        for i in range(10):
            f["sample"].create_group("extra%d" % i)
            f.attrs["extra%d" % i] = i
    with h5py.File(os.path.join(bad, "inflate.biom"), "w") as f:
        write_layout(f, table(8, 40, 4), chunks=(8,), compression="gzip")
    # Damage one deflate stream of sample/matrix/data: find the chunk by
    # its offset from the HDF5 library, flip bytes inside it.
    with h5py.File(os.path.join(bad, "inflate.biom"), "r") as f:
        ds = f["sample/matrix/data"]
        info = ds.id.get_chunk_info(0)
        off, size = info.byte_offset, info.size
    with open(os.path.join(bad, "inflate.biom"), "r+b") as fh:
        fh.seek(off + 2)
        chunk = fh.read(min(8, size - 2))
        fh.seek(off + 2)
        fh.write(bytes(b ^ 0x5A for b in chunk))

    fuzz_seeds()


FUZZ = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "internal", "hdf5", "testdata", "fuzz", "FuzzHDF5")


def go_bytes(data):
    """A Go fuzz corpus file ("go test fuzz v1") holding one []byte."""
    out = []
    for b in data:
        c = chr(b)
        out.append(c if 32 <= b < 127 and c not in '"\\' else "\\x%02x" % b)
    return 'go test fuzz v1\n[]byte("%s")\n' % "".join(out)


def fuzz_seeds():
    """Seeds for FuzzHDF5: tiny BIOM 2.1 layouts (2 taxa, 2 samples) in the
    structures the reader supports, and cut and flipped variants."""
    if os.path.isdir(FUZZ):
        shutil.rmtree(FUZZ)
    os.makedirs(FUZZ)
    tiny = Table(np.array([[3.0, 0.0], [1.0, 2.0]]), ["ASV1", "ASV2"], ["pond-A", "pond-B"])
    seeds = {}
    for name, libver, kw in (("earliest", "earliest", {}),
                             ("earliest-gzip", "earliest", dict(chunks=(2,), compression="gzip", shuffle=True, fletcher32=True)),
                             ("latest", "latest", {}),
                             ("latest-chunked", "latest", dict(chunks=(1,), compression="gzip", shuffle=True))):
        path = os.path.join(OUT, "tiny.h5")
        with h5py.File(path, "w", libver=libver) as f:
            write_layout(f, tiny, **kw)
        with open(path, "rb") as fh:
            seeds[name] = fh.read()
        os.remove(path)
    # Whole files of every structure are added by FuzzHDF5 itself from
    # testdata/taxa/biom2; the corpus keeps the small ones and the variants.
    variants = {"latest": seeds["latest"], "latest-chunked": seeds["latest-chunked"]}
    for name, data in seeds.items():
        variants[name + "-cut"] = data[:len(data) * 2 // 3]
    flipped = bytearray(seeds["latest-chunked"])
    for i in range(97, len(flipped), 509):
        flipped[i] ^= 0x10
    variants["latest-chunked-flipped"] = bytes(flipped)
    for vn, vd in variants.items():
        with open(os.path.join(FUZZ, vn), "w") as f:
            f.write(go_bytes(vd))


if __name__ == "__main__":
    main()
