//! The workbench window: menus, panels, background work and file handling around a [`Session`].

use crate::crater_sheet::CraterSheet;
use crate::criteria_panel::{CriteriaPanel, CriteriaRequest};
use crate::export_dialog::{ExportDialog, ExportFormat, ExportRequest};
use crate::job::{self, Job, JobOutcome};
use crate::map::MapView;
use crate::open_dialog::{PathPrompt, PromptPurpose};
use crate::persistence::{Guarded, Persistence};
use crate::pyramid::TerrainLayer;
use crate::session::Session;
use crate::survey_settings::{SurveySettings, SurveySettingsDialog};
use crate::table::CandidateTable;
use crate::SCREENING_CAUTION;
use egui::{Color32, RichText};
use std::path::{Path, PathBuf};
use std::sync::Arc;
use terrain::{Dem, GridGeometry, MapProjection};

/// Key under which the app keeps its own settings in eframe's storage.
const STORAGE_KEY: &str = "quietbowl-workbench";

/// A DEM opened without a survey beside it is surveyed at once only up to this many pixels;
/// a larger one opens for viewing and the window offers the survey instead. 25 Mpx is about
/// half a minute at [`SURVEY_PX_PER_S`] (common practice, no source: the wait a person
/// accepts without being asked).
pub const ASK_BEFORE_SURVEY_ABOVE_PX: u64 = 25_000_000;

/// Pixels per second a survey with the default options gets through, for the estimate shown
/// with the offer: the demo survey, 4 Mpx in 5.2-6.8 s wall on the project machine (two
/// shared cores; docs/performance.md, "## Survey"). Rate depends on the diameter range and
/// the load, hence "roughly".
pub const SURVEY_PX_PER_S: f64 = 700_000.0;

/// A survey the window did not start by itself because the raster is large.
#[derive(Clone, Debug, PartialEq)]
pub struct SurveyOffer {
    pub dem_path: PathBuf,
    pub width_px: usize,
    pub height_px: usize,
}

impl SurveyOffer {
    /// The offer for `dem`, opened from `path`.
    pub fn of(path: &Path, dem: &Dem) -> Self {
        SurveyOffer {
            dem_path: path.to_path_buf(),
            width_px: dem.width(),
            height_px: dem.height(),
        }
    }

    pub fn pixels(&self) -> u64 {
        self.width_px as u64 * self.height_px as u64
    }

    /// Rough duration of the survey at [`SURVEY_PX_PER_S`], seconds.
    pub fn estimate_s(&self) -> f64 {
        self.pixels() as f64 / SURVEY_PX_PER_S
    }

    /// What the offer says, in one line.
    pub fn describe(&self) -> String {
        format!(
            "{} has no survey yet. It is large: {} x {} px ({}), so it was opened for viewing \
             only. A survey would take roughly {}.",
            self.dem_path
                .file_name()
                .map(|n| n.to_string_lossy().into_owned())
                .unwrap_or_default(),
            group_thousands(self.width_px as u64),
            group_thousands(self.height_px as u64),
            megapixels(self.pixels()),
            duration_words(self.estimate_s()),
        )
    }
}

/// 20000 -> "20,000".
fn group_thousands(v: u64) -> String {
    let digits = v.to_string();
    let mut out = String::new();
    for (k, c) in digits.chars().enumerate() {
        if k > 0 && (digits.len() - k) % 3 == 0 {
            out.push(',');
        }
        out.push(c);
    }
    out
}

fn megapixels(px: u64) -> String {
    let mpx = px as f64 / 1e6;
    if mpx >= 10.0 {
        format!("{mpx:.0} Mpx")
    } else {
        format!("{mpx:.1} Mpx")
    }
}

/// A duration as a person would say it: "40 s", "12 min", "3.5 h".
fn duration_words(s: f64) -> String {
    if !s.is_finite() || s < 0.0 {
        "an unknown time".into()
    } else if s < 90.0 {
        format!("{:.0} s", s.max(1.0))
    } else if s < 5400.0 {
        format!("{:.0} min", s / 60.0)
    } else {
        format!("{:.1} h", s / 3600.0)
    }
}

#[derive(Default, serde::Serialize, serde::Deserialize)]
struct Remembered {
    last_dir: Option<PathBuf>,
    /// What the last survey run from the window looked for.
    #[serde(default)]
    survey_settings: Option<SurveySettings>,
    /// How longitudes were written when the window last closed.
    #[serde(default)]
    lon_convention: Option<survey::LonConvention>,
}

