#!/bin/sh
# Throughput of the Touchstone reader against scikit-rf 0.15.4 on the same
# files: 2-port, 10,000 points, RI, MA and DB. Prints MB/s of both and the
# ratio. Both sides count CPU time of their process per read (the machine
# may be shared), collector and kernel included. The sides take turns,
# ROUNDS times (default 5), each reading each file from disk in two
# batches; the best batch of each side is kept, as other load only ever
# adds time, and taking turns gives both sides the same chance of a quiet
# moment.
#
# gtpack is timed twice: with Go's default collector setting (GOGC=100),
# and with the one `gtpack build` reads its inputs with (GOGC=400, see
# cmd/gtpack/build.go). A loop that reads one file after another into a
# heap of a few MB collects every few reads, and at the default setting
# the collector's start and stop take a tenth of the CPU or more. Run from
# anywhere inside the repository.
set -eu
root=$(cd "$(dirname "$0")/../.." && pwd)
py=/usr/bin/python3
rounds=${ROUNDS:-5}
dir=$(mktemp -d)
trap 'rm -rf "$dir"' EXIT INT TERM
cd "$root"
GTPACK_TS_BENCH_WRITE="$dir" go test ./ingest/touchstone/ -run '^TestTouchstoneBenchHelper$' -count=1 >/dev/null
go test -c -o "$dir/touchstone.test" ./ingest/touchstone/
: >"$dir/go100.txt"
: >"$dir/go400.txt"
: >"$dir/skrf.txt"
r=0
while [ "$r" -lt "$rounds" ]; do
	for gc in 100 400; do
		GOGC=$gc GTPACK_TS_BENCH_READ="$dir" GTPACK_TS_BENCH_BATCHES=2 "$dir/touchstone.test" -test.run '^TestTouchstoneBenchHelper$' -test.count=1 -test.v |
			grep '^gtpack ' >>"$dir/go$gc.txt"
	done
	SKRF_BENCH_BATCHES=2 "$py" testdata/scripts/bench_touchstone_skrf.py "$dir"/bench_*.s2p >>"$dir/skrf.txt"
	r=$((r + 1))
done
printf '%-16s %9s %10s %10s %7s %10s %7s\n' file bytes 'skrf MB/s' 'GOGC=100' ratio 'GOGC=400' ratio
awk 'FILENAME ~ /go100/ { if (!($2 in a) || $4 < a[$2]) a[$2] = $4; next }
	FILENAME ~ /go400/ { if (!($2 in b) || $4 < b[$2]) b[$2] = $4; next }
	{ if (!($2 in s) || $4 < s[$2]) s[$2] = $4; n[$2] = $3 }
	END {
		for (f in s) {
			printf "%-16s %9d %10.1f %10.1f %6.1fx %10.1f %6.1fx\n", f, n[f], n[f] / s[f] / 1e6, n[f] / a[f] / 1e6, s[f] / a[f], n[f] / b[f] / 1e6, s[f] / b[f]
			N += n[f]; A += a[f]; B += b[f]; S += s[f]
		}
		# The whole set, each file read once by each side.
		printf "~%-15s %9d %10.1f %10.1f %6.1fx %10.1f %6.1fx\n", "all four", N, N / S / 1e6, N / A / 1e6, S / A, N / B / 1e6, S / B
	}' "$dir/go100.txt" "$dir/go400.txt" "$dir/skrf.txt" | LC_ALL=C sort
echo "(MB/s of CPU time; gtpack at Go's default collector setting and at the build's)"
