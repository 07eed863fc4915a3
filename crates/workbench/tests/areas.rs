//! Study areas, keep-out zones and the spread shortlist in the workbench, driven as a user
//! would (egui_kittest): a keep-out around the best candidate makes it fail with the area's
//! name in "Why it fails"; adding and removing an area are one undo step each; the spread
//! control leaves no two candidates listed under "Meeting limits" closer than the spread.
//! The areas are small GeoJSON files written here.

mod common;

use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use quietbowl_workbench::table::StatusFilter;
use quietbowl_workbench::{areas_panel, Session, WorkbenchApp};
use siting::areas::{AreaSpec, Keep};
use std::path::{Path, PathBuf};

/// A keep-out square of half-side `half_deg` around (lon, lat), named `name`, as GeoJSON
/// in lunar lon/lat.
fn write_square(dir: &Path, name: &str, lon: f64, lat: f64, half_deg: f64) -> PathBuf {
    let (w, e, s, n) = (
        lon - half_deg,
        lon + half_deg,
        lat - half_deg,
        lat + half_deg,
    );
    let text = format!(
        r#"{{"type":"FeatureCollection",
"crs":{{"type":"name","properties":{{"name":"IAU_2015:30100"}}}},
"features":[{{"type":"Feature","properties":{{"name":"{name}"}},
"geometry":{{"type":"Polygon","coordinates":[[[{w},{s}],[{e},{s}],[{e},{n}],[{w},{n}],[{w},{s}]]]}}}}]}}"#
    );
    let path = dir.join(format!("{}.geojson", name.replace(' ', "-")));
    std::fs::write(&path, text).expect("write the test area");
    path
}

fn harness(session: Session) -> Harness<'static, WorkbenchApp> {
    let mut h = Harness::builder()
        .with_size(egui::vec2(1800.0, 1400.0))
        .build_ui_state(
            |ui, app: &mut WorkbenchApp| app.ui(ui),
            WorkbenchApp::new(session),
        );
    h.run_steps(3);
    h
}

#[test]
fn a_keep_out_around_the_best_candidate_fails_it_by_name() {
    let survey = common::small_survey();
    let plain = Session::with_survey_and_criteria(survey.clone(), common::test_criteria());
    let best = plain.index_of_rank(1).expect("a candidate passes");
    let c = &survey.candidates[best].crater;
    let dir = tempfile::tempdir().expect("temp dir");
    let file = write_square(
        dir.path(),
        "Test keep out",
        c.centre_lon_deg,
        c.centre_lat_deg,
        0.2,
    );
    let mut criteria = common::test_criteria();
    criteria.areas.push(AreaSpec {
        file: file.display().to_string(),
        layer: None,
        filter: None,
        keep: Keep::Outside,
        margin_km: 1.0,
        why: String::new(),
    });
    let mut h = harness(Session::with_survey_and_criteria(survey, criteria));
    let s = &h.state().session;
    assert_eq!(s.criteria_error, None);
    assert!(
        !s.ranking.passed(best),
        "the candidate inside the keep-out passes"
    );
    assert_ne!(s.index_of_rank(1), Some(best));
    h.state_mut().table.status = StatusFilter::Failing;
    h.run_steps(3);
    // The list's "Why it fails" cell names the area.
    assert!(
        h.query_by_label_contains("Test keep out").is_some(),
        "no cell of the list names the keep-out zone"
    );
    let reasons = h.state().session.reasons(best).join("; ");
    assert!(reasons.contains("Test keep out"), "{reasons}");
}

#[test]
fn an_unreadable_area_is_not_applied_and_the_ranking_stays() {
    let mut h = harness(Session::with_survey_and_criteria(
        common::small_survey(),
        common::test_criteria(),
    ));
    let generation = h.state().session.ranking.generation;
    let missing = PathBuf::from("/nonexistent/keep-out.geojson");
    areas_panel::add_area(&mut h.state_mut().session, &missing, Keep::Outside, 0.0);
    h.run_steps(3);
    let s = &h.state().session;
    assert!(
        s.criteria_error.is_some(),
        "a missing area file was applied"
    );
    assert_eq!(s.ranking.generation, generation);
    assert!(h.query_by_label_contains("Not applied").is_some());
}

#[test]
fn adding_and_removing_an_area_are_one_undo_step_each() {
    let dir = tempfile::tempdir().expect("temp dir");
    let file = write_square(dir.path(), "Undo square", 175.0, -8.0, 0.5);
    let mut h = harness(Session::with_survey_and_criteria(
        common::small_survey(),
        common::test_criteria(),
    ));
    let original = h.state().session.criteria.clone();
    areas_panel::add_area(&mut h.state_mut().session, &file, Keep::Inside, 2.5);
    h.run_steps(3);
    let added = h.state().session.criteria.clone();
    assert_eq!(added.areas.len(), 1);
    assert_eq!(added.areas[0].margin_km, 2.5);
    assert_eq!(h.state().session.criteria_error, None);
    // The panel lists it; its remove button is one more step.
    h.get_by_label("Remove").click();
    h.run_steps(3);
    assert!(h.state().session.criteria.areas.is_empty());
    let s = &mut h.state_mut().session;
    assert!(s.undo_criteria());
    assert_eq!(s.criteria, added, "undo of the removal");
    assert!(s.undo_criteria());
    assert_eq!(s.criteria, original, "undo of the addition");
    assert!(!s.history.can_undo(), "adding took more than one step");
    assert!(s.redo_criteria());
    assert_eq!(s.criteria, added);
}

