//! The libration envelope, the terrain horizon and the Earth margin against textbook values,
//! the curvature-drop rule and the acceptance cases.

mod common;

use terrain::MOON_RADIUS_M;
use visibility::horizon::{sphere_dip_deg, Horizon, HorizonTerrain};
use visibility::{horizon_profile, site_visibility, LibrationEnvelope, VisibilityOptions};

#[test]
fn libration_envelope_extremes_match_textbook_values() {
    // Optical libration reaches about +-7.9 deg in longitude and +-6.8 deg in latitude; the
    // physical libration adds hundredths (textbook values, from memory; domain notes sec. 5).
    // The envelope holds total libration, so allow 0.3 deg.
    let env = LibrationEnvelope::standard();
    for (v, want) in [
        (env.lon_max_deg, 7.9),
        (-env.lon_min_deg, 7.9),
        (env.lat_max_deg, 6.8),
        (-env.lat_min_deg, 6.8),
    ] {
        assert!((v - want).abs() < 0.3, "extreme {v} vs {want}");
    }
    // Perigee and apogee: about 356,400 and 406,700 km (Meeus 1998 ch. 50, from memory).
    assert!(
        (env.distance_min_km - 356_400.0).abs() < 600.0,
        "{}",
        env.distance_min_km
    );
    assert!(
        (env.distance_max_km - 406_700.0).abs() < 600.0,
        "{}",
        env.distance_max_km
    );
    // The span must cover one regression of the nodes (18.6 years = 6793.5 days).
    assert!(env.samples.len() as f64 * env.step_days >= visibility::constants::NODAL_PERIOD_DAYS);
    assert!(env.contains(0.0, 0.0) && !env.contains(10.0, 0.0) && !env.contains(0.0, 8.0));
}

#[test]
fn far_side_site_is_hidden_and_near_side_site_is_not() {
    // Acceptance cases of the issue: positive at 180 E, 16 N; negative at 0, 0.
    let o = VisibilityOptions::default();
    let far = site_visibility(180.0, 16.0, None, &o);
    assert!(far.earth_clearance_deg > 0.0 && far.limb_margin_deg > 0.0 && far.far_side_band);
    // The margin is taken over the envelope's convex outline: never larger than over the
    // samples themselves, and close to it.
    let env = LibrationEnvelope::standard();
    let from_samples = env
        .samples
        .iter()
        .map(|s| {
            terrain::geodesy::central_angle_rad((180.0, 16.0), (s.lon_deg, s.lat_deg)).to_degrees()
                - 90.0
        })
        .fold(f64::INFINITY, f64::min);
    assert!(
        far.limb_margin_deg <= from_samples + 1e-9 && far.limb_margin_deg > from_samples - 0.1,
        "{} vs {from_samples}",
        far.limb_margin_deg
    );
    let near = site_visibility(0.0, 0.0, None, &o);
    assert!(
        near.earth_clearance_deg < -90.0 && !near.far_side_band,
        "{near:?}"
    );
}

#[test]
fn upper_limb_on_the_limb_includes_radius_and_parallax() {
    // A site exactly 90 deg from the sub-Earth point at perigee: the limb stands at
    // asin(R_earth/D) - asin(R_moon/D) ~ 1.026 - 0.279 = 0.746 deg (domain notes sec. 5:
    // radius about 0.95 deg at mean distance, parallax up to about 0.26-0.28 deg).
    let (centre, limb) = visibility::earth::earth_elevation_deg(90.0, 356_400.0, 0.0);
    assert!((centre - -(1737.4_f64 / 356_400.0).atan().to_degrees()).abs() < 1e-9);
    assert!((limb - 0.746).abs() < 0.002, "limb {limb}");
}

