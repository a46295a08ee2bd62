#!/usr/bin/env bash
# Regenerates docs/session.md, the user guide's worked session: every command run on the
# built-in invented demo data, with its real output. Run from the repository root:
#
#   docs/gen/session.sh
#
# It builds arcfit, works in a temporary folder, and writes docs/session.md (the prose is
# below, the outputs are the commands' own). The test cmd/arcfit/docsession_test.go runs
# every command of docs/session.md and checks that it still succeeds.
set -euo pipefail
root="$(cd "$(dirname "$0")/../.." && pwd)"
work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT
go build -o "$work/arcfit" "$root/cmd/arcfit"
out="$root/docs/session.md.tmp"
cd "$work"
export PATH="$work:$PATH"
export TZ=UTC

# run CMD... : appends the command and its output (stdout and stderr) as a block.
run() {
	{
		echo '```'
		printf '$'
		for a in "$@"; do
			case "$a" in
			*[[:space:]]*) printf ' "%s"' "$a" ;;
			*) printf ' %s' "$a" ;;
			esac
		done
		printf '\n'
		"$@" 2>&1 || echo "(exit code $?)"
		echo '```'
		echo
	} >>"$out"
}
say() { printf '%s\n\n' "$*" >>"$out"; }

cat >"$out" <<'TEXT'
# A worked session

Every command of arcfit, run on the invented demo data (an invented main-belt asteroid, Demo-1,
seen from two invented sites, Alder Ridge and Birch Hollow, on three nights in February 2027).
The outputs below are the commands' own, made by `docs/gen/session.sh`; run the same commands in
a scratch folder and you get the same numbers. The object, its orbit, the sites and the
measurements are invented.

## 1. The demo writes the data

`arcfit demo --out demo` writes the observations and the sites into `demo/`, then runs the
session below in one go (its own output is not repeated here).
TEXT
arcfit demo --out demo >/dev/null 2>&1
run ls demo

say "## 2. What was read: \`inspect\`

Before fitting anything, check what the file holds: the counts, the sites, the nights, the
rate of motion on each night, and any warnings."
run arcfit inspect demo/observations.csv --sites demo/sites.csv

say "## 3. Fit and compare the models: \`fit\`

The models are fitted, the bad measurement is flagged, and the comparison says which model is
used and why. \`--save\` keeps the fit for the later commands."
run arcfit fit demo/observations.csv --sites demo/sites.csv --save demo/fit.json

say "## 4. Where it will be: \`predict\`

The position and the 3-σ search region seen from Alder Ridge, the next night and three weeks
later. The region grows from arcseconds to arcminutes: a three-night arc pins the orbit down
only so far."
run arcfit predict demo/fit.json --sites demo/sites.csv --site "Alder Ridge" --at 2027-02-09T04:00:00Z,2027-03-01T04:00:00Z

say "The same as JSON, for a script (one time):"
run arcfit predict demo/fit.json --sites demo/sites.csv --site "Alder Ridge" --at 2027-03-01T04:00:00Z --json

say "## 5. Where to point on the night: \`night\`

Three weeks after the arc, at Alder Ridge: the window in which the object stands above 25°
in astronomical darkness, the best time, where to point, how large a region to search and how
fast the object moves. \`--chart\` draws the search region and the night's altitudes."
run arcfit night demo/fit.json --sites demo/sites.csv --site "Alder Ridge" --date 2027-02-28 --step 1h --chart night.png

say "## 6. The sky itself: \`ephem\`

Positions of the Sun, the Moon, a planet or an element set over a span, from a site."
run arcfit ephem moon --sites demo/sites.csv --site "Alder Ridge" --from 2027-03-01T02:00:00Z --to 2027-03-01T10:00:00Z --step 2h

cat >elements.csv <<'CSV'
# invented element sets for the worked session (not real objects)
name,epoch_tt,a_au,e,i_deg,node_deg,peri_deg,m_deg,q_au,tp_tt,h,g
Invented-Talus,2027-03-01T00:00:00,2.41,0.18,6.2,131.0,47.5,12.0,,,16.1,0.15
Invented-Comet Vale,,,0.73,14.5,210.0,96.0,,1.12,2027-04-20T00:00:00,,
CSV
say "An element set instead of observations (\`elements.csv\`, invented):"
run cat elements.csv
run arcfit ephem --elements elements.csv --name Invented-Talus --sites demo/sites.csv --site "Alder Ridge" --from 2027-03-01T03:00:00Z --to 2027-03-01T09:00:00Z --step 3h

say "## 7. A club's night: \`plan\`

A list of targets (observation files, fit files and element-set names) scheduled for one
night at one site, by when each is best, with the conflicts and the unobservable ones."
cat >targets.txt <<'TXT'
# targets for the night of 2027-02-28 (invented)
fit demo/fit.json
elements elements.csv Invented-Talus
elements elements.csv "Invented-Comet Vale"
TXT
run cat targets.txt
run arcfit plan targets.txt --sites demo/sites.csv --site "Alder Ridge" --date 2027-02-28 --limit-mag 19

say "## 8. What one more night would buy: \`simulate\`

Synthetic observations of the fitted orbit on a night you have not observed yet, with the
noise you expect; fit them with the real ones to see how much the region would shrink."
run arcfit simulate demo/fit.json --sites demo/sites.csv --site "Alder Ridge" --nights 2027-02-10 --per-night 4 --noise 0.5 --seed 7 --out more.csv
run cat more.csv

cat >>"$out" <<'TEXT'
`arcfit demo` does this last step for you: it fits the three real nights and the synthetic
one together and prints the region three weeks after the arc both ways.

For every option of every command, see [commands.md](commands.md); for the file formats,
[formats.md](formats.md); for what the models assume and when each holds, [models.md](models.md).
TEXT

mv "$out" "$root/docs/session.md"
echo "wrote docs/session.md"
