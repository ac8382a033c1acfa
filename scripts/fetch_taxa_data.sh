#!/bin/sh
# Fetch the open table Twins.csv (gut genera counts of 278 samples, LGPL-3)
# shipped in Debian's r-bioc-dirichletmultinomial into
# testdata/taxa/external/ (git-ignored). Tests that need it skip when it is
# absent. Uses only apt: `apt-get download` + `dpkg -x`; run `apt-get update`
# once before on a fresh machine.
#
#   sh scripts/fetch_taxa_data.sh
set -eu
root=$(cd "$(dirname "$0")/.." && pwd)
dest="$root/testdata/taxa/external"
mkdir -p "$dest"
if [ -s "$dest/Twins.csv" ]; then
	echo "fetch_taxa_data: $dest/Twins.csv already present"
	exit 0
fi
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
chmod 777 "$work" # apt-get download drops privileges to _apt
(cd "$work" && apt-get download -q r-bioc-dirichletmultinomial >/dev/null 2>&1) || {
	echo "fetch_taxa_data: apt-get download r-bioc-dirichletmultinomial failed (run apt-get update first?)" >&2
	exit 1
}
deb=$(ls "$work"/r-bioc-dirichletmultinomial_*.deb)
dpkg -x "$deb" "$work/x"
src=$(find "$work/x" -name Twins.csv | head -n 1)
if [ -z "$src" ]; then
	echo "fetch_taxa_data: Twins.csv not found in $(basename "$deb")" >&2
	exit 1
fi
cp "$src" "$dest/Twins.csv"
cp "$work"/x/usr/share/doc/r-bioc-dirichletmultinomial/copyright "$dest/Twins.copyright" 2>/dev/null || true
echo "$(basename "$deb")" >"$dest/Twins.source"
echo "fetch_taxa_data: wrote $dest/Twins.csv from $(basename "$deb")"
