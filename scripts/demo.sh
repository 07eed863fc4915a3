#!/usr/bin/env bash
# `make demo`: survey the demo terrain (a few seconds in release; redone whenever the binary is
# newer than the stored survey), then open the workbench on it, or run the headless path when
# there is no display.
set -euo pipefail
cd "$(dirname "$0")/.."
qb=target/release/quietbowl
dem=demo-terrain/farside-patch.tif
survey=demo-terrain/farside-patch.survey.json
if [ ! -f "$survey" ] || [ "$qb" -nt "$survey" ]; then
  "$qb" survey "$dem" --no-checkpoint --out "$survey"
fi
if [ -n "${DISPLAY:-}" ]; then
  exec "$qb" workbench "$survey"
fi
echo "No display found: running the headless path on the demo terrain instead of the workbench."
"$qb" describe "$dem"
mkdir -p out
"$qb" rank "$survey" --top 15 --geojson out/demo-shortlist.geojson --csv out/demo-shortlist.csv --gpkg out/demo-shortlist.gpkg
