//! A soft criterion's utility curve drawn small, over the spread of the candidates' values,
//! with its points draggable: the ends carry `worst` and `ideal`, the free breakpoints carry
//! value and utility. Every edit goes through the criterion's own edit methods
//! (`SoftCriterion::move_point` and friends in `siting`), so the curve is valid after each.
//!
//! The value spreads (histograms) are computed once per survey and set of hard requirements,
//! never per frame: a weight drag reads them as they are.

use crate::engine::{Criteria, PreparedTable, Requirement, SoftCriterion};
use egui::{Color32, Pos2, Rect, Sense, Stroke, Vec2};
use siting::criteria::{CurveEnd, PointRole};
use std::collections::HashMap;
use std::sync::Arc;
use survey::{MetricInfo, SurveyFile};

/// Bars in a value histogram.
const BINS: usize = 28;
/// Height of a curve plot, points.
pub const PLOT_HEIGHT: f32 = 64.0;
/// Radius of a point's grab area, points.
const GRAB_RADIUS: f32 = 7.0;

pub const WORST_COLOUR: Color32 = Color32::from_rgb(225, 110, 95);
pub const IDEAL_COLOUR: Color32 = Color32::from_rgb(110, 200, 120);
const FREE_COLOUR: Color32 = Color32::from_rgb(220, 220, 230);
const CURVE_COLOUR: Color32 = Color32::from_rgb(120, 170, 240);
const BAR_COLOUR: Color32 = Color32::from_rgba_premultiplied(90, 90, 100, 150);
pub const SELECTED_COLOUR: Color32 = Color32::from_rgb(250, 190, 60);

/// The values of one metric among the candidates that pass every hard requirement.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct ValueSpread {
    /// Lowest and highest finite value (equal when all values are the same).
    pub lo: f64,
    pub hi: f64,
    /// Candidate counts in `BINS` equal bins over lo..hi.
    pub bins: Vec<u32>,
    /// Passing candidates with a finite value.
    pub measured: usize,
    /// Passing candidates without a value.
    pub missing: usize,
}

impl ValueSpread {
    fn of(values: impl Iterator<Item = Option<f64>>) -> ValueSpread {
        let mut finite = Vec::new();
        let mut missing = 0;
        for v in values {
            match v.filter(|v| v.is_finite()) {
                Some(v) => finite.push(v),
                None => missing += 1,
            }
        }
        let (lo, hi) = finite
            .iter()
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| {
                (a.min(v), b.max(v))
            });
        let mut bins = vec![0u32; BINS];
        if lo <= hi {
            let width = (hi - lo).max(f64::MIN_POSITIVE);
            for v in &finite {
                let k = (((v - lo) / width) * BINS as f64) as usize;
                bins[k.min(BINS - 1)] += 1;
            }
        }
        ValueSpread {
            lo,
            hi,
            bins,
            measured: finite.len(),
            missing,
        }
    }
}

/// What the panel knows about the candidates per criterion, rebuilt only when its inputs
/// change: value spreads per survey and requirements, "decides nothing" per prepared table.
#[derive(Default)]
pub struct CurveData {
    spreads_key: Option<(usize, Vec<Requirement>, Vec<String>)>,
    spreads: HashMap<String, ValueSpread>,
    constant_key: usize,
    /// Metrics whose utility is the same for every passing candidate.
    constant: Vec<String>,
    /// How many times the spreads were computed (tests check it is not every frame).
    pub spread_builds: u64,
}

impl CurveData {
    /// Bring the spreads and flags up to date; cheap when nothing they rest on changed.
    pub fn refresh(
        &mut self,
        survey: Option<&Arc<SurveyFile>>,
        table: Option<&Arc<PreparedTable>>,
        criteria: &Criteria,
        criteria_valid: bool,
    ) {
        let (Some(survey), Some(table)) = (survey, table) else {
            self.spreads.clear();
            self.constant.clear();
            self.spreads_key = None;
            self.constant_key = 0;
            return;
        };
        // A table that was not rebuilt for the current requirements would give the wrong
        // pass flags; keep what was shown until the criteria rank again.
        if !criteria_valid || table.len() != survey.candidates.len() {
            return;
        }
        let metrics: Vec<String> = criteria.criteria.iter().map(|c| c.metric.clone()).collect();
        let key = (
            Arc::as_ptr(survey) as usize,
            criteria.requirements.clone(),
            metrics,
        );
        if self.spreads_key.as_ref() != Some(&key) {
            self.spreads = criteria
                .criteria
                .iter()
                .filter_map(|c| {
                    let m = survey::metrics::metric(&c.metric)?;
                    let values = survey
                        .candidates
                        .iter()
                        .enumerate()
                        .filter(|(i, _)| table.passed(*i))
                        .map(|(_, cand)| (m.get)(cand));
                    Some((c.metric.clone(), ValueSpread::of(values)))
                })
                .collect();
            self.spreads_key = Some(key);
            self.spread_builds += 1;
        }
        let table_key = Arc::as_ptr(table) as usize;
        if self.constant_key != table_key {
            self.constant = constant_criteria(table);
            self.constant_key = table_key;
        }
    }