pub struct WorkbenchApp {
    pub session: Session,
    pub map: MapView,
    pub table: CandidateTable,
    pub criteria: CriteriaPanel,
    pub sheet: CraterSheet,
    pub export: ExportDialog,
    pub terrain: Option<TerrainLayer>,
    /// Frame of reference for candidates when no DEM is open, with the survey it was made for.
    fallback_frame: Option<(usize, Arc<GridGeometry>)>,
    pub job: Option<Job>,
    prompt: Option<PathPrompt>,
    pub status: String,
    remembered: Remembered,
    /// Select this rank once a survey is ranked (start-up option).
    pub select_rank_on_load: Option<u32>,
    /// Compare the candidates of these ranks once a survey is ranked (start-up option).
    pub compare_ranks_on_load: Vec<u32>,
    /// Start the robustness analysis once the survey is ranked (screenshots, demos).
    pub robustness_on_load: bool,
    /// A study read from disk, adopted at the start of the next frame (needs the context).
    pending_study: Option<(siting::Study, PathBuf)>,
    /// Runs a survey when a DEM without one is opened (wired in by the binary).
    pub survey_runner: Option<job::SurveyRunner>,
    /// Rasters larger than this (pixels) are not surveyed on opening; the survey is offered.
    pub ask_before_survey_above_px: u64,
    /// The survey offered for the open DEM, if it was too large to start unasked.
    pub survey_offer: Option<SurveyOffer>,
    /// Unsaved-changes mark, questions before losing work, recovery file.
    pub persistence: Persistence,
    /// What a survey run from the window looks for.
    pub survey_settings: SurveySettingsDialog,
}

impl WorkbenchApp {
    pub fn new(session: Session) -> Self {
        WorkbenchApp {
            session,
            map: MapView::default(),
            table: CandidateTable::default(),
            criteria: CriteriaPanel::default(),
            sheet: CraterSheet::default(),
            export: ExportDialog::default(),
            terrain: None,
            fallback_frame: None,
            job: None,
            prompt: None,
            status: String::new(),
            remembered: Remembered::default(),
            select_rank_on_load: None,
            compare_ranks_on_load: Vec::new(),
            robustness_on_load: false,
            pending_study: None,
            survey_runner: None,
            ask_before_survey_above_px: ASK_BEFORE_SURVEY_ABOVE_PX,
            survey_offer: None,
            persistence: Persistence::default(),
            survey_settings: SurveySettingsDialog::default(),
        }
    }

    pub fn restore(&mut self, storage: Option<&dyn eframe::Storage>) {
        if let Some(r) = storage.and_then(|s| eframe::get_value::<Remembered>(s, STORAGE_KEY)) {
            if let Some(settings) = &r.survey_settings {
                self.survey_settings.settings = settings.clone();
            }
            if let Some(lon) = r.lon_convention {
                self.session.lon_convention = lon;
            }
            self.remembered = r;
        }
    }

    pub(crate) fn set_prompt(&mut self, prompt: PathPrompt) {
        self.prompt = Some(prompt);
    }

    /// Open any file the workbench understands, judged by its extension.
    pub fn open_path(&mut self, ctx: &egui::Context, path: &Path) {
        self.remembered.last_dir = path.parent().map(Path::to_path_buf);
        let ext = path
            .extension()
            .and_then(|e| e.to_str())
            .unwrap_or("")
            .to_lowercase();
        match ext.as_str() {
            "json" if looks_like_study(path) => self.open_study(path),
            "json" => {
                self.job = Some(job::load_survey(path.to_path_buf(), ctx));
            }
            "toml" => self.load_criteria(path),
            _ => {
                // A new terrain starts a new survey; criteria and decisions stay.
                self.session.survey = None;
                self.session.prepared = None;
                self.session.ranking = Default::default();
                self.session.selected = None;
                self.terrain = None;
                self.open_dem(ctx, path, true);
            }
        }
    }

