//! Candidate rims on the map: positions cached in source pixels once per survey and frame of
//! reference, drawn as their fitted ellipses coloured by score, failed ones dimmed.

use crate::session::Session;
use crate::shading::score_colour;
use egui::{Color32, Painter, Pos2, Rect, Shape, Stroke};
use std::sync::Arc;
use terrain::GridGeometry;

/// Below this many visible candidates every rim is drawn as an outline; above it, small rims
/// are drawn as dots so a dense survey stays readable and fast.
const OUTLINE_BUDGET: usize = 6_000;
/// At most this many marks are drawn in one frame (the best-ranked visible ones), so a view of
/// a whole large survey stays fluid; zooming in brings the rest into view.
const MARK_BUDGET: usize = 20_000;

#[derive(Clone, Copy)]
struct Mark {
    /// Centre in source pixels.
    pos: [f32; 2],
    /// Ground size of a source pixel at the centre (east-west, north-south), metres.
    px_m: [f32; 2],
    semi_major_m: f32,
    semi_minor_m: f32,
    azimuth_rad: f32,
}

#[derive(Default)]
pub struct CandidateMarks {
    marks: Vec<Option<Mark>>,
    /// Identity of what the cache was built for: survey pointer and frame pointer.
    built_for: Option<(usize, usize)>,
    score_range: (f64, f64),
    score_generation: u64,
}

pub struct MarkStyle {
    pub rect: Rect,
    pub centre_px: [f64; 2],
    pub zoom: f64,
}

