//! The committed `demo-terrain/` files are what the generator makes from the default spec, and
//! the scene they hold has the properties the demo promises.

use std::path::PathBuf;
use synthetic::{
    generate, heights_sha256, plant_craters, DegradationState, DemoSpec, PlantedAs, TruthDocument,
    RASTER_FILE, TRUTH_FILE,
};

fn demo_dir() -> PathBuf {
    PathBuf::from(concat!(env!("CARGO_MANIFEST_DIR"), "/../../demo-terrain"))
}

fn committed_truth() -> TruthDocument {
    let path = demo_dir().join(TRUTH_FILE);
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    serde_json::from_str(&text).expect("truth.json parses")
}

fn read_committed_heights() -> Vec<f32> {
    let ds = gdal::Dataset::open(demo_dir().join(RASTER_FILE)).expect("open committed raster");
    let band = ds.rasterband(1).expect("band 1");
    let (w, h) = band.size();
    band.read_as::<f32>((0, 0), (w, h), (w, h), None)
        .expect("read")
        .data()
        .to_vec()
}

#[test]
fn committed_truth_lists_exactly_the_craters_the_default_spec_plants() {
    let doc = committed_truth();
    assert_eq!(
        doc.spec,
        DemoSpec::default(),
        "truth.json was made from the default spec"
    );
    assert_eq!(
        doc.craters,
        plant_craters(&DemoSpec::default()).expect("plant")
    );
    assert_eq!(doc.crater_count, doc.craters.len());
}

#[test]
fn committed_raster_matches_the_checksum_in_committed_truth() {
    let doc = committed_truth();
    let heights = read_committed_heights();
    assert_eq!(heights.len(), doc.raster.width_px * doc.raster.height_px);
    assert_eq!(heights_sha256(&heights), doc.raster.heights_sha256);
}

/// The full check: regenerate the 2000 x 2000 scene and compare everything, byte for byte.
/// Runs in the plain debug `cargo test`, so `make test` covers it: the dev profile (opt-level 1,
/// dependencies at 2) regenerates in about 5-6 s on two shared cores, as fast as release
/// (4.8 s).
#[test]
fn committed_files_equal_full_regeneration_from_default_spec() {
    let terrain = generate(&DemoSpec::default()).expect("generate");
    let text = std::fs::read_to_string(demo_dir().join(TRUTH_FILE)).expect("read truth");
    assert_eq!(terrain.truth_json().expect("json"), text);
    assert_eq!(read_committed_heights(), terrain.heights_m);
}

#[test]
fn committed_scene_has_hosts_overlaps_breaches_boulders_and_plenty_of_craters() {
    let doc = committed_truth();
    let c = &doc.craters;
    let hosts: Vec<_> = c
        .iter()
        .filter(|x| x.planted_as == PlantedAs::Host)
        .collect();
    assert!((8..=15).contains(&hosts.len()), "{} hosts", hosts.len());
    for h in &hosts {
        assert!((800.0..=2000.0).contains(&h.diameter_m));
        assert_eq!(h.degradation, DegradationState::Fresh);
        assert_eq!(h.rim_completeness, 1.0);
        assert!(!h.boulder_floor && h.overprinted_by.is_empty());
        assert!(
            c.iter().all(|o| !o.overprinted_by.contains(&h.id)),
            "host {} cuts another rim",
            h.id
        );
    }
    // At least 8 posts (240 m) across: plentiful, but not a saturated surface.
    let resolvable = c.iter().filter(|x| x.diameter_m >= 240.0).count();
    assert!(
        (200..=1500).contains(&resolvable),
        "{resolvable} craters >= 240 m"
    );
    assert!(
        c.iter().filter(|x| !x.overprinted_by.is_empty()).count() >= 10,
        "overlapping craters"
    );
    assert!(
        c.iter().filter(|x| x.gap_azimuth_deg.is_some()).count() >= 3,
        "breached rims"
    );
    assert!(
        (1..=2).contains(&c.iter().filter(|x| x.boulder_floor).count()),
        "boulder floors"
    );
    assert!(c
        .iter()
        .any(|x| x.degradation == DegradationState::Degraded));
    // The patch straddles the 180 meridian: craters on both sides, longitudes in [-180, 180).
    assert!(c.iter().any(|x| x.lon_deg > 179.0) && c.iter().any(|x| x.lon_deg < -179.0));
    assert!(c.iter().all(|x| (-180.0..180.0).contains(&x.lon_deg)));
}

/// Cumulative size-frequency N(>D) ~ D^-2 (common practice, no source), fitted by least
/// squares in log-log over the background craters between 200 m and 2 km.
#[test]
fn committed_background_sfd_follows_cumulative_d_to_the_minus_2() {
    let doc = committed_truth();
    let mut d: Vec<f64> = doc
        .craters
        .iter()
        .filter(|x| x.planted_as == PlantedAs::Background)
        .map(|x| x.diameter_m)
        .collect();
    d.sort_by(|a, b| b.total_cmp(a));
    let pts: Vec<(f64, f64)> = d
        .iter()
        .enumerate()
        .filter(|(_, &di)| (200.0..=2000.0).contains(&di))
        .map(|(i, &di)| (di.ln(), ((i + 1) as f64).ln()))
        .collect();
    let n = pts.len() as f64;
    let (mx, my) = (
        pts.iter().map(|p| p.0).sum::<f64>() / n,
        pts.iter().map(|p| p.1).sum::<f64>() / n,
    );
    let slope = pts.iter().map(|p| (p.0 - mx) * (p.1 - my)).sum::<f64>()
        / pts.iter().map(|p| (p.0 - mx).powi(2)).sum::<f64>();
    assert!(
        (slope + 2.0).abs() < 0.15,
        "fitted cumulative slope {slope:.3}"
    );
}
