#!/usr/bin/env bash
# Scale benchmark: a 40,000 x 40,000 px virtual mosaic of the demo terrain (a GDAL VRT that
# repeats it 20 x 20, mirrored nowhere: seams are fine for a throughput test), surveyed end to
# end in release with /usr/bin/time -v for the peak resident memory.
#
#   scripts/scale-bench.sh [REPEAT] [DIAMETER]     defaults: 20, 1000..2000
#
# Prints Mpx/s, candidates/s and peak RSS; paste the output into docs/performance.md.
set -euo pipefail
cd "$(dirname "$0")/.."
repeat=${1:-20}
diameter=${2:-1000..2000}
work=${TMPDIR:-/tmp}/quietbowl-scale
mkdir -p "$work"
src=$(pwd)/demo-terrain/farside-patch.tif
size=2000
total=$((size * repeat))
# The demo's geotransform, extended: same pixel size, the mosaic centred on the demo's centre.
read -r x0 dx y0 dy < <(gdalinfo -json "$src" | python3 -c 'import json,sys; g=json.load(sys.stdin)["geoTransform"]; print(g[0], g[1], g[3], g[5])')
python3 - "$src" "$repeat" "$size" "$x0" "$dx" "$y0" "$dy" > "$work/mosaic.vrt" <<'PY'
import sys
src, n, size, x0, dx, y0, dy = sys.argv[1], int(sys.argv[2]), int(sys.argv[3]), *map(float, sys.argv[4:])
total = n * size
cx, cy = x0 + dx * size / 2, y0 + dy * size / 2
gx0, gy0 = cx - dx * total / 2, cy - dy * total / 2
srs = open(src + ".aux.xml").read().split("<SRS", 1)[1].split(">", 1)[1].split("</SRS>")[0]
print(f'<VRTDataset rasterXSize="{total}" rasterYSize="{total}">')
print(f'  <SRS>{srs}</SRS>')
print(f'  <GeoTransform>{gx0!r}, {dx!r}, 0, {gy0!r}, 0, {dy!r}</GeoTransform>')
print('  <VRTRasterBand dataType="Float32" band="1"><NoDataValue>nan</NoDataValue>')
for j in range(n):
    for i in range(n):
        print(f'    <SimpleSource><SourceFilename relativeToVRT="0">{src}</SourceFilename><SourceBand>1</SourceBand>'
              f'<SrcRect xOff="0" yOff="0" xSize="{size}" ySize="{size}"/><DstRect xOff="{i*size}" yOff="{j*size}" xSize="{size}" ySize="{size}"/></SimpleSource>')
print('  </VRTRasterBand>')
print('</VRTDataset>')
PY
cargo build --release -q -p quietbowl
echo "mosaic: ${total} x ${total} px ($((total * total / 1000000)) Mpx), diameters ${diameter} m, $(nproc) cores"
rm -f "$work/survey.json" "$work/survey.json.checkpoint"
/usr/bin/time -v target/release/quietbowl survey "$work/mosaic.vrt" --diameter "$diameter" --no-checkpoint --out "$work/survey.json" 2> "$work/time.txt" | tail -2
grep -E "Maximum resident|Elapsed" "$work/time.txt"
# CPU time as well: on a shared or throttled machine the wall clock swings from run to run, and
# megapixels per CPU-second times the core count is the figure to compare across runs.
python3 - "$work/time.txt" "$((total * total))" "$(nproc)" <<'PY'
import re, sys
text, px, cores = open(sys.argv[1]).read(), int(sys.argv[2]), int(sys.argv[3])
cpu = sum(float(re.search(rf"{k} time \(seconds\): ([0-9.]+)", text).group(1)) for k in ("User", "System"))
print(f"CPU {cpu:.1f} s (user + system): {px / 1e6 / cpu:.2f} Mpx per CPU-second, {cores * px / 1e6 / cpu:.1f} Mpx/s if all {cores} cores were busy the whole time")
PY
