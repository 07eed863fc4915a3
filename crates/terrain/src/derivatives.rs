//! Per-pixel terrain derivatives over a window, parallel over bands of rows (rayon).
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
//!
//! Slope, TRI and roughness run as loops over whole rows (three row slices in, one out) in
//! `f32`, written so the compiler vectorises them: no per-pixel bounds checks or calls, NaN
//! carried through the arithmetic instead of tested, and an `f32` arctangent made of
//! selects and one division. Their results stay within 1e-4 of the `f64` formulas (the tests
//! hold them to 1e-3 of `gdaldem`).

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
            grid.geometry
                .pixel_size_m_at(c, r)
                .unwrap_or((f64::NAN, f64::NAN))
        }
        Spacing::MapUnits => {
            let g = &grid.geometry.geotransform;
            (g[1].hypot(g[4]), g[2].hypot(g[5]))
        }
    }
}

/// Output pixels per parallel task: big enough that scheduling costs nothing, small enough
/// that two busy cores still share the work evenly (about 60 tasks on a 2000 x 2000 window).
const PIXELS_PER_TASK: usize = 1 << 16;

/// Run `row_fn(top, middle, bottom, out, row)` on every row with a full 3x3 neighbourhood,
/// bands of rows in parallel. `out` is the output row less its first and last pixel, so
/// `out[i]` is the pixel whose neighbourhood is columns i..i+3 of the three input rows (each
/// as long as the window is wide). The border of the output is NaN. `out` is resized to the
/// window; every value is written, so a buffer kept between calls costs no allocation and
/// no clearing. `scratch` is one per task, for kernels that need a row buffer.
fn rows_3x3<S: Default + Send>(
    grid: &ElevationGrid,
    out: &mut Vec<f32>,
    row_fn: impl Fn(&[f32], &[f32], &[f32], &mut [f32], usize, &mut S) + Sync,
) {
    let (w, h) = (grid.width, grid.height);
    let z = &grid.heights_m[..];
    if w < 3 || h < 3 || z.len() < w * h {
        out.clear();
        out.resize(w * h, f32::NAN);
        return;
    }
    if out.len() != w * h {
        // Zeroed memory comes from the system untouched, so the pages are first written by
        // the parallel loop below rather than by one thread filling them here.
        *out = vec![0.0; w * h];
    }
    let band = (PIXELS_PER_TASK / w).max(1);
    out.par_chunks_mut(band * w)
        .enumerate()
        .for_each_init(S::default, |scratch, (k, rows)| {
            for (j, row) in rows.chunks_exact_mut(w).enumerate() {
                let r = k * band + j;
                if r == 0 || r + 1 >= h {
                    row.fill(f32::NAN);
                    continue;
                }
                let (t, m, b) = (
                    &z[(r - 1) * w..r * w],
                    &z[r * w..(r + 1) * w],
                    &z[(r + 1) * w..(r + 2) * w],
                );
                row[0] = f32::NAN;
                row[w - 1] = f32::NAN;
                row_fn(t, m, b, &mut row[1..w - 1], r, scratch);
            }
        });
}

/// `a` if it is the larger, else `b`: a single max instruction, which the NaN-aware
/// `f32::max` is not. Kernels using it make NaN come out by other means.
#[inline(always)]
fn fast_max(a: f32, b: f32) -> f32 {
    if a > b {
        a
    } else {
        b
    }
}

#[inline(always)]
fn fast_min(a: f32, b: f32) -> f32 {
    if a < b {
        a
    } else {
        b
    }
}

