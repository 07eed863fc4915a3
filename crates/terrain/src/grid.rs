//! Where a raster sits on the body ([`GridGeometry`]) and a window of heights read from it
//! ([`ElevationGrid`]).

use crate::geodesy;
use crate::projection::MapProjection;
use serde::{Deserialize, Serialize};
use std::sync::Arc;

/// How far (in pixels) the columns of a grid may miss spanning exactly 360 deg and still count
/// as global: see [`GridGeometry::wrap_width_px`].
const WRAP_TOLERANCE_PX: f64 = 0.01;

/// The georeferencing of a whole raster: size, affine geotransform (GDAL order), projection and
/// the radius of the reference sphere heights are measured from.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct GridGeometry {
    pub width: usize,
    pub height: usize,
    /// GDAL order: x = gt[0] + col*gt[1] + row*gt[2]; y = gt[3] + col*gt[4] + row*gt[5].
    /// `col`, `row` are pixel-corner coordinates (0.0 is the upper-left corner of pixel 0).
    pub geotransform: [f64; 6],
    pub projection: MapProjection,
    pub body_radius_m: f64,
}

impl GridGeometry {
    /// A global simple-cylindrical grid centred on longitude 180 (the layout of the LOLA
    /// gridded products, e.g. LDEM_4 at 4 pixels per degree), pixel-registered, on a sphere.
    pub fn global_simple_cylindrical(radius_m: f64, pixels_per_degree: usize) -> GridGeometry {
        let px = radius_m * (1.0 / pixels_per_degree as f64).to_radians();
        GridGeometry {
            width: 360 * pixels_per_degree,
            height: 180 * pixels_per_degree,
            geotransform: [
                -std::f64::consts::PI * radius_m,
                px,
                0.0,
                std::f64::consts::FRAC_PI_2 * radius_m,
                0.0,
                -px,
            ],
            projection: MapProjection::Equirectangular {
                lon0_deg: 180.0,
                lat_ts_deg: 0.0,
                false_easting_m: 0.0,
                false_northing_m: 0.0,
            },
            body_radius_m: radius_m,
        }
    }

    /// Map coordinates of a fractional pixel position (pixel-corner convention).
    pub fn pixel_to_map(&self, col: f64, row: f64) -> (f64, f64) {
        let g = &self.geotransform;
        (
            g[0] + col * g[1] + row * g[2],
            g[3] + col * g[4] + row * g[5],
        )
    }

    /// Fractional pixel position of map coordinates. `None` if the geotransform is singular.
    pub fn map_to_pixel(&self, x: f64, y: f64) -> Option<(f64, f64)> {
        let g = &self.geotransform;
        let det = g[1] * g[5] - g[2] * g[4];
        if det == 0.0 || !det.is_finite() {
            return None;
        }
        let (dx, dy) = (x - g[0], y - g[3]);
        Some(((dx * g[5] - dy * g[2]) / det, (dy * g[1] - dx * g[4]) / det))
    }

    /// Lon/lat (degrees, lon in [-180, 180)) of the centre of pixel (col, row).
    pub fn pixel_centre_lonlat(&self, col: usize, row: usize) -> Option<(f64, f64)> {
        self.pixel_to_lonlat(col as f64 + 0.5, row as f64 + 0.5)
    }

    /// Lon/lat of a fractional pixel position (pixel-corner convention).
    pub fn pixel_to_lonlat(&self, col: f64, row: f64) -> Option<(f64, f64)> {
        let (x, y) = self.pixel_to_map(col, row);
        self.projection.inverse(self.body_radius_m, x, y)
    }

    /// Fractional pixel position (pixel-corner convention) of a lon/lat. For grids that wrap in
    /// longitude (geographic, equirectangular) the longitude is shifted by whole turns so that a
    /// 0..360 grid finds -170 at 190 and a -180..180 grid finds 190 at -170. The turn chosen puts
    /// the column in the half-open span of one turn centred on the grid, so on a global grid
    /// every longitude lands on a pixel: the seam belongs to the first column, not past the last.
    pub fn lonlat_to_pixel(&self, lon_deg: f64, lat_deg: f64) -> Option<(f64, f64)> {
        let (x, y) = self
            .projection
            .forward(self.body_radius_m, lon_deg, lat_deg)?;
        let (mut col, row) = self.map_to_pixel(x, y)?;
        if let Some(period_px) = self.turn_px() {
            let centre = self.width as f64 / 2.0;
            col -= ((col - centre) / period_px + 0.5).floor() * period_px;
        }
        Some((col, row))
    }