    /// Open a DEM for the terrain view; with `survey_it`, also read the survey saved beside it
    /// or, failing that, run one in the background (a large raster only when asked to:
    /// see [`ASK_BEFORE_SURVEY_ABOVE_PX`]).
    pub fn open_dem(&mut self, ctx: &egui::Context, path: &Path, survey_it: bool) {
        match Dem::open(path, &Default::default()) {
            Ok(dem) => {
                let offer = SurveyOffer::of(path, &dem);
                self.terrain = Some(TerrainLayer::new(Arc::new(dem), ctx));
                self.map.refit();
                self.status = format!("Opened {}", path.display());
                self.survey_offer = None;
                // A survey saved beside the DEM is read with it.
                let beside = path.with_extension("survey.json");
                if survey_it {
                    if beside.exists() {
                        self.job = Some(job::load_survey(beside, ctx));
                    } else if self.survey_runner.is_some()
                        && offer.pixels() > self.ask_before_survey_above_px
                    {
                        self.status = format!(
                            "Opened {} for viewing; it is too large to survey unasked.",
                            path.display()
                        );
                        self.survey_offer = Some(offer);
                    } else if let Some(runner) = self.survey_runner.clone() {
                        self.job = Some(job::run_survey(
                            runner,
                            path.to_path_buf(),
                            self.survey_settings.settings.clone(),
                            ctx,
                        ));
                    } else {
                        self.status = format!(
                            "Opened {}; no survey of it yet (open one from File).",
                            path.display()
                        );
                    }
                }
            }
            Err(e) => self.status = format!("Could not open {}: {e}", path.display()),
        }
    }

    /// Start the offered survey of the open DEM in the background (progress and cancel in
    /// the status bar).
    pub fn start_offered_survey(&mut self, ctx: &egui::Context) {
        let (Some(offer), Some(runner)) = (self.survey_offer.take(), self.survey_runner.clone())
        else {
            return;
        };
        if self.job.is_some() {
            self.status = "Another task is running; the survey can start when it ends.".into();
            self.survey_offer = Some(offer);
            return;
        }
        self.status = format!(
            "Surveying {} in the background (roughly {}).",
            offer.dem_path.display(),
            duration_words(offer.estimate_s())
        );
        self.job = Some(job::run_survey(
            runner,
            offer.dem_path,
            self.survey_settings.settings.clone(),
            ctx,
        ));
    }

    /// The offer of a survey of a large DEM, above the map.
    fn survey_offer_ui(&mut self, ui: &mut egui::Ui) {
        let Some(offer) = &self.survey_offer else {
            return;
        };
        let text = offer.describe();
        let mut start = false;
        let mut dismiss = false;
        egui::Frame::group(ui.style())
            .fill(Color32::from_rgb(48, 44, 30))
            .show(ui, |ui| {
                ui.set_width(ui.available_width());
                ui.label(RichText::new(text).color(Color32::from_rgb(240, 225, 170)));
                ui.horizontal(|ui| {
                    start = ui
                        .button("Survey it in the background")
                        .on_hover_text("With the survey settings; progress and Cancel appear in the status bar")
                        .clicked();
                    if ui.button("Survey settings…").clicked() {
                        self.survey_settings.open = true;
                    }
                    dismiss = ui.button("Just view it").clicked();
                });
            });
        if start {
            self.start_offered_survey(ui.ctx());
        } else if dismiss {
            self.survey_offer = None;
            self.status = "Viewing only; File > Survey the open terrain starts a survey.".into();
        }
    }

    fn open_study(&mut self, path: &Path) {
        match siting::Study::open(path) {
            Ok(study) => {
                self.pending_study = Some((study, path.to_path_buf()));
                self.status = format!("Opened study {}", path.display());
            }
            Err(e) => self.status = format!("Could not open the study {}: {e}", path.display()),
        }
    }

    /// Add an area file to the criteria (one undo step) and say how it went.
    fn add_area(&mut self, path: &Path, keep: siting::areas::Keep, margin_km: f64) {
        crate::areas_panel::add_area(&mut self.session, path, keep, margin_km);
        self.status = match &self.session.criteria_error {
            Some(e) => format!("Added {}, not applied: {e}", path.display()),
            None => format!("{} added: {}", keep.noun(), path.display()),
        };
    }

    fn load_criteria(&mut self, path: &Path) {
        match std::fs::read_to_string(path)
            .map_err(|e| e.to_string())
            .and_then(|t| crate::engine::Criteria::parse(&t).map_err(|e| e.to_string()))
        {
            Ok(c) => {
                self.session.criteria_dir = path.parent().map(Path::to_path_buf);
                self.session.criteria_baseline = c.clone();
                crate::criteria_panel::apply(&mut self.session, c);
                self.status = format!("Criteria read from {}", path.display());
            }
            Err(e) => self.status = format!("Could not read criteria from {}: {e}", path.display()),
        }
    }

