//! The criteria's study areas and keep-out zones in the criteria panel: one row per area
//! (name, inside or outside, margin) with a remove button; and the step that adds an area
//! file to the criteria (File menu, or a polygon drawn on the map), one undo step each.

use crate::engine::Criteria;
use crate::session::Session;
use egui::RichText;
use siting::areas::{AreaSpec, Keep};
use std::path::Path;

/// The rows of the criteria's areas, editable: a remove button per area.
pub fn areas_ui(ui: &mut egui::Ui, edited: &mut Criteria) {
    ui.strong("Areas");
    if edited.areas.is_empty() {
        ui.label(
            RichText::new(
                "No study area or keep-out zone. File > Add study area… or Add keep-out zone…, \
                 or draw one on the map.",
            )
            .small(),
        );
        return;
    }
    let mut remove = None;
    ui.group(|ui| {
        ui.set_width(ui.available_width());
        egui::Grid::new("criteria-areas")
            .num_columns(4)
            .striped(true)
            .show(ui, |ui| {
                for (k, a) in edited.areas.iter().enumerate() {
                    ui.label(area_name(a)).on_hover_text(&a.file);
                    ui.label(match a.keep {
                        Keep::Inside => "keep inside",
                        Keep::Outside => "keep outside",
                    });
                    ui.label(format!("margin {} km", a.margin_km));
                    if ui
                        .small_button("Remove")
                        .on_hover_text(format!("Remove {} from the criteria", area_name(a)))
                        .clicked()
                    {
                        remove = Some(k);
                    }
                    ui.end_row();
                }
            });
    });
    if let Some(k) = remove {
        edited.areas.remove(k);
    }
}

/// An area's name for a person: its file's name.
pub fn area_name(a: &AreaSpec) -> String {
    Path::new(&a.file)
        .file_name()
        .map_or_else(|| a.file.clone(), |n| n.to_string_lossy().into_owned())
}

/// Append the area file `path` to the criteria (one undo step) and re-rank. An area that
/// cannot be read shows as the criteria panel's "Not applied" error.
pub fn add_area(session: &mut Session, path: &Path, keep: Keep, margin_km: f64) {
    let mut edited = session.criteria.clone();
    edited.areas.push(AreaSpec {
        file: path.display().to_string(),
        layer: None,
        filter: None,
        keep,
        margin_km: margin_km.max(0.0),
        why: String::new(),
    });
    session.edit_criteria(edited, None);
}
