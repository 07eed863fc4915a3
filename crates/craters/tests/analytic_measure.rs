//! Measurement against analytic craters whose every number is known by construction.

mod common;
use common::*;
use craters::{measure, MeasureOptions};

const D: f64 = 1200.0; // 40 px at 30 m
const DEPTH: f64 = 0.2 * D; // fresh d/D about 0.2 (Pike 1977, from memory)
const RIM_H: f64 = 0.036 * D; // fresh rim height (Pike 1977, from memory)

fn bowl_grid(f: impl Fn(f64, f64) -> f64) -> terrain::ElevationGrid {
    grid_around(200, 200, 16.0, LON_C, LAT_C, f)
}

/// Start from a deliberately wrong centre (0.1 D off) and diameter (20% too large).
fn measure_from_offset_guess(g: &terrain::ElevationGrid) -> craters::CraterMeasurement {
    let (lon, lat) = lonlat(LON_C, LAT_C, 0.07 * D, -0.07 * D);
    measure(g, lon, lat, 1.2 * D, &MeasureOptions::default()).expect("measurable")
}

#[test]
fn paraboloid_bowl_diameter_and_depth_match_construction() {
    let g = bowl_grid(|x, y| rimmed_bowl(x.hypot(y), D / 2.0, DEPTH, RIM_H));
    let m = measure_from_offset_guess(&g);
    let off = dist((m.centre_lon_deg, m.centre_lat_deg), (LON_C, LAT_C));
    assert!(off < 0.01 * D, "centre off by {off} m");
    assert!(
        (m.diameter_m / D - 1.0).abs() < 0.01,
        "diameter {}",
        m.diameter_m
    );
    assert!(
        (m.depth_m / DEPTH - 1.0).abs() < 0.02,
        "depth {}",
        m.depth_m
    );
    assert!(
        (m.depth_to_diameter - 0.2).abs() < 0.004,
        "d/D {}",
        m.depth_to_diameter
    );
    assert!(
        m.rim_completeness > 0.99 && m.rim_gap_deg == 0.0,
        "completeness {} gap {}",
        m.rim_completeness,
        m.rim_gap_deg
    );
    assert!(m.ellipticity < 0.02, "ellipticity {}", m.ellipticity);
    assert!(m.floor_tilt_deg < 0.05, "tilt {}", m.floor_tilt_deg);
    assert!(
        m.rim_height_sd_m < 0.05 * RIM_H,
        "rim sd {}",
        m.rim_height_sd_m
    );
    // The rim stands RIM_H above a plain that still carries ejecta at 2-2.5 R: (R/r)^3 there.
    assert!(
        m.rim_relief_m > 0.8 * RIM_H && m.rim_relief_m < RIM_H,
        "relief {}",
        m.rim_relief_m
    );
    assert!(m.valid_fraction == 1.0 && !m.edge_cut);
    assert!(
        m.diameter_sd_m < 0.01 * D && m.depth_sd_m < 0.01 * DEPTH,
        "sd {} {}",
        m.diameter_sd_m,
        m.depth_sd_m
    );
    assert_eq!(m.rim_crest_radius_m.len(), 64);
}

#[test]
fn breach_of_90_degrees_gives_completeness_three_quarters_and_a_90_degree_gap() {
    // Rim cut away between azimuths 45 and 135 (centred east): there the ground ramps
    // monotonically from the floor to the plain at 2 R, so no crest exists.
    let f = |x: f64, y: f64| {
        let r = x.hypot(y);
        let z = rimmed_bowl(r, D / 2.0, DEPTH, RIM_H);
        let az = azimuth(x, y);
        if az > 45.0 && az < 135.0 {
            let floor = RIM_H - DEPTH;
            z.min(floor + (0.0 - floor) * (r / D).min(1.0))
        } else {
            z
        }
    };
    let m = measure_from_offset_guess(&bowl_grid(f));
    assert!(
        (m.rim_completeness - 0.75).abs() <= 0.035,
        "completeness {}",
        m.rim_completeness
    );
    assert!((m.rim_gap_deg - 90.0).abs() <= 6.0, "gap {}", m.rim_gap_deg);
    assert!(
        (m.rim_gap_azimuth_deg - 90.0).abs() <= 6.0,
        "gap azimuth {}",
        m.rim_gap_azimuth_deg
    );
    assert!(
        (m.diameter_m / D - 1.0).abs() < 0.02,
        "diameter {}",
        m.diameter_m
    );
}

#[test]
fn bowl_on_a_tilted_plane_reports_the_plane_tilt_and_azimuth() {
    // 3 deg plane falling towards azimuth 210: the floor fit separates plane and bowl exactly.
    let (tilt, az): (f64, f64) = (3.0, 210.0);
    let (gx, gy) = (
        -tilt.to_radians().tan() * az.to_radians().sin(),
        -tilt.to_radians().tan() * az.to_radians().cos(),
    );
    let g = bowl_grid(|x, y| rimmed_bowl(x.hypot(y), D / 2.0, DEPTH, RIM_H) + gx * x + gy * y);
    let m = measure_from_offset_guess(&g);
    assert!(
        (m.floor_tilt_deg - tilt).abs() < 0.02,
        "tilt {}",
        m.floor_tilt_deg
    );
    assert!(
        (m.floor_tilt_azimuth_deg - az).abs() < 0.5,
        "azimuth {}",
        m.floor_tilt_azimuth_deg
    );
    assert!(
        (m.depth_m / DEPTH - 1.0).abs() < 0.03,
        "depth {}",
        m.depth_m
    );
    assert!(
        (m.diameter_m / D - 1.0).abs() < 0.015,
        "diameter {}",
        m.diameter_m
    );
}

