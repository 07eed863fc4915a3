//! The criteria panel driven as a user would (egui_kittest): every edit of a curve leaves the
//! criteria applied and re-ranks, yes/no limits are checkboxes, undo and redo round-trip, and
//! the value spreads are not recomputed per frame. The shipped default criteria are used, as a
//! new user meets them.

mod common;

use egui_kittest::kittest::{NodeT, Queryable};
use egui_kittest::Harness;
use quietbowl_workbench::{Session, WorkbenchApp};
use siting::Criteria;
use survey::SurveyFile;

/// Twelve invented craters that pass the default limits (0.8-2 km, d/D 0.15-0.3, Earth
/// hidden, far side, full coverage), spread over every measure the default criteria weigh;
/// Earth shielding 60-82 degrees for all, as on the demo, so that criterion decides nothing.
fn default_criteria_survey() -> SurveyFile {
    let candidates = (0..12u32)
        .map(|k| {
            let t = f64::from(k) / 11.0;
            let mut c = common::candidate(
                k + 1,
                850.0 + 1_000.0 * t,
                0.16 + 0.12 * ((k * 7 % 12) as f64 / 11.0),
                0.65 + 0.3 * ((k * 5 % 12) as f64 / 11.0),
                0.6 + 3.0 * ((k * 3 % 12) as f64 / 11.0),
                176.0 + f64::from(k) * 0.4,
                -12.0 + f64::from(k % 4),
            );
            c.crater.floor_tilt_deg = (8.0 * ((k * 11 % 12) as f64 / 11.0)) as _;
            c.crater.obstacle_fraction = (0.15 * t) as _;
            c.visibility = Some(visibility::SiteVisibility {
                earth_clearance_deg: 60.0 + 2.0 * f64::from(k),
                earth_clearance_sphere_deg: 60.0,
                limb_margin_deg: 30.0,
                far_side_band: true,
                gc_separation_deg: 12.0 + 3.0 * f64::from(k),
                plane_fraction: 0.2,
                plane_band_deg: 10.0,
                ..Default::default()
            });
            c
        })
        .collect();
    common::survey_of(candidates)
}

fn harness() -> Harness<'static, WorkbenchApp> {
    let app = WorkbenchApp::new(Session::with_survey_and_criteria(
        default_criteria_survey(),
        Criteria::default_reflector(),
    ));
    let mut h = Harness::builder()
        .with_size(egui::vec2(1600.0, 3000.0))
        .build_ui_state(|ui, app: &mut WorkbenchApp| app.ui(ui), app);
    h.run_steps(3);
    h
}

fn criterion<'a>(h: &'a Harness<'_, WorkbenchApp>, metric: &str) -> &'a siting::SoftCriterion {
    h.state()
        .session
        .criteria
        .criteria
        .iter()
        .find(|c| c.metric == metric)
        .expect("criterion present")
}

fn scores(h: &Harness<'_, WorkbenchApp>) -> Vec<f64> {
    let s = &h.state().session;
    (0..s.candidate_count())
        .map(|i| s.ranking.score(i).unwrap_or(f64::NAN))
        .collect()
}

/// The ranking follows the controls: criteria applied, a new ranking made, scores moved.
fn assert_applied_and_reranked(
    h: &Harness<'_, WorkbenchApp>,
    generation: u64,
    before: &[f64],
    what: &str,
) {
    let s = &h.state().session;
    assert_eq!(s.criteria_error, None, "{what}: criteria not applied");
    assert!(s.ranking.generation > generation, "{what}: no new ranking");
    assert_ne!(scores(h), before, "{what}: no score changed");
}

/// Type `value` into the worst or ideal field of a criterion, as a keyboard user would.
fn set_field(h: &mut Harness<'static, WorkbenchApp>, name: &str, value: f64) {
    h.get_by_label(name).set_value_accesskit(value);
    h.run_steps(3);
}

#[test]
fn moving_dd_worst_to_0_295_keeps_the_ranking_live() {
    // Bug 1 as reported: on the default criteria, d/D worst 0.300 -> 0.295 froze the ranking
    // with "worst (0.295) must be a breakpoint with utility 0".
    let mut h = harness();
    let (generation, before) = (h.state().session.ranking.generation, scores(&h));
    set_field(&mut h, "Worst of Depth/diameter (d/D)", 0.295);
    assert_applied_and_reranked(&h, generation, &before, "d/D worst");
    let c = criterion(&h, "depth_to_diameter");
    assert_eq!(c.worst, 0.295);
    // The other zero of the peaked curve stays where it was.
    assert_eq!(siting::utility::utility(c, Some(0.15)), 0.0);
}

