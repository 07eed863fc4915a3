//! The operations' astronomy against published values, a worked example and a recorded
//! general-purpose reference library (pyerfa, tests/fixtures), and the bare-sphere cases whose
//! answers are known without the code.

use operations::relay::{earth_moon_mu, l2_gamma, RelayOrbit};
use operations::sky::{above_skyline, AboveSkyline, Site, SkyTracks, Track};
use operations::sun::{self, AU_KM};
use visibility::frames::{apply, dot, unit};
use visibility::Horizon;

const MOON_RADIUS_M: f64 = terrain::MOON_RADIUS_M;

#[test]
fn l2_distance_matches_the_published_cr3bp_value() {
    // gamma = 0.1678 Earth-Moon distances beyond the Moon for mu = 0.01215 (Szebehely 1967,
    // Theory of Orbits, from memory; domain notes sec. 8). The next digit moves with mu, so
    // 1e-4 is the published figure's own rounding.
    let g = l2_gamma(0.01215);
    assert!((g - 0.1678).abs() < 1e-4, "gamma {g}");
    // About 64,500 km for 384,400 km (domain notes sec. 8).
    let km = l2_gamma(earth_moon_mu()) * 384_400.0;
    assert!((km - 64_500.0).abs() < 100.0, "{km} km");
}

#[test]
fn sun_matches_meeus_example_25a() {
    // Meeus 1998, Astronomical Algorithms 2nd ed., example 25.a, 1992 October 13.0 TD (from
    // memory): true longitude 199.90988 deg, R = 0.99766 AU, apparent longitude 199.90895 deg,
    // apparent RA 198.38083 deg, Dec -7.78507 deg. Printed to 1e-5 deg and 1e-5 AU.
    let jd = 2_448_908.5;
    let s = sun::sun_position(jd);
    assert!(
        (s.lon_deg - 199.909_88).abs() < 2e-5,
        "true lon {}",
        s.lon_deg
    );
    assert!(
        (s.distance_au - 0.997_66).abs() < 1e-5,
        "R {}",
        s.distance_au
    );
    assert!(
        (s.apparent_lon_deg - 199.908_95).abs() < 2e-5,
        "apparent lon {}",
        s.apparent_lon_deg
    );
    let (ra, dec) = sun::sun_apparent_ra_dec_deg(jd);
    assert!((ra - 198.380_83).abs() < 2e-5, "ra {ra}");
    assert!((dec - -7.785_07).abs() < 2e-5, "dec {dec}");
}

#[test]
fn sun_matches_pyerfa_epv00_over_a_nodal_cycle() {
    // pyerfa 2.0.1.5 epv00 (VSOP2000-based, independent of Meeus), recorded by
    // tests/fixtures/record_sun_fixture.py: the geocentric Sun in the BCRS axes. Meeus gives
    // the low-accuracy method as good to 0.01 deg; the distance formula has no planetary
    // terms, so 2e-4 AU.
    let text = include_str!("fixtures/sun_erfa_reference.json");
    let v: serde_json::Value = serde_json::from_str(text).unwrap();
    let rows = v["sun_geocentric_bcrs"].as_array().unwrap();
    assert!(rows.len() > 30);
    for row in rows {
        let f = |k: &str| row[k].as_f64().unwrap();
        let jd = f("jd_tt");
        let ours = sun::sun_j2000_km(jd).map(|c| c / AU_KM);
        let theirs = [f("x_au"), f("y_au"), f("z_au")];
        let r = dot(&ours, &ours).sqrt();
        let angle = (dot(&ours, &theirs) / (r * f("distance_au")))
            .clamp(-1.0, 1.0)
            .acos()
            .to_degrees();
        assert!(angle < 0.01, "jd {jd}: {angle} deg apart");
        assert!((r - f("distance_au")).abs() < 2e-4, "jd {jd}: R {r}");
        let lon = sun::sun_position(jd).lon_deg;
        let d = (lon - f("ecliptic_lon_of_date_deg") + 180.0).rem_euclid(360.0) - 180.0;
        assert!(d.abs() < 0.01, "jd {jd}: longitude of date off by {d} deg");
    }
}

/// The Sun over the series' 13 months seen from the equator on the bare sphere: its upper
/// limb, and its centre alone.
fn sun_on_sphere_equator() -> (AboveSkyline, AboveSkyline) {
    let tracks = SkyTracks::compute(&RelayOrbit::circle(13_000.0, 14.0));
    let site = Site::new(180.0, 0.0, 0.0, MOON_RADIUS_M);
    let sphere = Horizon::compute(180.0, 0.0, None, 0.0, 250_000.0, 720);
    let centre = Track {
        radius_km: 0.0,
        ..tracks.sun.clone()
    };
    (
        above_skyline(&tracks.sun, &site, &sphere, 0.0),
        above_skyline(&centre, &site, &sphere, 0.0),
    )
}

