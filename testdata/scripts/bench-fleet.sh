#!/usr/bin/env bash
# Fleet-overview benchmark (issue 17): a demo site of N units over twelve
# months (few beams and points: the overview's cost is per unit), then
#   - the fleet stage, `gtpack index SITE`: wall time and peak RSS
#     (/usr/bin/time -v; targets < 10 s and < 150 MB at 10,000 units);
#   - index.html in headless Chromium over the DevTools protocol
#     (testdata/scripts/benchfleet): size, DOMContentLoaded, a filter
#     keystroke to the next frame, clearing the filter, sorts, renderer
#     memory (targets < 3 MB, < 2 s, < 100 ms, < 300 ms, < 300 MB);
#   - fleet.xlsx in openpyxl (bench_fleet_xlsx.py; target < 3 s).
#
#   testdata/scripts/bench-fleet.sh [N] [WORKDIR]
#
# The first run builds the archive and the site (a few minutes at 10,000
# units on two cores: `build -j 2 --quiet`); later runs reuse them. With
# SHOTS=DIR the browser part writes screenshots of the page there.
set -euo pipefail
cd "$(dirname "$0")/../.."
N=${1:-10000}
work=${2:-/tmp/gtpack-bench-fleet}
mkdir -p "$work"
go build -o "$work/gtpack" ./cmd/gtpack
go build -o "$work/benchfleet" ./testdata/scripts/benchfleet
archive="$work/archive-$N"
site="$work/site-$N"
if [ ! -d "$archive" ]; then
  echo "writing a demo archive of $N units..."
  "$work/gtpack" demo "$archive" --units "$N" --beams 2 --points 41 --months 12 >/dev/null
fi
if [ ! -f "$site/index.html" ]; then
  echo "building the site (this takes a while)..."
  start=$(date +%s)
  "$work/gtpack" build "$archive" -o "$site" -j 2 --quiet || true
  echo "built in $(( $(date +%s) - start )) s"
fi
echo "== $N units =="
log="$work/time-index-$N.log"
/usr/bin/time -v "$work/gtpack" index "$site" >/dev/null 2>"$log" || true
awk -F': ' '/Elapsed \(wall clock\)/ {n=split($2,a,":"); s=0; for(i=1;i<=n;i++) s=s*60+a[i]; w=s}
  /Maximum resident set size/ {r=$2/1024}
  END {printf "fleet stage (gtpack index) %8.2f s    peak RSS %.0f MB  (targets < 10 s, < 150 MB)\n", w, r}' "$log"
shots=()
if [ -n "${SHOTS:-}" ]; then mkdir -p "$SHOTS"; shots=(-shots "$SHOTS"); fi
"$work/benchfleet" "${shots[@]}" "$site/index.html" | grep -v '^  renderer process'
python=/usr/bin/python3
if "$python" -c 'import openpyxl' 2>/dev/null; then
  "$python" testdata/scripts/bench_fleet_xlsx.py "$site/fleet.xlsx"
else
  echo "fleet.xlsx: python3-openpyxl not installed, not measured"
fi