    /// Adopt a survey: rank it, find its DEM if none is open, select the requested rank.
    pub fn adopt_survey(
        &mut self,
        ctx: &egui::Context,
        survey: survey::SurveyFile,
        path: Option<PathBuf>,
    ) {
        let dem_path = PathBuf::from(&survey.input.path);
        self.status = format!("{} candidates", survey.candidates.len());
        self.survey_offer = None;
        self.session.set_survey(survey, path);
        self.restore_if_pending();
        self.after_survey(ctx, Some(dem_path));
    }

    /// Find the survey's DEM if none is open, frame the map, select the requested rank.
    fn after_survey(&mut self, ctx: &egui::Context, dem_path: Option<PathBuf>) {
        let base = self
            .session
            .survey_path
            .as_ref()
            .and_then(|p| p.parent())
            .map(Path::to_path_buf);
        // A relative DEM path is tried beside the survey, then from the working folder (where
        // the survey was run), then by its file name beside the survey.
        let dem_path = dem_path.and_then(|d| {
            if d.is_absolute() {
                return Some(d);
            }
            let mut tries = vec![];
            if let Some(b) = &base {
                tries.push(b.join(&d));
            }
            tries.push(d.clone());
            if let (Some(b), Some(name)) = (&base, d.file_name()) {
                tries.push(b.join(name));
            }
            tries.into_iter().find(|p| p.exists())
        });
        if let Some(dem_path) = dem_path.filter(|d| self.terrain.is_none() && d.exists()) {
            self.open_dem(ctx, &dem_path, false);
        }
        self.map.refit();
        if let Some(rank) = self.select_rank_on_load.take() {
            let idx = self.session.index_of_rank(rank);
            self.session.select(idx, false);
        }
        for rank in std::mem::take(&mut self.compare_ranks_on_load) {
            if let Some(i) = self.session.index_of_rank(rank) {
                self.session.compare.toggle(i);
            }
        }
        if std::mem::take(&mut self.robustness_on_load) {
            self.session.start_robustness(ctx);
        }
    }

    fn poll_job(&mut self, ctx: &egui::Context) {
        let Some(outcome) = self.job.as_ref().and_then(Job::try_finish) else {
            return;
        };
        self.job = None;
        match outcome {
            JobOutcome::Survey { survey, path } => self.adopt_survey(ctx, *survey, path),
            JobOutcome::Failed(e) => self.status = e,
            JobOutcome::Cancelled => self.status = "Cancelled.".into(),
        }
    }

    fn frame(&mut self) -> Option<Arc<GridGeometry>> {
        if let Some(t) = &self.terrain {
            return Some(t.geometry());
        }
        let survey = self.session.survey.as_ref()?;
        let key = Arc::as_ptr(survey) as usize;
        if self.fallback_frame.as_ref().map(|f| f.0) != Some(key) {
            self.fallback_frame = frame_around_candidates(survey).map(|g| (key, g));
        }
        self.fallback_frame.as_ref().map(|f| f.1.clone())
    }

    fn handle_prompt(&mut self, ctx: &egui::Context) {
        let Some(prompt) = &mut self.prompt else {
            return;
        };
        let Some(answer) = prompt.ui(ctx) else { return };
        let purpose = prompt.purpose;
        let margin_km = prompt.margin_km;
        self.prompt = None;
        let Some(path) = answer else { return };
        match purpose {
            PromptPurpose::Open => self.guard_then(ctx, Guarded::Open(path)),
            PromptPurpose::LoadCriteria => self.load_criteria(&path),
            PromptPurpose::AddArea(keep) => self.add_area(&path, keep, margin_km),
            PromptPurpose::SaveDrawnArea(keep) => {
                let written = self.map.drawing.take_ring().map_or_else(
                    || Err("no polygon was drawn".to_string()),
                    |ring| crate::map_draw::write_area(&path, &ring),
                );
                match written {
                    Ok(()) => self.add_area(&path, keep, margin_km),
                    Err(e) => self.status = format!("Could not save the drawn area: {e}"),
                }
            }
            PromptPurpose::SaveCriteria => {
                self.status = match crate::write_atomically(
                    &path,
                    self.session.criteria_to_save().to_toml().as_bytes(),
                ) {
                    Ok(()) => format!("Criteria saved to {}", path.display()),
                    Err(e) => format!("Could not save criteria: {e}"),
                }
            }
            PromptPurpose::SaveStudy => {
                self.save_study_to(&path);
                if let Some(then) = self.persistence.after_save.take() {
                    if !self.session.is_dirty() {
                        self.perform(ctx, then);
                    }
                }
            }
            PromptPurpose::SaveSurvey => {
                self.status = match self.session.save_survey(&path) {
                    Ok(()) => format!("Survey saved to {}", path.display()),
                    Err(e) => format!("Could not save the survey: {e}"),
                }
            }
        }
    }

