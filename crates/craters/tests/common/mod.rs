//! Grids built in code for the analytic tests: an equirectangular raster centred on longitude
//! 180 (as IAU_2015:30115) at 30 m/px, so every test also crosses the 180 meridian.
#![allow(dead_code)]

use std::sync::Arc;
use terrain::{ElevationGrid, GridGeometry, LocalFrame, MapProjection, MOON_RADIUS_M};

pub const PIXEL_M: f64 = 30.0;
/// Where the analytic craters are centred: between pixel centres, just east of the 180 meridian.
pub const LON_C: f64 = -179.99;
pub const LAT_C: f64 = 16.003;

/// A `w` x `h` window whose centre pixel sits at (180 E, `lat_deg`), heights from `f(x, y)`
/// where (x, y) are metres east/north of (`lon_c`, `lat_c`) in the exact azimuthal
/// equidistant frame.
pub fn grid_around(
    w: usize,
    h: usize,
    lat_deg: f64,
    lon_c: f64,
    lat_c: f64,
    f: impl Fn(f64, f64) -> f64,
) -> ElevationGrid {
    let r = MOON_RADIUS_M;
    let y_c = r * lat_deg.to_radians();
    let geometry = GridGeometry {
        width: w,
        height: h,
        geotransform: [
            -(w as f64) / 2.0 * PIXEL_M,
            PIXEL_M,
            0.0,
            y_c + h as f64 / 2.0 * PIXEL_M,
            0.0,
            -PIXEL_M,
        ],
        projection: MapProjection::Equirectangular {
            lon0_deg: 180.0,
            lat_ts_deg: 0.0,
            false_easting_m: 0.0,
            false_northing_m: 0.0,
        },
        body_radius_m: r,
    };
    let frame = LocalFrame::new(r, lon_c, lat_c);
    let mut heights_m = vec![f32::NAN; w * h];
    for row in 0..h {
        for col in 0..w {
            let (lon, lat) = geometry
                .pixel_to_lonlat(col as f64 + 0.5, row as f64 + 0.5)
                .expect("inside projection");
            let (x, y) = frame.to_local(lon, lat);
            heights_m[row * w + col] = f(x, y) as f32;
        }
    }
    ElevationGrid {
        geometry: Arc::new(geometry),
        col0: 0,
        row0: 0,
        width: w,
        height: h,
        heights_m,
    }
}

/// Rimmed paraboloid: floor at h - d, rim crest h at r = R, ejecta h (R/r)^3 outside
/// (McGetchin, Settle and Head 1973, Earth Planet. Sci. Lett. 20:226).
pub fn rimmed_bowl(r: f64, radius: f64, depth: f64, rim_h: f64) -> f64 {
    if r <= radius {
        rim_h - depth + depth * (r / radius).powi(2)
    } else {
        rim_h * (radius / r).powi(3)
    }
}

/// Flat-floored bowl: flat floor out to `floor_frac` R, then a paraboloid wall up to the rim.
pub fn flat_floored(r: f64, radius: f64, depth: f64, rim_h: f64, floor_frac: f64) -> f64 {
    if r <= floor_frac * radius {
        rim_h - depth
    } else if r <= radius {
        let t = (r - floor_frac * radius) / ((1.0 - floor_frac) * radius);
        rim_h - depth + depth * t * t
    } else {
        rim_h * (radius / r).powi(3)
    }
}

/// Azimuth (degrees clockwise from north) of local (x, y).
pub fn azimuth(x: f64, y: f64) -> f64 {
    x.atan2(y).to_degrees().rem_euclid(360.0)
}

/// Lon/lat of local (x, y) around (lon_c, lat_c).
pub fn lonlat(lon_c: f64, lat_c: f64, x: f64, y: f64) -> (f64, f64) {
    LocalFrame::new(MOON_RADIUS_M, lon_c, lat_c).to_lonlat(x, y)
}

/// Great-circle distance in metres.
pub fn dist(a: (f64, f64), b: (f64, f64)) -> f64 {
    terrain::geodesy::distance_m(MOON_RADIUS_M, a, b)
}
