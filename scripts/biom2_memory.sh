#!/bin/sh
# Peak memory of `headroom taxa` on a BIOM 2.1 (HDF5) table against the
# same table as TSV: 2,000 samples x 5,000 taxa, invented counts (fixed
# seed), 5% of cells non-zero. Needs python3-biom-format, python3-h5py and
# /usr/bin/time (Debian package time).
#
#     sh scripts/biom2_memory.sh [WORKDIR]
set -eu
dir=${1:-$(mktemp -d)}
mkdir -p "$dir"
/usr/bin/python3 - "$dir" <<'PY'
import sys, os
import numpy as np, scipy.sparse as sp, h5py
from biom.table import Table
d = sys.argv[1]
rng = np.random.default_rng(20261203)
n_obs, n_samp = 5000, 2000
m = sp.random(n_obs, n_samp, density=0.05, format="csc", random_state=rng,
              data_rvs=lambda k: rng.negative_binomial(1, 0.02, size=k) + 1.0)
t = Table(m, ["ASV%05d" % i for i in range(n_obs)], ["site-%04d" % j for j in range(n_samp)])
with h5py.File(os.path.join(d, "wide.biom"), "w") as f:
    t.to_hdf5(f, "headroom memory script", compress=True)
with open(os.path.join(d, "wide.tsv"), "w") as f:
    f.write(t.to_tsv())
PY
go build -o "$dir/headroom" ./cmd/headroom
ls -l "$dir/wide.biom" "$dir/wide.tsv"
for f in wide.biom wide.tsv; do
	/usr/bin/time -v "$dir/headroom" taxa --bootstrap 0 --progress never --threads 1 -o "$dir/$f.out" "$dir/$f" 2> "$dir/$f.time"
	printf '%s: ' "$f"
	grep -E 'Maximum resident|Elapsed' "$dir/$f.time" | tr -s ' \t' ' ' | tr '\n' ';'
	echo
done
cmp "$dir/wide.biom.out" "$dir/wide.tsv.out" && echo "same output for both"
