//! The libration envelope, the terrain horizon and the Earth margin against textbook values,
//! the curvature-drop rule and the acceptance cases.

mod common;

use terrain::MOON_RADIUS_M;
use visibility::horizon::{sphere_dip_deg, Horizon, HorizonTerrain, NodataRule};
use visibility::{horizon_profile, site_visibility, LibrationEnvelope, VisibilityOptions};

#[test]
fn libration_envelope_spans_a_nodal_cycle() {
    // Its extremes are checked against JPL DE421 in lunar_frame_lunarsky.rs. The span must
    // cover one regression of the nodes (18.6 years = 6793.5 days).
    let env = LibrationEnvelope::standard();
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
    // samples themselves, and here equal to it (the nearest point is a hull vertex).
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
        far.limb_margin_deg <= from_samples + 1e-9 && far.limb_margin_deg > from_samples - 1e-3,
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
    let elevation = |d: f64, h: f64| {
        ((h - d * d / (2.0 * MOON_RADIUS_M)) / d)
            .atan()
            .to_degrees()
    };
    let want = (60_000..140_000)
        .step_by(10)
        .map(|d| elevation(d as f64, ridge(d as f64)))
        .fold(f64::NEG_INFINITY, f64::max);
    // The sector bound reads the raw posts round each sample, up to one pixel diagonal
    // (0.02 deg = 606 m, so 857 m) nearer or farther: it lies between the skyline of the ridge
    // lowered to its minimum over +-857 m and the true skyline.
    let blur_m = 857.0;
    let want_low = (60_000..140_000)
        .step_by(10)
        .map(|d| {
            let d = d as f64;
            let low = (-10..=10)
                .map(|k| ridge(d + blur_m * k as f64 / 10.0))
                .fold(f64::INFINITY, f64::min);
            elevation(d, low)
        })
        .fold(f64::NEG_INFINITY, f64::max);
    assert!(
        want_low > 0.0 && want - want_low < 0.05,
        "{want_low} {want}"
    );
    let got = hz.at(0.0);
    assert!(
        want_low - 1e-3 <= got && got <= want + 1e-3,
        "{got} vs {want_low}..{want}"
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
    // Marching only the sectors the Earth's disc can reach gives the same margin as all.
    let t = HorizonTerrain::new(&grid).expect("grid has data");
    let full = Horizon::compute_sectors(
        lon,
        lat,
        Some(&t),
        &o.horizon_spec(o.horizon_azimuths),
        None,
    );
    let m = visibility::earth_margin(LibrationEnvelope::standard(), lon, lat, &full);
    assert_eq!(m.clearance_deg, v.earth_clearance_deg);
}

/// The 95 E bowl of the test above with a trench `width_m` wide along azimuth `az` from
/// `d0_m` out past the grid's edge (1.2 deg, 36 km), where the ground is set to `cut`.
fn cut_bowl(az: f64, width_m: f64, d0_m: f64, cut: f64) -> terrain::ElevationGrid {
    let bowl = common::bowl(4000.0, 30_000.0, 800.0);
    common::geographic_grid(95.0, 0.0, 1.2, 0.002, move |d, a| {
        let off = (a - az).to_radians();
        if d >= d0_m && off.cos() > 0.0 && (d * off.sin()).abs() <= width_m / 2.0 {
            cut
        } else {
            bowl(d, a)
        }
    })
}

/// Earth clearance at the 95 E bowl's centre and the azimuth of its worst case, with the
/// default options or another nodata rule.
fn clearance(grid: &terrain::ElevationGrid, nodata: Option<NodataRule>) -> (f64, f64) {
    let mut o = VisibilityOptions::default();
    if let Some(rule) = nodata {
        o.horizon_nodata = rule;
    }
    let env = LibrationEnvelope::standard();
    let t = HorizonTerrain::new(grid).expect("grid has data");
    let wanted = visibility::earth::sectors_needed(env, 95.0, 0.0, o.horizon_azimuths);
    let spec = o.horizon_spec(o.horizon_azimuths);
    let h = Horizon::compute_sectors(95.0, 0.0, Some(&t), &spec, Some(&wanted));
    let m = visibility::earth_margin(env, 95.0, 0.0, &h);
    assert_eq!(
        site_visibility(95.0, 0.0, Some(grid), &o).earth_clearance_deg,
        m.clearance_deg
    );
    (m.clearance_deg, m.worst_azimuth_deg)
}

/// The boundary between two default sectors (0.5 deg) nearest an azimuth: a feature centred
/// there falls between the sector centres, where one ray per sector would not look.
fn sector_boundary_near(az: f64) -> f64 {
    let w = 360.0 / VisibilityOptions::default().horizon_azimuths as f64;
    ((az / w - 0.5).round() + 0.5) * w
}

#[test]
fn narrow_notch_in_the_rim_reduces_the_earth_clearance() {
    // Analytic case: a trench 120 m wide (0.23 deg at the 30 km rim: narrower than one 0.5 deg
    // sector and than the 2 deg between rays before), cut to the floor (-4000 m) from 20 km out
    // past the grid's edge, on the sector boundary nearest the azimuth where the Earth stands
    // worst. Through it the floor sees only the inner wall where the cut begins (-1867 m at
    // 20 km: atan((2133 - 20^2/(2R) km) / 20 km) = 5.8 deg) against
    // atan((4800 - 30^2/(2R)) / 30 km) = 8.6 deg over the intact rim (curvature drop, domain
    // notes sec. 4): the clearance must fall by 2.8 deg, so by over 2.5.
    let intact = cut_bowl(0.0, 0.0, f64::INFINITY, 0.0);
    let (c_intact, az) = clearance(&intact, None);
    assert!(c_intact > 0.0, "{c_intact}");
    let notched = cut_bowl(sector_boundary_near(az), 120.0, 20_000.0, -4000.0);
    let (c_notch, _) = clearance(&notched, None);
    assert!(
        c_notch < c_intact - 2.5,
        "notch {c_notch} vs intact {c_intact}"
    );
    // A notch the Earth's disc never spans leaves the clearance as it was.
    let far = cut_bowl(az + 90.0, 120.0, 20_000.0, -4000.0);
    assert_eq!(clearance(&far, None).0, c_intact);
}

#[test]
fn nodata_hole_in_the_rim_counts_against_the_site_by_default() {
    // The same trench, but missing (NaN) instead of cut. By default the hole shields nothing:
    // the clearance falls as for the notch (the inner wall at 20 km stands 5.8 deg, the rim
    // 8.6). Told to skip missing heights, the lowest valid height on each arc stands for the
    // arc: the rim beside the hole, so the clearance is the intact one to within the bound's
    // pixel-scale blur.
    let intact = cut_bowl(0.0, 0.0, f64::INFINITY, 0.0);
    let (c_intact, az) = clearance(&intact, None);
    let holed = cut_bowl(sector_boundary_near(az), 120.0, 20_000.0, f64::NAN);
    let (c_default, _) = clearance(&holed, None);
    assert!(
        c_default < c_intact - 2.5,
        "hole {c_default} vs intact {c_intact}"
    );
    let (c_skip, _) = clearance(&holed, Some(NodataRule::Skip));
    assert!(
        (c_skip - c_intact).abs() < 0.05,
        "skip {c_skip} vs intact {c_intact}"
    );
}

#[test]
fn earth_disc_is_tested_over_every_azimuth_it_spans() {
    // A skyline of 20 deg all round but for one sector at -10 deg that lies wholly beyond the
    // farthest azimuth the Earth's centre reaches, yet within its 0.95-1.03 deg radius of it
    // (azimuths from terrain::geodesy, outline from the envelope). The disc's edge enters the
    // low sector, so the clearance must drop from about 20 - 3.9 deg to below zero; read at
    // the centre's azimuth only, it would not move.
    let (lon, lat) = (95.0, 0.0);
    let env = LibrationEnvelope::standard();
    let az_max = env
        .outline
        .iter()
        .map(|&p| terrain::geodesy::azimuth_deg((lon, lat), p))
        .fold(f64::NEG_INFINITY, f64::max);
    let n = 720;
    let w = 360.0 / n as f64;
    let k = (az_max / w + 0.5).floor() as usize + 1;
    let sector_from = (k as f64 - 0.5) * w;
    assert!(sector_from > az_max && sector_from < az_max + 0.5);
    let mut h = Horizon {
        elevation_deg: vec![20.0; n],
        site_height_m: 0.0,
        sphere_horizon_deg: 0.0,
        max_distance_m: 250_000.0,
        from_terrain: true,
    };
    let intact = visibility::earth_margin(env, lon, lat, &h).clearance_deg;
    h.elevation_deg[k % n] = -10.0;
    let notched = visibility::earth_margin(env, lon, lat, &h).clearance_deg;
    assert!(intact > 15.0 && notched < 0.0, "{intact} -> {notched}");
}