/// Great-circle distance by the haversine formula (Sinnott, "Virtues of the Haversine",
/// Sky and Telescope 68(2), 1984), written here apart from the code under test.
fn haversine_km(radius_m: f64, a: (f64, f64), b: (f64, f64)) -> f64 {
    let (p1, p2) = (a.1.to_radians(), b.1.to_radians());
    let (dp, dl) = (p2 - p1, (b.0 - a.0).to_radians());
    let h = (dp / 2.0).sin().powi(2) + p1.cos() * p2.cos() * (dl / 2.0).sin().powi(2);
    2.0 * radius_m * h.sqrt().asin() / 1000.0
}

#[test]
fn the_spread_slider_keeps_listed_candidates_apart() {
    let survey = common::large_survey(3_000);
    let mut h = harness(Session::with_survey_and_criteria(
        survey.clone(),
        common::test_criteria(),
    ));
    h.get_by_label("Meeting limits").click();
    h.run_steps(3);
    let passing = h.state().session.ranking.passing_count();
    assert!(passing > 200, "too few pass to test a spread ({passing})");
    let listed = |h: &Harness<'_, WorkbenchApp>| h.state().table.rows(&h.state().session);
    assert_eq!(listed(&h).len(), passing);
    let spread_km = 150.0;
    h.get_by_label("Spread of the shortlist [km]")
        .set_value_accesskit(spread_km);
    h.run_steps(3);
    let rows = listed(&h);
    assert!(
        rows.len() > 5 && rows.len() < passing,
        "{} listed",
        rows.len()
    );
    let place = |i: u32| {
        let c = &survey.candidates[i as usize].crater;
        (c.centre_lon_deg, c.centre_lat_deg)
    };
    for (k, &a) in rows.iter().enumerate() {
        for &b in &rows[k + 1..] {
            let d = haversine_km(1_737_400.0, place(a), place(b));
            assert!(d >= spread_km, "{a} and {b} are {d:.1} km apart");
        }
    }
    // The best candidate always heads the spread list.
    let s = &h.state().session;
    assert_eq!(rows.first().copied(), s.ranking.at(0));
}

/// A press and release of the primary button at `p`.
fn click_at(h: &mut Harness<'static, WorkbenchApp>, p: egui::Pos2) {
    h.event(egui::Event::PointerMoved(p));
    for pressed in [true, false] {
        h.event(egui::Event::PointerButton {
            pos: p,
            button: egui::PointerButton::Primary,
            pressed,
            modifiers: egui::Modifiers::NONE,
        });
    }
    h.run_steps(2);
}

#[test]
fn a_polygon_drawn_on_the_map_is_saved_as_geojson_and_added() {
    let mut h = harness(Session::with_survey_and_criteria(
        common::small_survey(),
        common::test_criteria(),
    ));
    let centre = h.state().map.last_rect.expect("the map was drawn").center();
    // Esc cancels a polygon begun.
    h.get_by_label("Draw area").click();
    h.run_steps(2);
    assert!(h.state().map.drawing.on);
    click_at(&mut h, centre);
    assert_eq!(h.state().map.drawing.vertices.len(), 1);
    h.key_press(egui::Key::Escape);
    h.run_steps(2);
    assert!(!h.state().map.drawing.on && h.state().map.drawing.vertices.is_empty());
    // Three clicks and Enter close a triangle and ask where to save it.
    h.get_by_label("Draw area").click();
    h.run_steps(2);
    let selected = h.state().session.selected;
    for d in [
        egui::vec2(-80.0, 60.0),
        egui::vec2(80.0, 60.0),
        egui::vec2(0.0, -80.0),
    ] {
        click_at(&mut h, centre + d);
    }
    assert_eq!(h.state().map.drawing.vertices.len(), 3);
    assert_eq!(
        h.state().session.selected,
        selected,
        "a click while drawing selected"
    );
    h.key_press(egui::Key::Enter);
    h.run_steps(3);
    assert!(!h.state().map.drawing.on);
    h.get_by_label("Save the drawn area (GeoJSON)");
    // What the save writes, read back by OGR through siting, as an area of the criteria.
    let ring = h
        .state_mut()
        .map
        .drawing
        .take_ring()
        .expect("a closed polygon");
    let dir = tempfile::tempdir().expect("temp dir");
    let file = dir.path().join("drawn.geojson");
    quietbowl_workbench::map_draw::write_area(&file, &ring).expect("written");
    areas_panel::add_area(&mut h.state_mut().session, &file, Keep::Outside, 0.0);
    h.run_steps(3);
    let s = &h.state().session;
    assert_eq!(s.criteria_error, None);
    let areas = s.areas.areas();
    assert_eq!(areas.len(), 1);
    let read = &areas[0].features[0].polygons[0][0];
    assert_eq!(read.len(), 4, "three vertices and the closing one");
    for (a, b) in ring.iter().zip(read) {
        assert!(
            (a.0 - b.0).abs() < 1e-9 && (a.1 - b.1).abs() < 1e-9,
            "{a:?} read as {b:?}"
        );
    }
}
