//! A small in-window file chooser: a path field and the folder's openable files. Works the
//! same on every desktop and under a virtual display, with no system dialog service.

use std::path::{Path, PathBuf};

/// File kinds the workbench opens, by extension.
pub const OPENABLE: [&str; 6] = ["tif", "tiff", "img", "json", "toml", "lbl"];

/// Vector files an area is commonly read from (any OGR vector can be typed in).
pub const AREA_FILES: [&str; 7] = ["geojson", "json", "gpkg", "shp", "kml", "gml", "fgb"];

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum PromptPurpose {
    Open,
    SaveStudy,
    SaveSurvey,
    SaveCriteria,
    LoadCriteria,
    /// An area file to add to the criteria, kept inside or outside.
    AddArea(siting::areas::Keep),
    /// Where to write the polygon drawn on the map (GeoJSON), then added as this kind.
    SaveDrawnArea(siting::areas::Keep),
}

pub struct PathPrompt {
    pub purpose: PromptPurpose,
    pub path: String,
    /// The margin of an area being added, km.
    pub margin_km: f64,
}

impl PathPrompt {
    pub fn new(purpose: PromptPurpose, start: &Path) -> Self {
        PathPrompt {
            purpose,
            path: start.display().to_string(),
            margin_km: 0.0,
        }
    }

    fn title(&self) -> &'static str {
        match self.purpose {
            PromptPurpose::Open => "Open a DEM, survey or study",
            PromptPurpose::SaveStudy => "Save the study",
            PromptPurpose::SaveSurvey => "Save the survey",
            PromptPurpose::SaveCriteria => "Save criteria",
            PromptPurpose::LoadCriteria => "Load criteria",
            PromptPurpose::AddArea(siting::areas::Keep::Inside) => "Add a study area",
            PromptPurpose::AddArea(siting::areas::Keep::Outside) => "Add a keep-out zone",
            PromptPurpose::SaveDrawnArea(_) => "Save the drawn area (GeoJSON)",
        }
    }

    /// Whether the prompt adds an area (then it asks for a margin too).
    fn adds_area(&self) -> bool {
        matches!(
            self.purpose,
            PromptPurpose::AddArea(_) | PromptPurpose::SaveDrawnArea(_)
        )
    }

    /// Whether files with extension `ext` (lower case) are listed.
    fn lists(&self, ext: &str) -> bool {
        if self.adds_area() {
            AREA_FILES.contains(&ext)
        } else {
            OPENABLE.contains(&ext)
        }
    }

    /// Returns `Some(Some(path))` when confirmed, `Some(None)` when dismissed.
    pub fn ui(&mut self, ctx: &egui::Context) -> Option<Option<PathBuf>> {
        let mut outcome = None;
        let mut open = true;
        egui::Window::new(self.title())
            .open(&mut open)
            .collapsible(false)
            .default_width(460.0)
            .show(ctx, |ui| {
                ui.horizontal(|ui| {
                    ui.label("Path:");
                    let r = ui.add(egui::TextEdit::singleline(&mut self.path).desired_width(340.0));
                    if r.lost_focus() && ui.input(|i| i.key_pressed(egui::Key::Enter)) {
                        outcome = Some(Some(PathBuf::from(self.path.trim())));
                    }
                });
                let here = PathBuf::from(self.path.trim());
                let dir = if here.is_dir() {
                    here.clone()
                } else {
                    here.parent().map(Path::to_path_buf).unwrap_or_default()
                };
                egui::ScrollArea::vertical()
                    .max_height(220.0)
                    .show(ui, |ui| {
                        if let Some(up) = dir.parent() {
                            if ui.selectable_label(false, ".. (folder above)").clicked() {
                                self.path = up.display().to_string();
                            }
                        }
                        let mut entries: Vec<PathBuf> = std::fs::read_dir(&dir)
                            .map(|rd| rd.filter_map(|e| e.ok().map(|e| e.path())).collect())
                            .unwrap_or_default();
                        entries.sort();
                        for p in entries {
                            let name = p
                                .file_name()
                                .map(|n| n.to_string_lossy().into_owned())
                                .unwrap_or_default();
                            let openable = p
                                .extension()
                                .and_then(|e| e.to_str())
                                .is_some_and(|e| self.lists(&e.to_lowercase()));
                            if p.is_dir() {
                                if ui.selectable_label(false, format!("{name}/")).clicked() {
                                    self.path = p.display().to_string();
                                }
                            } else if openable && ui.selectable_label(here == p, name).clicked() {
                                self.path = p.display().to_string();
                            }
                        }
                    });
                if self.adds_area() {
                    ui.horizontal(|ui| {
                        ui.label("Margin:");
                        let r = ui.add(
                            egui::DragValue::new(&mut self.margin_km)
                                .range(0.0..=1000.0)
                                .speed(0.1)
                                .suffix(" km"),
                        );
                        r.on_hover_text(
                            "How far inside a study area's edge, or outside a keep-out zone, a \
                             candidate must be",
                        );
                    });
                }
                ui.horizontal(|ui| {
                    let verb = if matches!(
                        self.purpose,
                        PromptPurpose::Open | PromptPurpose::LoadCriteria
                    ) {
                        "Open"
                    } else if matches!(self.purpose, PromptPurpose::AddArea(_)) {
                        "Add"
                    } else {
                        "Save"
                    };
                    if ui.button(verb).clicked() {
                        outcome = Some(Some(PathBuf::from(self.path.trim())));
                    }
                    if ui.button("Cancel").clicked() {
                        outcome = Some(None);
                    }
                });
            });
        if !open {
            outcome = Some(None);
        }
        outcome
    }
}
