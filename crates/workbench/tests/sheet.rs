//! The crater sheet's Score, Shape and Reflector pages and the comparison window, driven
//! through AccessKit (egui_kittest) on invented candidates: what the pages say and hide, not
//! the numbers' truth.

mod common;

use egui::Modifiers;
use egui_kittest::kittest::{NodeT, Queryable};
use egui_kittest::Harness;
use quietbowl_workbench::crater_sheet::SheetTab;
use quietbowl_workbench::session::candidate_label;
use quietbowl_workbench::{Session, WorkbenchApp};

fn harness_on(survey: survey::SurveyFile, tab: SheetTab) -> Harness<'static, WorkbenchApp> {
    let mut app = WorkbenchApp::new(Session::with_survey_and_criteria(
        survey,
        common::test_criteria(),
    ));
    app.sheet.tab = tab;
    Harness::builder()
        .with_size(egui::vec2(1600.0, 1000.0))
        .build_ui_state(|ui, app: &mut WorkbenchApp| app.ui(ui), app)
}

fn select(h: &mut Harness<'static, WorkbenchApp>, id: u32) -> usize {
    h.get_by_label(&candidate_label(id)).click();
    h.run_steps(8);
    h.state().session.selected.expect("a candidate is selected")
}

/// The numbers after a leading `+` on every label that starts with one (the sheet's
/// contributions), in screen order.
fn contributions(h: &Harness<'static, WorkbenchApp>) -> Vec<f64> {
    h.query_all_by_label_contains("+")
        .filter_map(|n| {
            let node = n.accesskit_node();
            let t = node.label().or_else(|| node.value())?;
            t.strip_prefix('+')?.parse::<f64>().ok()
        })
        .collect()
}

#[test]
fn score_page_parts_add_up_to_the_ranked_score() {
    for id in [1, 2, 5] {
        let mut h = harness_on(common::small_survey(), SheetTab::Score);
        let index = select(&mut h, id);
        let parts = contributions(&h);
        // test_criteria has four weighted measures: one bar each.
        assert_eq!(parts.len(), 4, "candidate {id}: {parts:?}");
        let ranked = h.state().session.ranking.score(index).expect("ranked");
        // Each part is printed to 3 decimals: the sum may be off by half a unit in the last
        // place per part.
        let sum: f64 = parts.iter().sum();
        assert!(
            (sum - ranked).abs() <= 4.0 * 0.0005 + 1e-9,
            "candidate {id}: parts {parts:?} sum {sum}, ranking {ranked}"
        );
        h.get_by_label(&format!("Sum of the contributions: {ranked:.3}"));
        // The measures are named by the registry, their ids kept for the tooltip.
        // (once in the criteria panel, once in the key figures, once in the breakdown)
        assert_eq!(h.query_all_by_label("Depth/diameter (d/D)").count(), 3);
    }
}

#[test]
fn score_page_marks_the_breakdown_of_a_failing_candidate_too() {
    // Candidate 3 (500 m) fails the 1 km limit but still has a score to explain.
    let mut h = harness_on(common::small_survey(), SheetTab::Score);
    let index = select(&mut h, 3);
    h.get_by_label("Fails the limits:");
    let sum: f64 = contributions(&h).iter().sum();
    let ranked = h.state().session.ranking.score(index).expect("scored");
    assert!((sum - ranked).abs() <= 0.002 + 1e-9);
}

/// Candidate 1 complete and centred (fit on the crater centre); candidate 2 with a 90 degree
/// gap toward the east and its fit 120 m off centre toward the north-east.
fn complete_and_gapped() -> survey::SurveyFile {
    let mut s = common::survey_with_fits();
    let c1 = &mut s.candidates[0];
    c1.crater.rim_completeness = 1.0;
    c1.crater.rim_gap_deg = 0.0;
    c1.crater.rim_gap_azimuth_deg = 0.0;
    c1.crater.rim_crest_radius_m = vec![(c1.crater.diameter_m / 2.0) as f32; 36];
    let c2 = &mut s.candidates[1];
    c2.crater.rim_completeness = 0.75;
    c2.crater.rim_gap_deg = 90.0;
    c2.crater.rim_gap_azimuth_deg = 90.0;
    c2.crater.rim_crest_radius_m = (0..36)
        .map(|k| {
            if (5..14).contains(&k) {
                f32::NAN
            } else {
                2500.0
            }
        })
        .collect();
    if let Some(f) = c2.fit.as_mut() {
        f.offset_from_crater_centre_m = 120.0;
        f.offset_azimuth_deg = 45.0;
    }
    s
}