#[test]
fn bare_sphere_equator_night_is_half_a_synodic_month() {
    // On a bare sphere at the equator the Sun is up half the time whatever its declination;
    // counting its upper limb (0.267 deg, domain notes sec. 8) adds 2 x 0.267 / 360 of the
    // time to the day. The longest night is about half a synodic month, 354.4 h (29.530589 d,
    // Meeus, from memory), longer near apogee.
    let (limb, centre) = sun_on_sphere_equator();
    let dark = 1.0 - limb.fraction;
    assert!((dark - 0.5).abs() < 0.005, "dark fraction {dark}");
    assert!(
        (limb.longest_gap_h - 354.4).abs() < 0.03 * 354.4,
        "longest night {} h",
        limb.longest_gap_h
    );
    // The limb's share on its own (the 13 lunations of the series are not exactly 13 mean
    // months, which moves both fractions alike by under 0.001): 2 x 0.267 / 360 = 0.00148.
    let limb_share = limb.fraction - centre.fraction;
    assert!(
        (limb_share - 2.0 * 0.267 / 360.0).abs() < 0.0002,
        "the limb adds {limb_share} of the time"
    );
}

/// The relay standing still at L2 with the Moon in its mean orientation: one sample, body
/// frame from the rotating frame by a half turn about z.
fn relay_fixed_at_l2(earth_moon_km: f64) -> Track {
    let g = l2_gamma(earth_moon_mu());
    Track {
        start_jd_tt: 0.0,
        step_days: 0.25,
        positions_km: vec![apply(
            &sun::rotating_to_mean_body(),
            &[g * earth_moon_km, 0.0, 0.0],
        )],
        radius_km: 0.0,
    }
}

#[test]
fn relay_at_l2_stands_at_the_zenith_of_180e_and_on_the_horizon_of_90e() {
    // Fixed at L2 (0.1678 x 384,400 km beyond the Moon, Szebehely 1967 from memory) with the
    // Moon's mean orientation the relay is at the zenith of 180 E 0 N, and from 90 E 0 N it
    // lies in the horizontal plane through the Moon's centre: the parallax asin(R_moon / d)
    // below the site's horizon.
    let track = relay_fixed_at_l2(384_400.0);
    let (el, _, _) = Site::new(180.0, 0.0, 0.0, MOON_RADIUS_M).look(&track.positions_km[0]);
    assert!((el - 90.0).abs() < 1e-6, "elevation {el}");
    let (el, az, _) = Site::new(90.0, 0.0, 0.0, MOON_RADIUS_M).look(&track.positions_km[0]);
    let parallax = (1737.4_f64 / (0.1678 * 384_400.0)).asin().to_degrees();
    assert!(
        (el + parallax).abs() < 0.002,
        "elevation {el}, parallax {parallax}"
    );
    // Towards 180 E along the equator: due east of 90 E.
    assert!((az - 90.0).abs() < 1e-6, "azimuth {az}");
    // The zenith direction of 180 E 0 N is the body's -x: the far side's centre.
    let u = unit(180.0, 0.0);
    let p = track.positions_km[0];
    assert!(dot(&u, &p) / dot(&p, &p).sqrt() > 1.0 - 1e-12);
}

#[test]
fn default_relay_is_in_view_from_the_far_side_centre_on_the_bare_sphere() {
    // The 13,000 km circle about L2 (11.4 deg seen from the Moon's centre) plus the libration
    // (under 8 deg each way) keeps the relay within about 20 deg of the zenith of 180 E 0 N.
    let tracks = SkyTracks::compute(&RelayOrbit::circle(13_000.0, 14.0));
    let site = Site::new(180.0, 0.0, 0.0, MOON_RADIUS_M);
    let sphere = Horizon::compute(180.0, 0.0, None, 0.0, 250_000.0, 720);
    let a = operations::sky::relay_above_skyline(&tracks, &site, &sphere, 5.0);
    assert_eq!(a.fraction, 1.0);
    assert!(
        a.worst_margin_deg > 60.0 && a.worst_margin_deg < 70.0,
        "{a:?}"
    );
    // The outline's bound is never above the series' own lowest value.
    let full = above_skyline(&tracks.relay, &site, &sphere, 5.0);
    assert!(
        a.worst_margin_deg <= full.worst_margin_deg + 1e-9,
        "{a:?} {full:?}"
    );
    assert!(
        full.worst_margin_deg - a.worst_margin_deg < 0.5,
        "{a:?} {full:?}"
    );
}
