//! The terrain view: the terrain in a chosen layer (shaded relief, height tint, slope),
//! candidate rims coloured by score, lon/lat lines, a north arrow, keys to every colour and
//! mark, a km scale bar and a cursor read-out; pan and zoom by mouse and keyboard, and a
//! "go to lon, lat" box.

use crate::map_draw;
use crate::map_grid::{self, Graticule, Viewport};
use crate::map_legend::{self, LegendState};
use crate::marks::{CandidateMarks, MarkStyle};
use crate::pyramid::TerrainLayer;
use crate::session::{candidate_label, Session};
use crate::shading::MapLayer;
use egui::{Align2, Color32, FontId, Key, Pos2, Rect, Sense, Stroke, Vec2};
use std::sync::Arc;
use survey::place::{format_lat, parse_lonlat, LonConvention};
use terrain::GridGeometry;

/// How far the arrow keys move the view, screen points per press.
const KEY_PAN_POINTS: f32 = 60.0;

/// What the map shows besides the rims: the user's choices in the bar above it.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct MapSettings {
    pub layer: MapLayer,
    /// Draw candidates that fail a limit (dashed); off leaves them out.
    pub show_failing: bool,
    /// Lon/lat lines with labels.
    pub show_grid: bool,
    /// The keys to terrain colours and marks.
    pub show_legend: bool,
}

impl Default for MapSettings {
    fn default() -> Self {
        MapSettings {
            layer: MapLayer::default(),
            show_failing: true,
            show_grid: true,
            show_legend: true,
        }
    }
}

/// What the map drew of the terrain, for the legend and the read-out.
#[derive(Default)]
struct TerrainShown {
    height_range_m: Option<(f32, f32)>,
    slope_top_deg: Option<f32>,
    /// Height under the pointer, from the finest level that covers it.
    pointer_height_m: Option<f64>,
}

