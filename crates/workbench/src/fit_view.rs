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

#[derive(Default)]
pub struct FitView {
    /// Shaded relief under the plan, for (candidate id, survey identity, close-up).
    backdrop: Option<((u32, usize, bool), Option<egui::TextureHandle>)>,
    /// Frame the plan on the aperture alone rather than the whole anchor layout.
    pub close_up: bool,
}

/// A one-line description of the structure spec.
pub fn describe_spec(s: &StructureSpec) -> String {
    let shape = match s.shape {
        structure::Shape::Paraboloid { focal_length_m } => {
            format!("paraboloid, focal length {focal_length_m:.0} m")
        }
        structure::Shape::ParaboloidRatio { f_over_d } => format!("paraboloid, f/D {f_over_d:.2}"),
        structure::Shape::SphericalCap { radius_m } => {
            format!("spherical cap, radius {radius_m:.0} m")
        }
    };
    format!(
        "{:.0} m aperture, {shape}, {} anchors; clearance at least {:.0} m; anchors within {:.0} m of each other in height",
        s.aperture_m, s.anchors, s.min_clearance_m, s.max_anchor_height_difference_m
    )
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
        if fit.fit_ok {
            ui.label(
                RichText::new("The reflector fits")
                    .strong()
                    .color(OK_COLOUR),
            );
        } else {
            ui.label(
                RichText::new("The reflector does not fit")
                    .strong()
                    .color(FAIL_COLOUR),
            );
            for r in &fit.reasons {
                ui.label(format!("• {r}"));
            }
        }
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
    let m = |v: f64, digits: usize, unit: &str| {
        if v.is_finite() {
            format!("{v:.digits$} {unit}")
        } else {
            "no data".into()
        }
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
    egui::Grid::new("fit-numbers").num_columns(2).spacing([14.0, 2.0]).striped(true).show(ui, |ui| {
        let mut row = |name: &str, value: String, hint: &str| {
            ui.label(name).on_hover_text(hint);
            ui.strong(value);
            ui.end_row();
        };
        row("Vertex height", m(f.vertex_height_m, 0, "m"), "lowest point of the surface, above the reference sphere");
        row("Smallest clearance", format!("{}, {where_min}", m(f.min_clearance_m, 1, "m")), "gap between the surface and the ground under it, at its smallest");
        row("Headroom", m(f.headroom_m, 1, "m"), "how far the surface could rise before its edge reaches the lowest anchor");
        row("Anchor height spread", format!("{}{limit}", m(f.anchor_height_spread_m, 0, "m")), "highest minus lowest rim anchor");
        row("Longest span", m(f.max_span_m, 0, "m"), "longest straight line from an anchor to the aperture edge");
        row("Excavation", m(f.excavation_m3, 0, "m³"), "ground to remove to reach the clearance");
        row(
            "Offset from crater centre",
            format!("{} toward {:.0}°", m(f.offset_from_crater_centre_m, 0, "m"), f.offset_azimuth_deg),
            "distance of the structure's axis from the crater centre, and its direction from north",
        );
        row("Rotation", format!("first anchor at {:.1}°", f.rotation_deg), "azimuth of anchor 1 from the axis, clockwise from north");
        row("Aperture with data", format!("{:.0}%", f.aperture_valid_fraction * 100.0), "share of the aperture the DEM covers");
    });
}
