//! Study file round trip and version policy; the terminal table and its caution line.

mod common;

use common::export::Fixture;
use siting::study::{Decision, Study, StudyError, STUDY_VERSION};
use siting::table::render_table;
use siting::{Criteria, SitingError, SCREENING_CAUTION};

fn study() -> Study {
    let mut s = Study::new(common::random_survey(20, 5), Criteria::default_reflector());
    s.review(
        3,
        Decision::Accepted,
        "rim anchors look good on the hillshade",
    );
    s.review(
        7,
        Decision::Rejected,
        "boulder field on the floor, \"see\" notes",
    );
    s
}

#[test]
fn study_saves_and_reopens_unchanged() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("site.study.json");
    let s = study();
    s.save(&path).unwrap();
    let back = Study::open(&path).unwrap();
    assert_eq!(back, s);
    assert_eq!(back.reviews[&7].decision, Decision::Rejected);
    // Saving again gives the same bytes.
    let again = dir.path().join("again.json");
    back.save(&again).unwrap();
    assert_eq!(
        std::fs::read(&path).unwrap(),
        std::fs::read(&again).unwrap()
    );
}

fn with_version(v: serde_json::Value) -> String {
    let mut j: serde_json::Value = serde_json::from_str(&study().to_json().unwrap()).unwrap();
    j["schema_version"] = v;
    j.to_string()
}

#[test]
fn older_layout_is_refused_with_the_reason() {
    match Study::from_json(&with_version(serde_json::json!(0))) {
        Err(StudyError::CannotMigrate { found: 0, reason }) => {
            assert!(reason.contains("predates"), "{reason}")
        }
        other => panic!("expected a refusal, got {other:?}"),
    }
}

#[test]
fn newer_layout_is_refused_with_the_reason() {
    let e = Study::from_json(&with_version(serde_json::json!(STUDY_VERSION + 1))).unwrap_err();
    assert!(matches!(e, StudyError::Newer { .. }));
    assert!(e.to_string().contains("newer quietbowl"), "{e}");
}

#[test]
fn missing_version_and_foreign_files_are_refused() {
    let mut j: serde_json::Value = serde_json::from_str(&study().to_json().unwrap()).unwrap();
    j.as_object_mut().unwrap().remove("schema_version");
    assert!(matches!(
        Study::from_json(&j.to_string()),
        Err(StudyError::NoVersion)
    ));
    assert!(matches!(
        Study::from_json("{\"type\":\"FeatureCollection\"}"),
        Err(StudyError::NotAStudy { .. })
    ));
    assert!(matches!(
        Study::from_json("not json"),
        Err(StudyError::Json(_))
    ));
    let e = Study::open(std::path::Path::new("/nonexistent/x.json")).unwrap_err();
    assert!(matches!(e, SitingError::Read { .. }));
}

#[test]
fn edited_study_with_inconsistent_checksum_or_criteria_is_refused() {
    let mut j: serde_json::Value = serde_json::from_str(&study().to_json().unwrap()).unwrap();
    j["dem_sha256"] = serde_json::json!("00");
    assert!(matches!(
        Study::from_json(&j.to_string()),
        Err(StudyError::ChecksumMismatch { .. })
    ));
    let mut j: serde_json::Value = serde_json::from_str(&study().to_json().unwrap()).unwrap();
    j["criteria"]["criteria"][0]["weight"] = serde_json::json!(-1.0);
    assert!(matches!(
        Study::from_json(&j.to_string()),
        Err(StudyError::Criteria(_))
    ));
}

#[test]
fn study_file_carries_the_screening_caution() {
    let text = study().to_json().unwrap();
    let j: serde_json::Value = serde_json::from_str(&text).unwrap();
    assert_eq!(j["caution"].as_str(), Some(SCREENING_CAUTION));
    // A file saved before the field existed opens, with the caution of this build.
    let mut old = j.clone();
    old.as_object_mut().unwrap().remove("caution");
    let reopened = Study::from_json(&old.to_string()).unwrap();
    assert_eq!(reopened.caution, SCREENING_CAUTION);
}

#[test]
fn table_lists_the_columns_rows_failures_and_caution() {
    let f = Fixture::new();
    let text = render_table(&f.survey, &f.table, &f.ranking, Some(&f.smaa), 10);
    let lines: Vec<&str> = text.lines().collect();
    for col in [
        "Rank",
        "Id",
        "Lon [°]",
        "Lat [°]",
        "Diam. [m]",
        "d/D",
        "Rim compl. [%]",
        "Floor tilt [°]",
        "Earth margin [°]",
        "Gal. centre [°]",
        "Score",
        "Meets limits",
        "P(rank 1)",
        "P(top 10)",
    ] {
        assert!(lines[0].contains(col), "header lacks {col}: {}", lines[0]);
    }
    assert!(lines[1].trim_start().starts_with("1 "));
    assert!(
        text.contains("id 5: Earth shielding margin: not measured"),
        "{text}"
    );
    // No metric id anywhere a person reads.
    for m in survey::METRICS {
        assert!(!text.contains(m.name), "{} in the table:\n{text}", m.name);
    }
    assert_eq!(lines.last().copied(), Some(SCREENING_CAUTION));
    assert!(text.contains(siting::VERDICT_SCOPE));
    // The longitude of the crater on 180 prints in -180..180.
    assert!(text.contains("-180.000"), "{text}");
}
