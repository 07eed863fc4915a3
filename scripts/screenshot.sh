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

# A fresh settings folder, so a remembered window layout does not change the pictures.
settings=$(mktemp -d)
trap 'kill "$xvfb" 2>/dev/null || true; rm -rf "$settings"' EXIT

# The window writes its own picture once the survey is ranked and the terrain shaded, then
# closes. One picture per crater-sheet page worth showing; the first also gets a grab of the
# whole virtual display, for comparison.
shot() {
  local name=$1 sheet=$2 grab=${3:-}
  XDG_DATA_HOME=$settings DISPLAY=$display LIBGL_ALWAYS_SOFTWARE=1 timeout 300 "$bin" "$file" \
    --select-rank 1 --sheet "$sheet" --size 1600x1000 --timing --screenshot "$out/$name.png" &
  local app=$!
  if [[ -n "$grab" ]]; then
    sleep "${SCREENSHOT_GRAB_AFTER_S:-8}"
    import -display "$display" -window root "$out/$grab.png" || true
  fi
  wait "$app"
}
shot workbench shape workbench-display
shot workbench-sky sky
shot workbench-fit reflector
echo "wrote $out/workbench.png, workbench-sky.png, workbench-fit.png and workbench-display.png"
