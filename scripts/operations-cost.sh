#!/usr/bin/env bash
# What the operations figures (landing, anchor shots, relay, night) add to the demo survey:
# the same release build surveys the demo twice in one run, with and without
# --no-operations, alternating, and prints the CPU time (user + system) and wall time of each
# and their ratio. CPU time is the figure to read on a shared machine.
#
#   scripts/operations-cost.sh [REPEATS]        (default 2; the best of the repeats is kept)
set -euo pipefail
cd "$(dirname "$0")/.."
QB=${CARGO_TARGET_DIR:-target}/release/quietbowl
DEM=demo-terrain/farside-patch.tif
REPEATS=${1:-2}
[ -x "$QB" ] || { echo "build first: cargo build --release -p quietbowl" >&2; exit 1; }
OUT=$(mktemp -d)
trap 'rm -rf "$OUT"' EXIT
measure() { # $1: label, rest: extra flags; prints "cpu wall"
    local label=$1; shift
    /usr/bin/time -f "%U %S %e" -o "$OUT/$label.time" \
        "$QB" survey "$DEM" --no-checkpoint --out "$OUT/$label.json" "$@" >/dev/null
    awk '{printf "%.2f %.2f\n", $1 + $2, $3}' "$OUT/$label.time"
}
best_with=""; best_without=""
for _ in $(seq "$REPEATS"); do
    read -r c w <<<"$(measure without --no-operations)"
    if [ -z "$best_without" ] || awk "BEGIN{exit !($c < ${best_without% *})}"; then best_without="$c $w"; fi
    read -r c w <<<"$(measure with)"
    if [ -z "$best_with" ] || awk "BEGIN{exit !($c < ${best_with% *})}"; then best_with="$c $w"; fi
done
n=$(python3 -c "import json,sys; s=json.load(open('$OUT/with.json')); print(sum(1 for c in s['candidates'] if c.get('operations')), len(s['candidates']))")
read -r cw ww <<<"$best_with"; read -r co wo <<<"$best_without"
echo "demo survey without operations: ${co} s CPU (${wo} s wall)"
echo "demo survey with operations:    ${cw} s CPU (${ww} s wall); candidates with operations / all: ${n}"
awk "BEGIN{printf \"cost of the operations: +%.1f %% CPU (target at most +30 %%); load %s\n\", 100*($cw/$co - 1), \"$(cut -d' ' -f1-3 /proc/loadavg)\"}"
