//! "Weights and limits": every hard requirement and every weighted criterion of the criteria
//! file, and the reflector to fit ([`ReflectorEditor`]). Limits are sliders (yes/no ones are
//! checkboxes); each weighted criterion shows its utility curve over the candidates' values,
//! with draggable points ([`crate::utility_curve`]), its weight and its share of the total.
//! Every edit leaves valid criteria, is one undo step, and re-ranks in the same frame, before
//! the map and the list are drawn; a new reflector refits the survey in the background first.
//!
//! Names on screen come from the metric registry (`survey::METRICS`); ids appear only in
//! tooltips.

use crate::engine::{Criteria, Requirement, SoftCriterion};
use crate::reflector_editor::ReflectorEditor;
use crate::session::Session;
use crate::utility_curve::{self, CurveData, IDEAL_COLOUR, SELECTED_COLOUR, WORST_COLOUR};
use egui::{Color32, RichText};
use siting::criteria::{CurveEnd, PointRole};
use std::collections::HashMap;
use survey::{MetricInfo, METRICS};

/// Largest weight a slider offers; typed entry may go beyond.
const WEIGHT_SLIDER_MAX: f64 = 5.0;
const NOTE_COLOUR: Color32 = Color32::from_rgb(240, 200, 120);
const ERROR_COLOUR: Color32 = Color32::from_rgb(240, 140, 120);

#[derive(Default)]
pub struct CriteriaPanel {
    /// Observed range of each metric in the survey, for slider ends; keyed by survey identity.
    ranges: Vec<(f64, f64)>,
    ranges_for: usize,
    /// Value spreads and "decides nothing" flags, rebuilt when the survey or limits change.
    pub curves: CurveData,
    /// The value range of the curve being dragged, held still under the pointer.
    held_view: Option<(String, (f64, f64))>,
    /// Limits on yes/no metrics switched off here, with their place, to switch back on.
    switched_off: Vec<(usize, Requirement)>,
    /// Where each curve's points were drawn last frame, by metric id (tests drag them).
    pub points_on_screen: HashMap<String, Vec<egui::Pos2>>,
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

/// The name a person reads for a metric, with its unit: "Floor roughness (RMS) [m]".
pub fn heading_of(metric: &str) -> String {
    match survey::metric(metric) {
        Some(m) => format!("{}{}", m.label, m.unit_suffix()),
        None => metric.to_owned(),
    }
}

/// Tooltip of a metric: its meaning, why the criteria file sets it, and its file id.
fn tooltip_of(metric: &str, why: &str) -> String {
    let meaning = survey::metric(metric).map_or("", |m| m.description);
    let mut t = String::new();
    if !meaning.is_empty() {
        t.push_str(&format!(
            "{}{}.",
            meaning[..1].to_uppercase(),
            &meaning[1..]
        ));
    }
    if !why.is_empty() {
        t.push_str(&format!("\nWhy: {why}"));
    }
    t.push_str(&format!("\nIn files: {metric}"));
    t
}

/// A typed value as the registry formats it ("71.3 km", "93 %", "0.183") back to the metric's
/// own unit; bare numbers are taken in that unit.
pub fn parse_value(info: Option<&MetricInfo>, text: &str) -> Option<f64> {
    let t = text.trim().replace(',', "");
    let (number, scale) = if let Some(n) = t.strip_suffix("million m³") {
        (n, 1e6)
    } else if let Some(n) = t.strip_suffix("km") {
        (n, 1000.0)
    } else if let Some(n) = t.strip_suffix('%') {
        (n, 0.01)
    } else {
        (t.trim_end_matches(['m', '³', '°']), 1.0)
    };
    let v: f64 = number.trim().parse().ok()?;
    // A bare number for a share is the share itself up to 1, a percentage above.
    let scale = match info.map(|m| m.kind) {
        Some(survey::MetricKind::Fraction) if !t.ends_with('%') && v.abs() > 1.0 => 0.01,
        _ => scale,
    };
    Some(v * scale).filter(|v| v.is_finite())
}

fn format_value(info: Option<&MetricInfo>, v: f64) -> String {
    info.map_or_else(|| format!("{v:.3}"), |m| m.format(v))
}

/// Name a widget for screen readers and tests ("Worst of Floor tilt [°]").
fn accessible_name(ui: &egui::Ui, resp: &egui::Response, name: String) {
    ui.ctx()
        .accesskit_node_builder(resp.id, |node| node.set_label(name));
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
        self.curves.refresh(
            session.survey.as_ref(),
            session.prepared.as_ref(),
            &session.criteria,
            session.criteria_error.is_none(),
        );
        let mut edited = session.criteria.clone();
        ui.heading("Weights and limits");
        ui.label(RichText::new(&edited.title).weak());
        ui.label(
            RichText::new(siting::dish_summary(
                &edited,
                session
                    .survey
                    .as_ref()
                    .and_then(|s| s.parameters.structure.as_ref()),
            ))
            .small(),
        );
        if let Some(e) = &session.criteria_error {
            ui.colored_label(ERROR_COLOUR, format!("Not applied: {e}"));
        }
        egui::ScrollArea::vertical()
            .id_salt("criteria-scroll")
            .show(ui, |ui| {
                self.limits_ui(ui, &mut edited);
                ui.add_space(8.0);
                crate::areas_panel::areas_ui(ui, &mut edited);
                ui.add_space(8.0);
                self.weights_ui(ui, session, &mut edited);
                ui.add_space(8.0);
                egui::CollapsingHeader::new(RichText::new("Reflector to fit").strong())
                    .id_salt("reflector-to-fit")
                    .default_open(true)
                    .show(ui, |ui| self.reflector.ui(ui, session, &mut edited));
                ui.add_space(8.0);
                self.buttons_ui(ui, session, &mut edited);
            });
        keep_consistent(&mut edited, &session.criteria);
        let press = ui.input(|i| {
            i.pointer
                .any_down()
                .then(|| i.pointer.press_start_time())
                .flatten()
        });
        session.edit_criteria(edited, press);
    }

