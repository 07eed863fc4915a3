#!/usr/bin/env bash
# quietbowl's survey against a plain scientific-Python baseline (bench/baseline/detect.py), on
# the demo and on synthetic grids of other seeds, in one run: wall and user CPU time of each
# whole command, Mpx/s, recall and precision (both scored by bench/baseline/score.py, the rule
# of crates/craters/tests/demo_accuracy.rs) and the speed ratio. The survey runs with its
# defaults (diameter range 3 px up to a third of a tile, 90 m - 20 km on 30 m posts; the
# visibility, structure-fit and operations columns on); the baseline with the same range. The
# survey is also timed with --no-visibility --no-structure --no-operations (detection and
# measurement only, the part of its work the baseline does too).
#
#   bench/compare.sh [SEED ...]                    default: 1 2
#
# Besides the demo and the seeds (2000 x 2000 px at the demo's 16N), two larger or farther
# grids of the same crater density: seed 4 at 55S, 90 km across (3000 x 3000 px, geographic
# grid, columns 52 m wide for 30 m on the ground), compared like the others; and seed 5 at 80S,
# 60 km across, reprojected by gdalwarp (cubic) to the south polar stereographic grid
# IAU_2015:30135 at 30 m, where only the survey runs (the baseline reads equirectangular grids
# only) and is scored by crates/craters/tests/demo_accuracy.rs's scorer, the same rule.
#
# Environment: QUIETBOWL (the release binary, default target/release/quietbowl),
# QB_VENV (default /tmp/qb-venv, made from bench/baseline/requirements.txt when missing),
# CARGO_TARGET_DIR (where make_demo is built). The table is printed at the end; paste its
# rows into docs/performance.md.
set -euo pipefail
cd "$(dirname "$0")/.."
root=$(pwd)
seeds=("$@")
((${#seeds[@]})) || seeds=(1 2)
bin=${QUIETBOWL:-$root/target/release/quietbowl}
venv=${QB_VENV:-/tmp/qb-venv}
work=${TMPDIR:-/tmp}/quietbowl-compare
mkdir -p "$work"
[[ -x $bin ]] || { echo "no release binary at $bin (cargo build --release -p quietbowl-cli, or set QUIETBOWL)" >&2; exit 1; }
if [[ ! -x $venv/bin/python ]]; then
  python3 -m venv "$venv"
  "$venv/bin/pip" install -q -r bench/baseline/requirements.txt
fi
py=$venv/bin/python
grids=("demo:$root/demo-terrain")
for s in "${seeds[@]}"; do
  dir=$work/seed$s
  [[ -f $dir/truth.json ]] || cargo run --release -q -p quietbowl-synthetic --example make_demo -- "$dir" "$s" >/dev/null
  grids+=("seed $s:$dir")
done
far=$work/seed4-55S
[[ -f $far/truth.json ]] || cargo run --release -q -p quietbowl-synthetic --example make_demo -- "$far" 4 -55 90 >/dev/null
grids+=("seed 4, 55S, 90 km:$far")
polar_src=$work/seed5-80S polar=$work/seed5-80S-polar
[[ -f $polar_src/truth.json ]] || cargo run --release -q -p quietbowl-synthetic --example make_demo -- "$polar_src" 5 -80 60 >/dev/null
if [[ ! -f $polar/truth.json ]]; then
  mkdir -p "$polar"
  gdalwarp -q -overwrite -t_srs IAU_2015:30135 -tr 30 30 -r cubic -dstnodata nan \
    "$polar_src/farside-patch.tif" "$polar/farside-patch.tif"
  cp "$polar_src/truth.json" "$polar/"
fi

# timed NAME OUTFILE CMD...: runs CMD under /usr/bin/time, leaves "wall user" in OUTFILE
timed() {
  local out=$1
  shift
  /usr/bin/time -f "%e %U" -o "$out" "$@" >"$out.log" 2>&1 || {
    echo "failed: $* (see $out.log)" >&2
    exit 1
  }
}

echo "load average before: $(cut -d' ' -f1-3 /proc/loadavg)"
rows=()
for g in "${grids[@]}"; do
  label=${g%%:*} dir=${g#*:}
  dem=$dir/farside-patch.tif truth=$dir/truth.json
  tag=${label// /}
  timed "$work/$tag.qb.time" "$bin" survey "$dem" --no-checkpoint --out "$work/$tag.survey.json"
  timed "$work/$tag.qbd.time" "$bin" survey "$dem" --no-visibility --no-structure --no-operations --no-checkpoint \
    --out "$work/$tag.detect.json"
  timed "$work/$tag.py.time" "$py" bench/baseline/detect.py "$dem" "$work/$tag.baseline.csv" \
    --min-diameter-m 90 --max-diameter-m 20000
  qs=$("$py" bench/baseline/score.py "$dem" "$truth" --survey "$work/$tag.survey.json" --json)
  ps=$("$py" bench/baseline/score.py "$dem" "$truth" --csv "$work/$tag.baseline.csv" --json)
  rows+=("$(
    "$py" - "$label" "$truth" "$(cat "$work/$tag.qb.time")" "$(cat "$work/$tag.qbd.time")" \
      "$(cat "$work/$tag.py.time")" "$qs" "$ps" <<'PY'
import json, sys
label, truth, qt, dt, pt, qs, ps = sys.argv[1:]
r = json.load(open(truth))["raster"]
mpx = r["width_px"] * r["height_px"] / 1e6
(qw, qu), (dw, du), (pw, pu) = (map(float, t.split()) for t in (qt, dt, pt))
qs, ps = json.loads(qs), json.loads(ps)
print(
    f"| {label} ({r['width_px']} x {r['height_px']} px) | {qw:.2f} s / {qu:.2f} s | {mpx / qw:.2f} | "
    f"{qs['recall']:.3f} / {qs['precision']:.3f} | {dw:.2f} s / {du:.2f} s | {mpx / dw:.2f} | "
    f"{pw:.2f} s / {pu:.2f} s | {mpx / pw:.2f} | "
    f"{ps['recall']:.3f} / {ps['precision']:.3f} | {pw / qw:.2f}x ({pu / qu:.2f}x) | "
    f"{pw / dw:.2f}x ({pu / du:.2f}x) |"
)
PY
  )")
done
# The polar grid: the survey alone, scored by the Rust scorer (score.py reads equirectangular
# grids only).
timed "$work/polar.qb.time" "$bin" survey "$polar/farside-patch.tif" --no-checkpoint --out "$work/polar.survey.json"
timed "$work/polar.qbd.time" "$bin" survey "$polar/farside-patch.tif" --no-visibility --no-structure \
  --no-operations --no-checkpoint --out "$work/polar.detect.json"
polar_score=$(QUIETBOWL_DEMO_DIR="$polar" cargo test --release -q -p quietbowl-craters --test demo_accuracy \
  -- --nocapture 2>&1 | grep "all >= " || echo "no score")
polar_px=$(gdalinfo -json "$polar/farside-patch.tif" | python3 -c 'import json,sys; s=json.load(sys.stdin)["size"]; print(s[0]*s[1])')
rows+=("$(python3 - "$polar_px" "$(cat "$work/polar.qb.time")" "$(cat "$work/polar.qbd.time")" "$polar_score" <<'PY'
import re, sys
px, qt, dt, sc = int(sys.argv[1]), sys.argv[2], sys.argv[3], sys.argv[4]
(qw, qu), (dw, du) = (map(float, t.split()) for t in (qt, dt))
v = re.findall(r"recall ([0-9.]+), precision ([0-9.]+)", sc)
rp = f"{v[0][0]} / {v[0][1]}" if v else "no score"
mpx = px / 1e6
print(
    f"| seed 5, 80S, south polar stereographic ({mpx:.2f} Mpx) | {qw:.2f} s / {qu:.2f} s | {mpx / qw:.2f} | "
    f"{rp} (Rust scorer) | {dw:.2f} s / {du:.2f} s | {mpx / dw:.2f} | not run (equirectangular only) | | | | |"
)
PY
)")
echo "load average after: $(cut -d' ' -f1-3 /proc/loadavg)"
echo "survey columns: visibility, structure fit and operations on (the defaults); $("$bin" --version 2>/dev/null || echo "$bin")"
echo
echo "speed ratio = the baseline's time / quietbowl's time (above 1: quietbowl is faster)"
echo
echo "| grid | quietbowl survey, wall / user CPU | Mpx/s | recall / precision | survey without visibility, structure and operations, wall / user CPU | Mpx/s | Python baseline, wall / user CPU | Mpx/s | recall / precision | speed ratio, wall (CPU) | speed ratio without visibility, structure and operations, wall (CPU) |"
echo "|---|---|---|---|---|---|---|---|---|---|---|"
printf '%s\n' "${rows[@]}"
