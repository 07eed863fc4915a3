//! Where north and the lon/lat lines fall on the map: computed from the grid's own projection
//! (`terrain::GridGeometry`), so a polar stereographic grid gets meridians that radiate from
//! the pole and a north arrow that turns as the view moves.

use egui::{Align2, Color32, FontId, Painter, Pos2, Rect, Shape, Stroke, Vec2};
use survey::place::{format_lat, LonConvention};
use terrain::projection::wrap_deg_180;
use terrain::GridGeometry;

/// The view: which source pixel is at the centre of `rect`, and how many screen points one
/// source pixel spans (pixel-corner convention, rows downward as on screen).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Viewport {
    pub rect: Rect,
    pub centre_px: [f64; 2],
    pub zoom: f64,
}

impl Viewport {
    pub fn to_screen(&self, px: [f64; 2]) -> Pos2 {
        let c = self.rect.center();
        Pos2::new(
            c.x + ((px[0] - self.centre_px[0]) * self.zoom) as f32,
            c.y + ((px[1] - self.centre_px[1]) * self.zoom) as f32,
        )
    }

    pub fn to_source(&self, p: Pos2) -> [f64; 2] {
        let c = self.rect.center();
        [
            self.centre_px[0] + (p.x - c.x) as f64 / self.zoom,
            self.centre_px[1] + (p.y - c.y) as f64 / self.zoom,
        ]
    }

    /// Screen position of a lon/lat, if the grid's projection reaches it.
    pub fn lonlat_to_screen(
        &self,
        geom: &GridGeometry,
        lon_deg: f64,
        lat_deg: f64,
    ) -> Option<Pos2> {
        let (c, r) = geom.lonlat_to_pixel(lon_deg, lat_deg)?;
        let p = self.to_screen([c, r]);
        (p.x.is_finite() && p.y.is_finite()).then_some(p)
    }
}

/// Within this many degrees of a pole, north has no single direction.
const POLE_DEG: f64 = 1e-6;

/// Unit screen vector (y downward) pointing north at source pixel `at_px`: the direction in
/// which latitude grows along the meridian there, from the grid's projection (central
/// difference over a step far below a pixel). `None` at a pole or off the projection.
pub fn north_on_screen(geom: &GridGeometry, at_px: [f64; 2]) -> Option<Vec2> {
    let (lon, lat) = geom.pixel_to_lonlat(at_px[0], at_px[1])?;
    if 90.0 - lat.abs() < POLE_DEG {
        return None;
    }
    let (px_m, _) = geom.pixel_size_m_at(at_px[0], at_px[1])?;
    // A tenth of a pixel, in degrees of latitude, kept off the poles.
    let step = (0.1 * px_m / geom.body_radius_m)
        .to_degrees()
        .clamp(1e-9, 1e-2);
    let north = (lat + step).min(90.0 - POLE_DEG / 2.0);
    let south = (lat - step).max(-90.0 + POLE_DEG / 2.0);
    let (c1, r1) = geom.lonlat_to_pixel(lon, north)?;
    let (c0, r0) = geom.lonlat_to_pixel(lon, south)?;
    let v = Vec2::new((c1 - c0) as f32, (r1 - r0) as f32);
    let len = v.length();
    (len.is_finite() && len > 0.0).then(|| v / len)
}

/// Round steps for lon/lat lines, degrees.
const STEPS_DEG: [f64; 18] = [
    0.001, 0.002, 0.005, 0.01, 0.02, 0.05, 0.1, 0.2, 0.25, 0.5, 1.0, 2.0, 5.0, 10.0, 15.0, 30.0,
    45.0, 90.0,
];
/// At most this many lines of each family across the view.
const MAX_LINES: f64 = 7.0;

/// The smallest round step that puts at most [`MAX_LINES`] lines over `span_deg`.
pub fn graticule_step_deg(span_deg: f64) -> f64 {
    STEPS_DEG
        .into_iter()
        .find(|s| span_deg / s <= MAX_LINES)
        .unwrap_or(90.0)
}

