"""Georeferencing of an equirectangular GeoTIFF on a sphere, read from its GeoTIFF keys.

Shared by detect.py and score.py. Only the equirectangular (equidistant cylindrical) projection
on a sphere is handled, which is what the demo terrain and the synthetic grids are written in;
anything else is refused with a clear message rather than read wrongly. The forward
projection is x = R (lon - lon0) cos(phi1), y = R lat (Snyder 1987, "Map Projections: A
Working Manual", USGS Professional Paper 1395, equations 12-1 and 12-2; from memory).
"""

import math

import numpy as np
import tifffile


class Georef:
    def __init__(self, path):
        with tifffile.TiffFile(path) as tif:
            page = tif.pages[0]
            keys = page.geotiff_tags
            if not keys:
                raise SystemExit(f"{path}: no GeoTIFF keys")
            self.heights = page.asarray().astype(np.float32)
        transform = keys.get("ProjCoordTransGeoKey")
        if transform is None or int(transform) != 17:  # CT_Equirectangular
            raise SystemExit(
                f"{path}: projection {transform!r} not handled (equirectangular only)"
            )
        a = float(keys["GeogSemiMajorAxisGeoKey"])
        b = float(keys.get("GeogSemiMinorAxisGeoKey", a))
        if abs(a - b) > 1e-6 * a:
            raise SystemExit(f"{path}: ellipsoid {a} / {b} not handled (sphere only)")
        scale, tie = keys["ModelPixelScale"], keys["ModelTiepoint"]
        if tie[0] != 0.0 or tie[1] != 0.0:
            raise SystemExit(f"{path}: tie point not at pixel (0, 0)")
        self.radius_m = a
        self.lon0 = float(keys.get("ProjCenterLongGeoKey", keys.get("ProjNatOriginLongGeoKey", 0.0)))
        self.phi1 = math.radians(float(keys.get("ProjStdParallel1GeoKey", 0.0)))
        self.false_e = float(keys.get("ProjFalseEastingGeoKey", 0.0))
        self.false_n = float(keys.get("ProjFalseNorthingGeoKey", 0.0))
        self.x0, self.dx = float(tie[3]), float(scale[0])
        self.y0, self.dy = float(tie[4]), -float(scale[1])
        self.height_px, self.width_px = self.heights.shape

    @property
    def post_m(self):
        """Row spacing on the ground (metres per row: exact for this projection)."""
        return abs(self.dy)

    def col_m(self, lat_deg):
        """Ground metres per column at a latitude."""
        return self.dx * np.cos(np.radians(lat_deg)) / math.cos(self.phi1)

    def pixel_to_lonlat(self, col, row):
        """Pixel-corner convention: the centre of pixel (i, j) is (i + 0.5, j + 0.5)."""
        x = self.x0 + np.asarray(col) * self.dx - self.false_e
        y = self.y0 + np.asarray(row) * self.dy - self.false_n
        lon = self.lon0 + np.degrees(x / (self.radius_m * math.cos(self.phi1)))
        lat = np.degrees(y / self.radius_m)
        return (lon + 180.0) % 360.0 - 180.0, lat

    def lonlat_to_pixel(self, lon, lat):
        dlon = (np.asarray(lon) - self.lon0 + 180.0) % 360.0 - 180.0
        x = self.radius_m * math.cos(self.phi1) * np.radians(dlon) + self.false_e
        y = self.radius_m * np.radians(np.asarray(lat)) + self.false_n
        return (x - self.x0) / self.dx, (y - self.y0) / self.dy