#[test]
fn every_curve_end_can_be_moved_and_the_ranking_follows() {
    let mut h = harness();
    let metrics: Vec<String> = h
        .state()
        .session
        .criteria
        .criteria
        .iter()
        .map(|c| c.metric.clone())
        .collect();
    for metric in metrics {
        let heading = quietbowl_workbench::criteria_panel::heading_of(&metric);
        for (word, end) in [("Worst", true), ("Ideal", false)] {
            let c = criterion(&h, &metric).clone();
            // A tenth of the way toward the other end: the utility of candidates between
            // moves, so the scores must change unless the criterion decides nothing.
            let (from, to) = if end {
                (c.worst, c.ideal)
            } else {
                (c.ideal, c.worst)
            };
            let target = from + 0.1 * (to - from);
            let (generation, before) = (h.state().session.ranking.generation, scores(&h));
            set_field(&mut h, &format!("{word} of {heading}"), target);
            let s = &h.state().session;
            assert_eq!(s.criteria_error, None, "{word} of {metric}: not applied");
            assert!(
                s.ranking.generation > generation,
                "{word} of {metric}: no re-rank"
            );
            let moved = criterion(&h, &metric);
            let now = if end { moved.worst } else { moved.ideal };
            assert!(
                (now - target).abs() <= 1e-9 * target.abs().max(1.0),
                "{word} of {metric}: {now} != {target}"
            );
            if !h.state().criteria.curves.decides_nothing(&metric)
                && metric != "earth_clearance_deg"
            {
                assert_ne!(scores(&h), before, "{word} of {metric}: no score moved");
            }
        }
    }
}

/// Press at `from`, move in steps to `to`, release: a mouse drag.
fn drag(h: &mut Harness<'static, WorkbenchApp>, from: egui::Pos2, to: egui::Pos2) {
    h.hover_at(from);
    h.run_steps(2);
    h.event(egui::Event::PointerButton {
        pos: from,
        button: egui::PointerButton::Primary,
        pressed: true,
        modifiers: Default::default(),
    });
    h.step();
    for k in 1..=6 {
        let p = from + (to - from) * (k as f32 / 6.0);
        h.event(egui::Event::PointerMoved(p));
        h.step();
    }
    h.event(egui::Event::PointerButton {
        pos: to,
        button: egui::PointerButton::Primary,
        pressed: false,
        modifiers: Default::default(),
    });
    h.run_steps(3);
}

fn point_on_screen(h: &Harness<'_, WorkbenchApp>, metric: &str, k: usize) -> egui::Pos2 {
    h.state().criteria.points_on_screen[metric][k]
}

#[test]
fn dragging_curve_points_on_the_plot_keeps_the_criteria_applied() {
    let mut h = harness();
    // The d/D ideal (the peak, point 1) dragged right, then the worst (point 2) dragged left
    // past the peak: both held valid; then the diameter's free point (2 km, 0.3) dragged up.
    for (metric, k, dx, dy) in [
        ("depth_to_diameter", 1, 25.0, 0.0),
        ("depth_to_diameter", 2, -400.0, 0.0),
        ("diameter_m", 2, 0.0, -20.0),
    ] {
        let before_curve = criterion(&h, metric).clone();
        let (generation, before) = (h.state().session.ranking.generation, scores(&h));
        let from = point_on_screen(&h, metric, k);
        drag(&mut h, from, from + egui::vec2(dx, dy));
        assert_ne!(
            *criterion(&h, metric),
            before_curve,
            "{metric} point {k} did not move"
        );
        assert_applied_and_reranked(&h, generation, &before, &format!("{metric} point {k}"));
    }
    let c = criterion(&h, "depth_to_diameter");
    assert!(
        c.worst > c.ideal,
        "the worst end stays on its side of the peak"
    );
    // One drag, one undo step.
    let edits = 3;
    for _ in 0..edits {
        assert!(h.state_mut().session.undo_criteria());
    }
    assert_eq!(h.state().session.criteria, Criteria::default_reflector());
}

