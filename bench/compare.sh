#!/bin/bash
# bench/compare.sh: arcfit against general-purpose peers, side by side on the
# same generated inputs (not part of CI). Run from anywhere in the repository:
#
#   bash bench/compare.sh [OUTDIR]        (default OUTDIR: a new directory under /tmp)
#
# It installs the peers from Debian's packages (python3-numpy, python3-ephem,
# python3-astropy, python3-erfa; with sudo when not root), builds the arcfit
# side (bench/peers, Go), and runs each case of each side in its own process:
#   (a) the weighted degree-2 sky-plane fit (fit.Fit, poly2, parallax off, no
#       outlier rejection) against numpy.linalg.lstsq on the same weighted
#       2n x 6 design, for 1,000 and 1,000,000 observations;
#   (b) an element-set ephemeris table of 100,000 rows (ephem.EphemerisTable,
#       the library call behind `arcfit ephem --elements`), geocentric ICRS
#       astrometric RA/Dec, against python3-ephem computing the same rows;
#   (c) tables of the Sun and the Moon at 10,000 instants each against
#       astropy's get_body with its builtin ephemeris (offline).
# Each timing covers the computation only (no start-up, imports, input
# generation or reading) and is the median of several repetitions, with the
# CPU time of the same repetitions; the peak memory is each process's
# ru_maxrss. The report checks that both sides give the same answers before
# it gives their ratio (peer time / arcfit time).
#
# The environment variables OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE, when set,
# are removed for numpy's runs only (they select an older, slower kernel);
# the report names the kernel numpy ran.
set -euo pipefail

here=$(cd "$(dirname "$0")" && pwd)
repo=$(cd "$here/.." && pwd)
out=${1:-$(mktemp -d /tmp/arcfit-compare.XXXXXX)}
mkdir -p "$out"
py=/usr/bin/python3

need=""
for m in numpy ephem astropy erfa; do
	$py -c "import $m" 2>/dev/null || need="$need python3-$m"
done
if [ -n "$need" ]; then
	sudo=""
	[ "$(id -u)" -eq 0 ] || sudo=sudo
	$sudo apt-get update -qq
	$sudo apt-get install -y $need
fi

echo "== building the arcfit side" >&2
(cd "$repo" && go build -o "$out/peers" ./bench/peers)
peers="$out/peers"
numpy_env=(env -u OPENBLAS_CORETYPE -u OPENBLAS_L2_SIZE)

echo "== load before: $(uptime)" >&2
uptime >"$out/uptime_before.txt"

echo "== (a) weighted polynomial fit" >&2
for n in 1000 1000000; do
	reps=201
	[ "$n" -gt 100000 ] && reps=7
	"$peers" fit-gen "$n" "$out/fit_$n.bin"
	"$peers" fit "$out/fit_$n.bin" "$reps" >"$out/go_fit_$n.json"
	"${numpy_env[@]}" $py "$here/peers.py" fit "$out/fit_$n.bin" "$reps" >"$out/py_fit_$n.json"
done

echo "== (b) element-set table, 100,000 rows" >&2
"$peers" ephem 100000 5 "$out/ephem" >"$out/go_ephem.json"
$py "$here/peers.py" ephem "$out/ephem" 3 >"$out/py_ephem.json"

echo "== (c) Sun and Moon tables, 10,000 instants" >&2
"$peers" sunmoon 10000 5 "$out/sunmoon" >"$out/go_sunmoon.json"
$py "$here/peers.py" sunmoon "$out/sunmoon" 3 >"$out/py_sunmoon.json"

uptime >"$out/uptime_after.txt"
echo "== load after: $(cat "$out/uptime_after.txt")" >&2
echo
echo "arcfit against general-purpose peers ($(nproc) cores; $(cd "$repo" && go version | cut -d' ' -f3))"
echo "load before: $(cat "$out/uptime_before.txt")"
echo "load after:  $(cat "$out/uptime_after.txt")"
echo
$py "$here/peers.py" report "$out"
echo
echo "raw results: $out"
