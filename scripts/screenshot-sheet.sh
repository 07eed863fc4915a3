#!/usr/bin/env bash
# Pictures of every crater-sheet page and of the comparison window on the demo survey, for
# docs/workbench.md: start the workbench example under a virtual X display (Xvfb, Mesa software
# GL) with the best candidate selected, and let the window write its own PNG once the survey is
# ranked and the terrain shaded.
#
#   scripts/screenshot-sheet.sh [OUT_DIR] [FILE]
#
# OUT_DIR defaults to docs/screenshots; FILE to the demo survey beside the demo terrain, else the
# demo terrain itself. SCREENSHOT_DISPLAY picks the X display number (default 93).
set -euo pipefail
root=$(cd "$(dirname "$0")/.." && pwd)
out=${1:-$root/docs/screenshots}
file=${2:-}
if [[ -z "$file" ]]; then
  for f in "$root/demo-terrain/farside-patch.survey.json" "$root/demo-terrain/farside-patch.tif"; do
    [[ -e "$f" ]] && { file=$f; break; }
  done
fi
[[ -n "$file" ]] || { echo "no demo terrain found in $root/demo-terrain" >&2; exit 1; }
mkdir -p "$out"
export CARGO_TARGET_DIR=${CARGO_TARGET_DIR:-$root/target}
(cd "$root" && cargo build --release -p quietbowl-workbench --example workbench)
bin=$CARGO_TARGET_DIR/release/examples/workbench

display=:${SCREENSHOT_DISPLAY:-93}
Xvfb "$display" -screen 0 1600x1000x24 -nolisten tcp >/dev/null 2>&1 &
xvfb=$!
settings=$(mktemp -d)
trap 'kill "$xvfb" 2>/dev/null || true; rm -rf "$settings"' EXIT
sleep 1

# shot NAME PAGE [EXTRA ARGS...]
shot() {
  local name=$1 page=$2
  shift 2
  XDG_DATA_HOME=$settings DISPLAY=$display LIBGL_ALWAYS_SOFTWARE=1 timeout 300 "$bin" "$file" \
    --select-rank 1 --sheet "$page" --size 1600x1000 "$@" --screenshot "$out/$name.png"
  echo "wrote $out/$name.png"
}
shot sheet-score score
shot sheet-shape shape
shot sheet-earth-and-sky sky
shot sheet-reflector reflector
shot sheet-robustness robustness
shot sheet-all-numbers numbers
shot sheet-notes notes
shot compare-four score --compare 1,2,3,4