    fn limits_ui(&mut self, ui: &mut egui::Ui, edited: &mut Criteria) {
        ui.strong("Limits");
        ui.label(
            RichText::new("A candidate outside any limit fails and is ranked after all that pass.")
                .small(),
        );
        for req in edited
            .requirements
            .iter_mut()
            .filter(|r| !survey::metric(&r.metric).is_some_and(MetricInfo::is_flag))
        {
            let (lo, hi) = self.range_of(
                &req.metric,
                &[req.min.unwrap_or(f64::NAN), req.max.unwrap_or(f64::NAN)],
            );
            ui.group(|ui| {
                ui.set_width(ui.available_width());
                bound_rows_ui(ui, req, (lo, hi));
            });
        }
        self.flag_limits_ui(ui, edited);
    }

    /// Yes/no limits: one checkbox per yes/no metric, on when a candidate must have it.
    fn flag_limits_ui(&mut self, ui: &mut egui::Ui, edited: &mut Criteria) {
        ui.group(|ui| {
            ui.set_width(ui.available_width());
            for m in METRICS.iter().filter(|m| m.is_flag()) {
                let at = edited.requirements.iter().position(|r| r.metric == m.name);
                let mut on =
                    at.is_some_and(|k| edited.requirements[k].min.is_some_and(|v| v >= 0.5));
                let why = at
                    .map_or("", |k| edited.requirements[k].why.as_str())
                    .to_owned();
                let resp = ui
                    .checkbox(&mut on, format!("Must be: {}", m.label.to_lowercase()))
                    .on_hover_text(tooltip_of(m.name, &why));
                if !resp.changed() {
                    continue;
                }
                if on {
                    let (place, mut req) = match self
                        .switched_off
                        .iter()
                        .position(|(_, r)| r.metric == m.name)
                    {
                        Some(k) => self.switched_off.remove(k),
                        None => (
                            edited.requirements.len(),
                            Requirement {
                                metric: m.name.to_owned(),
                                min: None,
                                max: None,
                                why: String::new(),
                            },
                        ),
                    };
                    req.min = Some(1.0);
                    req.max = None;
                    match at {
                        Some(k) => edited.requirements[k] = req,
                        None => edited
                            .requirements
                            .insert(place.min(edited.requirements.len()), req),
                    }
                } else if let Some(k) = at {
                    let req = edited.requirements.remove(k);
                    self.switched_off.retain(|(_, r)| r.metric != m.name);
                    self.switched_off.push((k, req));
                }
            }
        });
    }

    fn weights_ui(&mut self, ui: &mut egui::Ui, session: &Session, edited: &mut Criteria) {
        ui.strong("Weights");
        ui.label(
            RichText::new(
                "How much each measure counts among candidates that pass. The line is the \
                 score (0 to 1) a value earns: drag its points; worst scores 0, ideal 1.",
            )
            .small(),
        );
        let shares = edited.normalised_weights();
        let selected = session.selected.and_then(|i| session.candidate(i));
        for (c, share) in edited.criteria.iter_mut().zip(shares) {
            let info = survey::metric(&c.metric);
            let selected_value = selected.and_then(|cand| info.and_then(|m| (m.get)(cand)));
            ui.group(|ui| {
                ui.set_width(ui.available_width());
                self.criterion_ui(ui, c, info, share, selected_value);
            });
        }
    }

