//! The library interfaces: report rendering, JSON, bulk evaluation and bad input.

mod common;

use visibility::diffraction::creeping_wave_attenuation_db;
use visibility::{
    bulk, site_report, site_visibility, try_site_visibility, VisibilityError, VisibilityOptions,
};

#[test]
fn bulk_matches_one_at_a_time_and_keeps_order() {
    let grid = common::geographic_grid(95.0, 0.0, 2.0, 0.02, common::bowl(4000.0, 30_000.0, 800.0));
    let o = VisibilityOptions::default();
    let sites = [(95.0, 0.0), (180.0, 16.0), (0.0, 0.0), (95.3, 0.2)];
    let many = bulk(&sites, Some(&grid), &o);
    assert_eq!(many.len(), sites.len());
    for (s, v) in sites.iter().zip(&many) {
        assert_eq!(*v, site_visibility(s.0, s.1, Some(&grid), &o));
    }
}

#[test]
fn report_renders_text_and_json_with_every_section() {
    let grid = common::geographic_grid(95.0, 0.0, 2.0, 0.02, common::bowl(4000.0, 30_000.0, 800.0));
    let r = site_report(95.0, 0.0, Some(&grid), &VisibilityOptions::default()).expect("valid site");
    assert_eq!(r.horizon_table.len(), 36);
    assert!(
        r.horizon_table.iter().all(|row| row.elevation_deg > 5.0),
        "walls all round"
    );
    let text = r.to_text();
    for needle in [
        "azimuth",
        "clearance",
        "galactic centre",
        "half-power",
        "Screening estimate",
    ] {
        assert!(text.contains(needle), "missing {needle} in\n{text}");
    }
    let json = serde_json::to_string(&r).expect("serialises");
    assert!(
        json.contains("\"horizon_table\"")
            && json.contains("\"earth\"")
            && json.contains("\"sky\"")
    );
    // Same input, same bytes.
    let again =
        site_report(95.0, 0.0, Some(&grid), &VisibilityOptions::default()).expect("valid site");
    assert_eq!(json, serde_json::to_string(&again).expect("serialises"));
}

#[test]
fn bad_input_is_an_error_not_a_panic() {
    let o = VisibilityOptions::default();
    assert!(matches!(
        try_site_visibility(0.0, 91.0, None, &o),
        Err(VisibilityError::InvalidSite { .. })
    ));
    assert!(matches!(
        try_site_visibility(f64::NAN, 0.0, None, &o),
        Err(VisibilityError::InvalidSite { .. })
    ));
    let bad = VisibilityOptions {
        frequency_hz: 0.0,
        ..o.clone()
    };
    assert!(matches!(
        site_report(0.0, 0.0, None, &bad),
        Err(VisibilityError::InvalidOption { .. })
    ));
    assert!(site_visibility(0.0, 95.0, None, &o)
        .earth_clearance_deg
        .is_nan());
    assert!(bulk(&[(0.0, 0.0)], None, &bad)[0]
        .gc_separation_deg
        .is_nan());
}

#[test]
fn site_visibility_round_trips_through_json() {
    let v = site_visibility(180.0, 16.0, None, &VisibilityOptions::default());
    let back: visibility::SiteVisibility =
        serde_json::from_str(&serde_json::to_string(&v).expect("ser")).expect("de");
    // serde_json parses floats to within an ulp or so without its float_roundtrip feature.
    let close = |a: f64, b: f64| (a - b).abs() <= 1e-12 * a.abs().max(1.0);
    assert!(
        close(v.earth_clearance_deg, back.earth_clearance_deg)
            && close(v.plane_fraction, back.plane_fraction)
    );
    assert!(
        close(v.gc_separation_deg, back.gc_separation_deg) && v.far_side_band == back.far_side_band
    );
}

#[test]
fn creeping_wave_attenuation_scales_as_fock_theory() {
    // Fock/Keller: the decay rate goes as (k a)^(1/3), linear in the angle into the shadow,
    // and the soft boundary decays faster than the hard by the ratio of the Airy zeros
    // 2.338 / 1.019 (Abramowitz & Stegun table 10.13).
    let (h1, s1) = creeping_wave_attenuation_db(1.0, 1.0e6);
    let (h8, _) = creeping_wave_attenuation_db(1.0, 8.0e6);
    let (h2, _) = creeping_wave_attenuation_db(2.0, 1.0e6);
    assert!((h8 / h1 - 2.0).abs() < 1e-9 && (h2 / h1 - 2.0).abs() < 1e-9);
    assert!((s1 / h1 - 2.338_107 / 1.018_793).abs() < 1e-9);
    assert_eq!(creeping_wave_attenuation_db(-1.0, 1.0e6), (0.0, 0.0));
}