#[test]
fn horizon_of_a_distant_ridge_follows_the_curvature_drop() {
    // A broad ridge (3 km high, Gaussian of 8 km width) 100 km north of a site on the datum:
    // the skyline is max over d of atan((h(d) - d^2/(2R)) / d), the curvature drop of domain
    // notes sec. 4, to the order of (d/R)^2 and the ray's 1 % step.
    let ridge = |dist: f64| 3000.0 * (-((dist - 100_000.0) / 8000.0).powi(2) / 2.0).exp();
    let grid = common::geographic_grid(160.0, 0.0, 4.0, 0.02, |dist, az| {
        if !(30.0..=330.0).contains(&az) {
            ridge(dist)
        } else {
            0.0
        }
    });
    let t = HorizonTerrain::new(&grid).expect("grid has data");
    let hz = Horizon::compute(160.0, 0.0, Some(&t), 0.0, 250_000.0, 360);
    let want = (60_000..140_000)
        .step_by(10)
        .map(|d| {
            let d = d as f64;
            ((ridge(d) - d * d / (2.0 * MOON_RADIUS_M)) / d)
                .atan()
                .to_degrees()
        })
        .fold(f64::NEG_INFINITY, f64::max);
    assert!(want > 0.0);
    assert!(
        (hz.at(0.0) - want).abs() < 0.005,
        "{} vs {want}",
        hz.at(0.0)
    );
    // Elsewhere only the sphere: 0 deg for a site on the datum.
    assert!(hz.at(180.0).abs() < 1e-9);
}

#[test]
fn missing_data_falls_back_to_the_sphere() {
    let mut grid =
        common::geographic_grid(160.0, 0.0, 1.0, 0.02, common::bowl(3000.0, 20_000.0, 500.0));
    grid.heights_m.iter_mut().for_each(|h| *h = f32::NAN);
    let p = horizon_profile(160.0, 0.0, Some(&grid), 100_000.0, 36);
    assert_eq!(p.len(), 36);
    assert!(p.iter().all(|&(_, e)| e == 0.0));
    // A raised site sees the sphere's dip -acos(R/(R+h)): 1 km gives -1.9 deg.
    assert!(
        (sphere_dip_deg(MOON_RADIUS_M, 1000.0)
            - -(MOON_RADIUS_M / (MOON_RADIUS_M + 1000.0))
                .acos()
                .to_degrees())
        .abs()
            < 1e-12
    );
}

#[test]
fn crater_floor_gains_clearance_from_its_walls_at_the_limb() {
    // Acceptance case of the issue, on an invented deep bowl (4 km deep, 30 km radius) at
    // 95 E on the equator, where the Earth's limb rises a few degrees above the bare sphere's
    // horizon at the extremes of libration.
    let (lon, lat) = (95.0, 0.0);
    let grid = common::geographic_grid(lon, lat, 2.0, 0.01, common::bowl(4000.0, 30_000.0, 800.0));
    let o = VisibilityOptions::default();
    let v = site_visibility(lon, lat, Some(&grid), &o);
    assert!(
        v.horizon_from_terrain && (v.site_height_m - -4000.0).abs() < 5.0,
        "{v:?}"
    );
    assert!(
        v.earth_clearance_sphere_deg < 0.0,
        "bare sphere should see the Earth: {v:?}"
    );
    // The walls stand about atan((4800 - drop) / 30 km) ~ 9 deg high: clearance gains ~9 deg.
    assert!(
        v.earth_clearance_deg > v.earth_clearance_sphere_deg + 7.0,
        "{v:?}"
    );
    assert!(v.earth_clearance_deg > 0.0, "{v:?}");
    // Marching only the rays the Earth can stand behind gives the same margin as all rays.
    let t = HorizonTerrain::new(&grid).expect("grid has data");
    let full = Horizon::compute(
        lon,
        lat,
        Some(&t),
        0.0,
        o.horizon_max_distance_m,
        o.horizon_azimuths,
    );
    let m = visibility::earth_margin(LibrationEnvelope::standard(), lon, lat, &full);
    assert_eq!(m.clearance_deg, v.earth_clearance_deg);
}
