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
        only_kept: false,
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

#[test]
fn decisions_and_notes_are_exported_as_columns_and_can_narrow_the_list() {
    let mut session =
        Session::with_survey_and_criteria(common::small_survey(), common::test_criteria());
    session.review_mut(2).decision = siting::study::Decision::Accepted;
    session.review_mut(2).note = "smooth, \"best\" floor".into();
    session.review_mut(1).decision = siting::study::Decision::Rejected;
    let dir = tempfile::tempdir().unwrap();
    let all = dir.path().join("all.csv");
    let kept = dir.path().join("kept.csv");
    for (path, only_kept) in [(&all, false), (&kept, true)] {
        let req = ExportRequest {
            format: ExportFormat::Csv,
            path: path.clone(),
            passing_only: false,
            only_kept,
        };
        engine::export(&session, &req).expect("export succeeds");
    }
    let rows = |p: &std::path::Path| -> Vec<String> {
        std::fs::read_to_string(p)
            .unwrap()
            .lines()
            .filter(|l| !l.starts_with('#'))
            .map(str::to_owned)
            .collect()
    };
    let all = rows(&all);
    assert!(all[0].ends_with(",decision,note"), "{}", all[0]);
    assert_eq!(all.len(), 1 + common::ROWS.len());
    // RFC 4180 quoting of the note (quotes doubled), decision words as on screen.
    assert!(
        all.iter().any(|l| l.starts_with("")
            && l.contains(",2,")
            && l.ends_with(",kept,\"smooth, \"\"best\"\" floor\"")),
        "{all:?}"
    );
    assert!(
        all.iter()
            .any(|l| l.contains(",1,") && l.ends_with(",set aside,")),
        "{all:?}"
    );
    let kept = rows(&kept);
    assert_eq!(kept.len(), 2, "header and the one kept candidate: {kept:?}");
}