    /// Columns per turn of longitude on grids whose map x wraps around the body: exactly the
    /// raster width on a global grid ([`GridGeometry::wrap_width_px`]), so lookups and wrapped
    /// reads agree to the column; otherwise the projection's period over the pixel size.
    fn turn_px(&self) -> Option<f64> {
        if let Some(w) = self.wrap_width_px() {
            return Some(w as f64);
        }
        let period = self.projection.x_period(self.body_radius_m)?;
        let period_px = period / self.geotransform[1].abs();
        (period_px.is_finite() && period_px > 0.0).then_some(period_px)
    }

    /// The raster width when its columns span one whole turn of longitude (a global grid,
    /// whether it counts 0..360 or -180..180), so that column `width` is column 0 again and a
    /// window may be read across the seam; `None` for any other grid.
    ///
    /// "Whole turn" allows a hundredth of a pixel: products derive the geotransform from a
    /// rounded map scale (LDEM_4's label gives 7580.84 m, which spans 360 deg to 5e-4 px).
    pub fn wrap_width_px(&self) -> Option<usize> {
        let g = &self.geotransform;
        if g[2] != 0.0 || g[4] != 0.0 || self.width == 0 {
            return None;
        }
        let period = self.projection.x_period(self.body_radius_m)?;
        let span_px = period / g[1].abs();
        ((span_px - self.width as f64).abs() <= WRAP_TOLERANCE_PX).then_some(self.width)
    }

    /// The same raster with its column origin moved `shift_cols` columns east: column c of the
    /// result is column c + `shift_cols` of this one (taken modulo the width on a global grid).
    /// Used to give a window read across a global grid's seam a geometry in which the whole
    /// window lies within one turn.
    pub fn shifted_by_columns(&self, shift_cols: isize) -> GridGeometry {
        let mut g = self.clone();
        g.geotransform[0] += shift_cols as f64 * g.geotransform[1];
        g.geotransform[3] += shift_cols as f64 * g.geotransform[4];
        g
    }

    /// Ground size of one pixel in metres (east-west, north-south) at the given pixel, measured
    /// as great-circle distances to the neighbouring pixel centres.
    pub fn pixel_size_m_at(&self, col: f64, row: f64) -> Option<(f64, f64)> {
        let c = self.pixel_to_lonlat(col, row)?;
        let e = self.pixel_to_lonlat(col + 1.0, row)?;
        let s = self.pixel_to_lonlat(col, row + 1.0)?;
        Some((
            geodesy::distance_m(self.body_radius_m, c, e),
            geodesy::distance_m(self.body_radius_m, c, s),
        ))
    }

    /// Pixel size in metres at the raster centre.
    pub fn pixel_size_m(&self) -> Option<(f64, f64)> {
        self.pixel_size_m_at(self.width as f64 / 2.0, self.height as f64 / 2.0)
    }
}

/// A window of heights (metres above the reference sphere, `NaN` where there is no data) read
/// from a raster, with the geometry of the whole raster it came from.
#[derive(Clone, Debug)]
pub struct ElevationGrid {
    pub geometry: Arc<GridGeometry>,
    /// Position of this window's first column and row in `geometry`; negative when the window
    /// (with its halo) starts before the raster edge. Beyond the edge the heights are NaN,
    /// except across the seam of a global grid, where the columns wrap and `geometry` is the
    /// raster's with its column origin moved ([`GridGeometry::shifted_by_columns`]) so that
    /// the whole window lies within one turn and lon/lat lookups land inside it.
    pub col0: isize,
    pub row0: isize,
    pub width: usize,
    pub height: usize,
    /// Row-major, `width * height` values.
    pub heights_m: Vec<f32>,
}

impl ElevationGrid {
    /// Height at window pixel (col, row), or `None` outside the window or on nodata.
    #[inline]
    pub fn get(&self, col: usize, row: usize) -> Option<f32> {
        if col < self.width && row < self.height {
            let h = self.heights_m[row * self.width + col];
            (!h.is_nan()).then_some(h)
        } else {
            None
        }
    }

