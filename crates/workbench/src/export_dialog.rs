//! "Export shortlist": where to write the passing candidates and in which format, or a picture
//! of the terrain view, with the screening caution in plain sight (and stamped on the picture).

use crate::SCREENING_CAUTION;
use egui::{Color32, RichText};
use std::path::{Path, PathBuf};
use std::sync::mpsc::{channel, Receiver};

/// Colour of a failed export's message.
const ERROR_COLOUR: Color32 = Color32::from_rgb(240, 140, 120);

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
    /// A picture of the terrain view asked for: taken in the next frame, with this dialog
    /// out of the way.
    picture_to: Option<PathBuf>,
    /// Set by the frame that hid the dialog for the picture; the capture happens in it.
    capture_now: bool,
    /// The outcome of a picture being written (the window hands the pixels over after the
    /// frame is drawn, so the write finishes frames later).
    picture_writing: Option<Receiver<Result<String, String>>>,
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
            picture_to: None,
            capture_now: false,
            picture_writing: None,
        }
    }
}

impl ExportDialog {
    /// Draw the dialog if open; return a request when the user confirms.
    pub fn ui(&mut self, ctx: &egui::Context) -> Option<ExportRequest> {
        if let Some(done) = self
            .picture_writing
            .as_ref()
            .and_then(|rx| rx.try_recv().ok())
        {
            self.picture_writing = None;
            self.status = Some(done);
        }
        if !self.open {
            return None;
        }
        if self.picture_to.is_some() {
            // Hidden for one frame so the picture shows the map, not this window.
            self.capture_now = true;
            ctx.request_repaint();
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
                if self.picture_writing.is_some() {
                    ui.horizontal(|ui| {
                        ui.spinner();
                        ui.label("Writing the picture…");
                    });
                }
                match &self.status {
                    Some(Ok(msg)) => {
                        ui.colored_label(Color32::LIGHT_GREEN, msg);
                    }
                    Some(Err(msg)) => {
                        ui.colored_label(ERROR_COLOUR, msg);
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

    /// Ask for a picture of the terrain view at `path`: the next frame hides the dialog and
    /// [`ExportDialog::capture_map`] takes it.
    pub fn request_picture(&mut self, ctx: &egui::Context, path: PathBuf) {
        self.picture_to = Some(path);
        self.status = None;
        ctx.request_repaint();
    }

    /// Whether a picture is still being taken or written.
    pub fn picture_pending(&self) -> bool {
        self.picture_to.is_some() || self.picture_writing.is_some()
    }

    /// Call once per frame after [`ExportDialog::ui`], with where the map was drawn: in the
    /// frame that hid the dialog, stamps the caution on the map and asks the window for its
    /// pixels; the outcome (written, or why not) reaches the dialog when the write is done.
    pub fn capture_map(&mut self, ctx: &egui::Context, map_rect: Option<egui::Rect>) {
        if !std::mem::take(&mut self.capture_now) {
            return;
        }
        let Some(path) = self.picture_to.take() else {
            return;
        };
        let Some(rect) = map_rect.filter(|r| r.width() >= 1.0 && r.height() >= 1.0) else {
            self.status = Some(Err("No terrain view on screen to take a picture of.".into()));
            return;
        };
        stamp_caution(ctx, rect);
        let (tx, rx) = channel();
        let ppp = ctx.pixels_per_point();
        let repaint = ctx.clone();
        ctx.request_screenshot(move |image| {
            let _ = tx.send(save_picture(&path, &image, rect, ppp));
            repaint.request_repaint();
        });
        self.picture_writing = Some(rx);
    }
}

/// The caution and what verdicts leave out, on a dark band along the bottom of `rect`, drawn
/// over everything for the frame the picture is taken in.
fn stamp_caution(ctx: &egui::Context, rect: egui::Rect) {
    let painter = ctx.layer_painter(egui::LayerId::new(
        egui::Order::Foreground,
        egui::Id::unique("picture-caution"),
    ));
    let text = format!("{SCREENING_CAUTION}\n{}", siting::VERDICT_SCOPE);
    let galley = painter.layout(
        text,
        egui::FontId::proportional(12.0),
        Color32::from_rgb(240, 225, 170),
        (rect.width() - 16.0).max(40.0),
    );
    let band = egui::Rect::from_min_max(
        egui::pos2(rect.left(), rect.bottom() - galley.size().y - 12.0),
        rect.right_bottom(),
    );
    painter.rect_filled(band, 0.0, Color32::from_black_alpha(200));
    painter.galley(band.min + egui::vec2(8.0, 6.0), galley, Color32::WHITE);
}

/// Cut `rect` (points) out of the window's pixels and write it as PNG, atomically; the words
/// the dialog shows either way.
pub fn save_picture(
    path: &Path,
    image: &egui::ColorImage,
    rect: egui::Rect,
    pixels_per_point: f32,
) -> Result<String, String> {
    // `region` panics on a rectangle outside the image; the window may have shrunk since.
    let whole = egui::Rect::from_min_size(
        egui::Pos2::ZERO,
        egui::vec2(image.size[0] as f32, image.size[1] as f32) / pixels_per_point,
    );
    let rect = rect.intersect(whole);
    if !(rect.width() >= 1.0 && rect.height() >= 1.0) {
        return Err("Could not write the picture: the terrain view is off screen.".into());
    }
    let region = image.region(&rect, Some(pixels_per_point));
    crate::save_png(path, &region)
        .map(|()| format!("Picture written to {}", path.display()))
        .map_err(|e| format!("Could not write the picture: {e}"))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn grey(w: usize, h: usize) -> egui::ColorImage {
        egui::ColorImage::new([w, h], vec![Color32::GRAY; w * h])
    }

    #[test]
    fn a_picture_into_a_missing_folder_reports_the_error() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("no-such-folder").join("map.png");
        let rect = egui::Rect::from_min_size(egui::pos2(2.0, 2.0), egui::vec2(10.0, 10.0));
        let said = save_picture(&path, &grey(20, 20), rect, 1.0).unwrap_err();
        assert!(said.starts_with("Could not write the picture"), "{said}");
        assert!(!path.exists());
    }

    #[test]
    fn a_picture_is_cut_to_the_map_and_reported_once_written() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("map.png");
        // The rectangle runs past the image: it is cut to what exists, not a panic.
        let rect = egui::Rect::from_min_size(egui::pos2(5.0, 5.0), egui::vec2(30.0, 8.0));
        let said = save_picture(&path, &grey(20, 20), rect, 2.0).unwrap();
        assert_eq!(said, format!("Picture written to {}", path.display()));
        let png = image::open(&path).unwrap();
        // The image is 10 points square at 2 pixels per point: 5..10 points each way remain.
        assert_eq!((png.width(), png.height()), (10, 10));
    }
}
