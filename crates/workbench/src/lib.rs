//! The quietbowl workbench: a desktop window onto a survey: terrain view, candidate list,
//! weights and limits, and a crater sheet for the selected candidate.
//!
//! It reads the same survey model and criteria as the command line and calls the same
//! libraries for ranking and export; it computes nothing of its own beyond what is drawn.
//! Every panel is a struct with a `ui` method over plain data ([`Session`]) so it can be driven
//! in tests without a window.

pub mod app;
pub mod areas_panel;
pub mod charts;
pub mod compare;
pub mod crater_sheet;
pub mod criteria_panel;
pub mod engine;
pub mod export_dialog;
pub mod fit_plan;
pub mod fit_view;
pub mod job;
pub mod keys;
pub mod map;
pub mod map_draw;
pub mod map_grid;
pub mod map_legend;
pub mod marks;
pub mod open_dialog;
pub mod operations_view;
pub mod persistence;
pub mod profiles;
pub mod pyramid;
pub mod recovery;
pub mod reflector_editor;
pub mod score_view;
pub mod session;
pub mod shading;
pub mod shape_view;
pub mod sky_view;
pub mod survey_settings;
pub mod table;
pub mod utility_curve;

pub use app::WorkbenchApp;
pub use session::Session;

use std::path::{Path, PathBuf};
use std::time::Instant;

/// Shown wherever a ranking is shown and in the export dialog.
pub const SCREENING_CAUTION: &str = siting::SCREENING_CAUTION;

/// How the binary asks for the workbench.
#[derive(Clone, Default)]
pub struct WorkbenchOptions {
    /// A DEM, survey or study file to open at start; `None` opens `demo_dem`.
    pub open: Option<PathBuf>,
    /// The bundled demo terrain, opened when `open` is `None`.
    pub demo_dem: Option<PathBuf>,
    /// Select the candidate of this rank once the survey is ranked (screenshots, demos).
    pub select_rank: Option<u32>,
    /// Inner window size in points; default 1600 x 1000.
    pub window_size: Option<[f32; 2]>,
    /// Write a PNG of the whole window to this path once the start-up work has finished,
    /// then close (for scripted screenshots).
    pub screenshot_to: Option<PathBuf>,
    /// Print the time from `run` to the end of the first frame on stderr.
    pub report_first_frame: bool,
    /// Which page of the crater sheet to show first.
    pub sheet_tab: Option<crater_sheet::SheetTab>,
    /// Open the comparison on the candidates of these ranks (screenshots, demos).
    pub compare_ranks: Vec<u32>,
    /// Start the robustness analysis once the survey is ranked (screenshots, demos).
    pub robustness: bool,
    /// Runs a survey on a DEM opened without one (the binary passes the survey library's run).
    pub survey_runner: Option<job::SurveyRunner>,
    /// The map's layer and toggles at start (screenshots); default otherwise.
    pub map_settings: Option<map::MapSettings>,
    /// How longitudes are written at start (screenshots); default otherwise.
    pub lon_convention: Option<survey::LonConvention>,
    /// Area files added to the criteria at start (margin 0), each kept inside or outside.
    pub areas: Vec<(PathBuf, siting::areas::Keep)>,
}

#[derive(Debug, thiserror::Error)]
pub enum WorkbenchError {
    #[error("the window could not be opened: {0}")]
    Window(String),
}

