//! "Weights and limits": every hard requirement and every weighted criterion of the criteria
//! file, with sliders and typed entry, and the reflector to fit ([`ReflectorEditor`]). Any
//! change re-ranks in the same frame, before the map and the list are drawn; a new reflector
//! refits the survey in the background first.

use crate::engine::Criteria;
use crate::reflector_editor::ReflectorEditor;
use crate::session::Session;
use egui::{Color32, RichText};
use survey::METRICS;

/// Largest weight a slider offers; typed entry may go beyond.
const WEIGHT_SLIDER_MAX: f64 = 5.0;

#[derive(Default)]
pub struct CriteriaPanel {
    /// Observed range of each metric in the survey, for slider ends; keyed by survey identity.
    ranges: Vec<(f64, f64)>,
    ranges_for: usize,
    /// What the panel asks the app to do with files.
    pub request: Option<CriteriaRequest>,
    /// The `[structure]` of the criteria and its refit.
    pub reflector: ReflectorEditor,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum CriteriaRequest {
    Save,
    Load,
}

/// What a person reads for a metric: its label and unit (`survey::METRICS`).
fn with_unit(metric: &str) -> String {
    survey::metric(metric).map_or_else(
        || metric.to_owned(),
        |m| format!("{}{}", m.label, m.unit_suffix()),
    )
}

impl CriteriaPanel {
    fn refresh_ranges(&mut self, session: &Session) {
        let Some(survey) = &session.survey else {
            return;
        };
        let key = std::sync::Arc::as_ptr(survey) as usize;
        if self.ranges_for == key && self.ranges.len() == METRICS.len() {
            return;
        }
        self.ranges = METRICS
            .iter()
            .map(|m| {
                let (lo, hi) = survey
                    .candidates
                    .iter()
                    .filter_map(|c| (m.get)(c))
                    .filter(|v| v.is_finite())
                    .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
                        (a.min(v), b.max(v))
                    });
                if lo <= hi {
                    (lo, if hi > lo { hi } else { lo + 1.0 })
                } else {
                    (0.0, 1.0)
                }
            })
            .collect();
        self.ranges_for = key;
    }

    /// Slider ends for a metric: the survey's range widened to include `also`.
    fn range_of(&self, metric: &str, also: &[f64]) -> (f64, f64) {
        let (mut lo, mut hi) = METRICS
            .iter()
            .position(|m| m.name == metric)
            .and_then(|k| self.ranges.get(k).copied())
            .unwrap_or((0.0, 1.0));
        for v in also.iter().filter(|v| v.is_finite()) {
            lo = lo.min(*v);
            hi = hi.max(*v);
        }
        (lo, hi)
    }

    pub fn ui(&mut self, ui: &mut egui::Ui, session: &mut Session) {
        self.reflector.poll(session);
        self.refresh_ranges(session);
        let mut edited = session.criteria.clone();
        ui.heading("Weights and limits");
        ui.label(RichText::new(&edited.title).weak());
        ui.label(RichText::new(siting::dish_summary(&edited, session.survey.as_ref().and_then(|s| s.parameters.structure.as_ref()))).small());
        if let Some(e) = &session.criteria_error {
            ui.colored_label(
                Color32::from_rgb(240, 140, 120),
                format!("Not applied: {e}"),
            );
        }
        egui::ScrollArea::vertical().id_salt("criteria-scroll").show(ui, |ui| {
            ui.strong("Limits");
            ui.label(RichText::new("A candidate outside any limit fails and is ranked after all that pass.").small());
            for req in &mut edited.requirements {
                let (lo, hi) = self.range_of(&req.metric, &[req.min.unwrap_or(f64::NAN), req.max.unwrap_or(f64::NAN)]);
                ui.group(|ui| {
                    ui.set_width(ui.available_width());
                    ui.label(RichText::new(with_unit(&req.metric)).strong()).on_hover_text(&req.why);
                    for (which, bound) in [("at least", &mut req.min), ("at most", &mut req.max)] {
                        ui.horizontal(|ui| {
                            let mut on = bound.is_some();
                            if ui.checkbox(&mut on, which).changed() {
                                *bound = on.then_some(if which == "at least" { lo } else { hi });
                            }
                            if let Some(v) = bound {
                                ui.add(egui::Slider::new(v, lo..=hi).clamping(egui::SliderClamping::Never).text("").custom_formatter(|v, _| format!("{v:.3}")))
                                    .on_hover_text(format!("{} {which}", survey::label_of(&req.metric)));
                            }
                        });
                    }
                });
            }
            ui.add_space(8.0);
            ui.strong("Weights");
            ui.label(RichText::new("How much each measure counts among candidates that pass. Worst scores 0, ideal scores 1.").small());
            for c in &mut edited.criteria {
                ui.group(|ui| {
                    ui.set_width(ui.available_width());
                    let name = ui.label(RichText::new(with_unit(&c.metric)).strong()).on_hover_text(&c.why);
                    ui.horizontal(|ui| {
                        ui.label("weight");
                        ui.add(egui::Slider::new(&mut c.weight, 0.0..=WEIGHT_SLIDER_MAX).clamping(egui::SliderClamping::Never).step_by(0.05)).labelled_by(name.id);
                    });
                    ui.horizontal(|ui| {
                        let speed = ((c.ideal - c.worst).abs() / 200.0).max(1e-4);
                        let l = ui.label("worst");
                        ui.add(egui::DragValue::new(&mut c.worst).speed(speed)).labelled_by(l.id);
                        let l = ui.label("ideal");
                        ui.add(egui::DragValue::new(&mut c.ideal).speed(speed)).labelled_by(l.id);
                    });
                });
            }
            ui.add_space(8.0);
            egui::CollapsingHeader::new(RichText::new("Reflector to fit").strong())
                .id_salt("reflector-to-fit")
                .default_open(true)
                .show(ui, |ui| self.reflector.ui(ui, session, &mut edited));
            ui.add_space(8.0);
            ui.horizontal_wrapped(|ui| {
                if ui.button("Save criteria…").clicked() {
                    self.request = Some(CriteriaRequest::Save);
                }
                if ui.button("Load criteria…").clicked() {
                    self.request = Some(CriteriaRequest::Load);
                }
                if ui.button("Reset to defaults").on_hover_text("back to the criteria as last loaded").clicked() {
                    edited = session.criteria_baseline.clone();
                }
            });
        });
        apply(session, edited);
    }
}

/// Adopt edited criteria and re-rank at once if anything changed.
pub fn apply(session: &mut Session, edited: Criteria) {
    if edited != session.criteria {
        session.criteria = edited;
        session.rerank();
    }
}
