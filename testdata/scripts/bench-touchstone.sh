#!/bin/sh
# Throughput of the Touchstone reader against scikit-rf 0.15.4 on the same
# files: 2-port, 10,000 points, RI, MA and DB. Prints MB/s of both and the
# ratio. Both sides count CPU time of their process per read (the machine
# may be shared), each file read from disk in five batches, the best batch
# kept. Run from anywhere inside the repository.
set -eu
root=$(cd "$(dirname "$0")/../.." && pwd)
py=/usr/bin/python3
dir=$(mktemp -d)
trap 'rm -rf "$dir"' EXIT INT TERM
cd "$root"
GTPACK_TS_BENCH_WRITE="$dir" go test ./ingest/ -run '^TestTouchstoneBenchHelper$' -count=1 >/dev/null
GTPACK_TS_BENCH_READ="$dir" go test ./ingest/ -run '^TestTouchstoneBenchHelper$' -count=1 -v |
	grep '^gtpack ' >"$dir/go.txt"
"$py" testdata/scripts/bench_touchstone_skrf.py "$dir"/bench_*.s2p >"$dir/skrf.txt"
printf '%-16s %10s %12s %12s %8s\n' file bytes 'gtpack MB/s' 'skrf MB/s' ratio
awk 'FNR == NR { g[$2] = $4; next }
	{ printf "%-16s %10d %12.1f %12.2f %7.0fx\n", $2, $3, $3 / g[$2] / 1e6, $3 / $4 / 1e6, $4 / g[$2] }' \
	"$dir/go.txt" "$dir/skrf.txt"