/// Arctangent of x >= 0 in degrees, `f32`: the range reduction and polynomial of Cephes'
/// `atanf` (Moshier 1989, "Methods and Programs for Mathematical Functions", relative error
/// about 2e-7), with the three branches turned into selects around one division so a loop
/// calling it vectorises. NaN gives NaN, infinity 90.
#[inline(always)]
fn atan_deg_nonneg(x: f32) -> f32 {
    const TAN_3PI_8: f32 = 2.414_213_6;
    const TAN_PI_8: f32 = 0.414_213_57;
    let big = x > TAN_3PI_8;
    let mid = x > TAN_PI_8;
    // big: atan(x) = pi/2 + atan(-1/x); mid: pi/4 + atan((x-1)/(x+1)); else atan(x).
    let num = if big {
        -1.0
    } else if mid {
        x - 1.0
    } else {
        x
    };
    let den = if big {
        x
    } else if mid {
        x + 1.0
    } else {
        1.0
    };
    let base = if big {
        std::f32::consts::FRAC_PI_2
    } else if mid {
        std::f32::consts::FRAC_PI_4
    } else {
        0.0
    };
    let y = num / den;
    let zz = y * y;
    let p =
        (((8.053_744_5e-2 * zz - 1.387_768_6e-1) * zz + 1.997_771e-1) * zz - 3.333_295e-1) * zz * y
            + y;
    (base + p) * (180.0 / std::f32::consts::PI)
}

/// Horn slope of one row, degrees. `kx`, `ky` are 1 / (8 dx) and 1 / (8 dy).
#[inline(always)]
fn slope_row(t: &[f32], m: &[f32], b: &[f32], out: &mut [f32], kx: f32, ky: f32) {
    let n = out.len();
    let (t, m, b) = (&t[..n + 2], &m[..n + 2], &b[..n + 2]);
    for i in 0..n {
        // Differences of neighbours first: exact for nearby heights, so f32 loses nothing
        // against summing the columns first in f64.
        let gx = ((t[i + 2] - t[i]) + 2.0 * (m[i + 2] - m[i]) + (b[i + 2] - b[i])) * kx;
        // Rows run north to south, so north-positive is top minus bottom.
        let gy = ((t[i] - b[i]) + 2.0 * (t[i + 1] - b[i + 1]) + (t[i + 2] - b[i + 2])) * ky;
        // Horn's formula leaves out the centre; a missing centre must still give NaN
        // (0 times a height is 0, times NaN is NaN).
        out[i] = atan_deg_nonneg((gx * gx + gy * gy).sqrt()) + 0.0 * m[i + 1];
    }
}

/// Horn slope in degrees, ground spacing.
pub fn slope_deg(grid: &ElevationGrid) -> Vec<f32> {
    slope_deg_with(grid, Spacing::Ground)
}

/// Horn slope in degrees with the given pixel spacing.
pub fn slope_deg_with(grid: &ElevationGrid, spacing: Spacing) -> Vec<f32> {
    let mut out = Vec::new();
    slope_deg_into(grid, spacing, &mut out);
    out
}

/// [`slope_deg_with`] into a buffer kept by the caller (no allocation once it is big enough).
pub fn slope_deg_into(grid: &ElevationGrid, spacing: Spacing, out: &mut Vec<f32>) {
    let fixed = (spacing == Spacing::MapUnits).then(|| row_pixel_size(grid, 0, spacing));
    rows_3x3::<()>(grid, out, |t, m, b, row, r, _| {
        let (dx, dy) = fixed.unwrap_or_else(|| row_pixel_size(grid, r, spacing));
        slope_row(
            t,
            m,
            b,
            row,
            (1.0 / (8.0 * dx)) as f32,
            (1.0 / (8.0 * dy)) as f32,
        );
    });
}

/// Horn's gradient (dz/dx east-positive, dz/dy north-positive) of a 3x3 window given as its
/// three rows, top to bottom, each starting at the left column.
#[inline(always)]
fn horn_gradient(t: &[f32], m: &[f32], b: &[f32], dx: f64, dy: f64) -> (f64, f64) {
    let z = |row: &[f32], i: usize| row[i] as f64;
    let dzdx =
        ((z(t, 2) + 2.0 * z(m, 2) + z(b, 2)) - (z(t, 0) + 2.0 * z(m, 0) + z(b, 0))) / (8.0 * dx);
    // Rows run north to south, so north-positive is top minus bottom.
    let dzdy =
        ((z(t, 0) + 2.0 * z(t, 1) + z(t, 2)) - (z(b, 0) + 2.0 * z(b, 1) + z(b, 2))) / (8.0 * dy);
    (dzdx, dzdy)
}

