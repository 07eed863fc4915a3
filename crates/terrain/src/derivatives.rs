//! Per-pixel terrain derivatives over a window, parallel over rows (rayon).
//!
//! - Slope and aspect: Horn (1981), "Hill shading and the reflectance map", Proc. IEEE 69:14.
//! - Hillshade: the same gradient with a lamp at azimuth/altitude (Horn 1981).
//! - TRI: Riley, DeGloria and Elliot (1999), Intermountain J. Sci. 5:23: the square root of the
//!   summed squared differences to the 8 neighbours (`gdaldem TRI`'s default since GDAL 3.3).
//! - Roughness: largest minus smallest height in the 3x3 window (Wilson et al. 2007,
//!   Marine Geodesy 30:3), as `gdaldem roughness`.
//!
//! Pixel size in metres comes from the window's geometry at each row, so cylindrical grids
//! get the cos(latitude) shrink of a degree of longitude. A pixel whose 3x3 neighbourhood is
//! incomplete gets NaN (as gdaldem without -compute_edges).

use crate::grid::ElevationGrid;
use rayon::prelude::*;

/// How far apart neighbouring pixels are taken to be.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum Spacing {
    /// True ground distance in metres at each row (a degree of longitude shrinks with
    /// cos(latitude) on cylindrical grids). What every measurement uses.
    #[default]
    Ground,
    /// The geotransform's pixel size in map units, as `gdaldem` does for projected grids.
    /// Only for comparing with GDAL.
    MapUnits,
}

/// Pixel size (east-west, north-south) of window row `row` under `spacing`.
fn row_pixel_size(grid: &ElevationGrid, row: usize, spacing: Spacing) -> (f64, f64) {
    match spacing {
        Spacing::Ground => {
            let c = grid.col0 as f64 + grid.width as f64 / 2.0;
            let r = grid.row0 as f64 + row as f64 + 0.5;
            grid.geometry.pixel_size_m_at(c, r).unwrap_or((f64::NAN, f64::NAN))
        }
        Spacing::MapUnits => {
            let g = &grid.geometry.geotransform;
            (g[1].hypot(g[4]), g[2].hypot(g[5]))
        }
    }
}

/// The 3x3 neighbourhood of (c, r), or `None` if it leaves the window or holds nodata.
#[inline]
fn window3(grid: &ElevationGrid, c: usize, r: usize) -> Option<[f64; 9]> {
    if c == 0 || r == 0 || c + 1 >= grid.width || r + 1 >= grid.height {
        return None;
    }
    let w = grid.width;
    let mut out = [0.0; 9];
    for dr in 0..3 {
        let base = (r + dr - 1) * w + c - 1;
        for dc in 0..3 {
            let h = grid.heights_m[base + dc];
            if h.is_nan() {
                return None;
            }
            out[dr * 3 + dc] = h as f64;
        }
    }
    Some(out)
}

/// Horn's gradient (dz/dx east-positive, dz/dy north-positive) of a 3x3 window.
#[inline]
fn horn_gradient(z: &[f64; 9], dx: f64, dy: f64) -> (f64, f64) {
    let dzdx = ((z[2] + 2.0 * z[5] + z[8]) - (z[0] + 2.0 * z[3] + z[6])) / (8.0 * dx);
    // Rows run north to south, so north-positive is top minus bottom.
    let dzdy = ((z[0] + 2.0 * z[1] + z[2]) - (z[6] + 2.0 * z[7] + z[8])) / (8.0 * dy);
    (dzdx, dzdy)
}

fn per_pixel(grid: &ElevationGrid, spacing: Spacing, f: impl Fn(&[f64; 9], f64, f64) -> f64 + Sync) -> Vec<f32> {
    let mut out = vec![f32::NAN; grid.width * grid.height];
    out.par_chunks_mut(grid.width.max(1)).enumerate().for_each(|(r, row)| {
        let (dx, dy) = row_pixel_size(grid, r, spacing);
        for (c, v) in row.iter_mut().enumerate() {
            if let Some(z) = window3(grid, c, r) {
                *v = f(&z, dx, dy) as f32;
            }
        }
    });
    out
}

/// Horn slope in degrees, ground spacing.
pub fn slope_deg(grid: &ElevationGrid) -> Vec<f32> {
    slope_deg_with(grid, Spacing::Ground)
}

/// Horn slope in degrees with the given pixel spacing.
pub fn slope_deg_with(grid: &ElevationGrid, spacing: Spacing) -> Vec<f32> {
    per_pixel(grid, spacing, |z, dx, dy| {
        let (gx, gy) = horn_gradient(z, dx, dy);
        gx.hypot(gy).atan().to_degrees()
    })
}

/// Horn aspect: the downhill direction in degrees clockwise from north, [0, 360); NaN where flat.
pub fn aspect_deg(grid: &ElevationGrid) -> Vec<f32> {
    per_pixel(grid, Spacing::Ground, |z, dx, dy| {
        let (gx, gy) = horn_gradient(z, dx, dy);
        if gx == 0.0 && gy == 0.0 {
            f64::NAN
        } else {
            (-gx).atan2(-gy).to_degrees().rem_euclid(360.0)
        }
    })
}

/// Hillshade 0..255 for a lamp at `azimuth_deg` (clockwise from north) and `altitude_deg`.
pub fn hillshade(grid: &ElevationGrid, azimuth_deg: f64, altitude_deg: f64, z_factor: f64) -> Vec<f32> {
    let (zen, az) = ((90.0 - altitude_deg).to_radians(), azimuth_deg.to_radians());
    per_pixel(grid, Spacing::Ground, move |z, dx, dy| {
        let (gx, gy) = horn_gradient(z, dx, dy);
        let (gx, gy) = (gx * z_factor, gy * z_factor);
        let slope = gx.hypot(gy).atan();
        let aspect = (-gx).atan2(-gy); // downhill azimuth, clockwise from north
        let v = zen.cos() * slope.cos() + zen.sin() * slope.sin() * (az - aspect).cos();
        (255.0 * v).clamp(0.0, 255.0)
    })
}

/// Terrain Ruggedness Index (Riley et al. 1999): sqrt of summed squared differences to the 8
/// neighbours, m.
pub fn tri_m(grid: &ElevationGrid) -> Vec<f32> {
    per_pixel(grid, Spacing::MapUnits, |z, _, _| z.iter().map(|h| (h - z[4]).powi(2)).sum::<f64>().sqrt())
}

/// Roughness: max minus min height in the 3x3 window (Wilson et al. 2007), m.
pub fn roughness_m(grid: &ElevationGrid) -> Vec<f32> {
    per_pixel(grid, Spacing::MapUnits, |z, _, _| {
        let (lo, hi) = z.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &h| (a.min(h), b.max(h)));
        hi - lo
    })
}