/// What the lon/lat lines were traced for: the view and the grid, bit for bit.
#[derive(Clone, Copy, PartialEq)]
struct GridKey {
    view: [u64; 7],
    frame: usize,
}

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
    pub settings: MapSettings,
    /// What is typed in the "go to" box.
    pub goto_text: String,
    /// Go to `goto_text` in the next frame (once the frame of reference is known).
    goto_requested: bool,
    /// Why the last "go to" could not be done.
    pub goto_error: Option<String>,
    /// The place last gone to, lon/lat degrees, marked on the map.
    goto_point: Option<(f64, f64)>,
    graticule: Option<(GridKey, Graticule)>,
    /// The polygon being drawn ("Draw area" in the bar).
    pub drawing: map_draw::Drawing,
    /// The criteria's areas traced through the grid.
    outlines: map_draw::AreaOutlines,
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

    /// Lon/lat at the centre of the view (as last drawn).
    pub fn centre_lonlat(&self) -> Option<(f64, f64)> {
        self.last_frame
            .as_ref()?
            .pixel_to_lonlat(self.centre_px[0], self.centre_px[1])
    }

    /// Centre the view on a lon/lat (either longitude range) of the terrain `geom`; the zoom
    /// stays. Refused, with the reason, off the projection or outside the terrain.
    /// The refusal names the place in `convention`.
    pub fn go_to(
        &mut self,
        geom: &GridGeometry,
        lon_deg: f64,
        lat_deg: f64,
        convention: LonConvention,
    ) -> Result<(), String> {
        let outside = || {
            format!(
                "{}, {} is outside this terrain",
                convention.format_lon(lon_deg, 3),
                format_lat(lat_deg, 3)
            )
        };
        let (col, row) = geom.lonlat_to_pixel(lon_deg, lat_deg).ok_or_else(outside)?;
        let inside =
            (0.0..=geom.width as f64).contains(&col) && (0.0..=geom.height as f64).contains(&row);
        if !inside {
            return Err(outside());
        }
        self.centre_px = [col, row];
        self.goto_point = Some((lon_deg, lat_deg));
        Ok(())
    }

    /// Ask the map to go to what is typed in its box (as pressing Go does).
    pub fn request_go_to(&mut self, text: &str) {
        self.goto_text = text.to_string();
        self.goto_requested = true;
    }

    fn viewport(&self, rect: Rect) -> Viewport {
        Viewport {
            rect,
            centre_px: self.centre_px,
            zoom: self.zoom,
        }
    }

    fn to_screen(&self, rect: Rect, px: [f64; 2]) -> Pos2 {
        self.viewport(rect).to_screen(px)
    }

    fn to_source(&self, rect: Rect, p: Pos2) -> [f64; 2] {
        self.viewport(rect).to_source(p)
    }

    fn src_rect_to_screen(&self, rect: Rect, b: [f64; 4]) -> Rect {
        Rect::from_min_max(
            self.to_screen(rect, [b[0], b[1]]),
            self.to_screen(rect, [b[2], b[3]]),
        )
    }

    /// The bar above the map: layer, failing rims, lines, legend, longitude convention and
    /// the "go to" box.
    fn toolbar(&mut self, ui: &mut egui::Ui, session: &mut Session) {
        ui.horizontal_wrapped(|ui| {
            ui.label("Terrain");
            for l in MapLayer::ALL {
                ui.selectable_value(&mut self.settings.layer, l, l.label());
            }
            ui.separator();
            ui.checkbox(&mut self.settings.show_failing, "Failing rims")
                .on_hover_text("Draw craters that fail a limit as dashed red rims; off leaves them out");
            ui.checkbox(&mut self.settings.show_grid, "Lon/lat lines");
            ui.checkbox(&mut self.settings.show_legend, "Legend");
            ui.separator();
            self.drawing_controls(ui);
            ui.separator();
            ui.label("Longitudes");
            for c in LonConvention::ALL {
                ui.selectable_value(&mut session.lon_convention, c, c.label());
            }
            ui.separator();
            let label = ui.label("Go to");
            let edit = ui
                .add(
                    egui::TextEdit::singleline(&mut self.goto_text)
                        .hint_text("lon, lat")
                        .desired_width(120.0),
                )
                .labelled_by(label.id)
                .on_hover_text(
                    "Longitude then latitude in degrees, e.g. \"190.5, -45.2\" or \"169.5 W, 45.2 S\"; \
                     either longitude range is understood",
                );
            let enter = edit.lost_focus() && ui.input(|i| i.key_pressed(Key::Enter));
            if ui.button("Go").clicked() || enter {
                self.goto_requested = true;
            }
            if let Some(e) = &self.goto_error {
                ui.colored_label(Color32::from_rgb(240, 140, 120), e);
            }
        });
    }

    /// "Draw area" and, while drawing, what the polygon will be.
    fn drawing_controls(&mut self, ui: &mut egui::Ui) {
        let d = &mut self.drawing;
        let was_on = d.on;
        ui.toggle_value(&mut d.on, "Draw area").on_hover_text(
            "Click the map to add vertices; double-click or Enter closes the polygon and asks \
             where to save it (GeoJSON); Esc cancels",
        );
        if was_on && !d.on {
            d.vertices.clear();
        }
        if d.on {
            ui.selectable_value(&mut d.keep, siting::areas::Keep::Outside, "keep-out zone");
            ui.selectable_value(&mut d.keep, siting::areas::Keep::Inside, "study area");
            ui.label(format!("{} vertices", d.vertices.len()));
        }
    }

    fn do_requested_go_to(&mut self, geom: &GridGeometry, convention: LonConvention) {
        if !std::mem::take(&mut self.goto_requested) {
            return;
        }
        let result = parse_lonlat(&self.goto_text)
            .map_err(|e| e.to_string())
            .and_then(|(lon, lat)| self.go_to(geom, lon, lat, convention));
        self.goto_error = result.err();
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
        self.toolbar(ui, session);
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
        self.do_requested_go_to(&geom, session.lon_convention);
        self.handle_input(ui, &response, rect);
        let drawing = self.drawing.on;
        self.drawing
            .handle(ui, &response, &self.viewport(rect), &geom);
        self.centre_on_selection(session, &geom, rect);
        let clip = painter.with_clip_rect(rect);
        let shown = self.draw_terrain(ui, &clip, rect, terrain);
        if self.settings.show_grid {
            self.update_graticule(&geom, rect);
            if let Some((_, g)) = &self.graticule {
                map_grid::draw_graticule_lines(&clip, g);
            }
        }
        self.outlines.update(session.areas.areas(), &geom);
        self.outlines.draw(&clip, &self.viewport(rect));
        self.draw_candidates(&clip, session, &geom, &response, drawing);
        self.drawing
            .draw(&clip, &self.viewport(rect), &geom, response.hover_pos());
        self.draw_overlays(&clip, session, &geom, &response, shown);
        response
            .widget_info(|| egui::WidgetInfo::labeled(egui::Role::Canvas, true, "Terrain view"));
    }

    /// The terrain in the chosen layer: overview, then the finer window on top where it
    /// exists. Returns what the legend and the read-out need of it.
    fn draw_terrain(
        &self,
        ui: &egui::Ui,
        painter: &egui::Painter,
        rect: Rect,
        terrain: Option<&mut TerrainLayer>,
    ) -> TerrainShown {
        let Some(t) = terrain else {
            return TerrainShown::default();
        };
        if t.layer() != self.settings.layer {
            t.set_layer(self.settings.layer);
        }
        let visible = {
            let a = self.to_source(rect, rect.min);
            let b = self.to_source(rect, rect.max);
            [a[0], a[1], b[0], b[1]]
        };
        t.request_detail(ui.ctx(), visible, 1.0 / self.zoom);
        let uv = Rect::from_min_max(Pos2::ZERO, Pos2::new(1.0, 1.0));
        for level in [&t.overview, &t.detail].into_iter().flatten() {
            painter.image(
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
        let pointer_height_m = ui
            .ctx()
            .pointer_hover_pos()
            .filter(|p| rect.contains(*p))
            .and_then(|p| {
                let src = self.to_source(rect, p);
                t.height_at(src[0], src[1])
            });
        TerrainShown {
            height_range_m: t.range_m,
            slope_top_deg: t.slope_top_deg,
            pointer_height_m,
        }
    }

    /// The rims, the selected crater's placed reflector and the go-to point; hovering and
    /// clicking a rim.
    fn draw_candidates(
        &mut self,
        painter: &egui::Painter,
        session: &mut Session,
        geom: &Arc<GridGeometry>,
        response: &egui::Response,
        drawing: bool,
    ) {
        let rect = response.rect;
        let view = MarkStyle {
            rect,
            centre_px: self.centre_px,
            zoom: self.zoom,
            show_failing: self.settings.show_failing,
        };
        let pointer = response.hover_pos();
        self.hovered = self.marks.draw(painter, session, geom, &view, pointer);
        if !self.hide_placed_reflector {
            self.draw_placed_reflector(painter, session, geom, rect);
        }
        if let Some(p) = self
            .goto_point
            .and_then(|(lon, lat)| self.viewport(rect).lonlat_to_screen(geom, lon, lat))
        {
            map_legend::draw_goto(painter, p);
        }
        if let Some(i) = self.hovered {
            let resp = response.clone();
            resp.on_hover_ui_at_pointer(|ui| hover_card(ui, session, i));
        }
        if response.clicked() && !drawing {
            if let Some(i) = self.hovered {
                session.select(Some(i), true);
            }
        }
    }

    /// Read-out, keys, north arrow and scale bar, then the lon/lat labels where they leave
    /// room.
    fn draw_overlays(
        &self,
        painter: &egui::Painter,
        session: &Session,
        geom: &GridGeometry,
        response: &egui::Response,
        shown: TerrainShown,
    ) {
        let rect = response.rect;
        let mut boxes: Vec<Rect> = self
            .readout(painter, response, geom, shown.pointer_height_m, session)
            .into_iter()
            .collect();
        if self.settings.show_legend {
            let state = LegendState {
                layer: self.settings.layer,
                height_range_m: shown.height_range_m,
                slope_top_deg: shown.slope_top_deg,
                body_radius_m: geom.body_radius_m,
                score_range: session
                    .ranking
                    .passing_score_range()
                    .map(|_| self.marks.score_range()),
                show_failing: self.settings.show_failing,
                goto_shown: self.goto_point.is_some(),
                areas: session
                    .areas
                    .areas()
                    .iter()
                    .map(|a| (a.name(), a.spec.keep))
                    .collect(),
            };
            boxes.extend(map_legend::draw_legends(painter, rect, &state));
        }
        let north = map_grid::north_on_screen(geom, self.centre_px);
        boxes.push(map_grid::draw_north_arrow(painter, rect, north));
        boxes.extend(self.scale_bar(painter, rect, geom));
        if let Some((_, g)) = self.graticule.as_ref().filter(|_| self.settings.show_grid) {
            map_grid::draw_graticule_labels(painter, g, rect, session.lon_convention, &boxes);
        }
    }

    /// Trace the lon/lat lines for the current view, again only when the view moved.
    fn update_graticule(&mut self, geom: &Arc<GridGeometry>, rect: Rect) {
        let key = GridKey {
            view: [
                rect.min.x.to_bits() as u64,
                rect.min.y.to_bits() as u64,
                rect.max.x.to_bits() as u64,
                rect.max.y.to_bits() as u64,
                self.centre_px[0].to_bits(),
                self.centre_px[1].to_bits(),
                self.zoom.to_bits(),
            ],
            frame: Arc::as_ptr(geom) as usize,
        };
        if self.graticule.as_ref().map(|g| g.0) != Some(key) {
            self.graticule = map_grid::graticule(geom, &self.viewport(rect)).map(|g| (key, g));
        }
    }

    /// Centre on the selection once when it came from outside the map.
    fn centre_on_selection(&mut self, session: &mut Session, geom: &Arc<GridGeometry>, rect: Rect) {
        if !session.centre_map_on_selection {
            return;
        }
        session.centre_map_on_selection = false;
        let Some(i) = session.selected else { return };
        let Some(p) = self.marks.position(session, geom, i) else {
            return;
        };
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
            map_legend::APERTURE_FITS_COLOUR
        } else {
            map_legend::APERTURE_MISFIT_COLOUR
        };
        painter.add(egui::Shape::line(ring, Stroke::new(1.5, colour)));
        for a in &fit.anchors {
            if let Some(p) = at(a.lon_deg, a.lat_deg) {
                map_legend::draw_anchor(painter, p);
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

    /// Lon/lat (in the user's convention) and height under the pointer, at the top left;
    /// returns the box it took.
    fn readout(
        &self,
        painter: &egui::Painter,
        response: &egui::Response,
        geom: &GridGeometry,
        height_m: Option<f64>,
        session: &Session,
    ) -> Option<Rect> {
        let rect = response.rect;
        let p = response.hover_pos()?;
        let src = self.to_source(rect, p);
        let (lon, lat) = geom.pixel_to_lonlat(src[0], src[1])?;
        let (lon, lat) = (
            session.lon_convention.format_lon(lon, 4),
            format_lat(lat, 4),
        );
        let text = match height_m {
            Some(h) => format!("lon {lon}  lat {lat}  height {h:.0} m"),
            None => format!("lon {lon}  lat {lat}  height –"),
        };
        let galley = painter.layout_no_wrap(text, FontId::monospace(13.0), Color32::WHITE);
        let at = rect.left_top() + Vec2::new(8.0, 8.0);
        let bx = Rect::from_min_size(at, galley.size()).expand(4.0);
        painter.rect_filled(bx, 4.0, Color32::from_black_alpha(170));
        painter.galley(at, galley, Color32::WHITE);
        Some(bx)
    }

    /// A km (or m) bar at the bottom right, true at the view centre; returns its box.
    fn scale_bar(&self, painter: &egui::Painter, rect: Rect, geom: &GridGeometry) -> Option<Rect> {
        let (dx_m, _) = geom.pixel_size_m_at(self.centre_px[0], self.centre_px[1])?;
        let m_per_point = dx_m / self.zoom;
        if !(m_per_point.is_finite() && m_per_point > 0.0) {
            return None;
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
        let bx = Rect::from_min_max(
            base + Vec2::new(-8.0, -24.0),
            base + Vec2::new(len + 8.0, 8.0),
        );
        painter.rect_filled(bx, 4.0, Color32::from_black_alpha(170));
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
        Some(bx)
    }
}

/// What hovering a rim tells: name, size and shape, rank and score, or why it fails.
pub fn hover_card(ui: &mut egui::Ui, session: &Session, index: usize) {
    let Some(c) = session.candidate(index) else {
        return;
    };
    ui.strong(candidate_label(c.id));
    for id in ["diameter_m", "depth_to_diameter"] {
        if let Some((m, v)) = survey::metric(id).and_then(|m| Some((m, (m.get)(c)?))) {
            ui.label(format!("{}: {}", m.label, m.format(v)));
        }
    }
    ui.label(format!(
        "Centre: {}, {}",
        session
            .lon_convention
            .format_lon(c.crater.centre_lon_deg, 3),
        format_lat(c.crater.centre_lat_deg, 3)
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