/// Open the workbench window and run until it is closed.
pub fn run(options: WorkbenchOptions) -> Result<(), WorkbenchError> {
    let started = Instant::now();
    let size = options.window_size.unwrap_or([1600.0, 1000.0]);
    let native = eframe::NativeOptions {
        viewport: egui::ViewportBuilder::default()
            .with_inner_size(size)
            .with_title("quietbowl workbench")
            .with_drag_and_drop(true),
        ..Default::default()
    };
    eframe::run_native(
        "quietbowl-workbench",
        native,
        Box::new(move |cc| {
            let mut app = WorkbenchApp::new(Session::default());
            app.restore(cc.storage);
            if let Some(store) = recovery::RecoveryStore::in_user_data() {
                if let Some(problem) = app.persistence.use_store(store) {
                    app.status = problem;
                }
            }
            app.select_rank_on_load = options.select_rank;
            app.compare_ranks_on_load = options.compare_ranks.clone();
            app.robustness_on_load = options.robustness;
            app.sheet.tab = options.sheet_tab.unwrap_or_default();
            app.map.settings = options.map_settings.clone().unwrap_or_default();
            if let Some(lon) = options.lon_convention {
                app.session.lon_convention = lon;
            }
            app.survey_runner = Some(
                options
                    .survey_runner
                    .clone()
                    .unwrap_or_else(job::default_survey_runner),
            );
            for (path, keep) in &options.areas {
                areas_panel::add_area(&mut app.session, path, *keep, 0.0);
            }
            let first = options.open.clone().or(options.demo_dem.clone());
            if let Some(p) = first {
                app.open_path(&cc.egui_ctx, &p);
            }
            Ok(Box::new(Launcher {
                app,
                started,
                first_frame_reported: !options.report_first_frame,
                report_ready: options.report_first_frame,
                screenshot_to: options.screenshot_to.clone(),
                settled_frames: 0,
            }))
        }),
    )
    .map_err(|e| WorkbenchError::Window(e.to_string()))
}

/// Wraps the app with start-up chores: first-frame timing and the scripted screenshot.
struct Launcher {
    app: WorkbenchApp,
    started: Instant,
    first_frame_reported: bool,
    report_ready: bool,
    screenshot_to: Option<PathBuf>,
    settled_frames: u32,
}

impl eframe::App for Launcher {
    fn ui(&mut self, ui: &mut egui::Ui, frame: &mut eframe::Frame) {
        eframe::App::ui(&mut self.app, ui, frame);
        let busy = self.app.job.is_some()
            || self.app.session.robustness.is_running()
            || self.app.terrain.as_ref().is_some_and(|t| t.is_loading());
        if !self.first_frame_reported {
            self.first_frame_reported = true;
            eprintln!(
                "first frame drawn {:.3} s after start",
                self.started.elapsed().as_secs_f64()
            );
        }
        if self.report_ready && !busy {
            self.report_ready = false;
            eprintln!(
                "ready (survey ranked, terrain shaded) {:.3} s after start",
                self.started.elapsed().as_secs_f64()
            );
        }
        if self.screenshot_to.is_some() {
            self.settled_frames = if busy { 0 } else { self.settled_frames + 1 };
            ui.ctx().request_repaint();
            if self.settled_frames == 10 {
                if let Some(path) = self.screenshot_to.take() {
                    let ctx = ui.ctx().clone();
                    ui.ctx().request_screenshot(move |image| {
                        if let Err(e) = save_png(&path, &image) {
                            eprintln!("screenshot: {e}");
                        }
                        ctx.send_viewport_cmd(egui::ViewportCommand::Close);
                        ctx.request_repaint();
                    });
                    // A scripted picture ends the session without the unsaved-work question.
                    self.app.persistence.quit_confirmed = true;
                }
            }
        }
    }

    fn save(&mut self, storage: &mut dyn eframe::Storage) {
        eframe::App::save(&mut self.app, storage);
    }
}

/// Write bytes to `path` atomically (`terrain::atomic`), the error as a message for the window.
pub fn write_atomically(path: &Path, bytes: &[u8]) -> Result<(), String> {
    terrain::atomic::write_bytes(path, bytes)
        .map_err(|e| format!("cannot write {}: {e}", path.display()))
}

/// Save a picture as PNG (atomically).
pub fn save_png(path: &Path, image: &egui::ColorImage) -> Result<(), String> {
    let [w, h] = image.size;
    let raw: Vec<u8> = image
        .pixels
        .iter()
        .flat_map(|c| c.to_srgba_unmultiplied())
        .collect();
    let buf = image::RgbaImage::from_raw(w as u32, h as u32, raw)
        .ok_or("picture size does not match its pixels")?;
    let mut bytes = Vec::new();
    buf.write_to(
        &mut std::io::Cursor::new(&mut bytes),
        image::ImageFormat::Png,
    )
    .map_err(|e| e.to_string())?;
    write_atomically(path, &bytes)
}
