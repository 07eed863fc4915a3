#!/usr/bin/env python3
"""A plain scientific-Python crater finder: the baseline quietbowl's survey is timed against.

    python detect.py DEM.tif OUT.csv [--min-diameter-m 90] [--max-diameter-m 20000]

Written for bench/compare.sh as a first-time user of numpy, scipy and scikit-image would
write it; it is not part of quietbowl. Steps:

1. Closed depressions: fill the sinks of the DEM by morphological reconstruction by erosion
   (the seed is the DEM's maximum everywhere but on the border; Soille 2003, "Morphological
   Image Analysis", 2nd ed., section 8.2.3, from memory), take fill minus DEM as depth, and
   label the connected areas deeper than 1 m (8-connected).
2. Each depression whose equivalent diameter lies in half the minimum to the maximum diameter
   and whose depth is at least 3% of that diameter (common practice, no source) is a proposal,
   centred on its centroid with radius R0 = equivalent diameter / 2.
3. Rim points: along 48 rays from the centre, the highest point between 0.6 R0 and 1.6 R0.
   An algebraic circle fit (Kasa 1976, "A circle fitting procedure and its error analysis",
   IEEE Trans. Instrum. Meas. 25(1), 8-14) to those points, in ground metres; then the rays
   are cast again from the fitted centre between 0.7 R and 1.3 R, points further than 0.15 R
   from the first circle are dropped, and the circle is fitted again.
4. Kept if the fitted diameter is in range, the rms distance of the rim points from the circle
   is under 10% of R and the depth (median rim height minus the lowest height inside 0.5 R)
   is at least 3% of the diameter; of two kept circles with centres within 0.25 D of each
   other and diameters within 20%, the one with the smaller rms stays.

All the proposals are measured at once (arrays of crater x ray x sample), not in a Python loop.
Nested craters on the floor of a larger one are not found: the larger depression swallows
them. Writes a CSV: lon_deg, lat_deg, diameter_m, depth_m (planetocentric, lon in -180..180).
"""

import argparse
import csv
import math
import os
import sys

import numpy as np
from scipy import ndimage
from skimage import measure, morphology

from georef import Georef

RAYS = 48
SAMPLES = 40
MIN_DEPTH_M = 1.0
MIN_DEPTH_TO_DIAMETER = 0.03
MAX_RMS_OVER_R = 0.10


def depressions(z):
    """Depth below the spill level of every closed depression (Soille 2003, 8.2.3)."""
    seed = np.full_like(z, z.max())
    seed[0, :], seed[-1, :], seed[:, 0], seed[:, -1] = z[0, :], z[-1, :], z[:, 0], z[:, -1]
    return morphology.reconstruction(seed, z, method="erosion") - z


def proposals(z, post_m, d_min_m, d_max_m):
    """(row, col, radius_px) of each depression that may be a crater."""
    depth = depressions(z)
    labels = measure.label(depth > MIN_DEPTH_M, connectivity=2)
    props = measure.regionprops(labels, intensity_image=depth)
    out = []
    for p in props:
        d_m = p.equivalent_diameter_area * post_m
        if d_m < 0.5 * d_min_m or d_m > d_max_m:
            continue
        if p.intensity_max < MIN_DEPTH_TO_DIAMETER * d_m:
            continue
        r, c = p.centroid
        out.append((r + 0.5, c + 0.5, 0.5 * p.equivalent_diameter_area))
    return np.array(out, dtype=np.float64).reshape(-1, 3)


def ray_samples(z, geo, row, col, r_m, fractions):
    """Heights along RAYS rays from each centre (row, col in the pixel-corner convention) at
    the given fractions of the radius r_m (bilinear). East and north offsets in ground metres
    and heights, each of shape (craters, RAYS, len(fractions))."""
    lat = geo.pixel_to_lonlat(col, row)[1]
    gx = geo.col_m(lat)[:, None, None]
    az = np.linspace(0.0, 2.0 * math.pi, RAYS, endpoint=False)[None, :, None]
    s = np.asarray(fractions)[None, None, :] * r_m[:, None, None]
    east, north = s * np.cos(az), s * np.sin(az)
    cc = col[:, None, None] + east / gx - 0.5
    rr = row[:, None, None] - north / geo.post_m - 0.5
    h = ndimage.map_coordinates(z, [rr.ravel(), cc.ravel()], order=1, mode="nearest")
    return east, north, h.reshape(rr.shape)


def rim_points(z, geo, row, col, r_m, lo, hi):
    """Highest point along each ray between lo*R and hi*R: east and north offsets in metres
    from (row, col), shape (craters, RAYS), and the heights there."""
    east, north, h = ray_samples(z, geo, row, col, r_m, np.linspace(lo, hi, SAMPLES))
    k = np.argmax(h, axis=2)[..., None]
    take = lambda a: np.take_along_axis(np.broadcast_to(a, h.shape), k, axis=2)[..., 0]
    return take(east), take(north), take(h)