    pub fn spread(&self, metric: &str) -> Option<&ValueSpread> {
        self.spreads.get(metric)
    }

    /// The criterion on `metric` gives every passing candidate the same utility, so its
    /// weight cannot change the order.
    pub fn decides_nothing(&self, metric: &str) -> bool {
        self.constant.iter().any(|m| m == metric)
    }
}

/// Metrics of the table's criteria whose utility is equal for every passing candidate (and
/// at least two candidates pass: with one, nothing is decided by anything).
fn constant_criteria(table: &PreparedTable) -> Vec<String> {
    let passing: Vec<usize> = (0..table.len()).filter(|&i| table.passed(i)).collect();
    if passing.len() < 2 {
        return Vec::new();
    }
    table
        .criterion_metrics()
        .enumerate()
        .filter(|(c, _)| {
            let first = table.utility(*c, passing[0]);
            passing.iter().all(|&i| table.utility(*c, i) == first)
        })
        .map(|(_, m)| m.to_owned())
        .collect()
}

/// The value range a plot shows: the curve's points and the passing candidates' values,
/// padded a little so end points are not on the frame.
pub fn view_range(c: &SoftCriterion, spread: Option<&ValueSpread>) -> (f64, f64) {
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    for p in c.curve_points() {
        lo = lo.min(p[0]);
        hi = hi.max(p[0]);
    }
    if let Some(s) = spread.filter(|s| s.measured > 0) {
        lo = lo.min(s.lo);
        hi = hi.max(s.hi);
    }
    if !(lo.is_finite() && hi.is_finite()) {
        return (0.0, 1.0);
    }
    let pad = ((hi - lo) * 0.06).max(hi.abs().max(1e-9) * 1e-3);
    // Padding never invents values a measure cannot take: no negative lengths or angles
    // from non-negative data, no share above 1 from shares.
    let lo_view = if lo >= 0.0 {
        (lo - pad).max(0.0)
    } else {
        lo - pad
    };
    let hi_view = if lo >= 0.0 && hi <= 1.0 {
        (hi + pad).min(1.0)
    } else {
        hi + pad
    };
    (lo_view, hi_view)
}

/// How the plot maps values and utilities to the screen.
#[derive(Clone, Copy)]
struct Frame {
    rect: Rect,
    lo: f64,
    hi: f64,
}

impl Frame {
    fn x(&self, v: f64) -> f32 {
        let t = ((v - self.lo) / (self.hi - self.lo)) as f32;
        self.rect.left() + t * self.rect.width()
    }
    fn y(&self, u: f64) -> f32 {
        self.rect.bottom() - u as f32 * self.rect.height()
    }
    fn pos(&self, p: [f64; 2]) -> Pos2 {
        Pos2::new(self.x(p[0]), self.y(p[1]))
    }
    fn value_at(&self, x: f32) -> f64 {
        self.lo + f64::from((x - self.rect.left()) / self.rect.width()) * (self.hi - self.lo)
    }
    fn utility_at(&self, y: f32) -> f64 {
        f64::from((self.rect.bottom() - y) / self.rect.height())
    }
}

/// What a drawn curve reports back.
pub struct CurveOutcome {
    /// The criterion was edited by a drag, a double-click or a right-click.
    pub changed: bool,
    /// Where each point was drawn (for tests and tooltips).
    pub points_on_screen: Vec<Pos2>,
    /// A point is being dragged: the caller keeps the view range fixed meanwhile.
    pub dragging: bool,
}

