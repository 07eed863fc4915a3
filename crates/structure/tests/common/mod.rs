//! Terrains built in code for the analytic tests and the benchmark: an equirectangular raster
//! centred on longitude 180 (as IAU_2015:30115), so every fit also crosses the 180 meridian.
#![allow(dead_code)]

use craters::CraterMeasurement;
use std::sync::Arc;
use terrain::{ElevationGrid, GridGeometry, LocalFrame, MapProjection, MOON_RADIUS_M};

pub const LAT_DEG: f64 = 16.0;

/// An `n` x `n` window of `pixel_m` posts whose centre is (180 E, LAT_DEG), heights from
/// `f(x, y)` with (x, y) metres east/north of that centre in the exact azimuthal equidistant
/// frame. Returns the grid and the centre's lon/lat.
pub fn grid(n: usize, pixel_m: f64, f: impl Fn(f64, f64) -> f64) -> (ElevationGrid, (f64, f64)) {
    let r = MOON_RADIUS_M;
    let y_c = r * LAT_DEG.to_radians();
    let geometry = GridGeometry {
        width: n,
        height: n,
        geotransform: [
            -(n as f64) / 2.0 * pixel_m,
            pixel_m,
            0.0,
            y_c + n as f64 / 2.0 * pixel_m,
            0.0,
            -pixel_m,
        ],
        projection: MapProjection::Equirectangular {
            lon0_deg: 180.0,
            lat_ts_deg: 0.0,
            false_easting_m: 0.0,
            false_northing_m: 0.0,
        },
        body_radius_m: r,
    };
    let centre = geometry
        .pixel_to_lonlat(n as f64 / 2.0, n as f64 / 2.0)
        .expect("centre");
    let frame = LocalFrame::new(r, centre.0, centre.1);
    let mut heights_m = vec![f32::NAN; n * n];
    for row in 0..n {
        for col in 0..n {
            let (lon, lat) = geometry
                .pixel_to_lonlat(col as f64 + 0.5, row as f64 + 0.5)
                .expect("inside projection");
            let (x, y) = frame.to_local(lon, lat);
            heights_m[row * n + col] = f(x, y) as f32;
        }
    }
    (
        ElevationGrid {
            geometry: Arc::new(geometry),
            col0: 0,
            row0: 0,
            width: n,
            height: n,
            heights_m,
        },
        centre,
    )
}

/// A crater measurement centred at `centre` whose rim crest is the circle of `radius_m`, traced
/// at 64 azimuths (as the crater measurement's default), with crest heights from `f` (the same function as the terrain).
pub fn measured(
    centre: (f64, f64),
    radius_m: f64,
    f: impl Fn(f64, f64) -> f64,
) -> CraterMeasurement {
    measured_at(64, centre, radius_m, f)
}

/// As [`measured`] with `n` crest azimuths; many azimuths make the crest polygon hug the circle
/// (at 360 it lies within R (1 - cos 0.5 deg), 2 cm for R = 600 m, inside it).
pub fn measured_at(
    n: usize,
    centre: (f64, f64),
    radius_m: f64,
    f: impl Fn(f64, f64) -> f64,
) -> CraterMeasurement {
    let az = |i: usize| (i as f64 * 360.0 / n as f64).to_radians();
    CraterMeasurement {
        centre_lon_deg: centre.0,
        centre_lat_deg: centre.1,
        diameter_m: 2.0 * radius_m,
        rim_completeness: 1.0,
        rim_crest_radius_m: vec![radius_m as f32; n],
        rim_crest_height_m: (0..n)
            .map(|i| f(radius_m * az(i).sin(), radius_m * az(i).cos()) as f32)
            .collect(),
        ..Default::default()
    }
}

/// Local (x, y) of a lon/lat in the frame of `centre`.
pub fn local(centre: (f64, f64), lon: f64, lat: f64) -> (f64, f64) {
    LocalFrame::new(MOON_RADIUS_M, centre.0, centre.1).to_local(lon, lat)
}

/// Width of the level rim top in the analytic craters: a crest that is flat for a few posts has
/// a height that bilinear interpolation reproduces exactly, unlike a knife edge.
pub const RIM_TOP_M: f64 = 30.0;

/// Where the analytic craters' crest is traced: the middle of the level rim top.
pub fn crest_radius(radius: f64) -> f64 {
    radius + RIM_TOP_M / 2.0
}

/// A bowl whose inside is the paraboloid `floor + r^2 / (4 focal)` out to `radius`, a level rim
/// top `RIM_TOP_M` wide, then an outer slope of 1 in 2.
pub fn paraboloid_crater(x: f64, y: f64, floor: f64, focal: f64, radius: f64) -> f64 {
    let r = x.hypot(y);
    let rim = floor + radius * radius / (4.0 * focal);
    if r <= radius {
        floor + r * r / (4.0 * focal)
    } else {
        rim - 0.5 * (r - radius - RIM_TOP_M).max(0.0)
    }
}

/// Level floor out to `wall_start`, a straight wall up to `rim` at `radius`, a level rim top
/// `RIM_TOP_M` wide, then an outer slope of 1 in 2.
pub fn flat_crater(x: f64, y: f64, floor: f64, wall_start: f64, radius: f64, rim: f64) -> f64 {
    let r = x.hypot(y);
    if r <= wall_start {
        floor
    } else if r <= radius {
        floor + (rim - floor) * (r - wall_start) / (radius - wall_start)
    } else {
        rim - 0.5 * (r - radius - RIM_TOP_M).max(0.0)
    }
}

/// Weight rising linearly from 0 at `r0` to 1 at `r1` (and 1 beyond): confines a rim tilt to
/// the rim so it does not touch the ground under the aperture.
pub fn ramp(x: f64, y: f64, r0: f64, r1: f64) -> f64 {
    ((x.hypot(y) - r0) / (r1 - r0)).clamp(0.0, 1.0)
}
