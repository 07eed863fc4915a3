//! CPU time of one whole workbench frame, as eframe spends it before the GPU: the app's `ui`
//! (layout of every panel, the virtual table, the map marks) run by `egui::Context::run_ui`,
//! then `Context::tessellate` of everything painted. No window, no GPU upload, no AccessKit.
//!
//! Frames measured:
//! - `weight_change_frame_N`: one weight moves (a different value each frame), the session
//!   re-ranks through `siting`, then one full frame: what a frame costs while a slider drags;
//! - `idle_frame_N`: the same window with nothing changed (hover, animation, repaint);
//! - `rerank_only_N`: the re-rank alone, for comparison;
//! - `pan_frame_N`: the map dragged a few points every frame (the marks are rebuilt for each
//!   new view).
//!
//! N = 5,000 and 500,000 invented candidates over 60 x 80 degrees, window 1600 x 1000 points,
//! the map fitted to the whole survey (the densest view); and `demo`: the demo terrain opened
//! as the window opens it (survey read from `farside-patch.survey.json` beside it or, failing
//! that, run in the background; terrain shaded; rank 1 selected), or the survey file named by
//! `QUIETBOWL_BENCH_SURVEY`.
//!
//! Before Criterion's own figures, each case prints the median and the 10th-90th percentile
//! spread of single frames (`FRAME_SAMPLES` frames). Target: a weight-change frame under 16 ms
//! at 500,000 candidates (issue 6).
//!
//! Run: `cargo bench -p quietbowl-workbench --bench frame -- 500000`

#[path = "../tests/common/mod.rs"]
mod common;

use criterion::{criterion_group, criterion_main, Criterion};
use quietbowl_workbench::{Session, WorkbenchApp};
use std::path::PathBuf;
use std::time::{Duration, Instant};

/// Single frames timed for the printed median and spread.
const FRAME_SAMPLES: usize = 120;

/// A headless window: an egui context driving the app, with tessellation as eframe does it.
struct Window {
    ctx: egui::Context,
    app: WorkbenchApp,
}

impl Window {
    fn new(app: WorkbenchApp) -> Self {
        let mut w = Window {
            ctx: egui::Context::default(),
            app,
        };
        // Fonts, layout memory and the table's column widths settle over the first frames.
        for _ in 0..3 {
            w.frame();
        }
        w
    }

    /// One frame: `ui`, then tessellation; returns the number of clipped primitives.
    fn frame(&mut self) -> usize {
        self.frame_with(vec![])
    }

    /// One frame with input events.
    fn frame_with(&mut self, events: Vec<egui::Event>) -> usize {
        let input = egui::RawInput {
            events,
            screen_rect: Some(egui::Rect::from_min_size(
                egui::Pos2::ZERO,
                egui::vec2(1600.0, 1000.0),
            )),
            ..Default::default()
        };
        let app = &mut self.app;
        let out = self.ctx.run_ui(input, |ui| app.ui(ui));
        let prims = self.ctx.tessellate(out.shapes, out.pixels_per_point);
        std::hint::black_box(&prims);
        prims.len()
    }

    /// Move weight 2 to a new value and re-rank, as the criteria panel does on a drag.
    fn move_weight(&mut self, w: &mut f64) {
        *w = if *w > 4.0 { 0.5 } else { *w + 0.1 };
        let s = &mut self.app.session;
        let k = 2.min(s.criteria.criteria.len().saturating_sub(1));
        if let Some(c) = s.criteria.criteria.get_mut(k) {
            c.weight = *w;
        }
        s.rerank();
    }
}

/// CPU time used so far by the whole process (all threads), seconds. The machine is shared:
/// wall time then measures the queue for a core as much as the frame, CPU time does not.
fn process_cpu_s() -> f64 {
    let mut ts = libc::timespec {
        tv_sec: 0,
        tv_nsec: 0,
    };
    // SAFETY: `ts` is a valid, writable timespec for the duration of the call.
    let rc = unsafe { libc::clock_gettime(libc::CLOCK_PROCESS_CPUTIME_ID, &mut ts) };
    if rc == 0 {
        ts.tv_sec as f64 + ts.tv_nsec as f64 * 1e-9
    } else {
        f64::NAN
    }
}

/// Median and 10th-90th percentile wall time of `FRAME_SAMPLES` runs of `f`, and their mean
/// CPU time over all threads, in milliseconds.
fn spread(name: &str, mut f: impl FnMut()) {
    // Under a profiler (Criterion's --profile-time) only the named case should run.
    if std::env::args().any(|a| a == "--profile-time") {
        return;
    }
    let cpu0 = process_cpu_s();
    let mut t: Vec<f64> = (0..FRAME_SAMPLES)
        .map(|_| {
            let t0 = Instant::now();
            f();
            t0.elapsed().as_secs_f64() * 1e3
        })
        .collect();
    let cpu_ms = (process_cpu_s() - cpu0) * 1e3 / FRAME_SAMPLES as f64;
    t.sort_by(f64::total_cmp);
    let q = |p: f64| t[((t.len() - 1) as f64 * p).round() as usize];
    println!(
        "{name}: wall median {:.2} ms (p10 {:.2}, p90 {:.2}, max {:.2}); CPU {cpu_ms:.2} ms per \
         frame, all threads ({} frames, load {})",
        q(0.5),
        q(0.1),
        q(0.9),
        q(1.0),
        t.len(),
        std::fs::read_to_string("/proc/loadavg")
            .ok()
            .and_then(|l| l.split_whitespace().next().map(str::to_owned))
            .unwrap_or_else(|| "?".into())
    );
}

