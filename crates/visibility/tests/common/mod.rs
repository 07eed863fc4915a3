//! Synthetic elevation grids for the tests (invented terrain, not data).
#![allow(dead_code)]

use std::sync::Arc;
use terrain::{ElevationGrid, GridGeometry, MapProjection, MOON_RADIUS_M};

/// A geographic (lon/lat degree) grid centred on (lon0, lat0), `half_deg` each way at `px_deg`
/// spacing, with heights from `f(ground distance from the centre in m, azimuth in deg)`.
pub fn geographic_grid(
    lon0: f64,
    lat0: f64,
    half_deg: f64,
    px_deg: f64,
    f: impl Fn(f64, f64) -> f64,
) -> ElevationGrid {
    let n = (2.0 * half_deg / px_deg).round() as usize;
    let geometry = Arc::new(GridGeometry {
        width: n,
        height: n,
        geotransform: [lon0 - half_deg, px_deg, 0.0, lat0 + half_deg, 0.0, -px_deg],
        projection: MapProjection::Geographic,
        body_radius_m: MOON_RADIUS_M,
    });
    let mut heights_m = Vec::with_capacity(n * n);
    for row in 0..n {
        for col in 0..n {
            let lon = lon0 - half_deg + (col as f64 + 0.5) * px_deg;
            let lat = lat0 + half_deg - (row as f64 + 0.5) * px_deg;
            let d = terrain::geodesy::distance_m(MOON_RADIUS_M, (lon0, lat0), (lon, lat));
            let az = terrain::geodesy::azimuth_deg((lon0, lat0), (lon, lat));
            heights_m.push(f(d, az) as f32);
        }
    }
    ElevationGrid {
        geometry,
        col0: 0,
        row0: 0,
        width: n,
        height: n,
        heights_m,
    }
}

/// A simple crater: parabolic bowl `depth_m` deep out to `radius_m`, a rim `rim_m` high there,
/// decaying outside; the plain at 0.
pub fn bowl(depth_m: f64, radius_m: f64, rim_m: f64) -> impl Fn(f64, f64) -> f64 {
    move |d, _| {
        let x = d / radius_m;
        if x <= 1.0 {
            -depth_m + (depth_m + rim_m) * x * x
        } else {
            rim_m * (-(x - 1.0) * 3.0).exp()
        }
    }
}

/// A number from a recorded fixture (tests/fixtures/*.json).
pub fn num(v: &serde_json::Value) -> f64 {
    v.as_f64().expect("fixture number")
}

/// The LOLA LDEM_4 product (real data) from `QUIETBOWL_LOLA_DIR` or `../shared/data/lola-ldem4`
/// beside the checkout: `None` when its label is absent (the caller prints a SKIPPED line); a
/// failure, not a skip, when it is there and does not open.
pub fn lola_ldem4() -> Option<terrain::Dem> {
    let dir = std::env::var_os("QUIETBOWL_LOLA_DIR")
        .map(std::path::PathBuf::from)
        .unwrap_or_else(|| {
            std::path::PathBuf::from(concat!(
                env!("CARGO_MANIFEST_DIR"),
                "/../../../shared/data/lola-ldem4"
            ))
        });
    let label = dir.join("LDEM_4.LBL");
    if !label.exists() {
        return None;
    }
    match terrain::Dem::open(&label, &terrain::OpenOptions::default()) {
        Ok(d) => Some(d),
        Err(e) => panic!(
            "LDEM_4 is present in {} but did not open: {e}",
            dir.display()
        ),
    }
}