impl CandidateMarks {
    fn refresh(&mut self, session: &Session, geom: &Arc<GridGeometry>) {
        let Some(survey) = &session.survey else {
            self.marks.clear();
            self.built_for = None;
            return;
        };
        let key = (Arc::as_ptr(survey) as usize, Arc::as_ptr(geom) as usize);
        if self.built_for != Some(key) {
            self.marks = survey
                .candidates
                .iter()
                .map(|c| {
                    let m = &c.crater;
                    let (col, row) = geom.lonlat_to_pixel(m.centre_lon_deg, m.centre_lat_deg)?;
                    let (dx, dy) = geom.pixel_size_m_at(col, row)?;
                    let (a, b) = if m.ellipse_major_m > 0.0 && m.ellipse_minor_m > 0.0 {
                        (m.ellipse_major_m / 2.0, m.ellipse_minor_m / 2.0)
                    } else {
                        (m.diameter_m / 2.0, m.diameter_m / 2.0)
                    };
                    Some(Mark {
                        pos: [col as f32, row as f32],
                        px_m: [dx as f32, dy as f32],
                        semi_major_m: a as f32,
                        semi_minor_m: b as f32,
                        azimuth_rad: m.ellipse_azimuth_deg.to_radians() as f32,
                    })
                })
                .collect();
            self.built_for = Some(key);
            self.score_generation = u64::MAX;
        }
        if self.score_generation != session.ranking.generation {
            let r = &session.ranking;
            let (lo, hi) = r
                .score
                .iter()
                .zip(&r.pass)
                .filter(|(_, p)| **p)
                .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), (s, _)| {
                    (a.min(*s), b.max(*s))
                });
            self.score_range = if lo < hi { (lo, hi) } else { (0.0, 1.0) };
            self.score_generation = r.generation;
        }
    }

    /// Source-pixel centre of candidate `index`.
    pub fn position(
        &mut self,
        session: &Session,
        geom: &Arc<GridGeometry>,
        index: usize,
    ) -> Option<[f32; 2]> {
        self.refresh(session, geom);
        self.marks.get(index).copied().flatten().map(|m| m.pos)
    }

    /// Draw every visible rim; return the candidate under `pointer`, if any.
    pub fn draw(
        &mut self,
        painter: &Painter,
        session: &Session,
        geom: &Arc<GridGeometry>,
        view: &MarkStyle,
        pointer: Option<Pos2>,
    ) -> Option<usize> {
        self.refresh(session, geom);
        let (rect, z) = (view.rect, view.zoom as f32);
        let c = rect.center();
        let to_screen = |p: [f32; 2]| {
            Pos2::new(
                c.x + (p[0] - view.centre_px[0] as f32) * z,
                c.y + (p[1] - view.centre_px[1] as f32) * z,
            )
        };
        let cull = rect.expand(40.0);
        let is_visible = |m: &Mark| {
            let r = m.semi_major_m / m.px_m[0].max(1e-6) * z;
            cull.expand(r).contains(to_screen(m.pos))
        };
        let ranking = &session.ranking;
        // Best first, so when a dense view has to leave marks out it leaves out the worst.
        let mut drawn: Vec<usize> = Vec::new();
        let push = |i: usize, drawn: &mut Vec<usize>| {
            if let Some(Some(m)) = self.marks.get(i) {
                if is_visible(m) {
                    drawn.push(i);
                }
            }
            drawn.len() < MARK_BUDGET
        };
        if ranking.order.len() == self.marks.len() {
            for &i in &ranking.order {
                if !push(i as usize, &mut drawn) {
                    break;
                }
            }
        } else {
            for i in 0..self.marks.len() {
                if !push(i, &mut drawn) {
                    break;
                }
            }
        }
        let dense = drawn.len() > OUTLINE_BUDGET;
        let (lo, hi) = self.score_range;
        let mut hovered: Option<(usize, f32)> = None;
        let mut shapes = Vec::with_capacity(drawn.len());
        // Worst drawn first and best last, so good rims sit on top.
        for &i in drawn.iter().rev() {
            let Some(m) = self.marks[i] else { continue };
            let centre = to_screen(m.pos);
            let r_screen = m.semi_major_m / m.px_m[0].max(1e-6) * z;
            let pass = ranking.pass.get(i).copied().unwrap_or(false);
            let colour = if pass {
                score_colour((ranking.score[i] - lo) / (hi - lo))
            } else {
                Color32::from_rgba_unmultiplied(150, 150, 150, 110)
            };
            if let Some(p) = pointer {
                let d = p.distance(centre);
                if d <= r_screen.max(6.0) && hovered.is_none_or(|(_, best)| d < best) {
                    hovered = Some((i, d));
                }
            }
            if r_screen < 2.0 || (dense && r_screen < 3.0) {
                shapes.push(Shape::circle_filled(centre, 1.5, colour));
                continue;
            }
            let width = if pass { 1.8 } else { 1.0 };
            shapes.push(Shape::closed_line(
                ellipse_points(&m, centre, z),
                Stroke::new(width, colour),
            ));
        }
        painter.extend(shapes);
        if let Some(sel) = session
            .selected
            .and_then(|i| self.marks.get(i).copied().flatten())
        {
            let pts = ellipse_points(&sel, to_screen(sel.pos), z);
            painter.add(Shape::closed_line(
                pts.clone(),
                Stroke::new(5.0, Color32::from_black_alpha(160)),
            ));
            painter.add(Shape::closed_line(pts, Stroke::new(2.5, Color32::WHITE)));
            painter.circle_filled(to_screen(sel.pos), 2.5, Color32::WHITE);
        }
        hovered.map(|(i, _)| i)
    }
}

/// Screen outline of a rim: the fitted ellipse, major axis at its azimuth from north.
fn ellipse_points(m: &Mark, centre: Pos2, zoom: f32) -> Vec<Pos2> {
    let r_screen = m.semi_major_m / m.px_m[0].max(1e-6) * zoom;
    let n = (r_screen / 2.0).clamp(10.0, 72.0) as usize;
    let (sa, ca) = m.azimuth_rad.sin_cos();
    (0..n)
        .map(|k| {
            let t = k as f32 / n as f32 * std::f32::consts::TAU;
            let (u, v) = (m.semi_major_m * t.cos(), m.semi_minor_m * t.sin());
            let east = u * sa + v * ca;
            let north = u * ca - v * sa;
            Pos2::new(
                centre.x + east / m.px_m[0] * zoom,
                centre.y - north / m.px_m[1] * zoom,
            )
        })
        .collect()
}
