//! The crater sheet: everything about the selected candidate on one page: its standing (the
//! screening verdict), how its score is made, key measurements with what their uncertainties
//! cover, shape, Earth and sky, the reflector fit, robustness, every number, and the user's
//! notes and decision. It also hosts the comparison window (`compare.rs`).

use crate::compare::{CompareView, MAX_COMPARED};
use crate::profiles::{radial_profiles, RadialProfiles};
use crate::session::{candidate_label, Session};
use crate::shape_view::{DEPTH_SPREAD_HINT, DIAMETER_SPREAD_HINT};
use crate::SCREENING_CAUTION;
use egui::{Color32, RichText};
use siting::study::Decision;
use std::sync::Arc;
use survey::{Candidate, METRICS};
use terrain::Dem;

/// The pages of the crater sheet.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum SheetTab {
    Score,
    #[default]
    Shape,
    Sky,
    Fit,
    Operations,
    Robustness,
    Numbers,
    Notes,
}

const PASS_COLOUR: Color32 = Color32::from_rgb(130, 220, 140);
const FAIL_COLOUR: Color32 = Color32::from_rgb(240, 140, 120);

#[derive(Default)]
pub struct CraterSheet {
    pub tab: SheetTab,
    profiles: Option<(usize, Option<RadialProfiles>)>,
    sky: crate::sky_view::SkyView,
    fit: crate::fit_view::FitView,
    operations: crate::operations_view::OperationsView,
    /// The comparison window, drawn from here so it follows the same session.
    pub compare: CompareView,
}

/// A length with its spread in the same unit: "1433 ± 3 m", "71.3 ± 0.05 km".
fn length_with_spread(v_m: f64, sd_m: f64) -> String {
    if v_m.abs() >= 10_000.0 {
        format!("{:.1} ± {:.2} km", v_m / 1000.0, sd_m / 1000.0)
    } else if v_m.abs() >= 100.0 {
        format!("{v_m:.0} ± {sd_m:.0} m")
    } else {
        format!("{v_m:.1} ± {sd_m:.1} m")
    }
}

/// A metric's label with its meaning and id on hover.
fn metric_name(ui: &mut egui::Ui, id: &str) -> egui::Response {
    match survey::metrics::metric(id) {
        Some(m) => ui
            .label(m.label)
            .on_hover_text(format!("{}\nid: {id}", m.description)),
        None => ui.label(id),
    }
}

/// A metric's value as the registry formats it.
fn metric_value(c: &Candidate, id: &str) -> String {
    survey::metrics::metric(id)
        .and_then(|m| (m.get)(c).map(|v| m.format(v)))
        .unwrap_or_else(|| "not measured".into())
}

