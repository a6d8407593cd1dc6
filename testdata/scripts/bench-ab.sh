#!/usr/bin/env bash
# A/B comparison of two gtpack binaries on full builds of one archive, run
# alternately (A B A B ...) so that a change in the machine's load falls
# on both alike. Each run builds into an empty site. Prints per run the
# CPU time (user + system), the wall time and the peak RSS, then the
# medians and B's CPU against A's in percent.
#
#   testdata/scripts/bench-ab.sh BINARY_A BINARY_B ARCHIVE [PAIRS] [WORKDIR]
#
# The speed layers kept in the code are those whose removal costs 5 % or
# more of a full build's CPU measured this way (DEVELOPERS.md, Measured).
set -euo pipefail
a=$1 b=$2 archive=$3 pairs=${4:-3} work=${5:-/tmp/gtpack-ab}
mkdir -p "$work"
log="$work/ab.log"
: > "$log"
run() {
  local label=$1 bin=$2 site="$work/site"
  rm -rf "$site"
  sync
  /usr/bin/time -f "%U %S %e %M" -o "$work/time" "$bin" build "$archive" -o "$site" --quiet >/dev/null 2>&1 || true
  read -r u s e m < "$work/time"
  local cpu
  cpu=$(awk -v u="$u" -v s="$s" 'BEGIN{printf "%.2f", u+s}')
  printf '%s cpu %7.2f s  wall %7.2f s  peak RSS %5d MB  load %s\n' "$label" "$cpu" "$e" "$((m / 1024))" "$(cut -d' ' -f1 /proc/loadavg)"
  echo "$label $cpu $e" >> "$log"
}
for i in $(seq "$pairs"); do
  run A "$a"
  run B "$b"
done
awk '
  { cpu[$1] = cpu[$1] " " $2; wall[$1] = wall[$1] " " $3 }
  function median(s,   n, x, i, j, t) {
    n = split(s, x, " ")
    for (i = 1; i <= n; i++) for (j = i + 1; j <= n; j++) if (x[j] + 0 < x[i] + 0) { t = x[i]; x[i] = x[j]; x[j] = t }
    return n % 2 ? x[(n + 1) / 2] : (x[n / 2] + x[n / 2 + 1]) / 2
  }
  END {
    ca = median(cpu["A"]); cb = median(cpu["B"])
    printf "median cpu  A %.2f s  B %.2f s  B/A %+.1f %%\n", ca, cb, 100 * (cb - ca) / ca
    printf "median wall A %.2f s  B %.2f s\n", median(wall["A"]), median(wall["B"])
  }' "$log"