/// Decimals a label needs to show multiples of `step_deg` exactly (0.25 -> 2, 5 -> 0).
pub fn label_decimals(step_deg: f64) -> usize {
    (0..6)
        .find(|&d| {
            let v = step_deg * 10f64.powi(d as i32);
            (v - v.round()).abs() < 1e-6
        })
        .unwrap_or(6)
}

/// The label of a meridian in the user's convention.
pub fn meridian_label(convention: LonConvention, lon_deg: f64, step_deg: f64) -> String {
    convention.format_lon(lon_deg, label_decimals(step_deg))
}

/// The label of a parallel.
pub fn parallel_label(lat_deg: f64, step_deg: f64) -> String {
    format_lat(lat_deg, label_decimals(step_deg))
}

/// Lon/lat extent of the view: (west, east) unwrapped around the view centre's longitude
/// (so a view across the 180 meridian reads 170..190, not -180..180), (south, north).
pub fn visible_extent(geom: &GridGeometry, view: &Viewport) -> Option<((f64, f64), (f64, f64))> {
    let centre = geom.pixel_to_lonlat(view.centre_px[0], view.centre_px[1]);
    let r = view.rect;
    const N: usize = 16;
    let mut lon0 = centre.map(|c| c.0);
    let (mut w, mut e, mut s, mut n) = (
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::INFINITY,
        f64::NEG_INFINITY,
    );
    for i in 0..=N {
        for j in 0..=N {
            let p = Pos2::new(
                r.min.x + r.width() * i as f32 / N as f32,
                r.min.y + r.height() * j as f32 / N as f32,
            );
            let px = view.to_source(p);
            let Some((lon, lat)) = geom.pixel_to_lonlat(px[0], px[1]) else {
                continue;
            };
            // A point off the raster still has a lon/lat on most projections; keep it, the
            // lines are clipped to the view anyway.
            let l0 = *lon0.get_or_insert(lon);
            let lon = l0 + wrap_deg_180(lon - l0);
            w = w.min(lon);
            e = e.max(lon);
            s = s.min(lat);
            n = n.max(lat);
        }
    }
    if w > e {
        return None;
    }
    // A pole in view: every meridian meets there.
    let l0 = lon0.unwrap_or(0.0);
    for pole in [90.0, -90.0] {
        if view
            .lonlat_to_screen(geom, l0, pole)
            .is_some_and(|p| r.contains(p))
        {
            (w, e) = (l0 - 180.0, l0 + 180.0);
            if pole > 0.0 {
                n = 90.0;
            } else {
                s = -90.0;
            }
        }
    }
    Some(((w, e), (s.max(-90.0), n.min(90.0))))
}

/// One lon/lat line on screen, in pieces where the projection breaks it.
pub struct GridLine {
    pub meridian: bool,
    pub value_deg: f64,
    pub pieces: Vec<Vec<Pos2>>,
}

/// Lines of constant longitude and latitude over the view, with their steps.
pub struct Graticule {
    pub lines: Vec<GridLine>,
    pub lon_step_deg: f64,
    pub lat_step_deg: f64,
}

/// Samples along each line.
const LINE_SAMPLES: usize = 200;