    pub(crate) fn start_dir(&self) -> PathBuf {
        self.remembered
            .last_dir
            .clone()
            .or_else(|| std::env::current_dir().ok())
            .unwrap_or_default()
    }

    fn handle_export(&mut self, ctx: &egui::Context, req: ExportRequest) {
        match req.format {
            ExportFormat::MapPicture => self.export.request_picture(ctx, req.path),
            _ => {
                self.export.status = Some(crate::engine::export(&self.session, &req));
            }
        }
    }

    /// The whole window. Panels are laid out outside-in; the criteria panel comes first so a
    /// weight change re-ranks before the list and the map are drawn in the same frame.
    pub fn ui(&mut self, ui: &mut egui::Ui) {
        let ctx = ui.ctx().clone();
        self.poll_job(&ctx);
        if let Some((study, path)) = self.pending_study.take() {
            let dem = PathBuf::from(&study.dem_path);
            self.survey_offer = None;
            self.session.adopt_study(study, Some(path));
            self.restore_if_pending();
            self.after_survey(&ctx, Some(dem));
        }
        if let Some(t) = &mut self.terrain {
            t.poll(&ctx);
        }
        let dropped: Vec<PathBuf> = ctx.input(|i| {
            i.raw
                .dropped_files
                .iter()
                .map(|f| f.path().to_path_buf())
                .filter(|p| !p.as_os_str().is_empty())
                .collect()
        });
        for p in dropped {
            self.guard_then(&ctx, Guarded::Open(p));
        }
        self.shortcuts(&ctx);

        egui::Panel::top("menu").show(ui, |ui| {
            egui::MenuBar::new().ui(ui, |ui| {
                ui.menu_button("File", |ui| self.file_menu(ui));
                ui.menu_button("Edit", |ui| self.edit_menu(ui));
                ui.menu_button("View", |ui| {
                    if ui.button("Fit terrain to window").clicked() {
                        self.map.refit();
                    }
                    let mut show = !self.map.hide_placed_reflector;
                    if ui
                        .checkbox(&mut show, "Placed reflector of the selected crater")
                        .changed()
                    {
                        self.map.hide_placed_reflector = !show;
                    }
                });
            });
        });
        egui::Panel::bottom("status").show(ui, |ui| {
            ui.horizontal(|ui| {
                if let Some(job) = &self.job {
                    ui.add(
                        egui::ProgressBar::new(job.progress())
                            .desired_width(200.0)
                            .text(job.title.clone()),
                    );
                    if ui.button("Cancel").clicked() {
                        job.cancel();
                    }
                } else if self.terrain.as_ref().is_some_and(TerrainLayer::is_loading) {
                    ui.spinner();
                    ui.label("Shading terrain…");
                }
                ui.label(&self.status);
            });
            ui.label(
                RichText::new(format!("{SCREENING_CAUTION} {}", siting::VERDICT_SCOPE))
                    .small()
                    .color(Color32::from_rgb(230, 200, 120)),
            );
        });
        egui::Panel::left("criteria")
            .resizable(true)
            .default_size(320.0)
            .show(ui, |ui| {
                self.criteria.reflector.open_dem =
                    self.terrain.as_ref().map(|t| t.dem.info().path.clone());
                self.criteria.ui(ui, &mut self.session);
            });
        match self.criteria.request.take() {
            Some(CriteriaRequest::Save) => {
                self.prompt = Some(PathPrompt::new(
                    PromptPurpose::SaveCriteria,
                    &self.start_dir().join("criteria.toml"),
                ))
            }
            Some(CriteriaRequest::Load) => {
                self.prompt = Some(PathPrompt::new(
                    PromptPurpose::LoadCriteria,
                    &self.start_dir(),
                ))
            }
            None => {}
        }
        egui::Panel::right("sheet")
            .resizable(true)
            .default_size(440.0)
            .show(ui, |ui| {
                let dem = self.terrain.as_ref().map(|t| t.dem.clone());
                self.sheet.ui(ui, &mut self.session, dem.as_ref());
            });
        egui::Panel::bottom("table")
            .resizable(true)
            .default_size(300.0)
            .min_size(120.0)
            .show(ui, |ui| {
                // Fill the panel so it keeps its size instead of shrinking to the rows it shows.
                ui.set_min_height(ui.available_height());
                self.table.ui(ui, &mut self.session);
            });
        egui::CentralPanel::default().show(ui, |ui| {
            self.survey_offer_ui(ui);
            let frame = self.frame();
            self.map
                .ui(ui, &mut self.session, self.terrain.as_mut(), frame);
        });
        if self.map.drawing.wants_saving() {
            let keep = self.map.drawing.keep;
            let start = self.start_dir().join("drawn-area.geojson");
            self.set_prompt(PathPrompt::new(PromptPurpose::SaveDrawnArea(keep), &start));
        }
        self.handle_prompt(&ctx);
        if let Some(req) = self.export.ui(&ctx) {
            self.handle_export(&ctx, req);
        }
        self.export.capture_map(&ctx, self.map.last_rect);
        self.survey_settings_frame(&ctx);
        self.persistence_frame(&ctx);
    }

