//! "Export shortlist": where to write the passing candidates and in which format, or a picture
//! of the terrain view, with the screening caution in plain sight.

use crate::SCREENING_CAUTION;
use egui::RichText;
use std::path::PathBuf;

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ExportFormat {
    GeoJson,
    GeoPackage,
    Csv,
    MapPicture,
}

impl ExportFormat {
    pub const ALL: [ExportFormat; 4] = [
        ExportFormat::GeoJson,
        ExportFormat::GeoPackage,
        ExportFormat::Csv,
        ExportFormat::MapPicture,
    ];

    pub fn title(self) -> &'static str {
        match self {
            ExportFormat::GeoJson => "GeoJSON (rims as polygons)",
            ExportFormat::GeoPackage => "GeoPackage",
            ExportFormat::Csv => "CSV table",
            ExportFormat::MapPicture => "Picture of the terrain view (PNG)",
        }
    }

    pub fn extension(self) -> &'static str {
        match self {
            ExportFormat::GeoJson => "geojson",
            ExportFormat::GeoPackage => "gpkg",
            ExportFormat::Csv => "csv",
            ExportFormat::MapPicture => "png",
        }
    }
}

/// What the user asked for when they pressed Export.
#[derive(Clone, Debug, PartialEq)]
pub struct ExportRequest {
    pub format: ExportFormat,
    pub path: PathBuf,
    pub passing_only: bool,
    /// Only the candidates the user marked kept (decisions and notes are columns either way).
    pub only_kept: bool,
}

pub struct ExportDialog {
    pub open: bool,
    pub format: ExportFormat,
    pub path: String,
    pub passing_only: bool,
    pub only_kept: bool,
    /// Outcome of the last export, shown until the dialog closes.
    pub status: Option<Result<String, String>>,
}

impl Default for ExportDialog {
    fn default() -> Self {
        ExportDialog {
            open: false,
            format: ExportFormat::GeoJson,
            path: "shortlist.geojson".into(),
            passing_only: true,
            only_kept: false,
            status: None,
        }
    }
}

impl ExportDialog {
    /// Draw the dialog if open; return a request when the user confirms.
    pub fn ui(&mut self, ctx: &egui::Context) -> Option<ExportRequest> {
        if !self.open {
            return None;
        }
        let mut request = None;
        let mut open = self.open;
        egui::Window::new("Export shortlist")
            .open(&mut open)
            .collapsible(false)
            .resizable(false)
            .show(ctx, |ui| {
                ui.label(RichText::new(SCREENING_CAUTION).italics());
                ui.separator();
                for f in ExportFormat::ALL {
                    if ui.radio_value(&mut self.format, f, f.title()).changed() {
                        let stem = self
                            .path
                            .rsplit_once('.')
                            .map_or(self.path.clone(), |(s, _)| s.to_owned());
                        self.path = format!("{stem}.{}", f.extension());
                    }
                }
                if self.format != ExportFormat::MapPicture {
                    ui.checkbox(
                        &mut self.passing_only,
                        "Only candidates that pass the limits",
                    );
                    ui.checkbox(&mut self.only_kept, "Only candidates marked kept")
                        .on_hover_text("decisions and notes are exported as columns either way");
                }
                ui.horizontal(|ui| {
                    ui.label("Write to:");
                    ui.add(egui::TextEdit::singleline(&mut self.path).desired_width(320.0));
                });
                ui.horizontal(|ui| {
                    if ui.button("Export").clicked() && !self.path.trim().is_empty() {
                        request = Some(ExportRequest {
                            format: self.format,
                            path: PathBuf::from(self.path.trim()),
                            passing_only: self.passing_only,
                            only_kept: self.only_kept,
                        });
                    }
                });
                match &self.status {
                    Some(Ok(msg)) => {
                        ui.colored_label(egui::Color32::LIGHT_GREEN, msg);
                    }
                    Some(Err(msg)) => {
                        ui.colored_label(egui::Color32::from_rgb(240, 140, 120), msg);
                    }
                    None => {}
                }
            });
        self.open = open;
        if !open {
            self.status = None;
        }
        request
    }
}
