//! Frame time of the whole workbench while a weight moves, with 500,000 candidates: each
//! iteration changes one weight, re-ranks through `siting`, and runs one full frame (layout,
//! virtual table, map marks) headless. Target: under 16 ms (issue 6).
//!
//! Run: `cargo bench -p quietbowl-workbench --bench frame`

#[path = "../tests/common/mod.rs"]
mod common;

use criterion::{criterion_group, criterion_main, Criterion};
use egui_kittest::Harness;
use quietbowl_workbench::{Session, WorkbenchApp};
use std::time::Duration;

fn weight_drag_frame(c: &mut Criterion) {
    let mut group = c.benchmark_group("workbench");
    group
        .sample_size(20)
        .measurement_time(Duration::from_secs(20));
    for n in [5_000usize, 500_000] {
        let session =
            Session::with_survey_and_criteria(common::large_survey(n), common::test_criteria());
        let app = WorkbenchApp::new(session);
        let mut h = Harness::builder()
            .with_size(egui::vec2(1600.0, 1000.0))
            .build_ui_state(|ui, app: &mut WorkbenchApp| app.ui(ui), app);
        let mut w = 1.0;
        group.bench_function(format!("weight_change_frame_{n}"), |b| {
            b.iter(|| {
                w = if w > 4.0 { 0.5 } else { w + 0.1 };
                let app = h.state_mut();
                app.session.criteria.criteria[2].weight = w;
                app.session.rerank();
                h.step();
            })
        });
        let mut s3 =
            Session::with_survey_and_criteria(common::large_survey(n), common::test_criteria());
        let mut w3 = 1.0;
        group.bench_function(format!("rerank_only_{n}"), |b| {
            b.iter(|| {
                w3 = if w3 > 4.0 { 0.5 } else { w3 + 0.1 };
                s3.criteria.criteria[2].weight = w3;
                s3.rerank();
            })
        });
        let mut h2 = Harness::builder()
            .with_size(egui::vec2(1600.0, 1000.0))
            .build_ui_state(
                |ui, app: &mut WorkbenchApp| app.ui(ui),
                WorkbenchApp::new(Session::with_survey_and_criteria(
                    common::large_survey(n),
                    common::test_criteria(),
                )),
            );
        group.bench_function(format!("idle_frame_{n}"), |b| b.iter(|| h2.step()));
    }
    group.finish();
}

criterion_group!(benches, weight_drag_frame);
criterion_main!(benches);
