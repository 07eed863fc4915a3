//! The crater sheet's reflector page: the survey's verdict on hanging the target structure in
//! the selected crater, its key numbers, and a plan of the placement (clearance under the
//! surface, rim anchors, aperture edge) over shaded relief in the crater's local frame.
//!
//! Drawing and lookups only: the fit itself is `structure::fit`'s, stored in the survey.

use crate::fit_plan::{backdrop, plan, plan_half_width_m, PLAN_MARGIN};
use egui::{Color32, RichText};
use std::sync::Arc;
use structure::{StructureFit, StructureSpec};
use survey::Candidate;
use terrain::{Dem, LocalFrame};

const FAIL_COLOUR: Color32 = Color32::from_rgb(240, 140, 120);
const OK_COLOUR: Color32 = Color32::from_rgb(130, 220, 140);

/// What a fit verdict does not cover, shown beside every verdict: the fit is geometry on an
/// elevation model, nothing more.
pub const NOT_ASSESSED: &str = "Not assessed: loads, cable dynamics, ground bearing, thermal effects and the DEM's vertical error.";

/// The fit verdict as screening words: the structure meets the stated envelope on this DEM,
/// which is not a design check.
pub fn verdict_words(fit_ok: bool) -> &'static str {
    if fit_ok {
        "Fits the stated envelope on this DEM"
    } else {
        "Does not fit the stated envelope on this DEM"
    }
}

#[derive(Default)]
pub struct FitView {
    /// Shaded relief under the plan, for (candidate id, survey identity, close-up).
    backdrop: Option<((u32, usize, bool), Option<egui::TextureHandle>)>,
    /// Frame the plan on the aperture alone rather than the whole anchor layout.
    pub close_up: bool,
}

/// A one-line description of the structure spec (the one `siting` writes under the
/// criteria's title, so the sheet and the panel name the dish alike).
pub fn describe_spec(s: &StructureSpec) -> String {
    siting::structure_summary(s)
}

fn compass(az_deg: f64) -> &'static str {
    const NAMES: [&str; 8] = ["N", "NE", "E", "SE", "S", "SW", "W", "NW"];
    NAMES[((az_deg.rem_euclid(360.0) + 22.5) / 45.0) as usize % 8]
}

impl FitView {
    pub fn ui(
        &mut self,
        ui: &mut egui::Ui,
        c: &Candidate,
        spec: Option<&StructureSpec>,
        body_radius_m: f64,
        survey_key: usize,
        dem: Option<&Arc<Dem>>,
    ) {
        let Some(fit) = &c.fit else {
            match spec {
                None => ui.label("No reflector fits in this survey: set the reflector under \"Reflector to fit\" (Weights and limits) and apply to see where it would hang."),
                Some(_) => ui.colored_label(FAIL_COLOUR, "The crater could not be fitted: the survey recorded no placement for it (too little elevation data around it)."),
            };
            if let Some(s) = spec {
                ui.label(RichText::new(format!("Structure: {}", describe_spec(s))).small());
            }
            return;
        };
        ui.label(
            RichText::new(verdict_words(fit.fit_ok))
                .strong()
                .color(if fit.fit_ok { OK_COLOUR } else { FAIL_COLOUR }),
        );
        for r in &fit.reasons {
            ui.label(format!("• {r}"));
        }
        ui.label(RichText::new(NOT_ASSESSED).small().italics());
        if let Some(s) = spec {
            ui.label(RichText::new(format!("Structure: {}", describe_spec(s))).small());
        }
        let frame = LocalFrame::new(body_radius_m, fit.centre_lon_deg, fit.centre_lat_deg);
        numbers(ui, fit, spec, &frame);
        ui.add_space(4.0);
        ui.strong("Plan: clearance under the surface, anchors and aperture edge");
        ui.checkbox(&mut self.close_up, "Close-up of the aperture");
        let half_m = match spec.filter(|_| self.close_up) {
            Some(s) => s.aperture_radius_m() * PLAN_MARGIN,
            None => plan_half_width_m(fit, &frame),
        };
        let key = (c.id, survey_key, self.close_up);
        if self.backdrop.as_ref().map(|b| b.0) != Some(key) {
            let tex = dem.and_then(|d| backdrop(d, &frame, half_m)).map(|img| {
                ui.ctx()
                    .load_texture("reflector-backdrop", img, egui::TextureOptions::LINEAR)
            });
            self.backdrop = Some((key, tex));
        }
        let tex = self.backdrop.as_ref().and_then(|b| b.1.as_ref());
        plan(ui, fit, spec, &frame, half_m, tex, c);
        if tex.is_none() {
            ui.label(
                RichText::new(
                    "Shaded relief under the plan needs the DEM the survey was made from.",
                )
                .small(),
            );
        }
    }
}

