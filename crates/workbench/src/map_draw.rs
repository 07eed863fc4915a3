//! Areas on the map: the criteria's study areas and keep-out zones traced through the grid's
//! projection (edges are great-circle arcs, densified before projecting), and a polygon drawn
//! by clicking vertices, saved as GeoJSON in lunar lon/lat and added as an area.

use crate::map_grid::Viewport;
use egui::{Color32, Key, Painter, Pos2, Shape, Stroke};
use siting::areas::{sphere, Area, Keep};
use std::path::Path;
use std::sync::Arc;
use terrain::GridGeometry;

/// A study area's outline (keep inside).
pub const STUDY_AREA_COLOUR: Color32 = Color32::from_rgb(80, 220, 235);
/// A keep-out zone's outline (keep outside), drawn dashed.
pub const KEEP_OUT_COLOUR: Color32 = Color32::from_rgb(240, 70, 60);
/// The polygon being drawn.
pub const DRAWING_COLOUR: Color32 = Color32::from_rgb(255, 230, 90);

/// The colour an area is outlined in.
pub fn colour_of(keep: Keep) -> Color32 {
    match keep {
        Keep::Inside => STUDY_AREA_COLOUR,
        Keep::Outside => KEEP_OUT_COLOUR,
    }
}

/// One ring of an area in source pixels (points off the projection split it into runs).
struct TracedRing {
    keep: Keep,
    runs: Vec<Vec<[f64; 2]>>,
}

/// The areas' rings traced in source pixels, again only when the areas or the grid change.
#[derive(Default)]
pub struct AreaOutlines {
    key: Option<(usize, usize)>,
    rings: Vec<TracedRing>,
}

impl AreaOutlines {
    /// Trace `areas` through `geom` unless already traced for them.
    pub fn update(&mut self, areas: &Arc<Vec<Area>>, geom: &Arc<GridGeometry>) {
        let key = (Arc::as_ptr(areas) as usize, Arc::as_ptr(geom) as usize);
        if self.key == Some(key) {
            return;
        }
        self.key = Some(key);
        self.rings = areas
            .iter()
            .flat_map(|a| {
                let keep = a.spec.keep;
                a.features
                    .iter()
                    .flat_map(|f| f.polygons.iter().flatten())
                    .map(move |ring| TracedRing {
                        keep,
                        runs: trace(geom, ring),
                    })
            })
            .collect();
    }

    /// Outline every ring: study areas solid, keep-out zones dashed.
    pub fn draw(&self, painter: &Painter, view: &Viewport) {
        for r in &self.rings {
            let stroke = Stroke::new(2.0, colour_of(r.keep));
            for run in &r.runs {
                let pts: Vec<Pos2> = run.iter().map(|&p| view.to_screen(p)).collect();
                match r.keep {
                    Keep::Inside => {
                        painter.add(Shape::line(pts, stroke));
                    }
                    Keep::Outside => {
                        painter.extend(Shape::dashed_line(&pts, stroke, 7.0, 4.0));
                    }
                }
            }
        }
    }
}

/// A closed ring of (lon, lat) degrees in source pixels: its great-circle edges densified,
/// split where a point falls off the projection.
fn trace(geom: &GridGeometry, ring: &[(f64, f64)]) -> Vec<Vec<[f64; 2]>> {
    let open = match ring.split_last() {
        Some((last, rest)) if rest.first() == Some(last) => rest,
        _ => ring,
    };
    if open.len() < 2 {
        return Vec::new();
    }
    let arcs = sphere::Ring {
        vertices: open
            .iter()
            .map(|&(lon, lat)| sphere::unit(lon, lat))
            .collect(),
    };
    let mut runs = vec![Vec::new()];
    for (lon, lat) in sphere::densified(&arcs) {
        match geom.lonlat_to_pixel(lon, lat) {
            Some((c, r)) if c.is_finite() && r.is_finite() => {
                if let Some(run) = runs.last_mut() {
                    run.push([c, r]);
                }
            }
            _ => runs.push(Vec::new()),
        }
    }
    runs.retain(|r| r.len() >= 2);
    runs
}

