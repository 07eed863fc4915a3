//! The terrain view: shaded relief with an elevation tint, candidate rims coloured by score,
//! pan and zoom by mouse and keyboard, a km scale bar, a height legend and a cursor read-out.

use crate::marks::{CandidateMarks, MarkStyle};
use crate::pyramid::TerrainLayer;
use crate::session::{candidate_label, Session};
use crate::shading;
use egui::{Align2, Color32, FontId, Key, Pos2, Rect, Sense, Stroke, StrokeKind, Vec2};
use std::sync::Arc;
use terrain::GridGeometry;

/// How far the arrow keys move the view, screen points per press.
const KEY_PAN_POINTS: f32 = 60.0;

#[derive(Default)]
pub struct MapView {
    /// View centre in source pixels (pixel-corner convention).
    centre_px: [f64; 2],
    /// Screen points per source pixel.
    zoom: f64,
    fitted: bool,
    marks: CandidateMarks,
    /// Candidate under the pointer in the last frame.
    pub hovered: Option<usize>,
    /// Where the view was drawn last frame, for picture export.
    pub last_rect: Option<Rect>,
    last_frame: Option<Arc<GridGeometry>>,
    /// Leave out the selected candidate's placed reflector (View menu; drawn by default).
    pub hide_placed_reflector: bool,
}

impl MapView {
    /// Where candidate `index` was on screen last frame (tests and tours).
    pub fn screen_position(&mut self, session: &Session, index: usize) -> Option<Pos2> {
        let (rect, geom) = (self.last_rect?, self.last_frame.clone()?);
        let p = self.marks.position(session, &geom, index)?;
        Some(self.to_screen(rect, [p[0] as f64, p[1] as f64]))
    }

    /// Forget the view so the next frame fits the whole raster.
    pub fn refit(&mut self) {
        self.fitted = false;
    }

    fn to_screen(&self, rect: Rect, px: [f64; 2]) -> Pos2 {
        let c = rect.center();
        Pos2::new(
            c.x + ((px[0] - self.centre_px[0]) * self.zoom) as f32,
            c.y + ((px[1] - self.centre_px[1]) * self.zoom) as f32,
        )
    }

    fn to_source(&self, rect: Rect, p: Pos2) -> [f64; 2] {
        let c = rect.center();
        [
            self.centre_px[0] + (p.x - c.x) as f64 / self.zoom,
            self.centre_px[1] + (p.y - c.y) as f64 / self.zoom,
        ]
    }

    fn src_rect_to_screen(&self, rect: Rect, b: [f64; 4]) -> Rect {
        Rect::from_min_max(
            self.to_screen(rect, [b[0], b[1]]),
            self.to_screen(rect, [b[2], b[3]]),
        )
    }