    fn criterion_ui(
        &mut self,
        ui: &mut egui::Ui,
        c: &mut SoftCriterion,
        info: Option<&'static MetricInfo>,
        share: f64,
        selected_value: Option<f64>,
    ) {
        let heading = heading_of(&c.metric);
        ui.horizontal(|ui| {
            ui.label(RichText::new(&heading).strong())
                .on_hover_text(tooltip_of(&c.metric, &c.why));
            if self.curves.decides_nothing(&c.metric) {
                ui.label(RichText::new("decides nothing").small().color(NOTE_COLOUR))
                    .on_hover_text(self.decides_nothing_text(c, info));
            }
        });
        ui.horizontal(|ui| {
            let l = ui.label("Weight");
            let r = ui
                .add(
                    egui::Slider::new(&mut c.weight, 0.0..=WEIGHT_SLIDER_MAX)
                        .clamping(egui::SliderClamping::Never)
                        .step_by(0.05),
                )
                .labelled_by(l.id);
            accessible_name(ui, &r, format!("Weight of {heading}"));
            ui.label(format!("{:.0} %", share * 100.0))
                .on_hover_text("share of the total weight");
        });
        let spread = self.curves.spread(&c.metric);
        let range = match &self.held_view {
            Some((m, r)) if *m == c.metric => *r,
            _ => utility_curve::view_range(c, spread),
        };
        let id = ui.make_persistent_id(("curve", &c.metric));
        let out = utility_curve::curve_ui(ui, id, c, info, spread, range, selected_value);
        if out.dragging {
            self.held_view = Some((c.metric.clone(), range));
        } else if self.held_view.as_ref().is_some_and(|(m, _)| *m == c.metric) {
            self.held_view = None;
        }
        self.points_on_screen
            .insert(c.metric.clone(), out.points_on_screen);
        ends_ui(ui, c, info, &heading, selected_value);
        points_ui(ui, c, info, &heading);
    }

    fn decides_nothing_text(&self, c: &SoftCriterion, info: Option<&MetricInfo>) -> String {
        let spread = self.curves.spread(&c.metric);
        let values = spread
            .filter(|s| s.measured > 0)
            .map(|s| {
                format!(
                    " (their values run from {} to {})",
                    format_value(info, s.lo),
                    format_value(info, s.hi)
                )
            })
            .unwrap_or_default();
        format!(
            "Every candidate that passes the limits gets the same score here{values}, so this \
             weight cannot change the order. Move worst or ideal into their values to make it count."
        )
    }

    fn buttons_ui(&mut self, ui: &mut egui::Ui, session: &Session, edited: &mut Criteria) {
        ui.horizontal_wrapped(|ui| {
            if ui.button("Save criteria…").clicked() {
                self.request = Some(CriteriaRequest::Save);
            }
            if ui.button("Load criteria…").clicked() {
                self.request = Some(CriteriaRequest::Load);
            }
            if ui
                .add_enabled(
                    *edited != session.criteria_baseline,
                    egui::Button::new("Revert to loaded"),
                )
                .on_hover_text("back to the criteria as last loaded (can be undone)")
                .clicked()
            {
                *edited = session.criteria_baseline.clone();
            }
        });
    }
}

/// The "at least" and "at most" rows of a limit on a measured value.
fn bound_rows_ui(ui: &mut egui::Ui, req: &mut Requirement, (lo, hi): (f64, f64)) {
    let info = survey::metric(&req.metric);
    let heading = heading_of(&req.metric);
    ui.label(RichText::new(&heading).strong())
        .on_hover_text(tooltip_of(&req.metric, &req.why));
    let both = req.min.is_some() && req.max.is_some();
    for (which, is_min) in [("at least", true), ("at most", false)] {
        let bound = if is_min { &mut req.min } else { &mut req.max };
        ui.horizontal(|ui| {
            let mut on = bound.is_some();
            // A limit keeps at least one bound: the last cannot be switched off.
            let can_toggle = !on || both;
            if ui
                .add_enabled(can_toggle, egui::Checkbox::new(&mut on, which))
                .changed()
            {
                *bound = on.then_some(if is_min { lo } else { hi });
            }
            if let Some(v) = bound {
                let r = ui.add(
                    egui::Slider::new(v, lo..=hi)
                        .clamping(egui::SliderClamping::Never)
                        .text("")
                        .custom_formatter(move |v, _| format_value(info, v))
                        .custom_parser(move |t| parse_value(info, t)),
                );
                accessible_name(ui, &r, format!("{heading} {which}"));
            }
        });
    }
}