impl CraterSheet {
    pub fn ui(&mut self, ui: &mut egui::Ui, session: &mut Session, dem: Option<&Arc<Dem>>) {
        self.compare.window(ui.ctx(), session, dem);
        session.poll_robustness();
        let Some(index) = session.selected else {
            ui.heading("Crater sheet");
            ui.label("Select a candidate in the list or on the map.");
            compare_bar(ui, session, None);
            return;
        };
        let Some(c) = session.candidate(index).cloned() else {
            return;
        };
        let m = &c.crater;
        ui.heading(format!("Crater sheet: {}", candidate_label(c.id)));
        compare_bar(ui, session, Some(index));
        verdict(ui, session, index, &c);
        key_figures(ui, &c, session.lon_convention);
        ui.separator();
        self.tab_row(ui);
        ui.separator();
        egui::ScrollArea::vertical().id_salt("sheet-scroll").show(ui, |ui| match self.tab {
            SheetTab::Score => crate::score_view::score_ui(ui, session, index, &c),
            SheetTab::Shape => {
                if self.profiles.as_ref().map(|p| p.0) != Some(index) {
                    let p = dem.and_then(|d| radial_profiles(d, m.centre_lon_deg, m.centre_lat_deg, m.diameter_m / 2.0));
                    self.profiles = Some((index, p));
                }
                let p = self.profiles.as_ref().and_then(|p| p.1.as_ref());
                crate::shape_view::shape_ui(ui, m, p);
            }
            SheetTab::Sky => self.sky.ui(ui, index, &c, dem),
            SheetTab::Fit => {
                let survey = session.survey.clone();
                let spec = survey.as_ref().and_then(|s| s.parameters.structure.as_ref());
                let radius_m = survey.as_ref().map_or(terrain::MOON_RADIUS_M, |s| s.input.body_radius_m);
                let key = survey.as_ref().map_or(0, |s| Arc::as_ptr(s) as usize);
                self.fit.ui(ui, &c, spec, radius_m, key, dem);
            }
            SheetTab::Operations => {
                let survey = session.survey.clone();
                let inputs = survey.as_ref().and_then(|s| s.parameters.operations.as_ref());
                self.operations.ui(ui, index, &c, inputs, dem);
            }
            SheetTab::Robustness => self.smaa_ui(ui, session, index),
            SheetTab::Numbers => {
                egui::Grid::new("sheet-metrics").striped(true).num_columns(2).show(ui, |ui| {
                    let sd = |name: &str| match name {
                        "diameter_m" => Some(m.diameter_sd_m),
                        "depth_m" => Some(m.depth_sd_m),
                        _ => None,
                    };
                    for info in METRICS {
                        ui.label(info.label).on_hover_text(info.hint());
                        let text = match (session.metric_value(info, index), sd(info.name)) {
                            (Some(v), Some(s)) => format!("{} ± {}", info.format(v), info.format(s)),
                            (Some(v), None) => info.format_in(v, session.lon_convention),
                            (None, _) => "not measured".into(),
                        };
                        ui.label(text);
                        ui.end_row();
                    }
                });
                if m.edge_cut {
                    ui.colored_label(Color32::YELLOW, "The measurement disc is cut by the raster edge: figures cover part of the crater.");
                }
            }
            SheetTab::Notes => {
                ui.strong("Your decision and notes");
                let review = session.review_mut(c.id);
                ui.horizontal(|ui| {
                    ui.selectable_value(&mut review.decision, Decision::Undecided, "Undecided");
                    ui.selectable_value(&mut review.decision, Decision::Accepted, "Keep");
                    ui.selectable_value(&mut review.decision, Decision::Rejected, "Set aside");
                });
                ui.add(egui::TextEdit::multiline(&mut review.note).hint_text("Notes on this crater (kept in the study)").desired_rows(6).desired_width(f32::INFINITY));
            }
        });
    }

    fn tab_row(&mut self, ui: &mut egui::Ui) {
        ui.horizontal_wrapped(|ui| {
            for (tab, name) in [
                (SheetTab::Score, "Score"),
                (SheetTab::Shape, "Shape"),
                (SheetTab::Sky, "Earth and sky"),
                (SheetTab::Fit, "Reflector"),
                (SheetTab::Operations, "Operations"),
                (SheetTab::Robustness, "Robustness"),
                (SheetTab::Numbers, "All numbers"),
                (SheetTab::Notes, "Notes"),
            ] {
                ui.selectable_value(&mut self.tab, tab, name);
            }
        });
    }
}

/// Whether the candidate is in the comparison, and the way to open it.
fn compare_bar(ui: &mut egui::Ui, session: &mut Session, index: Option<usize>) {
    let count = session.compare.indices.len();
    if index.is_none() && count == 0 {
        return;
    }
    ui.horizontal(|ui| {
        if let Some(i) = index {
            let mut inside = session.compare.contains(i);
            let full = !inside && count >= MAX_COMPARED;
            let resp = ui
                .add_enabled(!full, egui::Checkbox::new(&mut inside, "In comparison"))
                .on_hover_text("Compare two to four candidates side by side (also Ctrl-click rows of the candidate list)")
                .on_disabled_hover_text(format!("{MAX_COMPARED} candidates at most: remove one first"));
            if resp.changed() {
                session.compare.toggle(i);
            }
        }
        let count = session.compare.indices.len();
        if count >= crate::compare::MIN_COMPARED && !session.compare.show {
            if ui.button(format!("Open comparison ({count})")).clicked() {
                session.compare.show = true;
            }
        } else if count == 1 {
            ui.label(RichText::new("Add one more to compare").small().weak());
        }
    });
}

