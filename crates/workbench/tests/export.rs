//! The export dialog's requests reach `siting`'s exporters and the study round-trips.

mod common;

use quietbowl_workbench::engine;
use quietbowl_workbench::export_dialog::{ExportFormat, ExportRequest};
use quietbowl_workbench::Session;

/// The ids in a CSV export's rows (second column; the columns before it hold no commas).
fn exported_ids(path: &std::path::Path) -> Vec<u32> {
    let text = std::fs::read_to_string(path).unwrap();
    let mut ids: Vec<u32> = text
        .lines()
        .filter(|l| !l.starts_with('#'))
        .skip(1)
        .map(|l| l.split(',').nth(1).and_then(|s| s.parse().ok()).unwrap())
        .collect();
    ids.sort();
    ids
}

#[test]
fn export_request_writes_the_passing_shortlist_as_csv() {
    let session =
        Session::with_survey_and_criteria(common::small_survey(), common::test_criteria());
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("shortlist.csv");
    let mut req = ExportRequest {
        format: ExportFormat::Csv,
        path: path.clone(),
        passing_only: true,
    };
    engine::export(&session, &req).expect("export succeeds");
    // By hand from common::ROWS and test_criteria's requirements (diameter >= 1000 m, rim
    // completeness >= 0.5): candidate 3 (500 m) and candidate 4 (rim 0.30) fail.
    assert_eq!(exported_ids(&path), vec![1, 2, 5, 6]);
    let text = std::fs::read_to_string(&path).unwrap();
    assert!(
        text.contains("Screening estimates from orbital data"),
        "the export carries the caution"
    );
    req.passing_only = false;
    engine::export(&session, &req).expect("export succeeds");
    assert_eq!(exported_ids(&path), vec![1, 2, 3, 4, 5, 6]);
}

#[test]
fn saved_study_reopens_with_decisions_and_criteria() {
    let mut session =
        Session::with_survey_and_criteria(common::small_survey(), common::test_criteria());
    session.review_mut(2).note = "smooth floor".into();
    session.criteria.criteria[0].weight = 3.0;
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("study.json");
    session.to_study().unwrap().save(&path).unwrap();
    let mut reopened = Session::default();
    reopened.adopt_study(siting::Study::open(&path).unwrap(), Some(path));
    assert_eq!(
        reopened.reviews.get(&2).map(|r| r.note.as_str()),
        Some("smooth floor")
    );
    assert_eq!(reopened.criteria.criteria[0].weight, 3.0);
    assert_eq!(reopened.ranking.order(), session.ranking.order());
}