/// Apply `f(top, middle, bottom, dx, dy)` to every pixel with a full 3x3 neighbourhood in
/// `f64` (for the kernels that need trigonometry per pixel). Each slice starts at the pixel's
/// left neighbour. A missing centre gives NaN; a NaN elsewhere propagates through Horn's
/// arithmetic.
fn per_pixel(
    grid: &ElevationGrid,
    spacing: Spacing,
    f: impl Fn(&[f32], &[f32], &[f32], f64, f64) -> f64 + Sync,
) -> Vec<f32> {
    let mut out = Vec::new();
    rows_3x3::<()>(grid, &mut out, |t, m, b, row, r, _| {
        let (dx, dy) = row_pixel_size(grid, r, spacing);
        for (c, o) in row.iter_mut().enumerate() {
            let v = f(&t[c..c + 3], &m[c..c + 3], &b[c..c + 3], dx, dy) as f32;
            *o = v + 0.0 * m[c + 1];
        }
    });
    out
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
pub fn hillshade(
    grid: &ElevationGrid,
    azimuth_deg: f64,
    altitude_deg: f64,
    z_factor: f64,
) -> Vec<f32> {
    let (zen, az) = ((90.0 - altitude_deg).to_radians(), azimuth_deg.to_radians());
    let (cos_zen, sin_zen, cos_az, sin_az) = (zen.cos(), zen.sin(), az.cos(), az.sin());
    per_pixel(grid, Spacing::Ground, move |t, m, b, dx, dy| {
        let (gx, gy) = horn_gradient(t, m, b, dx, dy);
        let (gx, gy) = (gx * z_factor, gy * z_factor);
        // cos(zen) cos(slope) + sin(zen) sin(slope) cos(az - aspect), with slope = atan(g) and
        // the downhill aspect = atan2(-gx, -gy) written out: cos(slope) = 1 / sqrt(1 + g^2),
        // sin(slope) cos(az - aspect) = -(gy cos(az) + gx sin(az)) / sqrt(1 + g^2).
        let v =
            (cos_zen - sin_zen * (gy * cos_az + gx * sin_az)) / (1.0 + gx * gx + gy * gy).sqrt();
        (255.0 * v).clamp(0.0, 255.0)
    })
}

/// Terrain Ruggedness Index (Riley et al. 1999): sqrt of summed squared differences to the 8
/// neighbours, m.
pub fn tri_m(grid: &ElevationGrid) -> Vec<f32> {
    let mut out = Vec::new();
    rows_3x3::<()>(grid, &mut out, |t, m, b, row, _, _| {
        let n = row.len();
        let (t, m, b) = (&t[..n + 2], &m[..n + 2], &b[..n + 2]);
        for (i, o) in row.iter_mut().enumerate() {
            let c = m[i + 1];
            let sq = |h: f32| (h - c) * (h - c);
            let s = (sq(t[i]) + sq(t[i + 1]) + sq(t[i + 2]))
                + (sq(m[i]) + sq(m[i + 2]))
                + (sq(b[i]) + sq(b[i + 1]) + sq(b[i + 2]));
            *o = s.sqrt();
        }
    });
    out
}

/// Roughness: max minus min height in the 3x3 window (Wilson et al. 2007), m.
pub fn roughness_m(grid: &ElevationGrid) -> Vec<f32> {
    let mut out = Vec::new();
    roughness_m_into(grid, &mut out);
    out
}

/// Column-wise max, min and sum of three rows, one task's reusable row buffers.
#[derive(Default)]
struct ColumnStats {
    hi: Vec<f32>,
    lo: Vec<f32>,
    sum: Vec<f32>,
}

/// [`roughness_m`] into a buffer kept by the caller (no allocation once it is big enough).
pub fn roughness_m_into(grid: &ElevationGrid, out: &mut Vec<f32>) {
    rows_3x3::<ColumnStats>(grid, out, |t, m, b, row, _, cs| {
        // Separable: max and min down each column of the three rows, then across three columns.
        let w = t.len();
        for v in [&mut cs.hi, &mut cs.lo, &mut cs.sum] {
            v.resize(w, 0.0);
        }
        let (hi, lo, sum) = (&mut cs.hi[..w], &mut cs.lo[..w], &mut cs.sum[..w]);
        let (m, b) = (&m[..w], &b[..w]);
        for c in 0..w {
            hi[c] = fast_max(fast_max(t[c], m[c]), b[c]);
            lo[c] = fast_min(fast_min(t[c], m[c]), b[c]);
            sum[c] = t[c] + m[c] + b[c];
        }
        let n = row.len();
        let (hi, lo, sum) = (&hi[..n + 2], &lo[..n + 2], &sum[..n + 2]);
        for (i, o) in row.iter_mut().enumerate() {
            let top = fast_max(fast_max(hi[i], hi[i + 1]), hi[i + 2]);
            let bottom = fast_min(fast_min(lo[i], lo[i + 1]), lo[i + 2]);
            // The fast max and min may skip a NaN; the sum does not, and 0 s is 0 or NaN.
            let s = sum[i] + sum[i + 1] + sum[i + 2];
            *o = (top - bottom) + 0.0 * s;
        }
    });
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fast_arctangent_matches_the_library_one() {
        // std's f64 atan as the reference, over slopes from flat to near vertical.
        let mut worst = 0.0f64;
        for k in 0..200_000 {
            let x = (k as f64 * 1e-4).powi(2);
            let ours = atan_deg_nonneg(x as f32) as f64;
            worst = worst.max((ours - x.atan().to_degrees()).abs());
        }
        assert!(worst < 2e-5, "worst {worst} deg");
        assert_eq!(atan_deg_nonneg(f32::INFINITY), 90.0);
        assert!(atan_deg_nonneg(f32::NAN).is_nan());
    }

    #[test]
    fn hillshade_matches_its_trigonometric_form() {
        // Horn (1981): 255 (cos zen cos slope + sin zen sin slope cos(az - aspect)), slope and
        // downhill aspect from atan and atan2, against the closed form `hillshade` uses, on a
        // tilted plane seen from lamps all round.
        use crate::grid::GridGeometry;
        use std::sync::Arc;
        let geometry = GridGeometry::global_simple_cylindrical(crate::MOON_RADIUS_M, 4);
        let (dx, dy) = (geometry.geotransform[1], -geometry.geotransform[5]);
        for (gx, gy) in [(0.0, 0.0), (0.3, -0.1), (-1.2, 0.7), (0.05, 2.5)] {
            let heights_m = (0..25)
                .map(|k| (gx * dx * (k % 5) as f64 - gy * dy * (k / 5) as f64) as f32)
                .collect();
            let grid = ElevationGrid {
                geometry: Arc::new(geometry.clone()),
                col0: 720,
                row0: 360,
                width: 5,
                height: 5,
                heights_m,
            };
            for az_deg in [0.0, 45.0, 135.0, 315.0] {
                let alt_deg = 40.0f64;
                let ours = hillshade(&grid, az_deg, alt_deg, 1.0)[12] as f64;
                let (px, py) = row_pixel_size(&grid, 2, Spacing::Ground);
                // The plane's gradient in ground units at the middle row.
                let (gxg, gyg) = (gx * dx / px, gy * dy / py);
                let slope = gxg.hypot(gyg).atan();
                let aspect = (-gxg).atan2(-gyg);
                let (zen, az) = ((90.0 - alt_deg).to_radians(), az_deg.to_radians());
                let want = (255.0
                    * (zen.cos() * slope.cos() + zen.sin() * slope.sin() * (az - aspect).cos()))
                .clamp(0.0, 255.0);
                assert!(
                    (ours - want).abs() < 1e-3,
                    "gradient ({gx}, {gy}), lamp {az_deg}: {ours} against {want}"
                );
            }
        }
    }
}