    /// The survey settings dialog; starting it runs the survey of the open terrain.
    fn survey_settings_frame(&mut self, ctx: &egui::Context) {
        let can_start =
            self.terrain.is_some() && self.job.is_none() && self.survey_runner.is_some();
        if let Some(settings) = self.survey_settings.ui(ctx, can_start) {
            self.remembered.survey_settings = Some(settings);
            if self.survey_offer.is_none() {
                self.survey_offer = self
                    .terrain
                    .as_ref()
                    .map(|t| SurveyOffer::of(&t.dem.info().path, &t.dem));
            }
            self.start_offered_survey(ctx);
        }
    }
}

impl eframe::App for WorkbenchApp {
    fn ui(&mut self, ui: &mut egui::Ui, _frame: &mut eframe::Frame) {
        WorkbenchApp::ui(self, ui);
    }

    fn save(&mut self, storage: &mut dyn eframe::Storage) {
        self.remembered.lon_convention = Some(self.session.lon_convention);
        eframe::set_value(storage, STORAGE_KEY, &self.remembered);
    }
}

/// A study file names its format near the top; a survey file does not.
fn looks_like_study(path: &Path) -> bool {
    use std::io::Read;
    let mut head = [0u8; 512];
    let n = std::fs::File::open(path)
        .and_then(|mut f| f.read(&mut head))
        .unwrap_or(0);
    String::from_utf8_lossy(&head[..n]).contains(siting::study::STUDY_FORMAT)
}

/// A geographic frame a little larger than the candidates' extent, for surveys opened
/// without their DEM.
fn frame_around_candidates(survey: &survey::SurveyFile) -> Option<Arc<GridGeometry>> {
    let c = &survey.candidates;
    if c.is_empty() {
        return None;
    }
    let (mut lo_lon, mut hi_lon, mut lo_lat, mut hi_lat) = (
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::INFINITY,
        f64::NEG_INFINITY,
    );
    for m in c.iter().map(|c| &c.crater) {
        lo_lon = lo_lon.min(m.centre_lon_deg);
        hi_lon = hi_lon.max(m.centre_lon_deg);
        lo_lat = lo_lat.min(m.centre_lat_deg);
        hi_lat = hi_lat.max(m.centre_lat_deg);
    }
    let pad = 0.05 * (hi_lon - lo_lon).max(hi_lat - lo_lat).max(0.1);
    let step = ((hi_lon - lo_lon).max(hi_lat - lo_lat) + 2.0 * pad) / 4000.0;
    let width = ((hi_lon - lo_lon + 2.0 * pad) / step).ceil() as usize;
    let height = ((hi_lat - lo_lat + 2.0 * pad) / step).ceil() as usize;
    Some(Arc::new(GridGeometry {
        width,
        height,
        geotransform: [lo_lon - pad, step, 0.0, hi_lat + pad, 0.0, -step],
        projection: MapProjection::Geographic,
        body_radius_m: survey.input.body_radius_m,
    }))
}
