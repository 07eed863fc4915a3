#!/usr/bin/env bash
# Screenshots of the workbench for the README: start it under a virtual X display (Xvfb, Mesa
# software GL) on the demo terrain with the best candidate selected, and write PNGs to
# docs/screenshots/ (or the folder given as $1).
#
#   scripts/screenshot.sh [OUT_DIR] [FILE]
#
# FILE defaults to the demo survey beside the demo terrain, else the demo terrain itself.
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

display=:${SCREENSHOT_DISPLAY:-97}
Xvfb "$display" -screen 0 1600x1000x24 -nolisten tcp >/dev/null 2>&1 &
xvfb=$!
trap 'kill "$xvfb" 2>/dev/null || true' EXIT
sleep 1

# The window writes its own picture once the survey is ranked and the terrain shaded, then
# closes; a full-screen grab of the display is kept too, for comparison.
DISPLAY=$display LIBGL_ALWAYS_SOFTWARE=1 timeout 120 "$bin" "$file" --select-rank 1 --size 1600x1000 --timing \
  --screenshot "$out/workbench.png" &
app=$!
sleep "${SCREENSHOT_GRAB_AFTER_S:-8}"
import -display "$display" -window root "$out/workbench-display.png" || true
wait "$app"
echo "wrote $out/workbench.png and $out/workbench-display.png"