fn numbers(ui: &mut egui::Ui, f: &StructureFit, spec: Option<&StructureSpec>, frame: &LocalFrame) {
    // Values through the metric registry, so the page reads like every other screen.
    let fmt = |id: &str, v: f64| match survey::metrics::metric(id) {
        Some(m) if v.is_finite() => m.format(v),
        _ => "no data".to_owned(),
    };
    let hint = |id: &str, fallback: &str| {
        survey::metrics::metric(id).map_or(fallback.to_owned(), |m| {
            format!("{}\nid: {id}", m.description)
        })
    };
    let (mx, my) = frame.to_local(f.min_clearance_lon_deg, f.min_clearance_lat_deg);
    let d_m = mx.hypot(my);
    let where_min = if d_m < 0.5 {
        "on the axis".to_owned()
    } else {
        format!(
            "{d_m:.0} m {} of the axis",
            compass(mx.atan2(my).to_degrees())
        )
    };
    let limit = spec
        .map(|s| format!(" (limit {:.0} m)", s.max_anchor_height_difference_m))
        .unwrap_or_default();
    egui::Grid::new("fit-numbers")
        .num_columns(2)
        .spacing([14.0, 2.0])
        .striped(true)
        .show(ui, |ui| {
            let mut row = |name: &str, value: String, hint: String| {
                ui.label(name).on_hover_text(hint);
                ui.strong(value);
                ui.end_row();
            };
            let vertex = if f.vertex_height_m.is_finite() {
                format!("{:.0} m", f.vertex_height_m)
            } else {
                "no data".to_owned()
            };
            row(
                "Vertex height",
                vertex,
                "lowest point of the surface, above the reference sphere".into(),
            );
            let label = survey::label_of;
            row(
                label("min_clearance_m"),
                format!("{}, {where_min}", fmt("min_clearance_m", f.min_clearance_m)),
                hint("min_clearance_m", ""),
            );
            row(
                label("headroom_m"),
                fmt("headroom_m", f.headroom_m),
                hint("headroom_m", ""),
            );
            row(
                label("anchor_height_spread_m"),
                format!(
                    "{}{limit}",
                    fmt("anchor_height_spread_m", f.anchor_height_spread_m)
                ),
                hint("anchor_height_spread_m", ""),
            );
            row(
                label("max_span_m"),
                fmt("max_span_m", f.max_span_m),
                hint("max_span_m", ""),
            );
            row(
                label("excavation_m3"),
                fmt("excavation_m3", f.excavation_m3),
                hint("excavation_m3", ""),
            );
            // A structure on the crater's centre has no direction to give.
            if f.offset_from_crater_centre_m >= 0.5 {
                row(
                    label("offset_from_crater_centre_m"),
                    format!(
                        "{} toward {:.0}°",
                        fmt("offset_from_crater_centre_m", f.offset_from_crater_centre_m),
                        f.offset_azimuth_deg
                    ),
                    hint("offset_from_crater_centre_m", ""),
                );
            }
            row(
                "Rotation",
                format!("first anchor at {:.1}°", f.rotation_deg),
                "azimuth of anchor 1 from the axis, clockwise from north".into(),
            );
            row(
                "Aperture with data",
                format!("{:.0} %", f.aperture_valid_fraction * 100.0),
                "share of the aperture the DEM covers".into(),
            );
        });
}
