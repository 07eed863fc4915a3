//! The terrain view driven through AccessKit without a window (egui_kittest): going to a
//! typed lon/lat, the longitude convention the read-outs use, the failing-rims toggle.

mod common;

use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use quietbowl_workbench::{Session, WorkbenchApp};
use survey::LonConvention;

fn harness() -> Harness<'static, WorkbenchApp> {
    let app = WorkbenchApp::new(Session::with_survey_and_criteria(
        common::small_survey(),
        common::test_criteria(),
    ));
    let mut h = Harness::builder()
        .with_size(egui::vec2(1600.0, 1000.0))
        .build_ui_state(|ui, app: &mut WorkbenchApp| app.ui(ui), app);
    h.run_steps(4);
    h
}

/// Type `text` in the "Go to" box and press Go.
fn go_to(h: &mut Harness<'static, WorkbenchApp>, text: &str) {
    let edit = h.get_by_label("Go to");
    edit.focus();
    h.run_steps(2);
    // Select what is there and type over it.
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::A);
    h.run_steps(1);
    h.get_by_label("Go to").type_text(text);
    h.run_steps(2);
    h.get_by_label("Go").click();
    h.run_steps(4);
}

fn centre(h: &Harness<'static, WorkbenchApp>) -> (f64, f64) {
    h.state().map.centre_lonlat().expect("the map has a frame")
}

/// The test survey spans 170-177.5 E, 10-6 S (tests/common). Check values: the typed
/// place itself; 185.5 W is 174.5 E (a full turn is 360 degrees), so both ranges land on the
/// same meridian.
#[test]
fn go_to_centres_the_map_on_the_typed_place_in_either_range() {
    let mut h = harness();
    for (typed, lon, lat) in [
        ("174.5, -8.0", 174.5, -8.0),
        ("-185.5 -8.5", 174.5, -8.5),
        ("172.25 E, 7.75 S", 172.25, -7.75),
    ] {
        go_to(&mut h, typed);
        assert_eq!(h.state().map.goto_error, None, "{typed}");
        let (c_lon, c_lat) = centre(&h);
        let east = LonConvention::East360;
        assert!(
            (east.normalise(c_lon) - lon).abs() < 1e-9 && (c_lat - lat).abs() < 1e-9,
            "typed {typed:?}: centred on {c_lon}, {c_lat}"
        );
    }
}

#[test]
fn go_to_outside_the_terrain_says_so_and_stays() {
    let mut h = harness();
    go_to(&mut h, "174.5, -8.0");
    let before = centre(&h);
    go_to(&mut h, "10, 10");
    assert_eq!(centre(&h), before);
    let err = h.state().map.goto_error.clone().expect("refused");
    assert!(err.contains("outside this terrain"), "{err}");
    h.get_by_label_contains("outside this terrain");
    go_to(&mut h, "east, 10");
    assert_eq!(centre(&h), before);
    h.get_by_label_contains("is not a number");
}

/// The convention is the user's choice, kept in the session every screen reads.
#[test]
fn longitude_convention_is_a_choice_in_the_map_bar() {
    let mut h = harness();
    assert_eq!(h.state().session.lon_convention, LonConvention::Signed180);
    h.get_by_label("0..360° E").click();
    h.run_steps(4);
    assert_eq!(h.state().session.lon_convention, LonConvention::East360);
}

#[test]
fn failing_rims_toggle_is_on_by_default_and_turns_off() {
    let mut h = harness();
    assert!(h.state().map.settings.show_failing);
    h.get_by_label("Failing rims").click();
    h.run_steps(4);
    assert!(!h.state().map.settings.show_failing);
}

/// The list and the crater sheet write longitudes in the chosen convention too: a crater at
/// 185 E reads -175 in -180..180 and 185 E in 0..360.
#[test]
fn the_list_and_the_sheet_follow_the_longitude_convention() {
    let survey = common::survey_of(vec![common::candidate(
        7, 1500.0, 0.15, 0.95, 2.0, 185.0, -5.0,
    )]);
    let mut app = WorkbenchApp::new(Session::with_survey_and_criteria(
        survey,
        common::test_criteria(),
    ));
    app.session.select(Some(0), false);
    let mut h = Harness::builder()
        .with_size(egui::vec2(1600.0, 1000.0))
        .build_ui_state(|ui, app: &mut WorkbenchApp| app.ui(ui), app);
    h.run_steps(4);
    h.get_by_label("lon -175.000°, lat -5.000°");
    h.get_by_label("-175.000");
    assert!(h.query_by_label("185.000").is_none());

    h.get_by_label("0..360° E").click();
    h.run_steps(4);
    h.get_by_label("lon 185.000° E, lat -5.000°");
    h.get_by_label("185.000");
    assert!(h.query_by_label("-175.000").is_none());
}
