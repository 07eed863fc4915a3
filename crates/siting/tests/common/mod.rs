//! Small surveys built in code for unit tests of the ranking logic (invented candidates:
//! these check our arithmetic, not measurements).
#![allow(dead_code)]

pub mod export;

use craters::CraterMeasurement;
use survey::{Candidate, SurveyFile};
use visibility::SiteVisibility;

/// Built through serde so that optional fields the survey model gains later keep their
/// defaults here.
pub fn survey(candidates: Vec<Candidate>) -> SurveyFile {
    let mut s: SurveyFile = serde_json::from_value(serde_json::json!({
        "schema_version": survey::SCHEMA_VERSION,
        "tool_version": "quietbowl test",
        "input": {
            "path": "/data/test-dem.tif",
            "size_bytes": 1234,
            "sha256": "ab".repeat(32),
            "crs_wkt": "",
            "crs_authority": "IAU_2015:30100",
            "body_radius_m": 1_737_400.0
        },
        "parameters": {"diameter_min_m": 500.0, "diameter_max_m": 3000.0, "tile_px": 1024, "catalogue": null, "detect": true},
        "candidates": []
    }))
    .expect("test survey header");
    s.candidates = candidates;
    s
}

/// A candidate with every metric the default criteria use set to a pleasant value.
pub fn good(id: u32, lon: f64, lat: f64) -> Candidate {
    // Through serde, so fields the model gains later (all optional) keep their defaults.
    let mut c: Candidate = serde_json::from_value(
        serde_json::json!({"id": id, "source": "detected", "crater": CraterMeasurement::default()}),
    )
    .expect("test candidate");
    c.crater = CraterMeasurement {
        centre_lon_deg: lon,
        centre_lat_deg: lat,
        diameter_m: 1200.0,
        ellipse_major_m: 1200.0,
        ellipse_minor_m: 1200.0,
        depth_m: 240.0,
        depth_to_diameter: 0.2,
        rim_completeness: 0.95,
        rim_gap_deg: 15.0,
        floor_tilt_deg: 0.0,
        roughness_rms_m: 0.5,
        obstacle_fraction: 0.0,
        valid_fraction: 1.0,
        ..CraterMeasurement::default()
    };
    c.visibility = Some(SiteVisibility {
        earth_clearance_deg: 5.0,
        limb_margin_deg: 40.0,
        far_side_band: true,
        gc_separation_deg: 45.0,
        ..SiteVisibility::default()
    });
    c
}

pub fn with_crater(mut c: Candidate, f: impl FnOnce(&mut CraterMeasurement)) -> Candidate {
    f(&mut c.crater);
    c
}

pub fn with_vis(mut c: Candidate, f: impl FnOnce(&mut SiteVisibility)) -> Candidate {
    if let Some(v) = c.visibility.as_mut() {
        f(v);
    }
    c
}

/// Criteria text with the given requirement and criterion blocks.
pub fn criteria_text(blocks: &str) -> String {
    format!("format = \"quietbowl-criteria\"\nversion = 1\ntitle = \"test\"\n{blocks}")
}

pub fn criteria(blocks: &str) -> siting::Criteria {
    siting::Criteria::parse(&criteria_text(blocks)).expect("test criteria parse")
}

/// A deterministic pseudo-random survey of n candidates for property and speed tests
/// (SplitMix64, Steele, Lea and Flood 2014, so no RNG crate is needed here).
pub fn random_survey(n: usize, seed: u64) -> SurveyFile {
    let mut s = seed;
    let mut next = move || {
        s = s.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = s;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        ((z ^ (z >> 31)) >> 11) as f64 / (1u64 << 53) as f64
    };
    let cands = (0..n)
        .map(|i| {
            let mut c = good(i as u32, 135.0 + 90.0 * next(), -60.0 + 120.0 * next());
            c.crater.diameter_m = 600.0 + 1800.0 * next();
            c.crater.depth_to_diameter = 0.1 + 0.25 * next();
            c.crater.rim_completeness = 0.4 + 0.6 * next();
            c.crater.rim_gap_deg = 120.0 * next();
            c.crater.floor_tilt_deg = 12.0 * next();
            c.crater.roughness_rms_m = 6.0 * next();
            c.crater.obstacle_fraction = 0.3 * next();
            c.crater.valid_fraction = 0.85 + 0.15 * next();
            if let Some(v) = c.visibility.as_mut() {
                v.earth_clearance_deg = -2.0 + 9.0 * next();
                v.gc_separation_deg = 60.0 * next();
                v.far_side_band = next() > 0.1;
            }
            c
        })
        .collect();
    survey(cands)
}