#[test]
fn complete_centred_crater_prints_no_empty_gap_or_offset() {
    let mut h = harness_on(complete_and_gapped(), SheetTab::Shape);
    select(&mut h, 1);
    h.get_by_label("Rim completeness: 100 % of azimuths");
    assert!(h.query_by_label_contains("Widest rim gap").is_none());
    assert!(h.query_by_label_contains("centred toward").is_none());
    assert!(h.query_by_label_contains("0° centred at 0°").is_none());

    let mut h = harness_on(complete_and_gapped(), SheetTab::Fit);
    select(&mut h, 1);
    h.get_by_label("Fits the stated envelope on this DEM");
    assert!(h.query_by_label_contains("toward").is_none());
    assert!(h.query_by_label("Offset from crater centre").is_none());
}

#[test]
fn gapped_off_centre_crater_prints_its_gap_and_offset() {
    let mut h = harness_on(complete_and_gapped(), SheetTab::Shape);
    select(&mut h, 2);
    h.get_by_label("Widest rim gap: 90.0° centred toward 90°");
    let mut h = harness_on(complete_and_gapped(), SheetTab::Fit);
    select(&mut h, 2);
    h.get_by_label("Does not fit the stated envelope on this DEM");
    h.get_by_label("120 m toward 45°");
}

#[test]
fn every_spread_says_what_it_covers() {
    let mut h = harness_on(common::small_survey(), SheetTab::Shape);
    select(&mut h, 1);
    // 20 km: diameter in km, SD 1 % = 200 m.
    let d = h.get_by_label("20.0 ± 0.20 km");
    d.hover();
    h.run_steps(4);
    h.get_by_label_contains("bootstrap over azimuths");
}

#[test]
fn verdict_reads_as_screening_with_what_is_not_assessed() {
    let mut h = harness_on(common::survey_with_fits(), SheetTab::Shape);
    select(&mut h, 1);
    h.get_by_label_contains("Meets limits: rank");
    h.get_by_label("Reflector: fits the stated envelope on this DEM");
    h.get_by_label(
        "Not assessed: loads, cable dynamics, ground bearing, thermal effects and the DEM's vertical error.",
    );
}

fn ctrl_click(h: &mut Harness<'static, WorkbenchApp>, id: u32) {
    h.get_by_label(&candidate_label(id))
        .click_modifiers(Modifiers::COMMAND);
    h.run_steps(6);
}

#[test]
fn compare_window_opens_with_two_to_four_candidates() {
    let mut h = harness_on(common::small_survey(), SheetTab::Shape);
    ctrl_click(&mut h, 1);
    assert_eq!(h.state().session.compare.indices.len(), 1);
    assert!(
        h.query_by_label_contains("Comparing").is_none(),
        "one is no comparison"
    );
    assert_eq!(
        h.state().session.selected,
        None,
        "Ctrl-click does not select"
    );
    ctrl_click(&mut h, 2);
    h.get_by_label("Comparing C-00001, C-00002");
    ctrl_click(&mut h, 5);
    ctrl_click(&mut h, 6);
    h.get_by_label("Comparing C-00001, C-00002, C-00005, C-00006");
    // Every metric has its row, by label (nothing is selected, so besides the comparison only
    // the criteria panel names it).
    assert_eq!(h.query_all_by_label("Depth/diameter (d/D)").count(), 2);
    h.get_by_label("Radial profiles");
    h.get_by_label("Skylines and the Earth");
    h.get_by_label("Reflector fits");
    // A fifth is refused.
    ctrl_click(&mut h, 4);
    assert_eq!(h.state().session.compare.indices.len(), 4);
    h.get_by_label("Comparing C-00001, C-00002, C-00005, C-00006");
    // Taking all but one out closes it.
    for id in [2, 5, 6] {
        let i = index_of(&h, id);
        h.state_mut().session.compare.toggle(i);
    }
    h.run_steps(4);
    assert!(h.query_by_label_contains("Comparing").is_none());
}

#[test]
fn sheet_checkbox_adds_the_selected_candidate_to_the_comparison() {
    let mut h = harness_on(common::small_survey(), SheetTab::Shape);
    select(&mut h, 1);
    h.get_by_label("In comparison").click();
    h.run_steps(4);
    select(&mut h, 2);
    h.get_by_label("In comparison").click();
    h.run_steps(6);
    h.get_by_label("Comparing C-00001, C-00002");
}

#[test]
fn another_survey_empties_the_comparison() {
    let mut h = harness_on(common::small_survey(), SheetTab::Shape);
    ctrl_click(&mut h, 1);
    ctrl_click(&mut h, 2);
    h.state_mut()
        .session
        .set_survey(common::small_survey(), None);
    h.run_steps(4);
    assert!(h.state().session.compare.indices.is_empty());
    assert!(h.query_by_label_contains("Comparing").is_none());
}

fn index_of(h: &Harness<'static, WorkbenchApp>, id: u32) -> usize {
    h.state()
        .session
        .survey
        .as_ref()
        .expect("survey")
        .candidates
        .iter()
        .position(|c| c.id == id)
        .expect("candidate")
}
