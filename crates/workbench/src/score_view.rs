//! The crater sheet's Score page: how the candidate's score is made, one bar per weighted
//! criterion (its share of the weight, the candidate's utility on it and what that adds), from
//! `siting::score_breakdown`.

use crate::session::Session;
use egui::{Color32, RichText, Sense, Stroke, Vec2};
use siting::{ScoreBreakdown, ScoreMethod};
use survey::Candidate;

const SHARE_OUTLINE: Color32 = Color32::from_gray(130);
const CONTRIBUTION_FILL: Color32 = Color32::from_rgb(250, 200, 70);
const LOST_FILL: Color32 = Color32::from_gray(55);
const BAR_W: f32 = 150.0;
const BAR_H: f32 = 12.0;

/// Contribution as the sheet prints it: "+0.320" for a sum, "×0.912" for a product.
pub fn contribution_text(method: ScoreMethod, v: f64) -> String {
    match method {
        ScoreMethod::WeightedSum => format!("+{v:.3}"),
        ScoreMethod::WeightedProduct => format!("×{v:.3}"),
    }
}

/// The Score page for candidate `c` (survey index `index`).
pub fn score_ui(ui: &mut egui::Ui, session: &Session, index: usize, c: &Candidate) {
    if let Some(e) = &session.criteria_error {
        ui.colored_label(
            Color32::from_rgb(240, 140, 120),
            format!(
                "The edited criteria cannot be ranked ({e}); the breakdown returns when they can."
            ),
        );
        return;
    }
    let b = match siting::score_breakdown(&session.criteria, c) {
        Ok(b) => b,
        Err(e) => {
            ui.label(format!("No breakdown: {e}"));
            return;
        }
    };
    ui.label(
        RichText::new(match b.method {
            ScoreMethod::WeightedSum => {
                "Each bar's outline is the criterion's share of the total weight; the filled part is that share times the crater's utility (0 at the worst acceptable value, 1 at the ideal). The filled parts add up to the score."
            }
            ScoreMethod::WeightedProduct => {
                "Weighted product: each criterion multiplies the score by its utility raised to its weight share. The bar's outline is the share; the fill is the utility."
            }
        })
        .small(),
    );
    parts_grid(ui, &b);
    ui.add_space(4.0);
    total_bar(ui, &b);
    let ranked = session.ranking.score(index);
    let sum_word = match b.method {
        ScoreMethod::WeightedSum => "Sum of the contributions",
        ScoreMethod::WeightedProduct => "Product of the factors",
    };
    ui.label(RichText::new(format!("{sum_word}: {:.3}", b.score)).strong());
    // The ranking scores from its prepared columns, this page from the candidate's own
    // numbers: a difference would be a defect, so say it rather than hide it.
    if let Some(r) = ranked.filter(|r| (r - b.score).abs() > 5e-4) {
        ui.colored_label(
            Color32::from_rgb(240, 140, 120),
            format!("The ranking holds {r:.3} for this candidate."),
        );
    }
    if let Some(t) = &session.prepared {
        if index < t.len() && t.passed(index) {
            if t.pareto(index) {
                ui.label("Pareto-efficient: no other candidate that meets the limits is at least as good on every criterion and better on one.");
            } else {
                ui.label("Not Pareto-efficient: another candidate that meets the limits is at least as good on every criterion and better on one.");
            }
        }
    }
}

fn parts_grid(ui: &mut egui::Ui, b: &ScoreBreakdown) {
    egui::Grid::new("score-parts")
        .num_columns(5)
        .spacing([10.0, 4.0])
        .striped(true)
        .show(ui, |ui| {
            ui.strong("Criterion");
            ui.strong("Value");
            ui.strong("Share · utility");
            ui.strong("Utility");
            ui.strong("Adds");
            ui.end_row();
            for p in &b.parts {
                let info = survey::metrics::metric(&p.metric);
                let name = info.map_or(p.metric.as_str(), |m| m.label);
                let hint = info.map_or(format!("id: {}", p.metric), |m| {
                    format!("{}\nid: {}", m.description, p.metric)
                });
                ui.label(name).on_hover_text(hint);
                let value = match (p.value, info) {
                    (Some(v), Some(m)) => m.format(v),
                    (Some(v), None) => format!("{v:.3}"),
                    (None, _) => "not measured".into(),
                };
                ui.label(value);
                part_bar(ui, p.weight_share, p.utility).on_hover_text(format!(
                    "{:.0} % of the total weight; utility {:.2}",
                    p.weight_share * 100.0,
                    p.utility
                ));
                ui.label(format!("{:.2}", p.utility));
                ui.label(contribution_text(b.method, p.contribution));
                ui.end_row();
            }
        });
}

/// Outline as long as the weight share, filled to share x utility.
fn part_bar(ui: &mut egui::Ui, share: f64, utility: f64) -> egui::Response {
    let (rect, resp) = ui.allocate_exact_size(Vec2::new(BAR_W, BAR_H), Sense::hover());
    let p = ui.painter();
    let w = (share.clamp(0.0, 1.0) as f32) * BAR_W;
    let outline = egui::Rect::from_min_size(rect.min, Vec2::new(w.max(1.0), BAR_H));
    let fill = egui::Rect::from_min_size(
        rect.min,
        Vec2::new(w * utility.clamp(0.0, 1.0) as f32, BAR_H),
    );
    p.rect_filled(outline, 1.0, LOST_FILL);
    p.rect_filled(fill, 1.0, CONTRIBUTION_FILL);
    p.rect_stroke(
        outline,
        1.0,
        Stroke::new(1.0, SHARE_OUTLINE),
        egui::StrokeKind::Inside,
    );
    let mut text = format!("{:.0} %", share * 100.0);
    if w < 34.0 {
        text.clear();
    }
    p.text(
        outline.right_center() - Vec2::new(3.0, 0.0),
        egui::Align2::RIGHT_CENTER,
        text,
        egui::FontId::proportional(9.0),
        Color32::from_gray(230),
    );
    resp
}

/// The whole score as one bar: the contributions end to end, the rest grey.
fn total_bar(ui: &mut egui::Ui, b: &ScoreBreakdown) {
    let width = (ui.available_width() - 8.0).clamp(120.0, 420.0);
    let (rect, _) = ui.allocate_exact_size(Vec2::new(width, BAR_H + 2.0), Sense::hover());
    let p = ui.painter();
    p.rect_filled(rect, 1.0, LOST_FILL);
    if b.method == ScoreMethod::WeightedSum {
        let mut x = rect.left();
        for (k, part) in b.parts.iter().enumerate() {
            let w = part.contribution.clamp(0.0, 1.0) as f32 * width;
            let shade = if k % 2 == 0 { 1.0 } else { 0.75 };
            p.rect_filled(
                egui::Rect::from_min_size(egui::pos2(x, rect.top()), Vec2::new(w, rect.height())),
                0.0,
                CONTRIBUTION_FILL.gamma_multiply(shade),
            );
            x += w;
        }
    } else {
        p.rect_filled(
            egui::Rect::from_min_size(
                rect.min,
                Vec2::new(b.score.clamp(0.0, 1.0) as f32 * width, rect.height()),
            ),
            0.0,
            CONTRIBUTION_FILL,
        );
    }
    p.rect_stroke(
        rect,
        1.0,
        Stroke::new(1.0, SHARE_OUTLINE),
        egui::StrokeKind::Inside,
    );
}
