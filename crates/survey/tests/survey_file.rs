//! The survey run on the demo terrain and the survey file's round trip, determinism and schema
//! checks.
use std::path::{Path, PathBuf};
use std::sync::atomic::AtomicBool;
use survey::{RunOptions, SurveyError, SurveyFile};

fn demo() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../../demo-terrain/farside-patch.tif")
}

fn small_run() -> SurveyFile {
    // Large craters only, so the debug-build test stays quick.
    let opts = RunOptions { diameter_min_m: Some(1500.0), diameter_max_m: Some(8000.0), tile_px: 1024, ..RunOptions::default() };
    survey::run(&demo(), &opts, &|_| {}, &AtomicBool::new(false)).unwrap().survey
}

#[test]
fn survey_file_round_trips_and_is_byte_identical_across_runs() {
    let a = small_run();
    assert!(!a.candidates.is_empty());
    let text = a.to_json();
    let back = SurveyFile::from_json(&text).unwrap();
    let again = back.to_json();
    if again != text {
        let line = again.lines().zip(text.lines()).position(|(a, b)| a != b);
        panic!("reading and writing again changed the file, first at line {line:?}: {:?}", line.map(|i| (again.lines().nth(i), text.lines().nth(i))));
    }
    let b = small_run();
    assert!(b.to_json() == text, "a rerun on the same input and parameters gives different bytes");
    // Provenance: the input's checksum and the parameters are recorded.
    assert_eq!(a.input.sha256.len(), 64);
    assert_eq!(a.parameters.diameter_min_m, 1500.0);
    assert_eq!(a.input.crs_authority.as_deref(), Some("IAU_2015:30115"));
    for c in &a.candidates {
        assert!(c.crater.diameter_m >= 1500.0 * 0.8 && c.crater.diameter_m <= 8000.0 * 1.2, "{}", c.crater.diameter_m);
        assert!(c.visibility.is_some());
    }
}

#[test]
fn craters_on_tile_edges_are_found_whichever_way_the_dem_is_tiled() {
    // One 2000 px tile against four 1000 px tiles with halos: every crater of 1.5-4 km found
    // one way is found the other way, centre within 5% of D. (Detection proposals depend a
    // little on the window, so borderline candidates may differ; hence the 90% floor.)
    let opts = |tile_px| RunOptions { diameter_min_m: Some(1500.0), diameter_max_m: Some(4000.0), tile_px, ..RunOptions::default() };
    let one = survey::run(&demo(), &opts(2000), &|_| {}, &AtomicBool::new(false)).unwrap().survey;
    let four = survey::run(&demo(), &opts(1000), &|_| {}, &AtomicBool::new(false)).unwrap().survey;
    let r = terrain::MOON_RADIUS_M;
    let found_in = |a: &SurveyFile, b: &SurveyFile| {
        a.candidates.iter().filter(|c| {
            b.candidates.iter().any(|d| {
                let dist = terrain::geodesy::distance_m(r, (c.crater.centre_lon_deg, c.crater.centre_lat_deg), (d.crater.centre_lon_deg, d.crater.centre_lat_deg));
                dist < 0.05 * c.crater.diameter_m
            })
        }).count() as f64 / a.candidates.len().max(1) as f64
    };
    let (ab, ba) = (found_in(&one, &four), found_in(&four, &one));
    assert!(ab >= 0.9 && ba >= 0.9, "one-tile craters found with four tiles: {ab:.2}; the reverse: {ba:.2}");
}

#[test]
fn future_schema_is_refused_with_the_reason() {
    let text = r#"{"schema_version": 99, "candidates": []}"#;
    let err = SurveyFile::from_json(text).unwrap_err();
    assert!(matches!(err, SurveyError::FutureSchema { found: 99, .. }), "{err}");
    assert!(err.to_string().contains("newer"));
    assert!(matches!(SurveyFile::from_json("{}"), Err(SurveyError::Parse(_))));
    assert!(matches!(SurveyFile::from_json("not json"), Err(SurveyError::Parse(_))));
}

#[test]
fn cancelled_run_returns_cancelled() {
    let err = survey::run(&demo(), &RunOptions::default(), &|_| {}, &AtomicBool::new(true)).err().unwrap();
    assert!(matches!(err, SurveyError::Cancelled));
}

#[test]
fn dem_too_small_for_the_range_is_refused() {
    let opts = RunOptions { diameter_min_m: Some(30_000.0), diameter_max_m: Some(40_000.0), ..RunOptions::default() };
    let err = survey::run(&demo(), &opts, &|_| {}, &AtomicBool::new(false)).err().unwrap();
    assert!(matches!(err, SurveyError::TooSmall { .. }), "{err}");
}
