#!/usr/bin/env bash
# The workbench's pictures for the README and docs/workbench.md: start the workbench example
# under a virtual X display (Xvfb, Mesa software GL) on the demo survey with the best candidate
# selected, and let the window write its own PNG once the survey is ranked, the terrain shaded
# and any background work done; then it closes.
#
#   scripts/screenshot.sh [OUT_DIR] [FILE] [NAME...]
#
# OUT_DIR defaults to docs/screenshots; FILE (or "-") to the demo survey beside the demo
# terrain, else the demo terrain itself. NAMEs pick pictures from the list below (default: all).
# SCREENSHOT_DISPLAY picks the X display number (default 97). The south polar picture needs the
# LOLA product in ../shared/data (or QUIETBOWL_LOLA_DIR) and gdalwarp; it is skipped, with a
# line saying so, without them.
set -euo pipefail
root=$(cd "$(dirname "$0")/.." && pwd)
out=${1:-$root/docs/screenshots}
file=${2:--}
shift $(( $# < 2 ? $# : 2 ))
wanted=("$@")
if [[ "$file" == - ]]; then
  file=
  for f in "$root/demo-terrain/farside-patch.survey.json" "$root/demo-terrain/farside-patch.tif"; do
    [[ -e "$f" ]] && { file=$f; break; }
  done
fi
[[ -n "$file" ]] || { echo "no demo terrain found in $root/demo-terrain" >&2; exit 1; }
mkdir -p "$out"
export CARGO_TARGET_DIR=${CARGO_TARGET_DIR:-$root/target}
(cd "$root" && cargo build --release -p quietbowl-workbench --example workbench)
bin=$CARGO_TARGET_DIR/release/examples/workbench

display=:${SCREENSHOT_DISPLAY:-97}
Xvfb "$display" -screen 0 1600x2000x24 -nolisten tcp >/dev/null 2>&1 &
xvfb=$!
# A fresh settings folder, so a remembered window layout does not change the pictures.
scratch=$(mktemp -d)
trap 'kill "$xvfb" 2>/dev/null || true; rm -rf "$scratch"' EXIT
sleep 1

# A DEM is surveyed once here rather than by every window.
case "$file" in
  *.json|*.toml) ;;
  *)
    (cd "$root" && cargo build --release -q -p quietbowl)
    "$CARGO_TARGET_DIR/release/quietbowl" survey "$file" --no-checkpoint --out "$scratch/survey.json" >/dev/null
    file=$scratch/survey.json
    ;;
esac

want() {
  [[ ${#wanted[@]} -eq 0 ]] && return 0
  local w
  for w in "${wanted[@]}"; do [[ "$w" == "$1" ]] && return 0; done
  return 1
}

# shot NAME INPUT [WORKBENCH ARGS...]
shot() {
  local name=$1 input=$2
  shift 2
  want "$name" || return 0
  # Settings of its own, so nothing one picture chose (a longitude convention) carries over.
  local settings
  settings=$(mktemp -d "$scratch/settings.XXXXXX")
  XDG_DATA_HOME=$settings DISPLAY=$display LIBGL_ALWAYS_SOFTWARE=1 timeout 300 "$bin" "$input" \
    --size 1600x1000 "$@" --screenshot "$out/$name.png"
  echo "wrote $out/$name.png"
}

# The first window as a user meets it, also grabbed from the display (the OCR check reads it).
if want workbench; then
  XDG_DATA_HOME=$scratch DISPLAY=$display LIBGL_ALWAYS_SOFTWARE=1 timeout 300 "$bin" "$file" \
    --select-rank 1 --size 1600x1000 --screenshot "$out/workbench.png" &
  app=$!
  sleep "${SCREENSHOT_GRAB_AFTER_S:-8}"
  import -display "$display" -window root -crop 1600x1000+0+0 +repage "$out/workbench-display.png" || true
  wait "$app"
  echo "wrote $out/workbench.png and workbench-display.png"
fi

# Read the first window back by OCR: a snake_case word on it is a metric id leaking to the
# screen (issue of the workbench's words). tesseract is Debian's tesseract-ocr.
if want workbench && command -v tesseract >/dev/null; then
  convert "$out/workbench.png" -resize 200% "$scratch/ocr.png"
  tesseract "$scratch/ocr.png" "$scratch/ocr" >/dev/null 2>&1
  ids=$(grep -oE '\b[a-z]+(_[a-z0-9]+)+\b' "$scratch/ocr.txt" | sort -u || true)
  echo "OCR of workbench.png: $(wc -w <"$scratch/ocr.txt") words read"
  if [[ -n "$ids" ]]; then
    echo "snake_case words on the default screen:" $ids >&2
    exit 1
  fi
  echo "OCR of workbench.png: no snake_case word"
fi

# Every page of the crater sheet, and the comparison of the four best.
shot sheet-score "$file" --select-rank 1 --sheet score
shot sheet-shape "$file" --select-rank 1 --sheet shape
shot sheet-earth-and-sky "$file" --select-rank 1 --sheet sky
shot sheet-reflector "$file" --select-rank 1 --sheet reflector
# A tall window, so the page's three pictures show below its figures.
shot sheet-operations "$file" --select-rank 1 --sheet operations --size 1600x1900
shot sheet-robustness "$file" --select-rank 1 --sheet robustness --rank-probabilities
shot sheet-all-numbers "$file" --select-rank 1 --sheet numbers
shot sheet-notes "$file" --select-rank 1 --sheet notes
shot compare-four "$file" --select-rank 1 --compare 1,2,3,4

# The map's layers and keys.
shot map-legend-height-tint "$file" --select-rank 1 --map-layer tint
shot map-shaded-relief "$file" --select-rank 1 --map-layer relief
shot map-slope "$file" --select-rank 1 --map-layer slope
shot map-failing-hidden "$file" --select-rank 1 --hide-failing --lon360
# An invented keep-out square near the demo's centre (assets/areas), outlined and in the key.
shot map-areas "$file" --select-rank 1 --keep-out "$root/assets/areas/demo-keep-out.geojson"

# A polar grid: the LOLA product south of 60 S, warped to the south polar stereographic
# projection (IAU_2015:30135) at 7.5 km posts; the north arrow turns with the meridians.
if want map-south-polar; then
  lola_dir=${QUIETBOWL_LOLA_DIR:-$root/../shared/data/lola-ldem4}
  lola=$(ls "$lola_dir"/*.LBL 2>/dev/null | head -1 || true)
  if [[ -n "$lola" ]] && command -v gdalwarp >/dev/null; then
    # PROJ complains of the northern points it cannot project; only a failed warp matters.
    gdalwarp -q -t_srs IAU_2015:30135 -te -900000 -900000 900000 900000 -tr 7500 7500 \
      -r bilinear "$lola" "$scratch/south-polar.tif" 2>"$scratch/warp.log" || {
      cat "$scratch/warp.log" >&2; exit 1; }
    shot map-south-polar "$scratch/south-polar.tif" --map-layer relief
  else
    echo "map-south-polar: no LOLA product in $lola_dir or no gdalwarp; picture not retaken"
  fi
fi
