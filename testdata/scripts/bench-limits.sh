#!/usr/bin/env bash
# Memory benchmark of the input limits (ingest/limits.go, issue 13): writes
# demo archives of two units at the limits and past them
# (testdata/scripts/limitgen), builds each with one worker and with two
# (two units built at once: the default on a 2-core machine), and prints
# the exit code, the wall time and the peak resident memory from
# /usr/bin/time -v. An archive at the limits must build with exit 0 under
# 300 MB (the target is 250 MB); one past them must be refused quickly,
# with exit 1, the file and line named, and the same bound.
#
#   testdata/scripts/bench-limits.sh [WORKDIR] [ROUNDS]
#
# ROUNDS (default 2) builds of each archive and -j: the machine is shared
# and the same build varies from run to run, so read the figures as
# ranges. The archives stay in WORKDIR (default /tmp/gtpack-limits) for
# the next run.
#
# Measured (2 cores, three rounds; peak RSS at -j 1 / -j 2, wall time at
# -j 2):
#   at-beam-points  103 / 175-179 MB, 0.8 s
#   at-beams        105 / 162-183 MB, 1.0-1.6 s
#   at-trace        105-107 / 167-171 MB, 0.8 s
#   past-file-size  47-52 / 53 MB, 0.1 s (refused before it is read)
#   past-trace      79-80 / 73-77 MB, 0.1 s
#   past-beams-10k  23 / 23 MB, 0.02 s
#   past-beams      25 / 24-26 MB, 0.03 s
#   past-run        112-114 / 174-175 MB, 3.6-6.2 s (it reads up to the
#                   1,000,000 lines of the run before refusing the rest)
# Before the limits, two units of 256 beams of 625 points took 219-259
# MB, one unit of 16 beams of 100,001 points 699 MB, and a 200 MB
# Touchstone file was read whole.
set -euo pipefail
cd "$(dirname "$0")/../.."
work=${1:-/tmp/gtpack-limits}
rounds=${2:-2}
mkdir -p "$work"
go build -o "$work/gtpack" ./cmd/gtpack
go build -o "$work/limitgen" ./testdata/scripts/limitgen

# archive NAME LIMITGEN-FLAGS...: writes the archive once.
archive() {
  local name=$1; shift
  if [ ! -d "$work/$name" ]; then
    "$work/limitgen" "$@" "$work/$name" >/dev/null
  fi
}
# At the limits. MaxRunBeamPoints (160,000) over 16 beams; MaxRunBeams
# (128) with the same beam points, both with tables of MaxElements
# (16,384) elements; MaxTracePoints (100,001) in one beam,
# with range references of as many points (files of 16 to 18 MB). The
# last exits 1: the demo spec's scanned limit selects no beam of a run of
# boresight alone, which the build reports.
archive at-beam-points -units 2 -beams 16 -points 10000 -elements 16384
archive at-beams       -units 2 -beams 128 -points 1250 -elements 16384
archive at-trace       -units 2 -beams 1 -points 100001
# Past them. The issue's 200 MB Touchstone file of 1.15 million points
# (refused by its size); a file of 150,000 points under the size limit
# (refused at the line of point 100,002); a run of 10,000 beams (its
# run.yaml is 2.5 MB: refused by its size); 200 beams in a run.yaml
# within the size limit (refused at the line of beam 129); 16 beams of
# 100,001 points (1.6 million beam points: the data files past 1,000,000
# lines are refused, and the beams past 160,000 beam points).
archive past-file-size -units 2 -huge-points 1150000 -huge-bytes 200000000
archive past-trace     -units 2 -huge-points 150000
archive past-beams-10k -units 2 -beams 10000 -points 101
archive past-beams     -units 2 -beams 200 -points 101
archive past-run       -units 2 -beams 16 -points 100001

printf '%-16s %-3s %6s %9s %10s  %s\n' archive -j exit wall peak-RSS "first problem"
for name in at-beam-points at-beams at-trace past-file-size past-trace past-beams-10k past-beams past-run; do
  for j in 1 2; do
    for ((r = 1; r <= rounds; r++)); do
      site="$work/site-$name"
      rm -rf "$site"
      log="$work/time-$name-$j.log"
      set +e
      /usr/bin/time -v "$work/gtpack" build "$work/$name" -o "$site" -j "$j" --quiet >/dev/null 2>"$log"
      code=$?
      set -e
      wall=$(awk -F': ' '/Elapsed \(wall clock\)/ {n=split($2,a,":"); s=0; for(i=1;i<=n;i++) s=s*60+a[i]; print s}' "$log")
      rss=$(awk -F': ' '/Maximum resident set size/ {printf "%.0f", $2/1024}' "$log")
      first=$(grep -v -e '^\s' -e '^Command exited' "$log" | head -1 | cut -c1-150 || true)
      printf '%-16s %-3s %6s %8ss %7s MB  %s\n' "$name" "$j" "$code" "$wall" "$rss" "$first"
    done
  done
done