/// A polygon being drawn on the map: vertices in lon/lat degrees.
pub struct Drawing {
    /// "Draw area" is on: clicks on the map add vertices instead of selecting.
    pub on: bool,
    /// What the polygon will be added as.
    pub keep: Keep,
    pub vertices: Vec<(f64, f64)>,
    /// A closed polygon waiting to be saved (the app asks where).
    closed: Option<Vec<(f64, f64)>>,
    /// The app has asked where to save the closed polygon.
    asked: bool,
}

impl Default for Drawing {
    fn default() -> Self {
        Drawing {
            on: false,
            keep: Keep::Outside,
            vertices: Vec::new(),
            closed: None,
            asked: false,
        }
    }
}

/// Screen points within which a click repeats the last vertex (the second click of a
/// double-click) and adds none.
const SAME_VERTEX_PT: f32 = 4.0;

impl Drawing {
    /// Take in the map's clicks and keys: a click adds a vertex, a double-click or Enter
    /// closes the polygon (three vertices at least), Esc cancels.
    pub fn handle(
        &mut self,
        ui: &egui::Ui,
        response: &egui::Response,
        view: &Viewport,
        geom: &GridGeometry,
    ) {
        if !self.on {
            return;
        }
        let (enter, escape) = ui.input(|i| (i.key_pressed(Key::Enter), i.key_pressed(Key::Escape)));
        if escape {
            self.vertices.clear();
            self.on = false;
            return;
        }
        if response.clicked() {
            if let Some(p) = response.interact_pointer_pos() {
                let near_last = self
                    .vertices
                    .last()
                    .and_then(|&(lon, lat)| view.lonlat_to_screen(geom, lon, lat))
                    .is_some_and(|q| q.distance(p) < SAME_VERTEX_PT);
                let src = view.to_source(p);
                if let (false, Some(ll)) = (near_last, geom.pixel_to_lonlat(src[0], src[1])) {
                    self.vertices.push(ll);
                }
            }
        }
        if (response.double_clicked() || enter) && self.vertices.len() >= 3 {
            self.closed = Some(std::mem::take(&mut self.vertices));
            self.asked = false;
            self.on = false;
        }
    }

    /// A polygon was closed and where to save it has not been asked yet (true once).
    pub fn wants_saving(&mut self) -> bool {
        self.closed.is_some() && !std::mem::replace(&mut self.asked, true)
    }

    /// The closed polygon, taken (to write it).
    pub fn take_ring(&mut self) -> Option<Vec<(f64, f64)>> {
        self.closed.take()
    }

    /// The vertices so far, joined, with a line to the pointer.
    pub fn draw(
        &self,
        painter: &Painter,
        view: &Viewport,
        geom: &GridGeometry,
        pointer: Option<Pos2>,
    ) {
        let mut pts: Vec<Pos2> = self
            .vertices
            .iter()
            .filter_map(|&(lon, lat)| view.lonlat_to_screen(geom, lon, lat))
            .collect();
        for &p in &pts {
            painter.circle_filled(p, 3.0, DRAWING_COLOUR);
        }
        if let (true, Some(p)) = (self.on && !pts.is_empty(), pointer) {
            pts.push(p);
        }
        painter.add(Shape::line(pts, Stroke::new(1.5, DRAWING_COLOUR)));
    }
}

/// The GeoJSON text of one polygon (lon, lat degrees; closed here), in the CRS member
/// `siting` writes, so GDAL reads it back on the Moon.
pub fn area_geojson(ring: &[(f64, f64)]) -> Result<String, String> {
    let mut coords: Vec<[f64; 2]> = ring.iter().map(|&(lon, lat)| [lon, lat]).collect();
    if let Some(&first) = coords.first() {
        coords.push(first);
    }
    let value = serde_json::json!({
        "type": "FeatureCollection",
        "crs": {"type": "name", "properties": {"name": siting::export::MOON_CRS}},
        "features": [{
            "type": "Feature",
            "properties": {"name": "drawn on the map"},
            "geometry": {"type": "Polygon", "coordinates": [coords]},
        }],
    });
    serde_json::to_string_pretty(&value).map_err(|e| e.to_string())
}

/// Write a drawn polygon to `path` as GeoJSON (atomically).
pub fn write_area(path: &Path, ring: &[(f64, f64)]) -> Result<(), String> {
    if ring.len() < 3 {
        return Err("a polygon needs three vertices at least".into());
    }
    crate::write_atomically(path, area_geojson(ring)?.as_bytes())
}
