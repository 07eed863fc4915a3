//! The reflector editor of the criteria panel, driven through AccessKit (egui_kittest) on the
//! demo terrain: a wider aperture applied refits the survey in the background, the fits change
//! the expected way (a wider dish fits fewer craters), and the criteria keep the new dish.

mod common;

use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use quietbowl_workbench::crater_sheet::SheetTab;
use quietbowl_workbench::{Session, WorkbenchApp};
use std::path::Path;
use std::sync::atomic::AtomicBool;
use std::time::{Duration, Instant};
use survey::{RunOptions, SurveyFile};

fn demo_survey() -> SurveyFile {
    let dem = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../demo-terrain/farside-patch.tif");
    // Kilometre-class craters only, so the debug-build test stays quick.
    let opts = RunOptions {
        diameter_min_m: Some(1200.0),
        diameter_max_m: Some(4000.0),
        visibility: false,
        ..RunOptions::default()
    };
    survey::run(&dem, &opts, &|_| {}, &AtomicBool::new(false))
        .expect("demo survey")
        .survey
}

fn fitting(s: &SurveyFile) -> usize {
    s.candidates
        .iter()
        .filter(|c| c.fit.as_ref().is_some_and(|f| f.fit_ok))
        .count()
}

#[test]
fn applying_a_wider_aperture_refits_the_survey_in_the_background() {
    let survey = demo_survey();
    let n_before = fitting(&survey);
    assert!(
        n_before >= 3,
        "the demo should hold craters that take the default dish"
    );
    let selected = survey
        .candidates
        .iter()
        .position(|c| c.fit.as_ref().is_some_and(|f| f.fit_ok));
    let mut app = WorkbenchApp::new(Session::with_survey_and_criteria(
        survey,
        common::test_criteria(),
    ));
    app.sheet.tab = SheetTab::Fit;
    app.session.select(selected, false);
    let mut h = Harness::builder()
        .with_size(egui::vec2(1600.0, 1000.0))
        .build_ui_state(|ui, app: &mut WorkbenchApp| app.ui(ui), app);
    h.run_steps(4);
    h.get_by_label_contains("Fits shown: 350 m paraboloid");
    assert!(h.query_by_label("Apply and refit").is_some());

    h.get_by_role_and_label(egui::Role::SpinButton, "Aperture diameter")
        .set_value_accesskit(700.0);
    h.run_steps(4);
    assert_eq!(h.state().criteria.reflector.draft.aperture_m, 700.0);
    h.get_by_label("Apply and refit").click_accesskit();
    h.run_steps(2);
    assert!(
        h.state().criteria.reflector.job.is_some(),
        "the refit runs as a background job"
    );
    let start = Instant::now();
    while h.state().criteria.reflector.job.is_some() {
        assert!(
            start.elapsed() < Duration::from_secs(900),
            "the refit did not finish"
        );
        std::thread::sleep(Duration::from_millis(50));
        h.step();
    }
    h.run_steps(4);

    let app = h.state();
    let s = app.session.survey.as_ref().expect("survey kept");
    assert_eq!(
        s.parameters.structure.as_ref().map(|p| p.aperture_m),
        Some(700.0)
    );
    let n_after = fitting(s);
    assert!(
        n_after < n_before,
        "{n_after} craters take the 700 m dish, {n_before} the 350 m one"
    );
    assert_eq!(
        app.session.selected, selected,
        "the selection survives the refit"
    );
    assert_eq!(
        app.session
            .criteria
            .structure
            .as_ref()
            .map(|p| p.aperture_m),
        Some(700.0)
    );
    // Saving the criteria writes the table.
    assert!(app
        .session
        .criteria_to_save()
        .to_toml()
        .contains("[structure]\naperture_diameter_m = 700.0\n"));
    h.get_by_label_contains(&format!("Refitted: the reflector fits {n_after} of"));
    // The editor and the selected crater's Reflector page both describe the new dish.
    assert!(
        h.query_all_by_label_contains("700 m paraboloid at f/D 0.50, 6 anchors")
            .count()
            >= 2
    );
}
