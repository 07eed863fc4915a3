//! "Reflector to fit": the structure of the criteria (`[structure]`) as editable fields, and a
//! refit of the survey in the background when it changes. The fit is the survey library's
//! (`survey::refit`); this panel only edits numbers, starts the job and adopts its result.

use crate::engine::Criteria;
use crate::fit_view::describe_spec;
use crate::job::{self, Job, JobOutcome};
use crate::session::Session;
use egui::{Color32, RichText};
use siting::criteria::{MAX_ANCHOR_COUNT, MIN_ANCHOR_COUNT};
use std::path::PathBuf;
use std::sync::Arc;
use structure::{Shape, StructureSpec};

const WARN_COLOUR: Color32 = Color32::from_rgb(240, 200, 120);
const FAIL_COLOUR: Color32 = Color32::from_rgb(240, 140, 120);
/// Field ranges: wide enough for any crater-hosted dish, narrow enough that a slip of the
/// mouse does not ask for a 100 km one (no source).
const APERTURE_RANGE_M: std::ops::RangeInclusive<f64> = 10.0..=10_000.0;
const F_OVER_D_RANGE: std::ops::RangeInclusive<f64> = 0.05..=5.0;
const HEIGHT_RANGE_M: std::ops::RangeInclusive<f64> = 0.0..=2_000.0;

/// The three ways the shape can be stated, as the combo box offers them.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum ShapeKind {
    Ratio,
    Focal,
    Cap,
}

impl ShapeKind {
    fn of(s: &Shape) -> ShapeKind {
        match s {
            Shape::ParaboloidRatio { .. } => ShapeKind::Ratio,
            Shape::Paraboloid { .. } => ShapeKind::Focal,
            Shape::SphericalCap { .. } => ShapeKind::Cap,
        }
    }

    fn name(self) -> &'static str {
        match self {
            ShapeKind::Ratio => "Paraboloid, by f/D",
            ShapeKind::Focal => "Paraboloid, by focal length",
            ShapeKind::Cap => "Spherical cap",
        }
    }
}

/// Focal length of a shape for an aperture (a cap's: half its radius, the paraboloid that
/// osculates the sphere at its vertex), so switching shape keeps the dish's depth close.
fn focal_length_m(shape: &Shape, aperture_m: f64) -> f64 {
    match *shape {
        Shape::Paraboloid { focal_length_m } => focal_length_m,
        Shape::ParaboloidRatio { f_over_d } => f_over_d * aperture_m,
        Shape::SphericalCap { radius_m } => radius_m / 2.0,
    }
}

fn convert(shape: &Shape, to: ShapeKind, aperture_m: f64) -> Shape {
    let f = focal_length_m(shape, aperture_m);
    match to {
        ShapeKind::Ratio => Shape::ParaboloidRatio {
            f_over_d: f / aperture_m,
        },
        ShapeKind::Focal => Shape::Paraboloid { focal_length_m: f },
        ShapeKind::Cap => Shape::SphericalCap {
            radius_m: (2.0 * f).max(aperture_m / 2.0),
        },
    }
}

#[derive(Default)]
pub struct ReflectorEditor {
    /// The fields as edited, not yet applied.
    pub draft: StructureSpec,
    /// What the draft was last set from (criteria or survey), to notice changes made elsewhere
    /// (criteria loaded, reset, a study opened).
    synced_from: Option<Option<StructureSpec>>,
    /// The refit in progress and the survey (by identity) it refits.
    pub job: Option<Job>,
    job_survey: usize,
    /// The DEM the window has open; tried when the survey's recorded DEM is not found.
    pub open_dem: Option<PathBuf>,
    pub message: Option<(bool, String)>,
}

fn survey_key(session: &Session) -> usize {
    session
        .survey
        .as_ref()
        .map_or(0, |s| Arc::as_ptr(s) as usize)
}

/// The spec the fits in the survey were made for.
fn fitted_spec(session: &Session) -> Option<&StructureSpec> {
    session
        .survey
        .as_ref()
        .and_then(|s| s.parameters.structure.as_ref())
}

