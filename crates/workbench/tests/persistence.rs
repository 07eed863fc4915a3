//! Nothing the user decides is lost (egui_kittest): the unsaved-changes mark, the question on
//! quit and on opening another file, a study that survives save, quit and reopen, the
//! recovery offered after a crash, and reviews that stay with their own survey.

mod common;

use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use quietbowl_workbench::persistence::{Guarded, Persistence};
use quietbowl_workbench::recovery::RecoveryStore;
use quietbowl_workbench::session::candidate_label;
use quietbowl_workbench::{Session, WorkbenchApp};
use siting::study::Decision;
use std::path::Path;
use std::time::Duration;

fn harness_of(app: WorkbenchApp) -> Harness<'static, WorkbenchApp> {
    let mut h = Harness::builder()
        .with_size(egui::vec2(1600.0, 1000.0))
        .build_ui_state(|ui, app: &mut WorkbenchApp| app.ui(ui), app);
    h.run_steps(3);
    h
}

/// The small test survey, as if read from `survey.json` (so it is saved on disk).
fn app_on_saved_survey(dir: &Path) -> WorkbenchApp {
    let path = dir.join("survey.json");
    let survey = common::small_survey();
    survey.write(&path).expect("write the survey");
    let mut session = Session::with_survey_and_criteria(survey, common::test_criteria());
    session.survey_path = Some(path);
    session.survey_unsaved = false;
    WorkbenchApp::new(session)
}

/// Keep candidate `id` with a note, through the crater sheet's Notes page.
fn keep_with_note(h: &mut Harness<'static, WorkbenchApp>, id: u32, note: &str) {
    h.get_by_label(&candidate_label(id)).click();
    h.run_steps(4);
    h.get_by_label("Notes").click();
    h.run_steps(4);
    h.get_by_label("Keep").click();
    h.run_steps(2);
    h.state_mut().session.review_mut(id).note = note.to_owned();
    h.run_steps(2);
}

fn request_close(h: &mut Harness<'static, WorkbenchApp>) {
    h.input_mut()
        .viewports
        .entry(egui::ViewportId::ROOT)
        .or_default()
        .events
        .push(egui::ViewportEvent::Close);
    h.run_steps(3);
}

fn until_job_ends(h: &mut Harness<'static, WorkbenchApp>) {
    common::until_job_ends(h);
    h.run_steps(3);
}

#[test]
fn an_edit_marks_the_title_and_quitting_asks_first() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut h = harness_of(app_on_saved_survey(dir.path()));
    assert!(!Persistence::title(&h.state().session).contains("unsaved"));
    h.get_by_label("Weight of Floor roughness (RMS) [m]")
        .set_value_accesskit(3.0);
    h.run_steps(3);
    assert!(Persistence::title(&h.state().session).starts_with("● unsaved changes"));
    request_close(&mut h);
    assert_eq!(h.state().persistence.guard, Some(Guarded::Quit));
    h.get_by_label("Quit with unsaved changes?");
    h.get_by_label("Cancel").click();
    h.run_steps(3);
    assert_eq!(h.state().persistence.guard, None);
    assert!(
        !h.state().persistence.quit_confirmed,
        "cancel keeps the window"
    );
}

#[test]
fn opening_another_file_with_unsaved_decisions_asks_first() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut h = harness_of(app_on_saved_survey(dir.path()));
    keep_with_note(&mut h, 2, "good rim");
    let other = dir.path().join("other.survey.json");
    let ctx = h.ctx.clone();
    h.state_mut().guard_then(&ctx, Guarded::Open(other.clone()));
    h.run_steps(3);
    assert_eq!(h.state().persistence.guard, Some(Guarded::Open(other)));
    assert!(h.state().job.is_none(), "nothing opened before the answer");
    h.get_by_label_contains("and leave unsaved changes?");
}

#[test]
fn a_study_with_decisions_and_notes_survives_save_quit_and_reopen() {
    let dir = tempfile::tempdir().expect("temp dir");
    let study = dir.path().join("study.json");
    let mut h = harness_of(app_on_saved_survey(dir.path()));
    keep_with_note(&mut h, 2, "smooth floor, check the rim gap");
    h.get_by_label("Weight of Floor roughness (RMS) [m]")
        .set_value_accesskit(3.5);
    h.run_steps(3);
    let criteria = h.state().session.criteria.clone();
    h.state_mut().save_study_to(&study);
    h.run_steps(2);
    assert!(!h.state().session.is_dirty(), "saved");
    request_close(&mut h);
    assert_eq!(
        h.state().persistence.guard,
        None,
        "nothing to ask after a save"
    );
    drop(h);

    let mut h = harness_of(WorkbenchApp::new(Session::default()));
    let ctx = h.ctx.clone();
    h.state_mut().open_path(&ctx, &study);
    h.run_steps(4);
    let s = &h.state().session;
    assert_eq!(s.criteria, criteria, "criteria as saved");
    let review = s.reviews.get(&2).expect("the review came back");
    assert_eq!(review.decision, Decision::Accepted);
    assert_eq!(review.note, "smooth floor, check the rim gap");
    assert!(!s.is_dirty());
}