def moved(geo, row, col, east, north):
    """The centre moved by east and north ground metres."""
    lat = geo.pixel_to_lonlat(col, row)[1]
    return row - north / geo.post_m, col + east / geo.col_m(lat)


def kasa_fit(x, y, w):
    """Weighted algebraic circle fit (Kasa 1976) of many point sets at once: minimises
    sum w (x^2 + y^2 + A x + B y + C)^2. Returns centre (x, y) and radius per set."""
    m = np.stack([x, y, np.ones_like(x)], axis=-1)
    rhs = -(x * x + y * y)
    ata = np.einsum("nk,nki,nkj->nij", w, m, m)
    atb = np.einsum("nk,nki,nk->ni", w, m, rhs)
    ata += 1e-9 * np.eye(3)
    a, b, c = np.linalg.solve(ata, atb[..., None])[..., 0].T
    xc, yc = -a / 2, -b / 2
    return xc, yc, np.sqrt(np.maximum(xc * xc + yc * yc - c, 0.0))


def measure_all(z, geo, prop):
    row, col, r_px = prop.T
    r_m = r_px * geo.post_m
    e, n, _ = rim_points(z, geo, row, col, r_m, 0.6, 1.6)
    xc, yc, r1 = kasa_fit(e, n, np.ones_like(e))
    # re-centre on the first circle and search again closer to it
    row2, col2 = moved(geo, row, col, xc, yc)
    e, n, hrim = rim_points(z, geo, row2, col2, r1, 0.7, 1.3)
    w = (np.abs(np.hypot(e, n) - r1[:, None]) <= 0.15 * r1[:, None]).astype(np.float64)
    xc, yc, r = kasa_fit(e, n, w)
    resid = np.hypot(e - xc[:, None], n - yc[:, None]) - r[:, None]
    rms = np.sqrt((w * resid * resid).sum(1) / np.maximum(w.sum(1), 1.0))
    row3, col3 = moved(geo, row2, col2, xc, yc)
    floor = floor_height(z, geo, row3, col3, r)
    rim = np.array([np.median(h[m > 0]) if m.any() else np.nan for h, m in zip(hrim, w)])
    return row3, col3, 2.0 * r, rim - floor, rms / np.maximum(r, 1e-9), w.sum(1)


def floor_height(z, geo, row, col, r_m):
    """Lowest height on 8 rings of the rays inside 0.5 R."""
    return ray_samples(z, geo, row, col, r_m, np.linspace(0.0, 0.5, 8))[2].min(axis=(1, 2))


def keep_best(lon, lat, d, rms, radius_m):
    """Of circles matching each other (centre within 0.25 D, diameters within 20%) keep the
    one with the smallest rms. Compared on a local plane, fine at these sizes."""
    order = np.argsort(rms)
    kept = []
    x = np.radians(lon) * np.cos(np.radians(lat)) * radius_m
    y = np.radians(lat) * radius_m
    for i in order:
        dup = False
        for j in kept:
            if (
                math.hypot(x[i] - x[j], y[i] - y[j]) <= 0.25 * max(d[i], d[j])
                and abs(d[i] / d[j] - 1.0) <= 0.2
            ):
                dup = True
                break
        if not dup:
            kept.append(i)
    return np.array(sorted(kept), dtype=np.int64)


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("dem")
    ap.add_argument("out_csv")
    ap.add_argument("--min-diameter-m", type=float, default=90.0)
    ap.add_argument("--max-diameter-m", type=float, default=20_000.0)
    a = ap.parse_args(argv)
    geo = Georef(a.dem)
    z = geo.heights
    if np.isnan(z).all():
        sys.exit(f"{a.dem}: no valid heights")
    z = np.where(np.isnan(z), np.nanmax(z), z).astype(np.float64)
    prop = proposals(z, geo.post_m, a.min_diameter_m, a.max_diameter_m)
    row, col, d, depth, rel_rms, npts = measure_all(z, geo, prop)
    ok = (
        (d >= a.min_diameter_m)
        & (d <= a.max_diameter_m)
        & (rel_rms <= MAX_RMS_OVER_R)
        & (npts >= RAYS / 2)
        & (depth >= MIN_DEPTH_TO_DIAMETER * d)
    )
    lon, lat = geo.pixel_to_lonlat(col, row)
    idx = np.flatnonzero(ok)
    idx = idx[keep_best(lon[idx], lat[idx], d[idx], rel_rms[idx], geo.radius_m)]
    tmp = a.out_csv + ".part"
    with open(tmp, "w", newline="") as f:
        wr = csv.writer(f)
        wr.writerow(["lon_deg", "lat_deg", "diameter_m", "depth_m"])
        for i in idx:
            wr.writerow([f"{lon[i]:.7f}", f"{lat[i]:.7f}", f"{d[i]:.1f}", f"{depth[i]:.1f}"])
    os.replace(tmp, a.out_csv)
    print(f"{len(prop)} depressions proposed, {len(idx)} craters written to {a.out_csv}")


if __name__ == "__main__":
    main()
