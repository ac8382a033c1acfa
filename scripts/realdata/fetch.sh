#!/bin/sh
# Rebuild the real-data benchmark's count vectors (scripts/realdata/vectors)
# from Debian packages: `apt-get download` + `dpkg -x` into a cache folder
# (default testdata/external/realdata, git-ignored), then build.py.
# Needs apt-get (run `apt-get update` once on a fresh machine), dpkg,
# /usr/bin/python3 with numpy and python3-rdata (apt-get install
# python3-numpy python3-rdata). About 230 MB of downloads, 1-2 minutes.
#
#   sh scripts/realdata/fetch.sh [CACHE]
set -eu
root=$(cd "$(dirname "$0")/../.." && pwd)
cache=${1:-$root/testdata/external/realdata}
mkdir -p "$cache/debs" "$cache/x"
[ -e "$root/testdata/external/.gitignore" ] || printf '*\n' >"$root/testdata/external/.gitignore"
chmod 777 "$cache/debs" # apt-get download drops privileges to _apt
pkgs="covtobed-examples drop-seq-testdata r-bioc-phyloseq r-bioc-dirichletmultinomial manpages-dev perl-doc fortunes r-bioc-biostrings spades"
(cd "$cache/debs" && apt-get download -q $pkgs >/dev/null) || {
	echo "fetch.sh: apt-get download failed (run apt-get update first?)" >&2
	exit 1
}
: >"$cache/x/VERSIONS"
for p in $pkgs; do
	deb=$(ls -t "$cache"/debs/${p}_*.deb | head -n 1)
	dpkg -x "$deb" "$cache/x"
	dpkg-deb -f "$deb" Package Version | tr '\n' ' ' >>"$cache/x/VERSIONS"
	echo >>"$cache/x/VERSIONS"
done
/usr/bin/python3 "$root/scripts/realdata/build.py" "$cache/x" "$root/scripts/realdata/vectors"
echo "fetch.sh: vectors in $root/scripts/realdata/vectors, manifest sources.tsv"