#[test]
fn flat_floor_on_a_plane_has_the_plane_slope_as_terrain_horn_slope_gives_it() {
    // Horn's slope of a plane is the plane's slope; terrain's Horn is checked against gdaldem.
    let tilt: f64 = 4.0;
    let g = bowl_grid(|x, y| {
        flat_floored(x.hypot(y), D / 2.0, 0.15 * D, RIM_H, 0.5) + tilt.to_radians().tan() * y
    });
    let m = measure_from_offset_guess(&g);
    let horn = terrain::derivatives::slope_deg(&g);
    let (c, r) = g.geometry.lonlat_to_pixel(LON_C, LAT_C).expect("pixel");
    let centre = horn[r as usize * g.width + c as usize] as f64;
    assert!((centre - tilt).abs() < 1e-3, "terrain Horn {centre}");
    assert!(
        (m.floor_slope_p95_deg - centre).abs() < 0.01,
        "floor p95 {} vs terrain {centre}",
        m.floor_slope_p95_deg
    );
    assert_eq!(m.obstacle_fraction, 0.0);
    let strict = MeasureOptions {
        obstacle_slope_deg: 3.0,
        ..MeasureOptions::default()
    };
    let m2 = measure(&g, LON_C, LAT_C, D, &strict).expect("measurable");
    assert_eq!(m2.obstacle_fraction, 1.0);
    assert!(
        m.wall_slope_mean_deg > tilt,
        "wall {}",
        m.wall_slope_mean_deg
    );
}

#[test]
fn floor_ripples_of_amplitude_a_give_rms_roughness_a_over_root_two() {
    // RMS of a sinusoid is its amplitude over sqrt(2); a 150 m wavelength is far shorter than
    // the floor, so the smooth bowl cannot absorb it.
    let a = 2.0;
    let g = bowl_grid(|x, y| {
        flat_floored(x.hypot(y), D / 2.0, 0.15 * D, RIM_H, 0.5)
            + a * (std::f64::consts::TAU * x / 150.0).sin()
    });
    let m = measure_from_offset_guess(&g);
    let want = a / 2f64.sqrt();
    assert!(
        (m.roughness_rms_m / want - 1.0).abs() < 0.1,
        "rms {} want {want}",
        m.roughness_rms_m
    );
    assert!(
        (m.roughness_baseline_m - PIXEL_M).abs() < 2.0,
        "baseline {}",
        m.roughness_baseline_m
    );
}

#[test]
fn elliptical_rim_gives_its_axes_and_orientation() {
    // Rim radius follows an ellipse with semi-axes 1.15 R and 0.87 R, major axis at azimuth 30.
    let (a, b, th) = (1.15 * D / 2.0, 0.87 * D / 2.0, 30.0_f64.to_radians());
    let f = |x: f64, y: f64| {
        let u = x * th.sin() + y * th.cos();
        let v = x * th.cos() - y * th.sin();
        let s = ((u / a).powi(2) + (v / b).powi(2)).sqrt(); // 1 on the rim
        rimmed_bowl(s, 1.0, DEPTH, RIM_H)
    };
    let m = measure_from_offset_guess(&bowl_grid(f));
    let want = 1.0 - 0.87 / 1.15;
    assert!(
        (m.ellipticity - want).abs() < 0.02,
        "ellipticity {} want {want}",
        m.ellipticity
    );
    assert!(
        (m.ellipse_major_m - 2.0 * a).abs() < 0.02 * D
            && (m.ellipse_minor_m - 2.0 * b).abs() < 0.02 * D
    );
    assert!(
        (m.ellipse_azimuth_deg - 30.0).abs() < 3.0,
        "azimuth {}",
        m.ellipse_azimuth_deg
    );
}

#[test]
fn measurement_is_deterministic_and_noise_gives_a_positive_bootstrap_spread() {
    // Deterministic pseudo-noise (a hash of the position), so the test itself is reproducible.
    let noise =
        |x: f64, y: f64| (((x * 12.9898 + y * 78.233).sin() * 43758.5453).fract() - 0.5) * 6.0;
    let g = bowl_grid(|x, y| rimmed_bowl(x.hypot(y), D / 2.0, DEPTH, RIM_H) + noise(x, y));
    let a = measure_from_offset_guess(&g);
    let b = measure_from_offset_guess(&g);
    // Bit for bit, through Debug (an azimuth without a crest holds NaN, which != itself).
    assert_eq!(format!("{a:?}"), format!("{b:?}"));
    assert!(a.diameter_sd_m > 0.0 && a.depth_sd_m > 0.0);
    assert!(
        (a.diameter_m / D - 1.0).abs() < 0.02,
        "diameter {}",
        a.diameter_m
    );
}
