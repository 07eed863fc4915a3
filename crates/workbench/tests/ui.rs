//! The interface driven through AccessKit without a window (egui_kittest): what a user sees
//! and what a click or a slider does.

mod common;

use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use quietbowl_workbench::session::candidate_label;
use quietbowl_workbench::{Session, WorkbenchApp};

fn harness() -> Harness<'static, WorkbenchApp> {
    let app = WorkbenchApp::new(Session::with_survey_and_criteria(
        common::small_survey(),
        common::test_criteria(),
    ));
    Harness::builder()
        .with_size(egui::vec2(1600.0, 1000.0))
        .build_ui_state(|ui, app: &mut WorkbenchApp| app.ui(ui), app)
}

#[test]
fn table_lists_every_candidate_of_the_survey() {
    let h = harness();
    for (id, ..) in common::ROWS {
        h.get_by_label(&candidate_label(id));
    }
    assert_eq!(
        h.state().table.rows(&h.state().session).len(),
        common::ROWS.len()
    );
}

#[test]
fn raising_a_weight_slider_changes_the_order() {
    let mut h = harness();
    let before = h.state().session.ranking.order().to_vec();
    h.get_by_label("Weight of Floor roughness (RMS) [m]")
        .set_value_accesskit(5.0);
    h.run_steps(8);
    let after = h.state().session.ranking.order().to_vec();
    assert_ne!(before, after, "ranking order did not change");
    // The smoothest floor (candidate 2) should now lead, and the table follows in the same frame.
    assert_eq!(
        h.state().session.ranking.order()[0] as usize,
        common::index_of_id(&h.state().session, 2)
    );
    assert_eq!(
        h.state().table.rows(&h.state().session)[0],
        h.state().session.ranking.order()[0]
    );
}

#[test]
fn selecting_a_row_marks_it_on_the_map() {
    let mut h = harness();
    h.get_by_label(&candidate_label(2)).click();
    h.run_steps(8);
    assert_eq!(
        h.state().session.selected,
        Some(common::index_of_id(&h.state().session, 2))
    );
    h.get_by_label_contains(&format!("Marked on map: {}", candidate_label(2)));
}

#[test]
fn failed_candidate_shows_its_reasons() {
    let mut h = harness();
    // Candidate 3 is 500 m across, under the 1 km limit.
    h.get_by_label(&candidate_label(3)).click();
    h.run_steps(8);
    h.get_by_label("Fails the limits:");
    // In words, in the sheet (the bullet) as well as in the list's "Why it fails" column.
    assert!(h
        .query_all_by_label_contains("• Diameter 500 m: 500 m under the 1.00 km minimum")
        .next()
        .is_some());
}

#[test]
fn failing_filter_lists_only_failed_candidates() {
    let mut h = harness();
    h.get_by_label("Failing").click();
    h.run_steps(8);
    let s = &h.state().session;
    let rows = h.state().table.rows(s);
    assert!(!rows.is_empty());
    assert!(rows.iter().all(|&i| !s.ranking.passed(i as usize)));
}

#[test]
fn screening_caution_is_shown_with_the_ranking() {
    let h = harness();
    h.get_by_label_contains("Screening estimates from orbital data");
}

#[test]
fn clicking_a_rim_on_the_map_selects_its_row() {
    let mut h = harness();
    let target = common::index_of_id(&h.state().session, 5);
    let pos = {
        let app = h.state_mut();
        let session = std::mem::take(&mut app.session);
        let p = app.map.screen_position(&session, target);
        app.session = session;
        p.expect("candidate 5 is on the map")
    };
    h.hover_at(pos);
    h.run_steps(8);
    for pressed in [true, false] {
        h.event(egui::Event::PointerButton {
            pos,
            button: egui::PointerButton::Primary,
            pressed,
            modifiers: Default::default(),
        });
        h.step();
    }
    h.run_steps(8);
    assert_eq!(h.state().session.selected, Some(target));
    // The list brings the row into view and shows it selected.
    assert!(!h.state().session.scroll_table_to_selection);
    h.get_by_label_contains(&format!("Crater sheet: {}", candidate_label(5)));
}

#[test]
fn decision_on_a_candidate_is_kept_in_the_study() {
    let mut h = harness();
    h.get_by_label(&candidate_label(2)).click();
    h.run_steps(4);
    h.get_by_label("Notes").click();
    h.run_steps(4);
    h.get_by_label("Keep").click();
    h.run_steps(4);
    let study = h.state().session.to_study().expect("a survey is loaded");
    assert_eq!(
        study.reviews.get(&2).map(|r| r.decision),
        Some(siting::study::Decision::Accepted)
    );
}

#[test]
fn export_dialog_shows_the_screening_caution() {
    let mut h = harness();
    let before = h
        .query_all_by_label_contains("Screening estimates from orbital data")
        .count();
    h.state_mut().export.open = true;
    h.run_steps(4);
    h.get_by_label("Export shortlist");
    let after = h
        .query_all_by_label_contains("Screening estimates from orbital data")
        .count();
    assert_eq!(
        after,
        before + 1,
        "the export dialog carries its own copy of the caution"
    );
}