pub fn graticule(geom: &GridGeometry, view: &Viewport) -> Option<Graticule> {
    let ((w, e), (s, n)) = visible_extent(geom, view)?;
    // All the way round (a pole in view): eight meridians, 45 degrees apart.
    let lon_step = if e - w >= 360.0 {
        45.0
    } else {
        graticule_step_deg(e - w)
    };
    let lat_step = graticule_step_deg(n - s);
    // A jump longer than this between samples is the projection's seam, not the line.
    let seam = 0.5 * view.rect.width().max(view.rect.height()) + 400.0;
    let trace = |f: &dyn Fn(f64) -> (f64, f64), from: f64, to: f64| {
        let mut pieces: Vec<Vec<Pos2>> = vec![];
        let mut cur: Vec<Pos2> = vec![];
        for k in 0..=LINE_SAMPLES {
            let t = from + (to - from) * k as f64 / LINE_SAMPLES as f64;
            let (lon, lat) = f(t);
            match view.lonlat_to_screen(geom, lon, lat) {
                Some(p) if cur.last().is_none_or(|q| q.distance(p) < seam) => cur.push(p),
                Some(p) => {
                    pieces.push(std::mem::take(&mut cur));
                    cur.push(p);
                }
                None => pieces.push(std::mem::take(&mut cur)),
            }
        }
        pieces.push(cur);
        pieces.retain(|p| p.len() >= 2);
        pieces
    };
    let mut lines = vec![];
    let mut lon = (w / lon_step).ceil() * lon_step;
    // A full turn of meridians (pole in view) would draw the first one twice.
    let lon_end = if e - w >= 360.0 { w + 360.0 - 1e-6 } else { e };
    while lon <= lon_end + 1e-9 {
        let pieces = trace(&|t| (lon, t), s, n);
        lines.push(GridLine {
            meridian: true,
            value_deg: lon,
            pieces,
        });
        lon += lon_step;
    }
    let mut lat = (s / lat_step).ceil() * lat_step;
    while lat <= n + 1e-9 {
        if lat.abs() < 90.0 - 1e-9 {
            let pieces = trace(&|t| (t, lat), w, e);
            lines.push(GridLine {
                meridian: false,
                value_deg: lat,
                pieces,
            });
        }
        lat += lat_step;
    }
    Some(Graticule {
        lines,
        lon_step_deg: lon_step,
        lat_step_deg: lat_step,
    })
}

/// Where a line leaves the view through the side it is labelled on: meridians on the top
/// edge (else the bottom), parallels on the right edge (else the left); the crossing point
/// and that side.
pub fn label_anchor(line: &GridLine, rect: Rect) -> Option<(Pos2, Align2)> {
    let mut best: Option<(u8, Pos2, Align2)> = None;
    for piece in &line.pieces {
        for pair in piece.windows(2) {
            let (a, b) = (pair[0], pair[1]);
            for (rank, edge) in edge_order(line.meridian).into_iter().enumerate() {
                if let Some(p) = crossing(a, b, rect, edge) {
                    if best.is_none_or(|(r, ..)| (rank as u8) < r) {
                        best = Some((rank as u8, p, edge.align()));
                    }
                }
            }
        }
    }
    best.map(|(_, p, a)| (p, a))
}

#[derive(Clone, Copy)]
enum Edge {
    Top,
    Bottom,
    Left,
    Right,
}

impl Edge {
    /// How a label sits inside the view at this edge.
    fn align(self) -> Align2 {
        match self {
            Edge::Top => Align2::CENTER_TOP,
            Edge::Bottom => Align2::CENTER_BOTTOM,
            Edge::Left => Align2::LEFT_CENTER,
            Edge::Right => Align2::RIGHT_CENTER,
        }
    }
}

fn edge_order(meridian: bool) -> [Edge; 4] {
    if meridian {
        [Edge::Top, Edge::Bottom, Edge::Left, Edge::Right]
    } else {
        [Edge::Right, Edge::Left, Edge::Top, Edge::Bottom]
    }
}