impl ReflectorEditor {
    /// Adopt a finished refit. Call before the criteria panel clones the criteria for editing.
    pub fn poll(&mut self, session: &mut Session) {
        let Some(outcome) = self.job.as_ref().and_then(Job::try_finish) else {
            return;
        };
        self.job = None;
        self.message = Some(match outcome {
            JobOutcome::Survey { survey, .. } if self.job_survey == survey_key(session) => {
                let n = survey
                    .candidates
                    .iter()
                    .filter(|c| c.fit.as_ref().is_some_and(|f| f.fit_ok))
                    .count();
                let total = survey.candidates.len();
                session.replace_fits(*survey);
                (
                    true,
                    format!("Refitted: the reflector fits {n} of {total} candidates."),
                )
            }
            JobOutcome::Survey { .. } => (
                false,
                "The refit was for a survey no longer open; dropped.".into(),
            ),
            JobOutcome::Failed(e) => (false, e),
            JobOutcome::Cancelled => (false, "Refit cancelled; the fits are as before.".into()),
        });
    }

    fn sync(&mut self, session: &Session, criteria: &Criteria) {
        let source = criteria
            .structure
            .clone()
            .or_else(|| fitted_spec(session).cloned());
        if self.synced_from.as_ref() != Some(&source) {
            self.draft = source.clone().unwrap_or_default();
            self.synced_from = Some(source);
        }
    }

