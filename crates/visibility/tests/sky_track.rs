//! The zenith beam's sky against the domain notes' check values (sec. 6) and against a
//! brute-force sampling of the full IAU rotation model.

use visibility::sky::{
    beam_track_galactic, beam_widths_deg, gc_lunar_dec_deg, track_gc_separation_deg,
    TRACK_PERIOD_DAYS,
};
use visibility::{site_visibility, PoleCycle, VisibilityOptions};

#[test]
fn galactic_centre_lunar_declination_swings_as_in_domain_notes() {
    // Domain notes sec. 6: between about -7.1 and -4.0 deg over the 18.6-year cycle (computed
    // there from the IAU pole series).
    let c = PoleCycle::standard();
    assert!(
        (c.gc_dec_min_deg - -7.1).abs() < 0.1,
        "{}",
        c.gc_dec_min_deg
    );
    assert!(
        (c.gc_dec_max_deg - -4.0).abs() < 0.1,
        "{}",
        c.gc_dec_max_deg
    );
}

#[test]
fn closest_approach_at_20n_matches_domain_notes_check_value() {
    // Domain notes sec. 6: at selenographic latitude 20 N the closest approach is about
    // 24-27 deg depending on the epoch.
    let c = PoleCycle::standard();
    let v = site_visibility(180.0, 20.0, None, &VisibilityOptions::default());
    assert!(
        (v.gc_separation_deg - 24.0).abs() < 0.15,
        "{}",
        v.gc_separation_deg
    );
    assert!((c.gc_separation_worst_month_deg(20.0) - 27.0).abs() < 0.15);
    // Over one sidereal month the full-model track comes within |phi - dec_GC| of the centre,
    // whatever the site's longitude (domain notes sec. 6), sampled every 0.5 deg of rotation.
    for (lon, jd) in [
        (180.0, 2_460_676.5),
        (150.0, 2_463_000.5),
        (-170.0, 2_465_500.5),
    ] {
        let track = beam_track_galactic(lon, 20.0, jd, TRACK_PERIOD_DAYS, 720);
        let sep = track_gc_separation_deg(&track);
        let dec_mid = gc_lunar_dec_deg(jd + TRACK_PERIOD_DAYS / 2.0);
        assert!(
            (sep - (20.0 - dec_mid)).abs() < 0.1,
            "lon {lon} jd {jd}: {sep} vs {}",
            20.0 - dec_mid
        );
        assert!((23.8..=27.2).contains(&sep));
    }
}

#[test]
fn plane_fraction_closed_form_matches_sampled_full_model_track() {
    // The closed form (uniform rotation of the zenith about the pole, per pole sample) against
    // counting samples of the full IAU model track over 40 months spread over the cycle.
    let c = PoleCycle::standard();
    for lat in [-60.0, -20.0, 0.0, 35.0] {
        let mut inside = 0usize;
        let mut total = 0usize;
        for k in 0..40 {
            let jd = 2_460_676.5 + k as f64 * 170.0;
            for (_, b) in beam_track_galactic(170.0, lat, jd, TRACK_PERIOD_DAYS, 360) {
                inside += (b.abs() < 10.0) as usize;
                total += 1;
            }
        }
        let sampled = inside as f64 / total as f64;
        let closed = c.plane_fraction(lat, 10.0);
        assert!(
            (sampled - closed).abs() < 0.01,
            "lat {lat}: sampled {sampled} vs closed {closed}"
        );
    }
}

#[test]
fn plane_fraction_on_the_lunar_equator_matches_spherical_geometry() {
    // The lunar equator lies within 1.5 deg of the ecliptic, which is inclined about 60.2 deg to
    // the galactic plane (from memory). A great circle inclined i to the plane spends
    // (2/pi) asin(sin(band)/sin(i)) of its length within +-band of it (spherical trigonometry).
    let want =
        2.0 / std::f64::consts::PI * (10f64.to_radians().sin() / 60.2f64.to_radians().sin()).asin();
    let got = PoleCycle::standard().plane_fraction(0.0, 10.0);
    assert!((got - want).abs() < 0.003, "{got} vs {want}");
    // The ecliptic pole stands about 30 deg from the plane: a polar beam never enters the band.
    assert_eq!(PoleCycle::standard().plane_fraction(90.0, 10.0), 0.0);
}

#[test]
fn beam_widths_match_airy_formulas() {
    // Domain notes sec. 6: half-power 1.02 lambda/D (uniform illumination), first null
    // 1.22 lambda/D (Airy). 10 MHz (lambda = 29.979 m) on a 1 km aperture.
    let (hpbw, null) = beam_widths_deg(1000.0, 10.0e6);
    assert!((hpbw - (1.02 * 29.979_245_8 / 1000.0_f64).to_degrees()).abs() < 1e-9);
    assert!((null - 2.0957).abs() < 1e-3, "{null}");
    let v = site_visibility(180.0, 20.0, None, &VisibilityOptions::default());
    assert!((v.gc_separation_hpbw - v.gc_separation_deg / hpbw).abs() < 1e-12);
}