#[test]
fn after_a_crash_the_restart_offers_the_unsaved_work() {
    let data = tempfile::tempdir().expect("temp dir");
    let dir = tempfile::tempdir().expect("temp dir");
    let mut app = app_on_saved_survey(dir.path());
    app.persistence.use_store(RecoveryStore::new(data.path()));
    app.persistence.autosave_after = Duration::ZERO;
    let mut h = harness_of(app);
    keep_with_note(&mut h, 5, "anchors on the east rim");
    h.get_by_label("Weight of Floor roughness (RMS) [m]")
        .set_value_accesskit(2.5);
    h.run_steps(3);
    let criteria = h.state().session.criteria.clone();
    assert!(RecoveryStore::new(data.path()).file().exists(), "autosaved");
    // The crash: the window goes away without a clean quit.
    drop(h);

    let mut app = WorkbenchApp::new(Session::default());
    assert_eq!(
        app.persistence.use_store(RecoveryStore::new(data.path())),
        None
    );
    let mut h = harness_of(app);
    h.get_by_label("Restore unsaved work?");
    h.get_by_label("Restore").click();
    h.run_steps(2);
    until_job_ends(&mut h);
    let s = &h.state().session;
    assert_eq!(s.criteria, criteria);
    assert_eq!(
        s.reviews.get(&5).map(|r| r.note.as_str()),
        Some("anchors on the east rim")
    );
    assert!(s.is_dirty(), "restored work is still unsaved");
}

#[test]
fn a_survey_run_here_is_recovered_too_and_can_be_saved() {
    let data = tempfile::tempdir().expect("temp dir");
    let dir = tempfile::tempdir().expect("temp dir");
    // A survey with no file: as one run in the window.
    let mut app = WorkbenchApp::new(Session::with_survey_and_criteria(
        common::small_survey(),
        common::test_criteria(),
    ));
    app.persistence.use_store(RecoveryStore::new(data.path()));
    app.persistence.autosave_after = Duration::ZERO;
    let mut h = harness_of(app);
    assert!(h.state().session.is_dirty(), "a survey run here is unsaved");
    keep_with_note(&mut h, 1, "widest");
    drop(h);
    let mut app = WorkbenchApp::new(Session::default());
    app.persistence.use_store(RecoveryStore::new(data.path()));
    let mut h = harness_of(app);
    h.get_by_label("Restore").click();
    h.run_steps(2);
    until_job_ends(&mut h);
    assert_eq!(h.state().session.candidate_count(), common::ROWS.len());
    assert!(
        h.state().session.survey_unsaved,
        "still only in the recovery folder"
    );
    let path = dir.path().join("kept.survey.json");
    h.state_mut()
        .session
        .save_survey(&path)
        .expect("save survey");
    assert!(!h.state().session.survey_unsaved);
    assert!(path.exists());
}

#[test]
fn reviews_do_not_carry_over_to_another_survey() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut h = harness_of(app_on_saved_survey(dir.path()));
    keep_with_note(&mut h, 2, "note on survey A");
    // Survey B: same ids, other craters (shifted by a degree).
    let mut other = common::small_survey();
    for c in &mut other.candidates {
        c.crater.centre_lon_deg += 1.0;
    }
    let ctx = h.ctx.clone();
    h.state_mut().adopt_survey(&ctx, other, None);
    h.run_steps(3);
    let s = &h.state().session;
    assert!(s
        .reviews
        .values()
        .all(|r| r.note.is_empty() && r.decision == Decision::Undecided));
    assert!(s.to_study().expect("a survey").reviews.is_empty());
    // Survey A again: its note comes back.
    let a = common::small_survey();
    h.state_mut().adopt_survey(&ctx, a, None);
    h.run_steps(3);
    assert_eq!(
        h.state().session.reviews.get(&2).map(|r| r.note.as_str()),
        Some("note on survey A")
    );
}

#[test]
fn arrow_keys_and_j_k_step_through_the_list() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut h = harness_of(app_on_saved_survey(dir.path()));
    let order = h.state().table.rows(&h.state().session);
    h.key_press(egui::Key::J);
    h.run_steps(2);
    assert_eq!(h.state().session.selected, Some(order[0] as usize));
    h.key_press(egui::Key::ArrowDown);
    h.run_steps(2);
    assert_eq!(h.state().session.selected, Some(order[1] as usize));
    h.key_press(egui::Key::K);
    h.run_steps(2);
    assert_eq!(h.state().session.selected, Some(order[0] as usize));
}