/// Draw the curve of `c` over `range` with the spread behind it, `selected` marked, and
/// apply drags of its points to `c`.
pub fn curve_ui(
    ui: &mut egui::Ui,
    id: egui::Id,
    c: &mut SoftCriterion,
    info: Option<&MetricInfo>,
    spread: Option<&ValueSpread>,
    range: (f64, f64),
    selected: Option<f64>,
) -> CurveOutcome {
    let format = |v: f64| info.map_or_else(|| format!("{v:.3}"), |m| m.format(v));
    let width = ui.available_width().max(120.0);
    let (outer, background) =
        ui.allocate_exact_size(Vec2::new(width, PLOT_HEIGHT + 14.0), Sense::click());
    let rect = Rect::from_min_max(
        outer.min + Vec2::new(6.0, 4.0),
        Pos2::new(outer.right() - 6.0, outer.top() + 4.0 + PLOT_HEIGHT - 8.0),
    );
    let frame = Frame {
        rect,
        lo: range.0,
        hi: range.1,
    };
    let painter = ui.painter_at(outer);
    painter.rect_filled(outer, 3.0, Color32::from_gray(22));
    paint_spread(&painter, &frame, spread);
    let stroke_weak = Stroke::new(1.0, Color32::from_gray(60));
    painter.hline(rect.x_range(), frame.y(0.0), stroke_weak);
    painter.hline(rect.x_range(), frame.y(1.0), stroke_weak);
    if let Some(v) = selected.filter(|v| v.is_finite()) {
        let x = frame.x(v.clamp(range.0, range.1));
        painter.vline(x, rect.y_range(), Stroke::new(1.5, SELECTED_COLOUR));
    }
    paint_curve(&painter, &frame, c);
    let small = egui::FontId::proportional(10.0);
    let label_y = rect.bottom() + 3.0;
    painter.text(
        Pos2::new(rect.left(), label_y),
        egui::Align2::LEFT_TOP,
        format(range.0),
        small.clone(),
        Color32::from_gray(150),
    );
    painter.text(
        Pos2::new(rect.right(), label_y),
        egui::Align2::RIGHT_TOP,
        format(range.1),
        small,
        Color32::from_gray(150),
    );

    let mut changed = false;
    let mut dragging = false;
    let points = c.curve_points();
    let mut on_screen = Vec::with_capacity(points.len());
    for (k, p) in points.iter().enumerate() {
        let centre = frame.pos(*p);
        on_screen.push(centre);
        let role = c.point_role(k);
        let resp = ui.interact(
            Rect::from_center_size(centre, Vec2::splat(2.0 * GRAB_RADIUS)),
            id.with(k),
            Sense::click_and_drag(),
        );
        let colour = match role {
            PointRole::End(CurveEnd::Worst) => WORST_COLOUR,
            PointRole::End(CurveEnd::Ideal) => IDEAL_COLOUR,
            PointRole::Free => FREE_COLOUR,
        };
        let r = if resp.hovered() || resp.dragged() {
            5.0
        } else {
            3.5
        };
        painter.circle_filled(centre, r, colour);
        if resp.dragged() {
            dragging = true;
            if let Some(pos) = resp.interact_pointer_pos() {
                let pos = pos.clamp(rect.min, rect.max);
                changed |= c.move_point(k, frame.value_at(pos.x), frame.utility_at(pos.y));
            }
        }
        if resp.secondary_clicked() {
            changed |= c.remove_point(k);
        }
        let what = match role {
            PointRole::End(CurveEnd::Worst) => format!(
                "Worst: {} scores 0. Drag sideways to move it.",
                format(p[0])
            ),
            PointRole::End(CurveEnd::Ideal) => format!(
                "Ideal: {} scores 1. Drag sideways to move it.",
                format(p[0])
            ),
            PointRole::Free => format!(
                "{} scores {:.2}. Drag to move; right-click to remove.",
                format(p[0]),
                p[1]
            ),
        };
        resp.on_hover_text(what);
    }
    if background.double_clicked() {
        if let Some(pos) = background.interact_pointer_pos() {
            changed |= c.insert_point(frame.value_at(pos.x)).is_some();
        }
    }
    background.on_hover_text(
        "Utility (0 to 1, line) against the value; bars: how many candidates that pass the \
         limits have each value; orange: the selected crater. Double-click to add a point.",
    );
    CurveOutcome {
        changed,
        points_on_screen: on_screen,
        dragging,
    }
}

fn paint_spread(painter: &egui::Painter, frame: &Frame, spread: Option<&ValueSpread>) {
    let Some(s) = spread.filter(|s| s.measured > 0) else {
        return;
    };
    let top = s.bins.iter().copied().max().unwrap_or(0).max(1) as f32;
    let n = s.bins.len().max(1);
    let width = (s.hi - s.lo) / n as f64;
    for (k, &count) in s.bins.iter().enumerate() {
        if count == 0 {
            continue;
        }
        let (a, b) = if width > 0.0 {
            (s.lo + k as f64 * width, s.lo + (k + 1) as f64 * width)
        } else {
            // Every value the same: one thin bar.
            let half = (frame.hi - frame.lo) * 0.004;
            (s.lo - half, s.lo + half)
        };
        let h = count as f32 / top * frame.rect.height();
        let x0 = frame.x(a);
        let x1 = frame.x(b).max(x0 + 1.0);
        painter.rect_filled(
            Rect::from_min_max(
                Pos2::new(x0, frame.rect.bottom() - h),
                Pos2::new(x1 - 0.5, frame.rect.bottom()),
            ),
            0.0,
            BAR_COLOUR,
        );
    }
}

fn paint_curve(painter: &egui::Painter, frame: &Frame, c: &SoftCriterion) {
    let points = c.curve_points();
    let (Some(first), Some(last)) = (points.first(), points.last()) else {
        return;
    };
    // Flat beyond the ends, as the utility is.
    let mut line = vec![frame.pos([frame.lo.min(first[0]), first[1]])];
    line.extend(points.iter().map(|p| frame.pos(*p)));
    line.push(frame.pos([frame.hi.max(last[0]), last[1]]));
    painter.add(egui::Shape::line(line, Stroke::new(2.0, CURVE_COLOUR)));
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn spread_counts_every_value_once() {
        let s =
            ValueSpread::of([Some(0.0), Some(1.0), Some(0.5), None, Some(f64::NAN)].into_iter());
        assert_eq!(s.measured, 3);
        assert_eq!(s.missing, 2);
        assert_eq!(s.bins.iter().sum::<u32>(), 3);
        assert_eq!(s.bins[0], 1);
        assert_eq!(s.bins[BINS - 1], 1);
    }
}
