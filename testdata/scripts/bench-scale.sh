#!/usr/bin/env bash
# Scale benchmark: a synthetic archive of N units (16 beams of 801 points
# each), then a full build, a no-change rebuild and a one-unit-changed
# rebuild. Prints units per second, input MB/s, peak memory (resident set,
# from /usr/bin/time -v) and the floor: reading and parsing every input
# byte with no reduction or rendering.
#
#   testdata/scripts/bench-scale.sh [N] [WORKDIR]
#
# With FLEET_ONLY=1 only the fleet-stage part at the end runs, on the site
# an earlier run left in WORKDIR.
set -euo pipefail
cd "$(dirname "$0")/../.."
N=${1:-1000}
work=${2:-/tmp/gtpack-bench}
mkdir -p "$work"
go build -o "$work/gtpack" ./cmd/gtpack
go build -o "$work/floor" ./testdata/scripts/floor
archive="$work/archive-$N"
if [ ! -d "$archive" ]; then
  echo "writing a demo archive of $N units..."
  "$work/gtpack" demo "$archive" --units "$N" >/dev/null
fi
mb=$(du -sb "$archive" | awk '{printf "%.1f", $1/1e6}')
echo "archive: $N units, $mb MB"

# measure LABEL CMD...: wall time and peak RSS of one command; units/s of
# UNITS units (default N), MB/s of the archive.
measure() {
  local label=$1; shift
  local log="$work/time-$label.log"
  /usr/bin/time -v "$@" >/dev/null 2>"$log" || true
  local wall rss
  wall=$(awk -F': ' '/Elapsed \(wall clock\)/ {n=split($2,a,":"); s=0; for(i=1;i<=n;i++) s=s*60+a[i]; print s}' "$log")
  rss=$(awk -F': ' '/Maximum resident set size/ {printf "%.0f", $2/1024}' "$log")
  printf '%-22s %8.2f s  %8.1f units/s  %8.1f MB/s  peak RSS %5d MB\n' "$label" "$wall" \
    "$(awk -v n="${UNITS:-$N}" -v w="$wall" 'BEGIN{print n/w}')" "$(awk -v m="$mb" -v w="$wall" 'BEGIN{print m/w}')" "$rss"
  echo "$wall" > "$work/wall-$label"
}