    /// The editor, drawn inside the criteria panel. Applying writes the spec into `edited` (the
    /// criteria being edited, so a save writes the `[structure]` table) and starts the refit.
    pub fn ui(&mut self, ui: &mut egui::Ui, session: &Session, edited: &mut Criteria) {
        self.sync(session, edited);
        let fitted = fitted_spec(session);
        ui.label(RichText::new("The dish fitted into every crater. Changing it refits the survey on its DEM; the measurements stay.").small());
        match fitted {
            Some(s) => ui.label(RichText::new(format!("Fits shown: {}", describe_spec(s))).small()),
            None => ui.label(RichText::new("This survey has no reflector fits yet.").small()),
        };
        let d = &mut self.draft;
        egui::Grid::new("reflector-fields")
            .num_columns(2)
            .spacing([10.0, 4.0])
            .show(ui, |ui| {
                let l = ui
                    .label("Aperture diameter")
                    .on_hover_text("diameter of the surface seen from above");
                let before = d.aperture_m;
                ui.add(
                    egui::DragValue::new(&mut d.aperture_m)
                        .range(APERTURE_RANGE_M)
                        .speed(1.0)
                        .suffix(" m")
                        .max_decimals(1),
                )
                .labelled_by(l.id);
                if let Shape::SphericalCap { radius_m } = &mut d.shape {
                    // Keep the cap able to span a wider aperture.
                    if d.aperture_m != before {
                        *radius_m = radius_m.max(d.aperture_m / 2.0);
                    }
                }
                ui.end_row();

                let l = ui.label("Shape");
                let mut kind = ShapeKind::of(&d.shape);
                let combo = egui::ComboBox::from_id_salt("reflector-shape")
                    .selected_text(kind.name())
                    .show_ui(ui, |ui| {
                        for k in [ShapeKind::Ratio, ShapeKind::Focal, ShapeKind::Cap] {
                            ui.selectable_value(&mut kind, k, k.name());
                        }
                    });
                let _ = combo.response.labelled_by(l.id);
                if kind != ShapeKind::of(&d.shape) {
                    d.shape = convert(&d.shape, kind, d.aperture_m);
                }
                ui.end_row();

                let half = d.aperture_m / 2.0;
                match &mut d.shape {
                    Shape::ParaboloidRatio { f_over_d } => {
                        let l = ui.label("Focal ratio f/D");
                        ui.add(
                            egui::DragValue::new(f_over_d)
                                .range(F_OVER_D_RANGE)
                                .speed(0.01)
                                .max_decimals(3),
                        )
                        .labelled_by(l.id);
                    }
                    Shape::Paraboloid { focal_length_m } => {
                        let l = ui.label("Focal length");
                        ui.add(
                            egui::DragValue::new(focal_length_m)
                                .range(1.0..=50_000.0)
                                .speed(1.0)
                                .suffix(" m")
                                .max_decimals(1),
                        )
                        .labelled_by(l.id);
                    }
                    Shape::SphericalCap { radius_m } => {
                        let l = ui
                            .label("Sphere radius")
                            .on_hover_text("at least half the aperture");
                        ui.add(
                            egui::DragValue::new(radius_m)
                                .range(half..=100_000.0)
                                .speed(1.0)
                                .suffix(" m")
                                .max_decimals(1),
                        )
                        .labelled_by(l.id);
                    }
                }
                ui.end_row();

                let l = ui
                    .label("Rim anchors")
                    .on_hover_text("evenly spaced round the axis, free to rotate");
                ui.add(
                    egui::DragValue::new(&mut d.anchors)
                        .range(MIN_ANCHOR_COUNT..=MAX_ANCHOR_COUNT)
                        .speed(0.05),
                )
                .labelled_by(l.id);
                ui.end_row();

                let l = ui.label("Least clearance").on_hover_text(
                    "smallest gap wanted between the surface and the ground under it",
                );
                ui.add(
                    egui::DragValue::new(&mut d.min_clearance_m)
                        .range(HEIGHT_RANGE_M)
                        .speed(0.5)
                        .suffix(" m")
                        .max_decimals(1),
                )
                .labelled_by(l.id);
                ui.end_row();

                let l = ui.label("Anchor height difference").on_hover_text(
                    "largest difference allowed between the highest and the lowest anchor",
                );
                ui.add(
                    egui::DragValue::new(&mut d.max_anchor_height_difference_m)
                        .range(HEIGHT_RANGE_M)
                        .speed(1.0)
                        .suffix(" m")
                        .max_decimals(1),
                )
                .labelled_by(l.id);
                ui.end_row();
            });

        let mut check = edited.clone();
        check.structure = Some(self.draft.clone());
        let invalid = check.validate().err().map(|e| e.to_string());
        let differs = fitted != Some(&self.draft);
        if let Some(job) = &self.job {
            ui.horizontal(|ui| {
                ui.add(
                    egui::ProgressBar::new(job.progress())
                        .desired_width(180.0)
                        .text(job.title.clone()),
                );
                if ui.button("Cancel").clicked() {
                    job.cancel();
                }
            });
        } else {
            if let Some(asked) = edited.structure.as_ref().filter(|s| Some(*s) != fitted) {
                ui.colored_label(
                    WARN_COLOUR,
                    format!(
                        "The criteria ask for {}; refit to rank by it.",
                        describe_spec(asked)
                    ),
                );
            }
            ui.horizontal(|ui| {
                let apply = ui
                    .add_enabled(
                        differs && invalid.is_none() && session.survey.is_some(),
                        egui::Button::new("Apply and refit"),
                    )
                    .on_hover_text("fit this reflector into every candidate again, then rank");
                if apply.clicked() {
                    edited.structure = Some(self.draft.clone());
                    self.synced_from = Some(edited.structure.clone());
                    self.start(ui.ctx(), session);
                }
                if ui
                    .add_enabled(differs, egui::Button::new("Undo edits"))
                    .clicked()
                {
                    self.draft = fitted.cloned().unwrap_or_default();
                }
            });
        }
        if let Some(e) = invalid {
            ui.colored_label(FAIL_COLOUR, e);
        }
        if let Some((ok, m)) = &self.message {
            ui.colored_label(
                if *ok {
                    Color32::from_rgb(130, 220, 140)
                } else {
                    FAIL_COLOUR
                },
                m,
            );
        }
    }

    fn start(&mut self, ctx: &egui::Context, session: &Session) {
        let Some(survey) = session.survey.clone() else {
            return;
        };
        let dem = match survey::locate_dem(&survey, session.survey_path.as_deref()) {
            Ok(p) => p,
            Err(e) => match self.open_dem.clone().filter(|p| p.is_file()) {
                Some(p) => p,
                None => {
                    self.message = Some((false, format!("Cannot refit: {e}. Open the DEM the survey was made from (File, Open), then apply again.")));
                    return;
                }
            },
        };
        self.message = None;
        self.job_survey = Arc::as_ptr(&survey) as usize;
        self.job = Some(job::refit_survey(survey, dem, self.draft.clone(), ctx));
    }
}
