#!/usr/bin/env python3
"""Recall and precision of a crater list against a synthetic grid's planted truth.

    python score.py DEM.tif truth.json (--csv FOUND.csv | --survey SURVEY.json) [--json]

One scorer for both sides of bench/compare.sh: the Python baseline's CSV (lon_deg, lat_deg,
diameter_m) and quietbowl's survey file (candidates[].crater: centre_lon_deg, centre_lat_deg,
diameter_m). The rule is the one of crates/craters/tests/demo_accuracy.rs, restated here:

- a found crater matches a planted one when its centre lies within 0.25 D of the planted
  centre (great-circle distance on the raster's sphere) and its diameter within 20% of D, D
  being the planted rim-crest diameter (rim_crest_diameter_m);
- only craters at least 8 posts across (30 m posts: the test's PIXEL_M) are scored, planted
  ones by D and found ones by their diameter, and only those whose measurement disc (radius
  0.75 D) lies inside the raster;
- recall = planted scored craters with a match / planted scored craters;
  precision = found scored craters matching any planted crater / found scored craters.
"""

import argparse
import csv
import json
import math

import numpy as np

from georef import Georef

PIXEL_M = 30.0
MIN_PX = 8.0


def haversine_m(radius, lon1, lat1, lon2, lat2):
    l1, p1, l2, p2 = map(np.radians, (lon1, lat1, lon2, lat2))
    h = np.sin((p2 - p1) / 2) ** 2 + np.cos(p1) * np.cos(p2) * np.sin((l2 - l1) / 2) ** 2
    return 2.0 * np.arcsin(np.minimum(np.sqrt(h), 1.0)) * radius


def read_found(args):
    if args.csv:
        with open(args.csv, newline="") as f:
            rows = list(csv.DictReader(f))
        return np.array(
            [[float(r["lon_deg"]), float(r["lat_deg"]), float(r["diameter_m"])] for r in rows]
        ).reshape(-1, 3)
    with open(args.survey) as f:
        survey = json.load(f)
    return np.array(
        [
            [c["crater"]["centre_lon_deg"], c["crater"]["centre_lat_deg"], c["crater"]["diameter_m"]]
            for c in survey["candidates"]
        ]
    ).reshape(-1, 3)


def score(geo, planted, found):
    def inside(lon, lat, d):
        c, r = geo.lonlat_to_pixel(lon, lat)
        m = 0.75 * d / PIXEL_M
        return (c > m) & (r > m) & (c < geo.width_px - m) & (r < geo.height_px - m)

    def matches(f, p):
        """Boolean matrix found x planted."""
        dist = haversine_m(
            geo.radius_m, f[:, 0, None], f[:, 1, None], p[None, :, 0], p[None, :, 1]
        )
        return (dist <= 0.25 * p[None, :, 2]) & (np.abs(f[:, 2, None] / p[None, :, 2] - 1.0) <= 0.2)

    p_sc = planted[(planted[:, 2] / PIXEL_M >= MIN_PX) & inside(*planted.T)]
    f_sc = found[(found[:, 2] / PIXEL_M >= MIN_PX) & inside(*found.T)]
    recalled = int(matches(found, p_sc).any(axis=0).sum()) if len(found) else 0
    precise = int(matches(f_sc, planted).any(axis=1).sum()) if len(f_sc) else 0
    return {
        "recall": recalled / max(len(p_sc), 1),
        "precision": precise / max(len(f_sc), 1),
        "planted_scored": len(p_sc),
        "planted_found": recalled,
        "found_scored": len(f_sc),
        "found_matching": precise,
        "found_total": len(found),
    }


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("dem")
    ap.add_argument("truth")
    src = ap.add_mutually_exclusive_group(required=True)
    src.add_argument("--csv", help="the Python baseline's output")
    src.add_argument("--survey", help="a quietbowl survey file")
    ap.add_argument("--json", action="store_true", help="print the scores as one JSON object")
    args = ap.parse_args(argv)
    geo = Georef(args.dem)
    with open(args.truth) as f:
        truth = json.load(f)
    planted = np.array(
        [[c["lon_deg"], c["lat_deg"], c["rim_crest_diameter_m"]] for c in truth["craters"]]
    ).reshape(-1, 3)
    s = score(geo, planted, read_found(args))
    if args.json:
        print(json.dumps(s))
    else:
        print(
            f"recall {s['recall']:.3f} ({s['planted_found']}/{s['planted_scored']}), "
            f"precision {s['precision']:.3f} ({s['found_matching']}/{s['found_scored']})"
        )


if __name__ == "__main__":
    main()