fn run_cases(c: &mut Criterion, label: &str, make: &dyn Fn() -> Window) {
    // Criterion's name filter, read here too so the slow set-up of an unwanted case is skipped.
    let mut filter = vec![];
    let mut args = std::env::args().skip(1);
    while let Some(a) = args.next() {
        if matches!(
            a.as_str(),
            "--profile-time"
                | "--warm-up-time"
                | "--measurement-time"
                | "--sample-size"
                | "--save-baseline"
                | "--baseline"
        ) {
            args.next();
        } else if !a.starts_with('-') {
            filter.push(a);
        }
    }
    let wanted = |f: &String| *f == label || f.ends_with(&format!("_{label}"));
    if !filter.is_empty() && !filter.iter().any(wanted) {
        return;
    }
    let mut group = c.benchmark_group("workbench");
    group
        .sample_size(20)
        .measurement_time(Duration::from_secs(8));

    let mut win = make();
    let mut w = 1.0;
    spread(&format!("weight_change_frame_{label}"), || {
        win.move_weight(&mut w);
        win.frame();
    });
    group.bench_function(format!("weight_change_frame_{label}"), |b| {
        b.iter(|| {
            win.move_weight(&mut w);
            win.frame()
        })
    });
    spread(&format!("idle_frame_{label}"), || {
        win.frame();
    });
    group.bench_function(format!("idle_frame_{label}"), |b| b.iter(|| win.frame()));
    spread(&format!("rerank_only_{label}"), || {
        win.move_weight(&mut w);
    });
    group.bench_function(format!("rerank_only_{label}"), |b| {
        b.iter(|| win.move_weight(&mut w))
    });
    // Drag the map: the pointer held down on it and moved a few points every frame.
    let grab = egui::pos2(740.0, 350.0);
    win.frame_with(vec![egui::Event::PointerMoved(grab)]);
    win.frame_with(vec![egui::Event::PointerButton {
        pos: grab,
        button: egui::PointerButton::Primary,
        pressed: true,
        modifiers: Default::default(),
    }]);
    let (mut dx, mut step) = (0.0f32, 4.0f32);
    let mut pan = move |win: &mut Window| {
        if dx.abs() > 200.0 {
            step = -step;
        }
        dx += step;
        win.frame_with(vec![egui::Event::PointerMoved(
            grab + egui::vec2(dx, 0.5 * dx),
        )])
    };
    spread(&format!("pan_frame_{label}"), || {
        pan(&mut win);
    });
    group.bench_function(format!("pan_frame_{label}"), |b| b.iter(|| pan(&mut win)));
    group.finish();
}

/// The real survey to measure besides the invented ones: `QUIETBOWL_BENCH_SURVEY`, else the
/// demo survey saved beside the demo terrain, else the demo terrain itself (surveyed in the
/// background on opening, as the window does).
fn real_survey() -> Option<PathBuf> {
    let demo = |name: &str| {
        PathBuf::from(concat!(env!("CARGO_MANIFEST_DIR"), "/../../demo-terrain/")).join(name)
    };
    std::env::var_os("QUIETBOWL_BENCH_SURVEY")
        .map(PathBuf::from)
        .or_else(|| Some(demo("farside-patch.survey.json")).filter(|p| p.exists()))
        .or_else(|| Some(demo("farside-patch.tif")).filter(|p| p.exists()))
}

fn frames(c: &mut Criterion) {
    for n in [5_000usize, 500_000] {
        run_cases(c, &n.to_string(), &|| {
            Window::new(WorkbenchApp::new(Session::with_survey_and_criteria(
                common::large_survey(n),
                common::test_criteria(),
            )))
        });
    }
    match real_survey() {
        Some(path) => run_cases(c, "demo", &|| {
            // Opened as the window opens it: survey read in the background, DEM shaded.
            let ctx = egui::Context::default();
            let mut app = WorkbenchApp::new(Session::default());
            app.select_rank_on_load = Some(1);
            app.survey_runner = Some(quietbowl_workbench::job::default_survey_runner());
            app.open_path(&ctx, &path);
            let t0 = Instant::now();
            let mut win = Window { ctx, app };
            while (win.app.job.is_some()
                || win.app.terrain.as_ref().is_some_and(|t| t.is_loading()))
                && t0.elapsed() < Duration::from_secs(600)
            {
                win.frame();
                std::thread::sleep(Duration::from_millis(20));
            }
            println!(
                "demo: {} candidates from {}",
                win.app.session.candidate_count(),
                path.display()
            );
            for _ in 0..3 {
                win.frame();
            }
            win
        }),
        None => println!("demo skipped: no demo terrain and no QUIETBOWL_BENCH_SURVEY"),
    }
}

criterion_group!(benches, frames);
criterion_main!(benches);
