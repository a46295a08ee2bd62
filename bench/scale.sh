#!/bin/bash
# bench/scale.sh: arcfit over many inputs (not part of CI). Run from anywhere
# in the repository:
#
#   bash bench/scale.sh [N] [WORKDIR]     (default N = 1000, WORKDIR a new directory under /tmp)
#
# It builds arcfit, writes four invented element sets (near opposition in late
# February 2027) and an invented site, simulates N observation files with
# `arcfit simulate` (three nights, six observations a night, 0.5″ noise, seed
# = file number), then measures with /usr/bin/time -v:
#   * `arcfit fit DIR` (a worker per core), and with --jobs 1;
#   * `arcfit plan TARGETS` of the N files as "obs FILE" targets (a worker per
#     core), and with GOMAXPROCS=1 (one worker);
# printing wall time, CPU utilisation (user + system over wall) and peak
# memory (maximum resident set size) of each, with the load before and after.
# Nothing is written inside the repository.
set -euo pipefail

here=$(cd "$(dirname "$0")" && pwd)
repo=$(cd "$here/.." && pwd)
n=${1:-1000}
work=${2:-$(mktemp -d /tmp/arcfit-scale.XXXXXX)}
mkdir -p "$work/obs"
[ -x /usr/bin/time ] || { echo "bench/scale.sh: needs GNU time (apt-get install time)" >&2; exit 2; }

(cd "$repo" && go build -o "$work/arcfit" ./cmd/arcfit)
arcfit="$work/arcfit"

cat >"$work/sites.csv" <<'SITES'
name,lat_deg,lon_deg,height_m
Invented Ridge,44.52,-72.80,410
SITES
# Invented element sets whose mean longitude at the epoch (2027-02-20 TT) is
# 151°, the Earth's heliocentric longitude then: near opposition.
cat >"$work/elements.csv" <<'ELEMENTS'
name,epoch_tt,a_au,e,i_deg,node_deg,peri_deg,m_deg,h,g
Invented-S1,2461456.5,2.3,0.08,5.0,100.0,30.0,21.0,16.0,0.15
Invented-S2,2461456.5,2.6,0.12,9.0,140.0,300.0,71.0,15.5,0.15
Invented-S3,2461456.5,3.0,0.05,12.0,60.0,200.0,251.0,15.0,0.15
Invented-S4,2461456.5,2.8,0.15,3.0,10.0,120.0,21.0,15.2,0.15
ELEMENTS

if [ "$(ls "$work/obs" | wc -l)" -ne "$n" ]; then
	echo "== simulating $n observation files in $work/obs" >&2
	seq 1 "$n" | xargs -P "$(nproc)" -I{} bash -c '
		k={}; set=$(( (k - 1) % 4 + 1 ))
		"$0" simulate --elements "$1/elements.csv" --name "Invented-S$set" --site "Invented Ridge" --sites "$1/sites.csv" \
			--from 2027-02-18 --night-count 3 --per-night 6 --cadence 20m --noise 0.5 --seed "$k" \
			--out "$1/obs/$(printf "obs_%04d.csv" "$k")" 2>/dev/null' "$arcfit" "$work"
fi
ls "$work/obs" | sed 's/^/obs obs\//' >"$work/targets.txt"

measure() { # key, label, then the command; prints one line
	local log="$work/time_$1.txt" label=$2
	shift 2
	local rc=0
	/usr/bin/time -v "$@" >"$log.out" 2>"$log" || rc=$?
	awk -v label="$label" -v rc="$rc" -F': ' '
		/Elapsed \(wall clock\)/ { n = split($2, t, ":"); wall = (n == 3) ? t[1]*3600 + t[2]*60 + t[3] : t[1]*60 + t[2] }
		/User time/ { user = $2 } /System time/ { sys = $2 }
		/Maximum resident set size/ { rss = $2 }
		END { printf "| %s | %.1f s | %.0f %% (%.1f s CPU) | %.0f MB | %d |\n", label, wall, 100 * (user + sys) / wall, user + sys, rss / 1024, rc }' "$log"
}

echo "arcfit at scale: $n observation files ($(nproc) cores; $(cd "$repo" && go version | cut -d' ' -f3))"
echo "load before: $(uptime)"
echo
echo "| run | wall | CPU utilisation | peak RSS | exit |"
echo "|---|---|---|---|---|"
measure fit "fit DIR (a worker per core)" "$arcfit" fit "$work/obs" --sites "$work/sites.csv"
measure fit1 "fit DIR --jobs 1" "$arcfit" fit "$work/obs" --sites "$work/sites.csv" --jobs 1
measure plan "plan of $n obs targets (a worker per core)" "$arcfit" plan "$work/targets.txt" --date 2027-02-22 --site "Invented Ridge" --sites "$work/sites.csv"
measure plan1 "plan of $n obs targets, GOMAXPROCS=1" env GOMAXPROCS=1 "$arcfit" plan "$work/targets.txt" --date 2027-02-22 --site "Invented Ridge" --sites "$work/sites.csv"
echo
echo "load after: $(uptime)"
echo "fit blocks: $(grep -c '^== ' "$work/time_fit.txt.out") of $n; outputs and logs: $work"
