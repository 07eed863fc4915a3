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

/// Horn's gradient (dz/dx east-positive, dz/dy north-positive) of a 3x3 window given as its
/// three rows, top to bottom, each starting at the left column.
#[inline(always)]
fn horn_gradient(t: &[f32], m: &[f32], b: &[f32], dx: f64, dy: f64) -> (f64, f64) {
    let z = |row: &[f32], i: usize| row[i] as f64;
    let dzdx = ((z(t, 2) + 2.0 * z(m, 2) + z(b, 2)) - (z(t, 0) + 2.0 * z(m, 0) + z(b, 0))) / (8.0 * dx);
    // Rows run north to south, so north-positive is top minus bottom.
    let dzdy = ((z(t, 0) + 2.0 * z(t, 1) + z(t, 2)) - (z(b, 0) + 2.0 * z(b, 1) + z(b, 2))) / (8.0 * dy);
    (dzdx, dzdy)
}

/// Apply `f(top, middle, bottom, dx, dy)` to every pixel with a full 3x3 neighbourhood, rows in
/// parallel. Each slice starts at the pixel's left neighbour. Border pixels are NaN. A NaN
/// anywhere in the neighbourhood propagates through the arithmetic, so nodata needs no test
/// (kernels that use min/max must check for it themselves).
fn per_pixel(grid: &ElevationGrid, spacing: Spacing, f: impl Fn(&[f32], &[f32], &[f32], f64, f64) -> f64 + Sync) -> Vec<f32> {
    let (w, h) = (grid.width, grid.height);
    let mut out = vec![f32::NAN; w * h];
    if w < 3 || h < 3 {
        return out;
    }
    let z = &grid.heights_m;
    out.par_chunks_mut(w).enumerate().skip(1).take(h - 2).for_each(|(r, row)| {
        let (dx, dy) = row_pixel_size(grid, r, spacing);
        let (t, m, b) = (&z[(r - 1) * w..r * w], &z[r * w..(r + 1) * w], &z[(r + 1) * w..(r + 2) * w]);
        for c in 1..w - 1 {
            row[c] = f(&t[c - 1..c + 2], &m[c - 1..c + 2], &b[c - 1..c + 2], dx, dy) as f32;
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
    per_pixel(grid, spacing, |t, m, b, dx, dy| {
        let (gx, gy) = horn_gradient(t, m, b, dx, dy);
        (gx * gx + gy * gy).sqrt().atan().to_degrees()
    })
}

/// Horn aspect: the downhill direction in degrees clockwise from north, [0, 360); NaN where flat.
pub fn aspect_deg(grid: &ElevationGrid) -> Vec<f32> {
    per_pixel(grid, Spacing::Ground, |t, m, b, dx, dy| {
        let (gx, gy) = horn_gradient(t, m, b, dx, dy);
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
    per_pixel(grid, Spacing::Ground, move |t, m, b, dx, dy| {
        let (gx, gy) = horn_gradient(t, m, b, dx, dy);
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
    per_pixel(grid, Spacing::MapUnits, |t, m, b, _, _| {
        let centre = m[1] as f64;
        t.iter().chain(m).chain(b).map(|&h| (h as f64 - centre).powi(2)).sum::<f64>().sqrt()
    })
}

/// Roughness: max minus min height in the 3x3 window (Wilson et al. 2007), m.
pub fn roughness_m(grid: &ElevationGrid) -> Vec<f32> {
    per_pixel(grid, Spacing::MapUnits, |t, m, b, _, _| {
        let (mut lo, mut hi, mut sum) = (f32::INFINITY, f32::NEG_INFINITY, 0.0f32);
        for &h in t.iter().chain(m).chain(b) {
            lo = lo.min(h);
            hi = hi.max(h);
            sum += h;
        }
        // min/max skip NaN; the sum does not, so it tells whether a neighbour is missing.
        if sum.is_nan() { f64::NAN } else { (hi - lo) as f64 }
    })
}