    pub fn ui(
        &mut self,
        ui: &mut egui::Ui,
        session: &mut Session,
        terrain: Option<&mut TerrainLayer>,
        frame: Option<Arc<GridGeometry>>,
    ) {
        let sel_text = match session
            .selected
            .and_then(|i| session.candidate(i).map(|c| (i, c.id)))
        {
            Some((i, id)) => match session.ranking.rank(i) {
                Some(r) => format!("Marked on map: {} (rank {r})", candidate_label(id)),
                None => format!(
                    "Marked on map: {} (fails a requirement)",
                    candidate_label(id)
                ),
            },
            None => "Nothing marked on map: click a rim or a table row".to_owned(),
        };
        ui.label(sel_text);
        let (response, painter) = ui.allocate_painter(ui.available_size(), Sense::click_and_drag());
        let rect = response.rect;
        self.last_rect = Some(rect);
        painter.rect_filled(rect, 0.0, Color32::from_gray(18));
        let Some(geom) = frame else {
            painter.text(
                rect.center(),
                Align2::CENTER_CENTER,
                "Open a DEM or a survey (File menu, or drop a file here)",
                FontId::proportional(16.0),
                Color32::GRAY,
            );
            return;
        };
        self.last_frame = Some(geom.clone());
        let (w, h) = (geom.width as f64, geom.height as f64);
        if !self.fitted && rect.width() > 1.0 {
            self.zoom = (rect.width() as f64 / w).min(rect.height() as f64 / h) * 0.96;
            self.centre_px = [w / 2.0, h / 2.0];
            self.fitted = true;
        }
        self.handle_input(ui, &response, rect);
        if session.centre_map_on_selection {
            session.centre_map_on_selection = false;
            if let Some(i) = session.selected {
                if let Some(p) = self.marks.position(session, &geom, i) {
                    self.centre_px = [p[0] as f64, p[1] as f64];
                    // Zoom in (never out) so the view spans about a dozen diameters around it.
                    let d_m = session.candidate(i).map_or(0.0, |c| c.crater.diameter_m);
                    if let Some((px_m, _)) = geom.pixel_size_m_at(p[0] as f64, p[1] as f64) {
                        let want = rect.width().min(rect.height()) as f64 / (12.0 * d_m / px_m);
                        if want.is_finite() && want > self.zoom {
                            self.zoom = want.min(8.0);
                        }
                    }
                }
            }
        }

        // Terrain: overview, then the finer window on top where it exists.
        let uv = Rect::from_min_max(Pos2::ZERO, Pos2::new(1.0, 1.0));
        let mut height_range = None;
        if let Some(t) = terrain {
            let visible = {
                let a = self.to_source(rect, rect.min);
                let b = self.to_source(rect, rect.max);
                [a[0], a[1], b[0], b[1]]
            };
            t.request_detail(ui.ctx(), visible, 1.0 / self.zoom);
            let clip = painter.with_clip_rect(rect);
            for level in [&t.overview, &t.detail].into_iter().flatten() {
                clip.image(
                    level.texture.id(),
                    self.src_rect_to_screen(rect, level.key.bounds()),
                    uv,
                    Color32::WHITE,
                );
            }
            if t.overview.is_none() {
                painter.text(
                    rect.center(),
                    Align2::CENTER_CENTER,
                    "Shading terrain…",
                    FontId::proportional(16.0),
                    Color32::GRAY,
                );
            }
            height_range = t.range_m;
            self.readout(ui, &response, rect, &geom, Some(&*t));
        } else {
            self.readout(ui, &response, rect, &geom, None);
        }

        // Candidates.
        let view = MarkStyle {
            rect,
            centre_px: self.centre_px,
            zoom: self.zoom,
        };
        let pointer = response.hover_pos();
        self.hovered = self.marks.draw(
            &painter.with_clip_rect(rect),
            session,
            &geom,
            &view,
            pointer,
        );
        if !self.hide_placed_reflector {
            self.draw_placed_reflector(&painter.with_clip_rect(rect), session, &geom, rect);
        }
        if let Some(i) = self.hovered {
            let resp = response.clone();
            resp.on_hover_ui_at_pointer(|ui| hover_card(ui, session, i));
        }
        if response.clicked() {
            if let Some(i) = self.hovered {
                session.select(Some(i), true);
            }
        }
        if let Some(range) = height_range {
            legend(&painter, rect, range);
        }
        self.scale_bar(&painter, rect, &geom);
        response
            .widget_info(|| egui::WidgetInfo::labeled(egui::Role::Canvas, true, "Terrain view"));
    }

    /// The selected candidate's aperture edge and rim anchors, as the survey's fit placed them.
    fn draw_placed_reflector(
        &self,
        painter: &egui::Painter,
        session: &Session,
        geom: &GridGeometry,
        rect: Rect,
    ) {
        let Some(fit) = session
            .selected
            .and_then(|i| session.candidate(i))
            .and_then(|c| c.fit.as_ref())
        else {
            return;
        };
        let at = |lon: f64, lat: f64| {
            geom.lonlat_to_pixel(lon, lat)
                .map(|(c, r)| self.to_screen(rect, [c, r]))
        };
        let ring: Vec<Pos2> = fit
            .aperture_outline_lonlat
            .iter()
            .filter_map(|&(lon, lat)| at(lon, lat))
            .collect();
        let colour = if fit.fit_ok {
            Color32::WHITE
        } else {
            Color32::from_rgb(240, 140, 120)
        };
        painter.add(egui::Shape::line(ring, Stroke::new(1.5, colour)));
        for a in &fit.anchors {
            if let Some(p) = at(a.lon_deg, a.lat_deg) {
                painter.circle_filled(p, 3.0, Color32::from_rgb(255, 170, 40));
                painter.circle_stroke(p, 3.0, Stroke::new(1.0, Color32::BLACK));
            }
        }
    }

