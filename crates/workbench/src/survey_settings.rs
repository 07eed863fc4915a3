//! What a survey run from the window looks for: the diameter range, a crater catalogue to
//! measure, and the reflector to fit. Chosen in a dialog before a survey starts and kept
//! between sessions; the survey itself is the survey library's (`job::SurveyRunner`).

use serde::{Deserialize, Serialize};
use std::path::PathBuf;
use structure::{Shape, StructureSpec};

/// The survey options a person chooses; the rest stay at the survey library's defaults.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct SurveySettings {
    /// `None`: the library's default (3 pixels up to a third of a tile).
    pub diameter_min_m: Option<f64>,
    pub diameter_max_m: Option<f64>,
    /// A crater catalogue (CSV, GeoJSON, ...) whose craters are measured too.
    pub catalogue: Option<PathBuf>,
    /// Detect craters in the DEM (off: measure only the catalogue's).
    pub detect: bool,
    /// The reflector fitted into every candidate; `None`: no fit.
    pub structure: Option<StructureSpec>,
}

impl Default for SurveySettings {
    fn default() -> Self {
        let run = survey::RunOptions::default();
        SurveySettings {
            diameter_min_m: run.diameter_min_m,
            diameter_max_m: run.diameter_max_m,
            catalogue: run.catalogue,
            detect: run.detect,
            structure: run.structure,
        }
    }
}

impl SurveySettings {
    /// The survey library's options with these settings.
    pub fn run_options(&self) -> survey::RunOptions {
        survey::RunOptions {
            diameter_min_m: self.diameter_min_m,
            diameter_max_m: self.diameter_max_m,
            catalogue: self.catalogue.clone(),
            detect: self.detect,
            structure: self.structure.clone(),
            ..Default::default()
        }
    }

    /// Why these settings cannot run, if they cannot.
    pub fn problem(&self) -> Option<String> {
        if let (Some(a), Some(b)) = (self.diameter_min_m, self.diameter_max_m) {
            if a >= b {
                return Some("The smallest diameter must be below the largest.".into());
            }
        }
        if [self.diameter_min_m, self.diameter_max_m]
            .iter()
            .flatten()
            .any(|v| !v.is_finite() || *v <= 0.0)
        {
            return Some("Diameters must be positive.".into());
        }
        if !self.detect && self.catalogue.is_none() {
            return Some("With detection off, a catalogue is needed.".into());
        }
        if let Some(s) = &self.structure {
            if let Err(e) = s.validate() {
                return Some(format!("Reflector: {e}"));
            }
        }
        None
    }
}

/// The settings dialog.
#[derive(Default)]
pub struct SurveySettingsDialog {
    pub open: bool,
    pub settings: SurveySettings,
    /// The catalogue path as typed.
    catalogue_text: String,
    synced: bool,
}

impl SurveySettingsDialog {
    /// Show the dialog; returns the settings when the user starts the survey.
    pub fn ui(&mut self, ctx: &egui::Context, can_start: bool) -> Option<SurveySettings> {
        if !self.open {
            self.synced = false;
            return None;
        }
        if !self.synced {
            self.catalogue_text = self
                .settings
                .catalogue
                .as_ref()
                .map(|p| p.display().to_string())
                .unwrap_or_default();
            self.synced = true;
        }
        let mut start = false;
        let mut open = true;
        egui::Window::new("Survey settings")
            .open(&mut open)
            .collapsible(false)
            .resizable(false)
            .show(ctx, |ui| {
                ui.label(
                    "What the survey of the open terrain looks for. Kept for the next survey.",
                );
                self.fields_ui(ui);
                let problem = self.settings.problem();
                if let Some(p) = &problem {
                    ui.colored_label(egui::Color32::from_rgb(240, 140, 120), p);
                }
                ui.horizontal(|ui| {
                    start = ui
                        .add_enabled(
                            can_start && problem.is_none(),
                            egui::Button::new("Start the survey"),
                        )
                        .on_disabled_hover_text("needs an open terrain and no other task running")
                        .clicked();
                    if ui.button("Defaults").clicked() {
                        self.settings = SurveySettings::default();
                        self.synced = false;
                    }
                });
            });
        self.open = open && !start;
        start.then(|| self.settings.clone())
    }

    fn fields_ui(&mut self, ui: &mut egui::Ui) {
        let s = &mut self.settings;
        egui::Grid::new("survey-settings")
            .num_columns(2)
            .spacing([10.0, 6.0])
            .show(ui, |ui| {
                for (word, value, default_m) in [
                    ("Smallest diameter", &mut s.diameter_min_m, 500.0),
                    ("Largest diameter", &mut s.diameter_max_m, 5_000.0),
                ] {
                    ui.label(word);
                    ui.horizontal(|ui| {
                        let mut auto = value.is_none();
                        if ui
                            .checkbox(&mut auto, "automatic")
                            .on_hover_text("from the DEM's pixel size and tile size")
                            .changed()
                        {
                            *value = (!auto).then_some(default_m);
                        }
                        if let Some(v) = value {
                            let r = ui.add(
                                egui::DragValue::new(v)
                                    .range(1.0..=1.0e6)
                                    .speed(10.0)
                                    .suffix(" m"),
                            );
                            ui.ctx().accesskit_node_builder(r.id, |n| n.set_label(word));
                        }
                    });
                    ui.end_row();
                }
                ui.label("Crater catalogue");
                ui.horizontal(|ui| {
                    let r = ui.add(
                        egui::TextEdit::singleline(&mut self.catalogue_text)
                            .hint_text("none (path to CSV or GeoJSON)")
                            .desired_width(240.0),
                    );
                    if r.changed() {
                        let t = self.catalogue_text.trim();
                        s.catalogue = (!t.is_empty()).then(|| PathBuf::from(t));
                    }
                });
                ui.end_row();
                ui.label("Find craters");
                ui.checkbox(&mut s.detect, "detect in the DEM as well");
                ui.end_row();
                ui.label("Reflector to fit");
                let mut fit = s.structure.is_some();
                ui.horizontal(|ui| {
                    if ui.checkbox(&mut fit, "fit").changed() {
                        s.structure = fit.then(StructureSpec::default);
                    }
                    if let Some(spec) = &mut s.structure {
                        ui.add(
                            egui::DragValue::new(&mut spec.aperture_m)
                                .range(10.0..=10_000.0)
                                .speed(5.0)
                                .prefix("aperture ")
                                .suffix(" m"),
                        );
                        if let Shape::ParaboloidRatio { f_over_d } = &mut spec.shape {
                            ui.add(
                                egui::DragValue::new(f_over_d)
                                    .range(0.05..=5.0)
                                    .speed(0.01)
                                    .prefix("f/D "),
                            );
                        }
                        ui.add(
                            egui::DragValue::new(&mut spec.anchors)
                                .range(
                                    siting::criteria::MIN_ANCHOR_COUNT
                                        ..=siting::criteria::MAX_ANCHOR_COUNT,
                                )
                                .suffix(" anchors"),
                        );
                    }
                });
                ui.end_row();
            });
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn defaults_are_the_survey_library_defaults() {
        let s = SurveySettings::default();
        let run = survey::RunOptions::default();
        assert_eq!(s.run_options().structure, run.structure);
        assert_eq!(s.run_options().diameter_min_m, run.diameter_min_m);
        assert!(s.problem().is_none());
    }

    #[test]
    fn a_reversed_range_is_refused() {
        let s = SurveySettings {
            diameter_min_m: Some(2_000.0),
            diameter_max_m: Some(1_000.0),
            ..Default::default()
        };
        assert!(s.problem().is_some());
    }
}