    /// Bilinear height at a fractional window position in pixel-centre convention
    /// (0.0 is the centre of window pixel 0). `None` if any of the four neighbours is missing.
    pub fn sample(&self, col: f64, row: f64) -> Option<f64> {
        if !(col >= 0.0 && row >= 0.0) {
            return None;
        }
        // Both are at least 0 here, where truncation is the floor: `as` saves the libm call
        // (x86-64's baseline has no rounding instruction) and saturates as floor's cast would.
        // Through u32 the cast skips the 64-bit unsigned conversion's fix-ups, as the craters
        // crate's samplers do; a position past u32::MAX saturates there, still past the window.
        let (c0, r0) = (col as u32 as usize, row as u32 as usize);
        let (fc, fr) = (col - c0 as f64, row - r0 as f64);
        let c1 = if fc > 0.0 { c0 + 1 } else { c0 };
        let r1 = if fr > 0.0 { r0 + 1 } else { r0 };
        if c1 >= self.width || r1 >= self.height {
            return None;
        }
        let h = &self.heights_m;
        let (a, b) = (r0 * self.width, r1 * self.width);
        let (h00, h10, h01, h11) = (
            h[a + c0] as f64,
            h[a + c1] as f64,
            h[b + c0] as f64,
            h[b + c1] as f64,
        );
        // A NaN (nodata) neighbour makes the sum NaN whatever its weight, and a sum that is
        // not a number is no height: one test for all four.
        let v = h00 * (1.0 - fc) * (1.0 - fr)
            + h10 * fc * (1.0 - fr)
            + h01 * (1.0 - fc) * fr
            + h11 * fc * fr;
        (!v.is_nan()).then_some(v)
    }

    /// Bilinear height at a lon/lat, or `None` outside the window or on nodata.
    pub fn sample_lonlat(&self, lon_deg: f64, lat_deg: f64) -> Option<f64> {
        let (col, row) = self.geometry.lonlat_to_pixel(lon_deg, lat_deg)?;
        self.sample(col - 0.5 - self.col0 as f64, row - 0.5 - self.row0 as f64)
    }

    /// Lon/lat of the centre of window pixel (col, row).
    pub fn lonlat(&self, col: usize, row: usize) -> Option<(f64, f64)> {
        self.geometry.pixel_to_lonlat(
            (self.col0 + col as isize) as f64 + 0.5,
            (self.row0 + row as isize) as f64 + 0.5,
        )
    }

    /// Fraction of the window's pixels that hold data.
    pub fn valid_fraction(&self) -> f64 {
        if self.heights_m.is_empty() {
            return 0.0;
        }
        self.heights_m.iter().filter(|h| !h.is_nan()).count() as f64 / self.heights_m.len() as f64
    }

    /// Smallest and largest valid height, or `None` if the window holds no data.
    pub fn min_max(&self) -> Option<(f32, f32)> {
        // Eight running extremes side by side, so the loop runs in vector registers (a survey
        // scans every tile window); `f32::min` and `max` pass over NaN, as nodata should be.
        const LANES: usize = 8;
        let (mut lo, mut hi) = ([f32::INFINITY; LANES], [f32::NEG_INFINITY; LANES]);
        let chunks = self.heights_m.chunks_exact(LANES);
        let rest = chunks.remainder();
        for c in chunks {
            for k in 0..LANES {
                lo[k] = lo[k].min(c[k]);
                hi[k] = hi[k].max(c[k]);
            }
        }
        for &h in rest {
            lo[0] = lo[0].min(h);
            hi[0] = hi[0].max(h);
        }
        let lo = lo.into_iter().fold(f32::INFINITY, f32::min);
        let hi = hi.into_iter().fold(f32::NEG_INFINITY, f32::max);
        // Any height at all leaves lo <= hi; none leaves them at their starting infinities.
        (lo <= hi).then_some((lo, hi))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn grid(heights_m: Vec<f32>) -> ElevationGrid {
        ElevationGrid {
            geometry: Arc::new(GridGeometry::global_simple_cylindrical(1.0, 1)),
            col0: 0,
            row0: 0,
            width: heights_m.len(),
            height: 1,
            heights_m,
        }
    }

    /// The lane-wise extremes against a plain pass over the heights, with holes in every
    /// position of a lane and a tail shorter than a lane.
    #[test]
    fn min_max_skips_nodata_in_every_lane_and_the_tail() {
        for n in [0usize, 1, 7, 8, 9, 61] {
            let heights: Vec<f32> = (0..n)
                .map(|k| {
                    if k % 3 == 1 {
                        f32::NAN
                    } else {
                        ((k * 37) % 23) as f32 - 11.5
                    }
                })
                .collect();
            let valid: Vec<f32> = heights.iter().copied().filter(|h| !h.is_nan()).collect();
            let plain = (!valid.is_empty()).then(|| {
                (
                    valid.iter().copied().fold(f32::INFINITY, f32::min),
                    valid.iter().copied().fold(f32::NEG_INFINITY, f32::max),
                )
            });
            assert_eq!(grid(heights).min_max(), plain, "{n} heights");
        }
        assert_eq!(grid(vec![f32::NAN; 20]).min_max(), None);
    }
}