/// Where segment a-b crosses one edge of `rect`, if it does within the edge's extent.
fn crossing(a: Pos2, b: Pos2, rect: Rect, edge: Edge) -> Option<Pos2> {
    let (fixed, along_x) = match edge {
        Edge::Top => (rect.min.y, true),
        Edge::Bottom => (rect.max.y, true),
        Edge::Left => (rect.min.x, false),
        Edge::Right => (rect.max.x, false),
    };
    let (pa, pb) = if along_x { (a.y, b.y) } else { (a.x, b.x) };
    if (pa - fixed) * (pb - fixed) > 0.0 || pa == pb {
        return None;
    }
    let t = (fixed - pa) / (pb - pa);
    let p = a + (b - a) * t;
    let inside = if along_x {
        (rect.min.x..=rect.max.x).contains(&p.x)
    } else {
        (rect.min.y..=rect.max.y).contains(&p.y)
    };
    inside.then_some(p)
}

/// Colour of the lon/lat lines: light and thin, under the rims.
const LINE_COLOUR: Color32 = Color32::from_rgba_premultiplied(105, 110, 120, 140);

/// Draw the lines (under the rims).
pub fn draw_graticule_lines(painter: &Painter, g: &Graticule) {
    for line in &g.lines {
        for piece in &line.pieces {
            painter.add(Shape::line(piece.clone(), Stroke::new(1.0, LINE_COLOUR)));
        }
    }
}

/// Label the lines at the view's edges; a label is left out where it would cover a
/// rectangle in `keep_clear` (legends, read-out, north arrow, scale bar) or another label.
pub fn draw_graticule_labels(
    painter: &Painter,
    g: &Graticule,
    rect: Rect,
    convention: LonConvention,
    keep_clear: &[Rect],
) {
    let mut taken: Vec<Rect> = keep_clear.to_vec();
    for line in &g.lines {
        let Some((p, align)) = label_anchor(line, rect) else {
            continue;
        };
        let text = if line.meridian {
            meridian_label(convention, line.value_deg, g.lon_step_deg)
        } else {
            parallel_label(line.value_deg, g.lat_step_deg)
        };
        let galley = painter.layout_no_wrap(text, FontId::proportional(11.0), Color32::WHITE);
        let inset = match align {
            Align2::CENTER_TOP => Vec2::new(0.0, 3.0),
            Align2::CENTER_BOTTOM => Vec2::new(0.0, -3.0),
            Align2::LEFT_CENTER => Vec2::new(3.0, 0.0),
            _ => Vec2::new(-3.0, 0.0),
        };
        let at = align.anchor_size(p + inset, galley.size());
        let bg = at.expand(2.0);
        if !rect.contains_rect(bg) || taken.iter().any(|r| r.intersects(bg)) {
            continue;
        }
        taken.push(bg);
        painter.rect_filled(bg, 3.0, Color32::from_black_alpha(150));
        painter.galley(at.min, galley, Color32::WHITE);
    }
}

/// Side of the north arrow's box, points.
pub const NORTH_BOX_PT: f32 = 56.0;

/// The north arrow at the top right of `rect`: where north points at the view centre on this
/// grid; at a pole, a note instead. Returns the box it took.
pub fn draw_north_arrow(painter: &Painter, rect: Rect, north: Option<Vec2>) -> Rect {
    let bx = Rect::from_min_size(
        Pos2::new(rect.max.x - NORTH_BOX_PT - 10.0, rect.min.y + 10.0),
        Vec2::splat(NORTH_BOX_PT),
    );
    painter.rect_filled(bx, 6.0, Color32::from_black_alpha(170));
    let c = bx.center() + Vec2::new(0.0, 4.0);
    let Some(d) = north else {
        painter.text(
            bx.center(),
            Align2::CENTER_CENTER,
            "pole",
            FontId::proportional(12.0),
            Color32::WHITE,
        );
        return bx;
    };
    let len = 17.0;
    let (tip, tail) = (c + d * len, c - d * len);
    let side = d.rot90() * 6.0;
    painter.add(Shape::convex_polygon(
        vec![tip, c - d * 4.0 + side, c - d * 4.0 - side],
        Color32::WHITE,
        Stroke::NONE,
    ));
    painter.line_segment([c - d * 4.0, tail], Stroke::new(2.0, Color32::WHITE));
    // The letter beyond the tip, kept inside the box.
    let letter = (c + d * (len + 9.0)).clamp(bx.min + Vec2::splat(7.0), bx.max - Vec2::splat(7.0));
    painter.text(
        letter,
        Align2::CENTER_CENTER,
        "N",
        FontId::proportional(12.0),
        Color32::WHITE,
    );
    bx
}

