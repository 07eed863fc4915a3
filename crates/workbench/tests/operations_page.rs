//! The crater sheet's Operations page driven through AccessKit (egui_kittest): the survey's
//! operations figures by their registry labels beside the Earth margin, and what it says when
//! a candidate has none. The figures are invented here (the page only shows them; the
//! operations crate's own tests check how they are computed).

mod common;

use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use quietbowl_workbench::crater_sheet::SheetTab;
use quietbowl_workbench::WorkbenchApp;
use survey::SurveyFile;

/// The survey with fits, candidate 1 given invented operations figures and the survey the
/// default operations inputs.
fn survey_with_operations() -> SurveyFile {
    let mut s = common::survey_with_fits();
    s.parameters.operations = Some(operations::OperationsInputs::default());
    let c = s
        .candidates
        .iter_mut()
        .find(|c| c.id == 1)
        .expect("candidate 1");
    let report = serde_json::json!({
        "lander_lon_deg": c.crater.centre_lon_deg,
        "lander_lat_deg": c.crater.centre_lat_deg,
        "landing": {
            "p_aim": 0.873, "aim_lon_deg": c.crater.centre_lon_deg,
            "aim_lat_deg": c.crater.centre_lat_deg, "best_lon_deg": c.crater.centre_lon_deg,
            "best_lat_deg": c.crater.centre_lat_deg, "p_best": 0.912, "best_to_aim_m": 42.0,
            "safe_fraction": 0.64, "post_m": 30.0
        },
        "shots": null,
        "relay": {
            "lander": { "fraction": 0.991, "longest_gap_h": 17.5,
                        "worst_margin_deg": -2.5, "worst_azimuth_deg": 181.0 },
            "anchors": [], "best_anchor": 0, "worst_anchor": 0
        },
        "night": {
            "lander": { "dark_fraction": 0.52, "longest_dark_h": 360.0,
                        "sunlit_h_per_month": 340.0 },
            "anchors": [], "best_lit_anchor": 0
        }
    });
    c.operations = Some(serde_json::from_value(report).expect("an operations report"));
    s
}

fn harness_on(id: u32) -> Harness<'static, WorkbenchApp> {
    common::harness_on_page(SheetTab::Operations, id, survey_with_operations())
}

#[test]
fn operations_page_lists_the_figures_by_label_beside_the_earth_margin() {
    let h = harness_on(1);
    for (label, value) in [
        ("Safe landing chance at the aim point", "87 %"),
        ("Safe landing chance at the best aim point", "91 %"),
        ("Relay in view from the lander", "99 %"),
        ("Longest relay outage at the lander", "18 h"),
        ("Share of time in darkness at the lander", "52 %"),
        ("Longest darkness at the lander", "360 h"),
    ] {
        h.get_by_label(label);
        h.get_by_label(value);
    }
    // The Earth shielding margin stands on the same page: depth trades it against the relay.
    h.get_by_label("Earth shielding margin");
    // Without the DEM open the page says what its pictures need.
    h.get_by_label_contains("The pictures need the DEM");
    h.get_by_label_contains("rocks and hazards smaller than a post are not seen");
}

#[test]
fn a_candidate_without_operations_figures_says_why() {
    let h = harness_on(3);
    h.get_by_label_contains("No operations figures for this candidate");
}
