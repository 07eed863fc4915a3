//! Radial height profiles around a candidate, read from the DEM for the crater sheet.
//! Sampling only (bilinear heights along great-circle rays); the crater measurement itself
//! comes from the survey.

use terrain::{geodesy, Dem};

/// Rays per crater and samples per ray; enough to see the rim without a slow selection.
pub const RAYS: usize = 36;
pub const SAMPLES: usize = 96;
/// Rays reach this many rim radii out, to show the surrounding plain.
pub const REACH_RADII: f64 = 1.8;
/// Window side cap for the read around a crater, output pixels.
const WINDOW_MAX_PX: usize = 768;

pub struct RadialProfiles {
    /// Distance from the fitted centre of each sample, metres.
    pub distance_m: Vec<f64>,
    /// `RAYS` rows of `SAMPLES` heights (NaN where no data), azimuths from north clockwise.
    pub heights_m: Vec<Vec<f64>>,
    /// Median over rays at each distance.
    pub median_m: Vec<f64>,
}

pub fn radial_profiles(
    dem: &Dem,
    lon_deg: f64,
    lat_deg: f64,
    radius_m: f64,
) -> Option<RadialProfiles> {
    let geom = dem.geometry();
    let (col, row) = geom.lonlat_to_pixel(lon_deg, lat_deg)?;
    let (dx, dy) = geom.pixel_size_m_at(col, row)?;
    let reach_m = radius_m * REACH_RADII;
    let half_px = (reach_m / dx.min(dy)).ceil() as usize + 2;
    let factor = (2 * half_px).div_ceil(WINDOW_MAX_PX).max(1);
    let c0 = ((col as usize).saturating_sub(half_px) / factor) * factor;
    let r0 = ((row as usize).saturating_sub(half_px) / factor) * factor;
    let grid = dem
        .read_window_decimated(c0, r0, 2 * half_px, 2 * half_px, factor)
        .ok()?;
    let distance_m: Vec<f64> = (0..SAMPLES)
        .map(|k| reach_m * k as f64 / (SAMPLES - 1) as f64)
        .collect();
    let heights_m: Vec<Vec<f64>> = (0..RAYS)
        .map(|a| {
            let az = 360.0 * a as f64 / RAYS as f64;
            distance_m
                .iter()
                .map(|&d| {
                    let (lo, la) =
                        geodesy::destination(geom.body_radius_m, (lon_deg, lat_deg), az, d);
                    grid.sample_lonlat(lo, la).unwrap_or(f64::NAN)
                })
                .collect()
        })
        .collect();
    let median_m = (0..SAMPLES)
        .map(|k| {
            let mut v: Vec<f64> = heights_m
                .iter()
                .map(|r| r[k])
                .filter(|h| h.is_finite())
                .collect();
            if v.is_empty() {
                return f64::NAN;
            }
            v.sort_by(|a, b| a.total_cmp(b));
            v[v.len() / 2]
        })
        .collect();
    Some(RadialProfiles {
        distance_m,
        heights_m,
        median_m,
    })
}