    fn handle_input(&mut self, ui: &egui::Ui, response: &egui::Response, rect: Rect) {
        if response.dragged() {
            let d = response.drag_delta();
            self.centre_px[0] -= d.x as f64 / self.zoom;
            self.centre_px[1] -= d.y as f64 / self.zoom;
        }
        if response.hovered() {
            let (scroll, pinch) = ui.input(|i| (i.smooth_scroll_delta.y, i.zoom_delta()));
            let factor = pinch as f64 * (scroll as f64 / 300.0).exp();
            if (factor - 1.0).abs() > 1e-6 {
                let anchor = response.hover_pos().unwrap_or(rect.center());
                self.zoom_about(rect, anchor, factor);
            }
            let (pan, zoom_in, zoom_out) = ui.input(|i| {
                let mut v = Vec2::ZERO;
                if i.key_down(Key::ArrowLeft) {
                    v.x -= 1.0;
                }
                if i.key_down(Key::ArrowRight) {
                    v.x += 1.0;
                }
                if i.key_down(Key::ArrowUp) {
                    v.y -= 1.0;
                }
                if i.key_down(Key::ArrowDown) {
                    v.y += 1.0;
                }
                (
                    v * KEY_PAN_POINTS * i.stable_dt.min(0.1) * 8.0,
                    i.key_pressed(Key::Plus) || i.key_pressed(Key::Equals),
                    i.key_pressed(Key::Minus),
                )
            });
            if pan != Vec2::ZERO {
                self.centre_px[0] += pan.x as f64 / self.zoom;
                self.centre_px[1] += pan.y as f64 / self.zoom;
                ui.ctx().request_repaint();
            }
            if zoom_in {
                self.zoom_about(rect, rect.center(), 1.5);
            }
            if zoom_out {
                self.zoom_about(rect, rect.center(), 1.0 / 1.5);
            }
        }
    }

    fn zoom_about(&mut self, rect: Rect, anchor: Pos2, factor: f64) {
        let before = self.to_source(rect, anchor);
        self.zoom = (self.zoom * factor).clamp(1e-4, 64.0);
        let after = self.to_source(rect, anchor);
        self.centre_px[0] += before[0] - after[0];
        self.centre_px[1] += before[1] - after[1];
    }

    fn readout(
        &self,
        ui: &egui::Ui,
        response: &egui::Response,
        rect: Rect,
        geom: &GridGeometry,
        terrain: Option<&TerrainLayer>,
    ) {
        let Some(p) = response.hover_pos() else {
            return;
        };
        let src = self.to_source(rect, p);
        let Some((lon, lat)) = geom.pixel_to_lonlat(src[0], src[1]) else {
            return;
        };
        let height = terrain.and_then(|t| t.height_at(src[0], src[1]));
        let text = match height {
            Some(h) => format!("lon {lon:.4}°  lat {lat:.4}°  height {h:.0} m"),
            None => format!("lon {lon:.4}°  lat {lat:.4}°  height –"),
        };
        let painter = ui.painter_at(rect);
        let galley = painter.layout_no_wrap(text, FontId::monospace(13.0), Color32::WHITE);
        let at = rect.left_top() + Vec2::new(8.0, 8.0);
        painter.rect_filled(
            Rect::from_min_size(at, galley.size()).expand(4.0),
            4.0,
            Color32::from_black_alpha(170),
        );
        painter.galley(at, galley, Color32::WHITE);
    }