#[test]
fn undo_and_redo_round_trip_through_the_keyboard() {
    let mut h = harness();
    let original = h.state().session.criteria.clone();
    h.get_by_label("Weight of Floor tilt [°]")
        .set_value_accesskit(4.0);
    h.run_steps(3);
    set_field(&mut h, "Ideal of Rim completeness [%]", 0.9);
    h.get_by_label("Must be: in the far-side band").click();
    h.run_steps(3);
    let edited = h.state().session.criteria.clone();
    assert_ne!(edited, original);
    // Leave the last field (a typed entry keeps the keyboard for its own undo).
    h.ctx.memory_mut(|m| {
        if let Some(id) = m.focused() {
            m.surrender_focus(id)
        }
    });
    h.run_steps(2);
    for _ in 0..3 {
        h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
        h.run_steps(2);
    }
    assert_eq!(
        h.state().session.criteria,
        original,
        "undo goes back to the start"
    );
    assert_eq!(h.state().session.criteria_error, None);
    let shift_cmd = egui::Modifiers::COMMAND | egui::Modifiers::SHIFT;
    for _ in 0..3 {
        h.key_press_modifiers(shift_cmd, egui::Key::Z);
        h.run_steps(2);
    }
    assert_eq!(
        h.state().session.criteria,
        edited,
        "redo comes back to the edits"
    );
    // Revert to loaded is one more step, and can itself be undone.
    h.get_by_label("Revert to loaded").click();
    h.run_steps(3);
    assert_eq!(h.state().session.criteria, original);
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
    h.run_steps(2);
    assert_eq!(h.state().session.criteria, edited);
}

#[test]
fn yes_no_limits_are_checkboxes_and_switch_back_with_their_reason() {
    let mut h = harness();
    let original = h.state().session.criteria.clone();
    let far = h.get_by_label("Must be: in the far-side band");
    assert_eq!(far.accesskit_node().role(), egui::accesskit::Role::CheckBox);
    assert!(
        h.query_by_label("In the far-side band at least").is_none(),
        "no slider for a yes/no limit"
    );
    h.get_by_label("Must be: in the far-side band").click();
    h.run_steps(3);
    let s = &h.state().session;
    assert!(s
        .criteria
        .requirements
        .iter()
        .all(|r| r.metric != "far_side_band"));
    assert_eq!(s.criteria_error, None);
    h.get_by_label("Must be: in the far-side band").click();
    h.run_steps(3);
    assert_eq!(
        h.state().session.criteria,
        original,
        "same limit, same place, same reason"
    );
}

#[test]
fn weights_show_their_share_and_a_criterion_that_decides_nothing_is_flagged() {
    let h = harness();
    // Default weights 2, 1, 2, 1, 2, 1, 1, 2, 1: total 13; 2/13 = 15 %, 1/13 = 8 %.
    assert_eq!(h.query_all_by_label("15 %").count(), 4);
    assert_eq!(h.query_all_by_label("8 %").count(), 5);
    // Earth shielding 60-82 degrees, ideal 5: utility 1 for every candidate that passes.
    let curves = &h.state().criteria.curves;
    assert!(curves.decides_nothing("earth_clearance_deg"));
    for c in &h.state().session.criteria.criteria {
        if c.metric != "earth_clearance_deg" {
            assert!(!curves.decides_nothing(&c.metric), "{} flagged", c.metric);
        }
    }
    assert_eq!(h.query_all_by_label("decides nothing").count(), 1);
}

#[test]
fn value_spreads_are_built_per_limits_not_per_frame() {
    let mut h = harness();
    let built = h.state().criteria.curves.spread_builds;
    h.get_by_label("Weight of Floor tilt [°]")
        .set_value_accesskit(3.0);
    h.run_steps(10);
    set_field(&mut h, "Worst of Floor tilt [°]", 9.0);
    assert_eq!(
        h.state().criteria.curves.spread_builds,
        built,
        "rebuilt on a weight or curve edit"
    );
    set_field(&mut h, "Depth/diameter (d/D) at least", 0.17);
    assert_eq!(
        h.state().criteria.curves.spread_builds,
        built + 1,
        "not rebuilt on a limit edit"
    );
}
