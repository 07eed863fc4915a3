//! Every string the workbench shows for the demo, read back the way a person meets it: the
//! AccessKit tree (panels, headers, table cells, sheet pages, failure reasons, dialogs) and
//! the text painted in the frame (plots, map). A metric's id (a `survey::METRICS` name, the
//! word used in files) may appear only inside a tooltip, as "id in files: ...".
//!
//! The demo is opened as a user opens it: the committed demo terrain, surveyed by the window
//! itself, ranked under the shipped criteria.

use egui_kittest::kittest::{NodeT, Queryable};
use egui_kittest::Harness;
use quietbowl_workbench::crater_sheet::SheetTab;
use quietbowl_workbench::{job, Session, WorkbenchApp};
use std::path::PathBuf;
use std::time::{Duration, Instant};

const SHEET_TABS: [SheetTab; 6] = [
    SheetTab::Shape,
    SheetTab::Sky,
    SheetTab::Fit,
    SheetTab::Robustness,
    SheetTab::Numbers,
    SheetTab::Notes,
];

fn demo_dem() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../demo-terrain/farside-patch.tif")
}

/// Step until the window has nothing running in the background (survey, shading, analysis).
fn settle(h: &mut Harness<'_, WorkbenchApp>) {
    // Not a speed check: a guard so a survey that never ends fails instead of hanging.
    let give_up = Instant::now() + Duration::from_secs(1800);
    loop {
        h.step();
        let app = h.state();
        let busy = app.job.is_some() || app.terrain.as_ref().is_some_and(|t| t.is_loading());
        if !busy {
            break;
        }
        assert!(Instant::now() < give_up, "the workbench stayed busy");
        std::thread::sleep(Duration::from_millis(50));
    }
    h.remove_cursor();
    h.run_steps(6);
}

fn open_demo() -> Harness<'static, WorkbenchApp> {
    let mut app = WorkbenchApp::new(Session::default());
    app.survey_runner = Some(job::default_survey_runner());
    app.select_rank_on_load = Some(1);
    let mut h = Harness::builder()
        .with_size(egui::vec2(1600.0, 1000.0))
        .build_ui_state(|ui, app: &mut WorkbenchApp| app.ui(ui), app);
    let ctx = h.ctx.clone();
    h.state_mut().open_path(&ctx, &demo_dem());
    settle(&mut h);
    assert!(
        h.state().session.candidate_count() > 0,
        "the demo survey found no candidates: {}",
        h.state().status
    );
    h
}

/// Metric ids written like identifiers (snake_case). Single words such as `ellipticity` are
/// also plain English and are left to the labels test in `survey::metrics`.
fn ids() -> Vec<&'static str> {
    survey::METRICS
        .iter()
        .map(|m| m.name)
        .filter(|n| n.contains('_'))
        .collect()
}

/// The metric ids `text` contains as whole words.
fn ids_in(text: &str) -> Vec<&'static str> {
    let words: Vec<&str> = text
        .split(|c: char| !(c.is_ascii_alphanumeric() || c == '_'))
        .collect();
    ids().into_iter().filter(|id| words.contains(id)).collect()
}

fn painted_text(shape: &egui::Shape, out: &mut Vec<String>) {
    match shape {
        egui::Shape::Vec(shapes) => shapes.iter().for_each(|s| painted_text(s, out)),
        egui::Shape::Text(t) => out.push(t.galley.text().to_owned()),
        _ => {}
    }
}

/// Every string on screen now, with whether it sits in a tooltip (AccessKit only: painted
/// text carries no such mark, so it is read with the pointer off the window).
fn on_screen(h: &Harness<'_, WorkbenchApp>) -> Vec<(String, bool)> {
    let mut out = Vec::new();
    for node in h.root().children_recursive() {
        let ak = node.accesskit_node();
        let mut in_tooltip = false;
        let mut up = node.parent();
        while let Some(p) = up {
            in_tooltip |= p.accesskit_node().role() == egui::accesskit::Role::Tooltip;
            up = p.parent();
        }
        in_tooltip |= ak.role() == egui::accesskit::Role::Tooltip;
        for text in [ak.label(), ak.value()].into_iter().flatten() {
            out.push((text, in_tooltip));
        }
        // egui gives a widget's hover text to AccessKit as its description: tooltip text.
        if let Some(text) = ak.description() {
            out.push((text, true));
        }
    }
    let mut painted = Vec::new();
    for clipped in &h.output().shapes {
        painted_text(&clipped.shape, &mut painted);
    }
    out.extend(painted.into_iter().map(|t| (t, false)));
    out
}

/// Where a metric id showed outside a tooltip, as "place: text".
fn ids_outside_tooltips(h: &Harness<'_, WorkbenchApp>, place: &str) -> Vec<String> {
    on_screen(h)
        .into_iter()
        .filter(|(text, in_tooltip)| !in_tooltip && !ids_in(text).is_empty())
        .map(|(text, _)| format!("{place}: {text:?}"))
        .collect()
}

fn every_sheet_page(h: &mut Harness<'_, WorkbenchApp>, who: &str, found: &mut Vec<String>) {
    for tab in SHEET_TABS {
        h.state_mut().sheet.tab = tab;
        h.run_steps(4);
        settle(h);
        found.extend(ids_outside_tooltips(
            h,
            &format!("{who}, sheet page {tab:?}"),
        ));
    }
}

#[test]
fn no_metric_id_shows_outside_tooltips_on_the_demo() {
    let mut h = open_demo();
    let mut found = ids_outside_tooltips(&h, "opening screen");

    // The best candidate, every page of its sheet.
    assert!(h.state().session.selected.is_some(), "rank 1 is selected");
    every_sheet_page(&mut h, "rank 1", &mut found);

    // A candidate that fails: its reasons in the sheet and in the list.
    let failing = {
        let s = &h.state().session;
        (0..s.candidate_count()).find(|&i| !s.ranking.passed(i))
    };
    let failing = failing.expect("the demo has candidates that fail the shipped limits");
    h.state_mut().session.select(Some(failing), false);
    h.get_by_label("Failing").click();
    h.run_steps(4);
    settle(&mut h);
    assert!(
        !h.state().session.reasons(failing).is_empty(),
        "a failing candidate has reasons"
    );
    every_sheet_page(&mut h, "a failing candidate", &mut found);

    assert!(
        found.is_empty(),
        "metric ids outside tooltips:\n{}",
        found.join("\n")
    );

    // After a robustness run the list carries rank probabilities.
    h.get_by_label("Rank probabilities").click();
    let give_up = Instant::now() + Duration::from_secs(600);
    while h.state().session.smaa.is_none() {
        assert!(
            Instant::now() < give_up,
            "the robustness run did not finish"
        );
        h.step();
        std::thread::sleep(Duration::from_millis(50));
    }
    settle(&mut h);
    h.get_by_label("P(rank 1)");
    found.extend(ids_outside_tooltips(&h, "after the robustness run"));

    // The export dialog.
    h.state_mut().export.open = true;
    settle(&mut h);
    found.extend(ids_outside_tooltips(&h, "export dialog"));

    assert!(
        found.is_empty(),
        "metric ids outside tooltips:\n{}",
        found.join("\n")
    );
}