site="$work/site-$N"
if [ "${FLEET_ONLY:-}" != 1 ]; then
  rm -rf "$site"
  sync
  # The floor twice: the first may read the archive from disk, the second
  # reads it from the page cache, as the build after it does. The ratio is
  # taken against the second (the stricter and the reproducible one).
  measure floor-first "$work/floor" "$archive"
  measure floor "$work/floor" "$archive"
  measure full-build "$work/gtpack" build "$archive" -o "$site" --quiet
  measure no-change "$work/gtpack" build "$archive" -o "$site" --quiet
  first=$(find "$archive" -name run.yaml | sort | sed -n 1p)
  echo "# touched by the benchmark" >> "$first"
  measure one-changed "$work/gtpack" build "$archive" -o "$site" --quiet
  sed -i '$ d' "$first"
  # An in-place edit of a data file with its size and time restored (as
  # touch -r leaves it): found by its change time, one unit rebuilt.
  data=$(find "$(dirname "$first")" -name '*.s2p' | sort | sed -n 1p)
  cp -p "$data" "$work/saved.s2p"
  tr '0123456789' '1234567890' < "$work/saved.s2p" | head -c "$(stat -c %s "$work/saved.s2p")" > "$work/edited.s2p"
  cat "$work/edited.s2p" > "$data"
  touch -r "$work/saved.s2p" "$data"
  measure in-place-edit "$work/gtpack" build "$archive" -o "$site" --quiet
  cat "$work/saved.s2p" > "$data"
  touch -r "$work/saved.s2p" "$data"
  measure edit-undone "$work/gtpack" build "$archive" -o "$site" --quiet
  measure no-change-2 "$work/gtpack" build "$archive" -o "$site" --quiet
  printf 'manifest sizes, %d units: manifest.json %d B, a unit manifest %d B, SHA256SUMS %d B\n' "$N" \
    "$(stat -c %s "$site/manifest.json")" "$(stat -c %s "$(ls -d "$site"/units/*/ | head -1)manifest.json")" "$(stat -c %s "$site/SHA256SUMS")"
  awk -v f="$(cat "$work/wall-floor")" -v b="$(cat "$work/wall-full-build")" \
    'BEGIN{printf "full build / floor: %.2f\n", b/f}'
fi

# The fleet stage at ten times the units: the units of this site (their
# records, summaries and folders, the files hard-linked), replicated ten
# times under new serial numbers, then `gtpack index`. The unit stage holds
# one unit per worker whatever the archive's size, so this is where memory
# could grow with the number of units: the fleet stage reads the states one
# by one and keeps per unit a small record and its boresight trace (3.2 kB
# at 801 points), so its peak at ten times the units should stay near the
# 1,000-unit one.
big="$work/site-x10"
rm -rf "$big"
mkdir -p "$big/.gtpack/units" "$big/.gtpack/summaries" "$big/units"
/usr/bin/python3 - "$site" "$big" <<'PY'
import json, os, sys
src, dst = sys.argv[1], sys.argv[2]
for name in sorted(os.listdir(os.path.join(src, ".gtpack", "units"))):
    state = json.load(open(os.path.join(src, ".gtpack", "units", name)))
    summary = json.load(open(os.path.join(src, ".gtpack", "summaries", name)))
    old = state["serial"]
    for k in range(10):
        serial = "%s-R%d" % (old, k)
        s = dict(state, serial=serial, summary=dict(state["summary"], serial=serial))
        os.makedirs(os.path.join(dst, "units", serial))
        outs = []
        for o in state["outputs"]:
            base = os.path.basename(o["path"])
            new = base.replace(old, serial)
            os.link(os.path.join(src, o["path"]), os.path.join(dst, "units", serial, new))
            outs.append(dict(o, path="units/%s/%s" % (serial, new)))
        s["outputs"] = outs
        json.dump(s, open(os.path.join(dst, ".gtpack", "units", serial + ".json"), "w"))
        json.dump(dict(summary, serial=serial), open(os.path.join(dst, ".gtpack", "summaries", serial + ".json"), "w"))
PY
echo "fleet stage, $((N)) units:"
measure index-x1 "$work/gtpack" index "$site"
echo "fleet stage, $((N * 10)) units:"
UNITS=$((N * 10)) measure index-x10 "$work/gtpack" index "$big"
awk -v a="$(awk -F': ' '/Maximum resident/ {print $2}' "$work/time-index-x1.log")" \
  -v b="$(awk -F': ' '/Maximum resident/ {print $2}' "$work/time-index-x10.log")" \
  'BEGIN{printf "fleet stage peak RSS, 10x units / 1x units: %.2f\n", b/a}'
echo "fleet pages of $((N * 10)) units:"
for f in fleet.json fleet.xlsx index.html results.csv manifest.json SHA256SUMS; do
  printf '  %-14s %6.1f MB\n' "$f" "$(stat -c %s "$big/$f" | awk '{print $1/1e6}')"
done

# The unit stage at ten times the units: an archive whose runs are this
# archive's, ten times over under new serials (data files hard-linked, only
# run.yaml rewritten), built with --shard 0/10. The build discovers all ten
# times the units (lean: ~1 kB a run) and builds a tenth of them, so its
# peak is the unit stage's with the discovery of the larger archive.
if [ "${FLEET_ONLY:-}" != 1 ]; then
  ten="$work/archive-${N}x10"
  if [ ! -d "$ten" ]; then
    echo "writing an archive of $((N * 10)) units by hard links..."
    /usr/bin/python3 - "$archive" "$ten" <<'PY'
import os, re, shutil, sys
src, dst = sys.argv[1], sys.argv[2]
os.makedirs(os.path.join(dst, "runs"))
for d in ("stations", "references", "specs"):
    shutil.copytree(os.path.join(src, d), os.path.join(dst, d))
for unit in sorted(os.listdir(os.path.join(src, "runs"))):
    for k in range(10):
        for root, dirs, files in os.walk(os.path.join(src, "runs", unit)):
            rel = os.path.relpath(root, os.path.join(src, "runs", unit))
            out = os.path.normpath(os.path.join(dst, "runs", "%s-R%d" % (unit, k), rel))
            os.makedirs(out, exist_ok=True)
            for f in files:
                if f == "run.yaml":
                    text = open(os.path.join(root, f)).read()
                    text = re.sub(r"(?m)^serial: (.*)$", r"serial: \1-R%d" % k, text)
                    open(os.path.join(out, f), "w").write(text)
                else:
                    os.link(os.path.join(root, f), os.path.join(out, f))
PY
  fi
  rm -rf "$work/site-shard"
  UNITS=$N measure shard-0-of-10 "$work/gtpack" build "$ten" -o "$work/site-shard" --shard 0/10 --quiet
  awk -v a="$(awk -F': ' '/Maximum resident/ {print $2}' "$work/time-full-build.log")" \
    -v b="$(awk -F': ' '/Maximum resident/ {print $2}' "$work/time-shard-0-of-10.log")" \
    'BEGIN{printf "unit stage peak RSS, %d-unit archive / %d-unit archive: %.2f\n", 10*'"$N"', '"$N"', b/a}'
fi