    fn scale_bar(&self, painter: &egui::Painter, rect: Rect, geom: &GridGeometry) {
        let Some((dx_m, _)) = geom.pixel_size_m_at(self.centre_px[0], self.centre_px[1]) else {
            return;
        };
        let m_per_point = dx_m / self.zoom;
        if !(m_per_point.is_finite() && m_per_point > 0.0) {
            return;
        }
        let target_m = m_per_point * 140.0;
        let exp = 10f64.powf(target_m.log10().floor());
        let nice = [5.0, 2.0, 1.0]
            .into_iter()
            .map(|k| k * exp)
            .find(|v| *v <= target_m)
            .unwrap_or(exp);
        let len = (nice / m_per_point) as f32;
        let label = if nice >= 1000.0 {
            format!("{} km", nice / 1000.0)
        } else {
            format!("{nice} m")
        };
        let base = rect.right_bottom() + Vec2::new(-len - 20.0, -18.0);
        painter.rect_filled(
            Rect::from_min_max(
                base + Vec2::new(-8.0, -24.0),
                base + Vec2::new(len + 8.0, 8.0),
            ),
            4.0,
            Color32::from_black_alpha(170),
        );
        let s = Stroke::new(2.0, Color32::WHITE);
        painter.line_segment([base, base + Vec2::new(len, 0.0)], s);
        painter.line_segment([base + Vec2::new(0.0, -5.0), base + Vec2::new(0.0, 3.0)], s);
        painter.line_segment([base + Vec2::new(len, -5.0), base + Vec2::new(len, 3.0)], s);
        painter.text(
            base + Vec2::new(len / 2.0, -6.0),
            Align2::CENTER_BOTTOM,
            label,
            FontId::proportional(13.0),
            Color32::WHITE,
        );
    }
}

fn legend(painter: &egui::Painter, rect: Rect, range: (f32, f32)) {
    let (w, h) = (14.0, 120.0);
    let origin = rect.left_bottom() + Vec2::new(14.0, -h - 26.0);
    let bg = Rect::from_min_size(origin + Vec2::new(-8.0, -24.0), Vec2::new(110.0, h + 40.0));
    painter.rect_filled(bg, 4.0, Color32::from_black_alpha(170));
    painter.text(
        origin + Vec2::new(0.0, -6.0),
        Align2::LEFT_BOTTOM,
        "Height",
        FontId::proportional(13.0),
        Color32::WHITE,
    );
    let steps = 48;
    for i in 0..steps {
        let t0 = i as f32 / steps as f32;
        let y0 = origin.y + h * (1.0 - t0 - 1.0 / steps as f32);
        painter.rect_filled(
            Rect::from_min_size(
                Pos2::new(origin.x, y0),
                Vec2::new(w, h / steps as f32 + 0.5),
            ),
            0.0,
            shading::tint(t0 + 0.5 / steps as f32),
        );
    }
    painter.rect_stroke(
        Rect::from_min_size(origin, Vec2::new(w, h)),
        0.0,
        Stroke::new(1.0, Color32::from_gray(200)),
        StrokeKind::Outside,
    );
    for (t, v) in [
        (1.0, range.1),
        (0.5, (range.0 + range.1) / 2.0),
        (0.0, range.0),
    ] {
        let y = origin.y + h * (1.0 - t);
        painter.text(
            Pos2::new(origin.x + w + 6.0, y),
            Align2::LEFT_CENTER,
            format!("{v:.0} m"),
            FontId::proportional(12.0),
            Color32::WHITE,
        );
    }
}

/// What hovering a rim tells: name, rank and score, or why it fails.
pub fn hover_card(ui: &mut egui::Ui, session: &Session, index: usize) {
    let Some(c) = session.candidate(index) else {
        return;
    };
    ui.strong(candidate_label(c.id));
    ui.label(format!(
        "D = {:.2} km, d/D = {:.3}",
        c.crater.diameter_m / 1000.0,
        c.crater.depth_to_diameter
    ));
    match session.ranking.rank(index) {
        Some(r) => {
            ui.label(format!(
                "Rank {r}, score {:.3}",
                session.ranking.score(index).unwrap_or(0.0)
            ));
        }
        None => {
            ui.colored_label(Color32::from_rgb(240, 140, 120), "Fails:");
            for reason in session.reasons(index) {
                ui.label(format!("• {reason}"));
            }
        }
    }
}
