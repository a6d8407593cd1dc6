#!/bin/sh
# Throughput of the Touchstone reader against scikit-rf 0.15.4 on the same
# files: 2-port, 10,000 points, RI, MA and DB. Prints MB/s of both and the
# ratio. Both sides count CPU time of their process per read (the machine
# may be shared). The two sides take turns, ROUNDS times (default 5), each
# reading each file from disk in two batches; the best batch of each side
# is kept, as other load only ever adds time, and taking turns gives both
# sides the same chance of a quiet moment. Run from anywhere inside the
# repository.
set -eu
root=$(cd "$(dirname "$0")/../.." && pwd)
py=/usr/bin/python3
rounds=${ROUNDS:-5}
dir=$(mktemp -d)
trap 'rm -rf "$dir"' EXIT INT TERM
cd "$root"
GTPACK_TS_BENCH_WRITE="$dir" go test ./ingest/ -run '^TestTouchstoneBenchHelper$' -count=1 >/dev/null
go test -c -o "$dir/ingest.test" ./ingest/
: >"$dir/go.txt"
: >"$dir/skrf.txt"
r=0
while [ "$r" -lt "$rounds" ]; do
	GTPACK_TS_BENCH_READ="$dir" GTPACK_TS_BENCH_BATCHES=2 "$dir/ingest.test" -test.run '^TestTouchstoneBenchHelper$' -test.count=1 -test.v |
		grep '^gtpack ' >>"$dir/go.txt"
	SKRF_BENCH_BATCHES=2 "$py" testdata/scripts/bench_touchstone_skrf.py "$dir"/bench_*.s2p >>"$dir/skrf.txt"
	r=$((r + 1))
done
printf '%-16s %10s %12s %12s %8s\n' file bytes 'gtpack MB/s' 'skrf MB/s' ratio
awk 'FNR == NR { if (!($2 in g) || $4 < g[$2]) g[$2] = $4; next }
	{ if (!($2 in s) || $4 < s[$2]) s[$2] = $4; n[$2] = $3 }
	END {
		for (f in s) {
			printf "%-16s %10d %12.1f %12.2f %7.1fx\n", f, n[f], n[f] / g[f] / 1e6, n[f] / s[f] / 1e6, s[f] / g[f]
			N += n[f]; G += g[f]; S += s[f]
		}
		# The whole set, each file read once by each side.
		printf "~%-15s %10d %12.1f %12.2f %7.1fx\n", "all four", N, N / G / 1e6, N / S / 1e6, S / G
	}' "$dir/go.txt" "$dir/skrf.txt" | LC_ALL=C sort