#[cfg(test)]
mod tests {
    use super::*;
    use terrain::{MapProjection, MOON_RADIUS_M};

    fn south_polar_grid() -> GridGeometry {
        // 200 m posts, 400 x 400 px, centred on the south pole, lon0 = 0 (the layout of the
        // LOLA polar stereographic products, IAU_2015:30135; domain-notes §2).
        GridGeometry {
            width: 400,
            height: 400,
            geotransform: [-40_000.0, 200.0, 0.0, 40_000.0, 0.0, -200.0],
            projection: MapProjection::PolarStereographic {
                south: true,
                lon0_deg: 0.0,
                lat_ts_deg: -90.0,
                false_easting_m: 0.0,
                false_northing_m: 0.0,
            },
            body_radius_m: MOON_RADIUS_M,
        }
    }

    fn geographic_grid() -> GridGeometry {
        GridGeometry {
            width: 400,
            height: 200,
            geotransform: [160.0, 0.1, 0.0, -30.0, 0.0, -0.1],
            projection: MapProjection::Geographic,
            body_radius_m: MOON_RADIUS_M,
        }
    }

    fn angle_deg(v: Vec2) -> f32 {
        v.y.atan2(v.x).to_degrees()
    }

    /// On a geographic grid (rows run north to south) north is straight up the screen.
    #[test]
    fn north_is_up_on_a_geographic_grid() {
        let g = geographic_grid();
        let n = north_on_screen(&g, [200.0, 100.0]).unwrap();
        assert!((n - Vec2::new(0.0, -1.0)).length() < 1e-5, "{n:?}");
    }

    /// On a south polar stereographic grid the meridians are straight lines from the pole
    /// (Snyder 1987, USGS PP 1395, §21), so north points straight away from the pole: at map
    /// (x, y) it is the direction (x, y) / |(x, y)|, which on screen (rows downward) is
    /// (x, -y). Checked at four points around the pole and one off the axes.
    #[test]
    fn north_points_away_from_the_pole_on_a_south_polar_grid() {
        let g = south_polar_grid();
        for (x, y) in [
            (10_000.0, 0.0),
            (0.0, 10_000.0),
            (-10_000.0, 0.0),
            (0.0, -10_000.0),
            (12_000.0, -5_000.0f64),
        ] {
            let (col, row) = g.map_to_pixel(x, y).unwrap();
            let n = north_on_screen(&g, [col, row]).unwrap();
            let want = Vec2::new(x as f32, -y as f32).normalized();
            // 2e-4 rad between unit vectors: about 0.01 degree.
            assert!(
                (n - want).length() < 2e-4,
                "at map ({x}, {y}): north {:.3} deg on screen, expected {:.3}",
                angle_deg(n),
                angle_deg(want)
            );
        }
        // At the pole itself north has no direction.
        assert_eq!(north_on_screen(&g, [200.0, 200.0]), None);
    }

    /// On a north polar grid north points to the pole, the opposite of the south grid.
    #[test]
    fn north_points_to_the_pole_on_a_north_polar_grid() {
        let mut g = south_polar_grid();
        g.projection = MapProjection::PolarStereographic {
            south: false,
            lon0_deg: 0.0,
            lat_ts_deg: 90.0,
            false_easting_m: 0.0,
            false_northing_m: 0.0,
        };
        let (col, row) = g.map_to_pixel(10_000.0, 0.0).unwrap();
        let n = north_on_screen(&g, [col, row]).unwrap();
        assert!((n - Vec2::new(-1.0, 0.0)).length() < 1e-4, "{n:?}");
    }

