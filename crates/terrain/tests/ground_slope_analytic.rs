//! Horn slope and aspect in ground units on a geographic (lon/lat) grid, against surfaces
//! whose slope on the sphere is known by construction, at 0, 45 and 70 degrees of latitude
//! (and 70 south).
//!
//! The surfaces are the sphere's tilted planes: heights rising `east_m_per_m` metres per
//! ground metre eastward and `north_m_per_m` northward, written with the sphere's metric: a
//! degree of longitude at latitude phi is (pi/180) R cos(phi) metres of ground and a degree of
//! latitude (pi/180) R (spherical geometry; Snyder 1987, USGS PP 1395, ch. 12, from memory).
//! So z = e R cos(phi) (lon - lon0) + n R (phi - phi0), angles in radians, has gradient
//! (e, n) everywhere along the centre meridian. Horn (1981, Proc. IEEE 69:14) weights the
//! three rows 1:2:1; on these surfaces that reads e (1 + cos(dphi)) / 2 and n exactly, within
//! 5e-6 of the truth at 0.25 deg pixels, so the checks below hold to 0.001 deg.
//!
//! A grid that took a degree of longitude as R (pi/180) metres at every latitude (no
//! cos(latitude)) would read the east-west slope of 0.1 as atan(0.1 cos(phi)): 4.04 deg at
//! 45 deg and 1.96 deg at 70 deg instead of 5.71, far outside 0.001 deg.

use std::sync::Arc;
use terrain::derivatives::{aspect_deg, slope_deg};
use terrain::{ElevationGrid, GridGeometry, MapProjection, MOON_RADIUS_M};

/// Pixel size of the grid, degrees (LDEM_4's).
const PIXEL_DEG: f64 = 0.25;
const N: usize = 5;
/// Longitude of the window's middle column centre (column 400).
const LON0_DEG: f64 = 100.125;

/// A 5 x 5 window of a global geographic grid whose middle pixel is centred on (LON0_DEG,
/// `lat0_deg`), heights from `z(lon_rad - lon0_rad, lat_rad, lat0_rad)`.
fn tilted(lat0_deg: f64, east_m_per_m: f64, north_m_per_m: f64) -> ElevationGrid {
    // Rows start half a pixel north of the pole so that row centres fall on whole
    // quarter degrees: the middle row is centred on the latitude asked for.
    let geometry = GridGeometry {
        width: (360.0 / PIXEL_DEG) as usize,
        height: (180.0 / PIXEL_DEG) as usize + 1,
        geotransform: [0.0, PIXEL_DEG, 0.0, 90.0 + 0.5 * PIXEL_DEG, 0.0, -PIXEL_DEG],
        projection: MapProjection::Geographic,
        body_radius_m: MOON_RADIUS_M,
    };
    // Column and row of the middle pixel in the whole grid.
    let mid_col = ((LON0_DEG - 0.5 * PIXEL_DEG) / PIXEL_DEG).round() as isize;
    let mid_row = ((90.0 - lat0_deg) / PIXEL_DEG).round() as isize;
    let half = (N / 2) as isize;
    let (col0, row0) = (mid_col - half, mid_row - half);
    let r = MOON_RADIUS_M;
    let mut heights_m = Vec::with_capacity(N * N);
    for row in 0..N as isize {
        for col in 0..N as isize {
            let lon = (col - half) as f64 * PIXEL_DEG;
            let lat = 90.0 - (row0 + row) as f64 * PIXEL_DEG;
            let z = east_m_per_m * r * lat.to_radians().cos() * lon.to_radians()
                + north_m_per_m * r * (lat - lat0_deg).to_radians();
            heights_m.push(z as f32);
        }
    }
    let g = ElevationGrid {
        geometry: Arc::new(geometry),
        col0,
        row0,
        width: N,
        height: N,
        heights_m,
    };
    // The middle pixel really is where the construction says.
    let (lon, lat) = g.lonlat(N / 2, N / 2).unwrap();
    assert!((lon - LON0_DEG).abs() < 1e-9 && (lat - lat0_deg).abs() < 1e-9);
    g
}

const LATITUDES_DEG: [f64; 4] = [0.0, 45.0, 70.0, -70.0];
const TOL_DEG: f64 = 1e-3;

fn middle(v: &[f32]) -> f64 {
    v[(N / 2) * N + N / 2] as f64
}

#[test]
fn east_west_tilt_has_its_ground_slope_at_every_latitude() {
    for lat in LATITUDES_DEG {
        for s in [0.1, 0.5] {
            let g = tilted(lat, s, 0.0);
            let want = f64::atan(s).to_degrees();
            let got = middle(&slope_deg(&g));
            assert!(
                (got - want).abs() < TOL_DEG,
                "lat {lat}, {s} m/m east: {got} deg, analytic {want} deg"
            );
            // Rising to the east: downhill faces west.
            let aspect = middle(&aspect_deg(&g));
            assert!(
                (aspect - 270.0).abs() < TOL_DEG,
                "lat {lat}: aspect {aspect}"
            );
        }
    }
}

#[test]
fn north_south_tilt_has_its_ground_slope_at_every_latitude() {
    for lat in LATITUDES_DEG {
        let g = tilted(lat, 0.0, 0.1);
        let want = f64::atan(0.1).to_degrees();
        let got = middle(&slope_deg(&g));
        assert!(
            (got - want).abs() < TOL_DEG,
            "lat {lat}: {got} deg, analytic {want} deg"
        );
        let aspect = middle(&aspect_deg(&g));
        assert!(
            (aspect - 180.0).abs() < TOL_DEG,
            "lat {lat}: aspect {aspect}"
        );
    }
}

#[test]
fn oblique_tilt_has_its_ground_slope_and_aspect_at_every_latitude() {
    // 0.2 m/m east and 0.1 m/m south: gradient magnitude sqrt(0.05), downhill towards
    // azimuth atan2(-0.2, 0.1) = 296.57 deg.
    let (e, n) = (0.2, -0.1);
    let want_slope = f64::hypot(e, n).atan().to_degrees();
    let want_aspect = f64::atan2(-e, -n).to_degrees().rem_euclid(360.0);
    for lat in LATITUDES_DEG {
        let g = tilted(lat, e, n);
        let slope = middle(&slope_deg(&g));
        let aspect = middle(&aspect_deg(&g));
        assert!(
            (slope - want_slope).abs() < TOL_DEG && (aspect - want_aspect).abs() < TOL_DEG,
            "lat {lat}: slope {slope} (analytic {want_slope}), aspect {aspect} (analytic {want_aspect})"
        );
    }
}