/// The screening verdict: meets the limits (rank and score) or every limit it misses; the
/// reflector verdict; what neither covers.
fn verdict(ui: &mut egui::Ui, session: &Session, index: usize, c: &Candidate) {
    match session.ranking.rank(index) {
        Some(r) => {
            ui.label(
                RichText::new(format!(
                    "Meets limits: rank {r} of {}, score {:.3}",
                    session.ranking.passing_count(),
                    session.ranking.score(index).unwrap_or(0.0)
                ))
                .strong()
                .color(PASS_COLOUR),
            );
        }
        None => {
            ui.label(
                RichText::new("Fails the limits:")
                    .strong()
                    .color(FAIL_COLOUR),
            );
            for reason in session.reasons(index) {
                ui.label(format!("• {reason}"));
            }
        }
    }
    if let Some(f) = &c.fit {
        let words = crate::fit_view::verdict_words(f.fit_ok);
        // "Fits the ..." reads "fits the ..." after the colon; the rest keeps its capitals (DEM).
        let mut chars = words.chars();
        let first = chars
            .next()
            .map(|c| c.to_lowercase().to_string())
            .unwrap_or_default();
        ui.label(format!("Reflector: {first}{}", chars.as_str()));
    }
    ui.label(
        RichText::new(crate::fit_view::NOT_ASSESSED)
            .small()
            .italics(),
    );
    ui.label(RichText::new(SCREENING_CAUTION).small().italics());
}

/// The measurements every page leans on, named by the metric registry; each ± says on hover
/// what it covers.
fn key_figures(ui: &mut egui::Ui, c: &Candidate, lon: survey::LonConvention) {
    let m = &c.crater;
    egui::Grid::new("sheet-key-figures")
        .num_columns(4)
        .spacing([14.0, 2.0])
        .show(ui, |ui| {
            metric_name(ui, "diameter_m");
            ui.strong(length_with_spread(m.diameter_m, m.diameter_sd_m))
                .on_hover_text(DIAMETER_SPREAD_HINT);
            metric_name(ui, "depth_m");
            ui.strong(length_with_spread(m.depth_m, m.depth_sd_m))
                .on_hover_text(DEPTH_SPREAD_HINT);
            ui.end_row();
            metric_name(ui, "depth_to_diameter");
            ui.strong(metric_value(c, "depth_to_diameter"));
            metric_name(ui, "rim_completeness");
            ui.strong(metric_value(c, "rim_completeness"));
            ui.end_row();
            ui.label("Centre");
            ui.strong(format!(
                "lon {}, lat {}",
                lon.format_lon(m.centre_lon_deg, 3),
                survey::place::format_lat(m.centre_lat_deg, 3)
            ));
            ui.end_row();
        });
}

impl CraterSheet {
    fn smaa_ui(&mut self, ui: &mut egui::Ui, session: &mut Session, index: usize) {
        let current = session
            .smaa
            .as_ref()
            .filter(|(g, _)| *g == session.ranking.generation)
            .map(|(_, r)| r);
        match current {
            Some(r) => match r.probabilities(index) {
                Some((p1, pn)) => {
                    ui.label(format!(
                        "Ranked first in {:.1}% of {} weight draws",
                        p1 * 100.0,
                        r.settings.samples
                    ));
                    ui.label(format!(
                        "In the best {} in {:.1}% of draws",
                        r.settings.top_n,
                        pn * 100.0
                    ));
                    ui.add(
                        egui::ProgressBar::new(pn as f32)
                            .desired_width(220.0)
                            .text(format!("top {}: {:.0}%", r.settings.top_n, pn * 100.0)),
                    );
                }
                None => {
                    ui.label(format!(
                        "Not among the {} best candidates analysed.",
                        r.pool.len()
                    ));
                }
            },
            None if session.robustness.is_running() => {
                ui.horizontal(|ui| {
                    ui.spinner();
                    ui.label("Drawing weights…");
                });
            }
            None => {
                ui.label(RichText::new("How often this candidate stays on top when the weights are drawn around the chosen ones.").small());
                if ui.button("Estimate rank probabilities").clicked() {
                    session.start_robustness(ui.ctx());
                }
            }
        }
        if let Some(e) = session.robustness.error() {
            ui.colored_label(Color32::from_rgb(240, 140, 120), e);
        }
    }
}
