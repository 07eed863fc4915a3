#!/usr/bin/env bash
# `make demo`: the workbench on the demo terrain, or the headless path when there is no display.
set -euo pipefail
qb=target/release/quietbowl
dem=demo-terrain/farside-patch.tif
mkdir -p out
if [ -n "${DISPLAY:-}" ] && "$qb" --help | grep -q '^  workbench'; then
  exec "$qb" workbench "$dem"
fi
echo "No display (or no workbench in this build): running the headless path on the demo terrain."
"$qb" describe "$dem"
"$qb" survey "$dem" --out out/demo-survey.json
if "$qb" --help | grep -q '^  rank'; then
  "$qb" rank out/demo-survey.json --top 15 --geojson out/demo-shortlist.geojson --csv out/demo-shortlist.csv
fi
