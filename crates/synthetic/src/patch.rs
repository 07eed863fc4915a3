//! Where the patch sits: an equirectangular grid centred on longitude 180 (IAU_2015:30115,
//! x = R (lon - 180) in radians, y = R lat, true scale on the equator), with the column
//! spacing widened by 1/cos(centre latitude) so that posts are square on the ground at the
//! centre of the patch.

use crate::published::MOON_RADIUS_M;
use crate::spec::DemoSpec;
use serde::{Deserialize, Serialize};

/// The CRS the demo raster is written in.
pub const CRS_AUTHORITY: &str = "IAU_2015:30115";
/// Central meridian of that CRS.
const CRS_LON0_DEG: f64 = 180.0;

/// Size and georeferencing of the generated raster.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct PatchGrid {
    pub width_px: usize,
    pub height_px: usize,
    /// GDAL order, map metres of IAU_2015:30115, pixel-is-area (corner of pixel 0 at gt[0], gt[3]).
    pub geotransform: [f64; 6],
    /// Ground spacing at the centre latitude, both ways.
    pub post_m: f64,
}

impl PatchGrid {
    pub fn new(spec: &DemoSpec) -> PatchGrid {
        let n = spec.size_px();
        let dx_map_m = spec.post_m / spec.centre_lat_deg.to_radians().cos();
        let dy_map_m = spec.post_m;
        let dlon = wrap_180(spec.centre_lon_deg - CRS_LON0_DEG).to_radians();
        let (xc, yc) = (
            MOON_RADIUS_M * dlon,
            MOON_RADIUS_M * spec.centre_lat_deg.to_radians(),
        );
        let geotransform = [
            xc - n as f64 / 2.0 * dx_map_m,
            dx_map_m,
            0.0,
            yc + n as f64 / 2.0 * dy_map_m,
            0.0,
            -dy_map_m,
        ];
        PatchGrid {
            width_px: n,
            height_px: n,
            geotransform,
            post_m: spec.post_m,
        }
    }

    /// Lon (in [-180, 180)) and lat, degrees, of a fractional pixel position (corner convention:
    /// the centre of pixel (c, r) is (c + 0.5, r + 0.5)).
    pub fn lonlat(&self, col: f64, row: f64) -> (f64, f64) {
        let g = &self.geotransform;
        let (x, y) = (g[0] + col * g[1], g[3] + row * g[5]);
        let lon = wrap_180(CRS_LON0_DEG + (x / MOON_RADIUS_M).to_degrees());
        (lon, (y / MOON_RADIUS_M).to_degrees())
    }

    /// Ground metres per column step at a latitude (east-west) and per row step (north-south).
    pub fn ground_step_m(&self, lat_deg: f64) -> (f64, f64) {
        (
            self.geotransform[1] * lat_deg.to_radians().cos(),
            -self.geotransform[5],
        )
    }
}

/// Wrap degrees into [-180, 180).
pub fn wrap_180(deg: f64) -> f64 {
    (deg + 180.0).rem_euclid(360.0) - 180.0
}