/// Worst and ideal as typed values, and the selected crater's value.
fn ends_ui(
    ui: &mut egui::Ui,
    c: &mut SoftCriterion,
    info: Option<&'static MetricInfo>,
    heading: &str,
    selected_value: Option<f64>,
) {
    ui.horizontal_wrapped(|ui| {
        let speed = ((c.ideal - c.worst).abs() / 200.0).max(1e-4);
        for (end, word, colour) in [
            (CurveEnd::Worst, "worst", WORST_COLOUR),
            (CurveEnd::Ideal, "ideal", IDEAL_COLOUR),
        ] {
            let mut v = c.end(end);
            let l = ui.label(RichText::new(word).color(colour));
            let r = ui
                .add(
                    egui::DragValue::new(&mut v)
                        .speed(speed)
                        .custom_formatter(move |v, _| format_value(info, v))
                        .custom_parser(move |t| parse_value(info, t)),
                )
                .labelled_by(l.id);
            accessible_name(ui, &r, format!("{} of {heading}", capitalised(word)));
            if v != c.end(end) {
                c.set_end(end, v);
            }
        }
        if let Some(v) = selected_value {
            ui.label(
                RichText::new(format!("selected: {}", format_value(info, v)))
                    .small()
                    .color(SELECTED_COLOUR),
            );
        }
    });
}

/// The free breakpoints as typed values (value and score), collapsed by default.
fn points_ui(
    ui: &mut egui::Ui,
    c: &mut SoftCriterion,
    info: Option<&'static MetricInfo>,
    heading: &str,
) {
    let points = c.curve_points();
    let free: Vec<usize> = (0..points.len())
        .filter(|&k| c.point_role(k) == PointRole::Free)
        .collect();
    if free.is_empty() {
        return;
    }
    egui::CollapsingHeader::new(RichText::new(format!("{} more points", free.len())).small())
        .id_salt(("points", &c.metric))
        .show(ui, |ui| {
            for (n, k) in free.into_iter().enumerate() {
                let [mut x, mut u] = points[k];
                ui.horizontal(|ui| {
                    let r = ui.add(
                        egui::DragValue::new(&mut x)
                            .speed(((points[points.len() - 1][0] - points[0][0]) / 200.0).max(1e-4))
                            .custom_formatter(move |v, _| format_value(info, v))
                            .custom_parser(move |t| parse_value(info, t)),
                    );
                    accessible_name(ui, &r, format!("Point {} value of {heading}", n + 1));
                    ui.label("scores");
                    let r = ui.add(
                        egui::DragValue::new(&mut u)
                            .speed(0.01)
                            .range(0.0..=1.0)
                            .max_decimals(2),
                    );
                    accessible_name(ui, &r, format!("Point {} score of {heading}", n + 1));
                });
                if [x, u] != points[k] {
                    c.move_point(k, x, u);
                }
            }
        });
}

fn capitalised(word: &str) -> String {
    let mut cs = word.chars();
    cs.next()
        .map(|f| f.to_uppercase().chain(cs).collect())
        .unwrap_or_default()
}

/// Edits the widgets cannot refuse by themselves: a minimum above its maximum pulls the
/// maximum along (and the other way), and weights that would all be zero stay as they were.
fn keep_consistent(edited: &mut Criteria, before: &Criteria) {
    for (k, r) in edited.requirements.iter_mut().enumerate() {
        if let (Some(min), Some(max)) = (r.min, r.max) {
            if min > max {
                let min_moved = before.requirements.get(k).and_then(|b| b.min) != Some(min);
                if min_moved {
                    r.max = Some(min);
                } else {
                    r.min = Some(max);
                }
            }
        }
    }
    if edited.criteria.iter().all(|c| c.weight <= 0.0) {
        for (c, b) in edited.criteria.iter_mut().zip(&before.criteria) {
            c.weight = b.weight;
        }
    }
}

/// Adopt criteria from outside the panel (a file read, a study opened): one undo step.
pub fn apply(session: &mut Session, edited: Criteria) {
    session.edit_criteria(edited, None);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn typed_values_read_back_in_the_metric_unit() {
        let d = survey::metric("diameter_m");
        assert_eq!(parse_value(d, "71.3 km"), Some(71_300.0));
        assert_eq!(parse_value(d, "800 m"), Some(800.0));
        let f = survey::metric("valid_fraction");
        assert_eq!(parse_value(f, "90 %"), Some(0.9));
        assert_eq!(parse_value(f, "0.9"), Some(0.9));
        assert_eq!(
            parse_value(survey::metric("floor_tilt_deg"), "2.5°"),
            Some(2.5)
        );
        assert_eq!(parse_value(d, "wide"), None);
    }
}