    #[test]
    fn steps_are_round_and_few() {
        assert_eq!(graticule_step_deg(8.0), 2.0);
        assert_eq!(graticule_step_deg(360.0), 90.0);
        assert_eq!(graticule_step_deg(1.0), 0.2);
        assert_eq!(graticule_step_deg(0.03), 0.005);
        assert_eq!(label_decimals(0.25), 2);
        assert_eq!(label_decimals(5.0), 0);
        assert_eq!(label_decimals(0.005), 3);
    }

    /// Labels follow the user's convention (190 E is 170 W: east longitude, IAU WGCCRE,
    /// Archinal et al. 2018) with as many decimals as the step needs.
    #[test]
    fn graticule_labels_follow_the_longitude_convention() {
        assert_eq!(
            meridian_label(LonConvention::East360, -170.0, 5.0),
            "190° E"
        );
        assert_eq!(
            meridian_label(LonConvention::Signed180, 190.0, 5.0),
            "-170°"
        );
        assert_eq!(
            meridian_label(LonConvention::Signed180, 180.5, 0.5),
            "-179.5°"
        );
        assert_eq!(
            meridian_label(LonConvention::East360, 360.0, 0.25),
            "0.00° E"
        );
        assert_eq!(parallel_label(-45.0, 1.0), "-45°");
        assert_eq!(parallel_label(-44.75, 0.25), "-44.75°");
    }

    /// A view across the 180 meridian on a grid centred on it: meridians 170..190 in one
    /// piece each, every one labelled at the top edge, parallels at the right edge.
    #[test]
    fn graticule_spans_the_180_meridian_in_one_piece() {
        let g = geographic_grid();
        let view = Viewport {
            rect: Rect::from_min_size(Pos2::ZERO, Vec2::new(800.0, 400.0)),
            centre_px: [200.0, 100.0],
            zoom: 2.0,
        };
        let ((w, e), (s, n)) = visible_extent(&g, &view).unwrap();
        let east = LonConvention::East360;
        assert!(
            (east.normalise(w) - 160.0).abs() < 1e-6 && (e - w - 40.0).abs() < 1e-6,
            "{w} {e}"
        );
        assert!(
            (s + 50.0).abs() < 1e-6 && (n + 30.0).abs() < 1e-6,
            "{s} {n}"
        );
        let gr = graticule(&g, &view).unwrap();
        assert_eq!(gr.lon_step_deg, 10.0);
        let meridians: Vec<f64> = gr
            .lines
            .iter()
            .filter(|l| l.meridian)
            .map(|l| east.normalise(l.value_deg).round())
            .collect();
        assert_eq!(meridians, vec![160.0, 170.0, 180.0, 190.0, 200.0]);
        for l in &gr.lines {
            assert_eq!(l.pieces.len(), 1, "line at {} broken", l.value_deg);
            if let Some((_, align)) = label_anchor(l, view.rect) {
                let want = if l.meridian {
                    Align2::CENTER_TOP
                } else {
                    Align2::RIGHT_CENTER
                };
                assert_eq!(align, want, "line at {}", l.value_deg);
            }
        }
    }

    /// With the pole in view every meridian is drawn once, all the way round.
    #[test]
    fn graticule_around_a_pole_has_a_full_turn_of_meridians() {
        let g = south_polar_grid();
        let view = Viewport {
            rect: Rect::from_min_size(Pos2::ZERO, Vec2::new(400.0, 400.0)),
            centre_px: [200.0, 200.0],
            zoom: 1.0,
        };
        let gr = graticule(&g, &view).unwrap();
        let values: Vec<f64> = gr
            .lines
            .iter()
            .filter(|l| l.meridian)
            .map(|l| l.value_deg)
            .collect();
        let meridians = values.len();
        assert_eq!(gr.lon_step_deg, 45.0);
        assert_eq!(meridians, 8, "{values:?}");
    }
}
