//! The crater sheet's reflector page and the placed reflector on the map, driven through
//! AccessKit (egui_kittest) on invented fits: what the page says, not the fits' truth.

mod common;

use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use quietbowl_workbench::crater_sheet::SheetTab;
use quietbowl_workbench::WorkbenchApp;

fn harness_on(id: u32, survey: survey::SurveyFile) -> Harness<'static, WorkbenchApp> {
    common::harness_on_page(SheetTab::Fit, id, survey)
}

#[test]
fn reflector_page_shows_the_verdict_and_each_failure_reason() {
    let h = harness_on(2, common::survey_with_fits());
    h.get_by_label("Does not fit the stated envelope on this DEM");
    h.get_by_label_contains(common::FIT_FAILURE_REASON);
    h.get_by_label_contains("Structure: 350 m paraboloid at f/D 0.50, 6 anchors");
    h.get_by_label("Reflector plan");
}

#[test]
fn reflector_page_shows_a_fitting_candidate_with_its_numbers() {
    let h = harness_on(1, common::survey_with_fits());
    h.get_by_label("Fits the stated envelope on this DEM");
    assert!(h
        .query_by_label("Does not fit the stated envelope on this DEM")
        .is_none());
    h.get_by_label_contains("12.0 m, on the axis");
    h.get_by_label("Reflector plan");
}

#[test]
fn reflector_page_says_why_there_is_no_fit() {
    let h = harness_on(3, common::survey_with_fits());
    h.get_by_label_contains("The crater could not be fitted");
    let h = harness_on(3, common::small_survey());
    h.get_by_label_contains("No reflector fits in this survey");
}

#[test]
fn view_menu_turns_the_placed_reflector_off_the_map() {
    let mut h = harness_on(1, common::survey_with_fits());
    assert!(!h.state().map.hide_placed_reflector, "drawn by default");
    h.get_by_label("View").click();
    h.run_steps(4);
    h.get_by_label("Placed reflector of the selected crater")
        .click();
    h.run_steps(4);
    assert!(h.state().map.hide_placed_reflector);
}
