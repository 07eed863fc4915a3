//! Candidate rims on the map: positions cached in source pixels once per survey and frame of
//! reference, drawn as their fitted ellipses coloured by score over a dark halo (so they read
//! on any terrain colour); failing ones, when shown, dashed in [`FAILING_COLOUR`].
//!
//! A survey may hold hundreds of thousands of candidates, so the drawing is built in stages,
//! each kept until what it depends on changes:
//! - marks and a grid index of their centres: per survey and frame of reference;
//! - which candidates are in view: per view (centre, zoom, rectangle), found through the grid;
//! - which of those are drawn (the best-ranked `MARK_BUDGET`) and the finished triangles of
//!   all of them in one mesh: per view and ranking.
//!
//! An unchanged frame (hover, animation, a repaint) re-uses the mesh as it is.

use crate::session::Session;
use crate::shading::score_colour;
use egui::epaint::{Mesh, Vertex, WHITE_UV};
use egui::{Color32, Painter, Pos2, Rect, Shape, Stroke, Vec2};
use std::sync::Arc;
use terrain::GridGeometry;

/// Below this many visible candidates every rim is drawn as an outline; above it, small rims
/// and all but the best `OUTLINE_BUDGET` are drawn as dots so a dense view stays readable and
/// fast.
const OUTLINE_BUDGET: usize = 6_000;
/// At most this many marks are drawn in one frame (the best-ranked visible ones), so a view of
/// a whole large survey stays fluid; zooming in brings the rest into view.
const MARK_BUDGET: usize = 20_000;
/// Side of a dot, points: the area of a disc of radius 1.5.
const DOT_SIDE_PT: f32 = 2.66;
/// From this many drawn marks on, the mesh is built in two halves on both cores.
const PARALLEL_MARKS: usize = 4_096;
/// Cells along each side of the grid index of mark centres.
const GRID_SIDE: usize = 256;
/// How far a drawn outline may stray from the true ellipse, points: the vertex count is
/// chosen from the rim's size on screen so the chords' sagitta stays under this.
const OUTLINE_TOLERANCE_PT: f32 = 0.1;
/// Fewest and most vertices of a drawn rim.
const OUTLINE_VERTICES: (usize, usize) = (12, 720);
/// Width of the dark halo on each side of a rim, points.
pub const HALO_PT: f32 = 1.2;
/// The halo's colour.
pub const HALO_COLOUR: Color32 = Color32::from_rgba_premultiplied(0, 0, 0, 150);
/// Colour of a failing candidate's rim (dashed) or dot.
pub const FAILING_COLOUR: Color32 = Color32::from_rgb(255, 96, 84);
/// Dash and gap along a failing rim, points.
pub const DASH_PT: (f32, f32) = (4.0, 3.0);
/// Width of a passing rim and of a failing one, points.
pub const RIM_WIDTH_PT: (f32, f32) = (1.8, 1.4);
/// The selected rim: white over a wider dark stroke.
pub const SELECTED_WIDTH_PT: f32 = 2.5;

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

impl Mark {
    /// A circle `r_pt` across on a grid of one-metre pixels seen at zoom 1: a rim of that
    /// radius in points (legend icons, tests).
    fn circle(r_pt: f32, azimuth_rad: f32) -> Mark {
        Mark {
            pos: [0.0, 0.0],
            px_m: [1.0, 1.0],
            semi_major_m: r_pt,
            semi_minor_m: r_pt,
            azimuth_rad,
        }
    }

    /// Semi-major axis in source pixels (east-west scale).
    fn radius_px(&self) -> f32 {
        self.semi_major_m / self.px_m[0].max(1e-6)
    }
}

/// Mark centres bucketed on a regular grid of source pixels (compressed rows: the candidates
/// of cell k are `items[start[k]..start[k + 1]]`).
#[derive(Default)]
struct GridIndex {
    origin: [f32; 2],
    cell_px: [f32; 2],
    start: Vec<u32>,
    /// Candidate index, centre and semi-major axis in source pixels: kept here so a query
    /// reads the cells' contents in sequence instead of the marks scattered by index.
    items: Vec<GridItem>,
    /// Largest semi-major axis of any mark, source pixels: how far a rim reaches out of its cell.
    max_radius_px: f32,
}

impl GridIndex {
    fn build(marks: &[Option<Mark>]) -> GridIndex {
        let (mut lo, mut hi) = ([f32::INFINITY; 2], [f32::NEG_INFINITY; 2]);
        let mut max_radius_px = 0.0f32;
        for m in marks.iter().flatten() {
            for ((l, h), v) in lo.iter_mut().zip(hi.iter_mut()).zip(m.pos) {
                *l = l.min(v);
                *h = h.max(v);
            }
            let r = m.radius_px();
            if r.is_finite() {
                max_radius_px = max_radius_px.max(r);
            }
        }
        if lo[0] > hi[0] {
            return GridIndex::default();
        }
        let cell_px = [
            ((hi[0] - lo[0]) / GRID_SIDE as f32).max(1e-3),
            ((hi[1] - lo[1]) / GRID_SIDE as f32).max(1e-3),
        ];
        let mut g = GridIndex {
            origin: lo,
            cell_px,
            start: vec![0; GRID_SIDE * GRID_SIDE + 1],
            items: vec![GridItem::default(); marks.iter().flatten().count()],
            max_radius_px,
        };
        let cells: Vec<Option<usize>> = marks.iter().map(|m| m.map(|m| g.cell_of(m.pos))).collect();
        for c in cells.iter().flatten() {
            g.start[c + 1] += 1;
        }
        for k in 0..GRID_SIDE * GRID_SIDE {
            g.start[k + 1] += g.start[k];
        }
        let mut fill = g.start.clone();
        for (i, c) in cells.iter().enumerate() {
            if let (Some(c), Some(m)) = (c, &marks[i]) {
                g.items[fill[*c] as usize] = GridItem {
                    index: i as u32,
                    pos: m.pos,
                    radius_px: m.radius_px(),
                };
                fill[*c] += 1;
            }
        }
        g
    }

    fn axis_cell(&self, v: f32, k: usize) -> usize {
        (((v - self.origin[k]) / self.cell_px[k]).floor().max(0.0) as usize).min(GRID_SIDE - 1)
    }

    fn cell_of(&self, p: [f32; 2]) -> usize {
        self.axis_cell(p[1], 1) * GRID_SIDE + self.axis_cell(p[0], 0)
    }

    /// Call `f` with every candidate whose centre lies in a cell touching the source-pixel
    /// rectangle `[min col, min row, max col, max row]`.
    fn for_each_near(&self, b: [f32; 4], mut f: impl FnMut(&GridItem)) {
        if self.start.is_empty() || !(b[0] <= b[2] && b[1] <= b[3]) {
            return;
        }
        let (c0, c1) = (self.axis_cell(b[0], 0), self.axis_cell(b[2], 0));
        let (r0, r1) = (self.axis_cell(b[1], 1), self.axis_cell(b[3], 1));
        for r in r0..=r1 {
            let (a, z) = (
                self.start[r * GRID_SIDE + c0] as usize,
                self.start[r * GRID_SIDE + c1 + 1] as usize,
            );
            self.items[a..z].iter().for_each(&mut f);
        }
    }
}

#[derive(Clone, Copy, Default)]
struct GridItem {
    index: u32,
    pos: [f32; 2],
    radius_px: f32,
}

/// What the in-view set was found for: the view, bit for bit.
#[derive(Clone, Copy, PartialEq)]
struct ViewKey {
    rect: [f32; 4],
    centre_px: [u64; 2],
    zoom: u64,
}

/// What the mesh was built for: the view, the ranking, the resolution, the survey and
/// whether failing candidates are drawn.
#[derive(Clone, Copy, PartialEq)]
struct MeshKey {
    view: ViewKey,
    ranking: u64,
    pixels_per_point: u32,
    built_for: (usize, usize),
    show_failing: bool,
}

#[derive(Default)]
pub struct CandidateMarks {
    marks: Vec<Option<Mark>>,
    grid: GridIndex,
    /// Identity of what the cache was built for: survey pointer and frame pointer.
    built_for: Option<(usize, usize)>,
    score_range: (f64, f64),
    score_generation: u64,
    /// Per candidate: in view (set for the view `in_view_for`).
    in_view: Vec<bool>,
    /// The candidates in view, by index.
    in_view_list: Vec<u32>,
    in_view_for: Option<ViewKey>,
    /// Candidates drawn, best first.
    drawn: Vec<u32>,
    /// Screen centre and radius of each drawn rim, worst first (what hovering tests).
    drawn_on_screen: Vec<(u32, Pos2, f32)>,
    /// What `meshes` were built for; `None` when they are stale.
    mesh_key: Option<MeshKey>,
    /// The drawn rims' triangles in two parts, the worse-ranked part first (painted in that
    /// order). Kept between rebuilds and refilled in place when egui holds no other reference:
    /// a dense view's mesh is megabytes, and fresh pages each rebuild cost page faults that
    /// outweigh the building.
    meshes: [Arc<Mesh>; 2],
}

pub struct MarkStyle {
    pub rect: Rect,
    pub centre_px: [f64; 2],
    pub zoom: f64,
    /// Draw candidates that fail a requirement (dashed); when false they are left out.
    pub show_failing: bool,
}

impl MarkStyle {
    fn key(&self) -> ViewKey {
        ViewKey {
            rect: [
                self.rect.min.x,
                self.rect.min.y,
                self.rect.max.x,
                self.rect.max.y,
            ],
            centre_px: [self.centre_px[0].to_bits(), self.centre_px[1].to_bits()],
            zoom: self.zoom.to_bits(),
        }
    }

    fn to_screen(&self, p: [f32; 2]) -> Pos2 {
        let (c, z) = (self.rect.center(), self.zoom as f32);
        Pos2::new(
            c.x + (p[0] - self.centre_px[0] as f32) * z,
            c.y + (p[1] - self.centre_px[1] as f32) * z,
        )
    }
}

impl CandidateMarks {
    fn refresh(&mut self, session: &Session, geom: &Arc<GridGeometry>) {
        let Some(survey) = &session.survey else {
            self.marks.clear();
            self.grid = GridIndex::default();
            self.built_for = None;
            self.in_view_for = None;
            self.mesh_key = None;
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
            self.grid = GridIndex::build(&self.marks);
            self.built_for = Some(key);
            self.score_generation = u64::MAX;
            self.in_view_for = None;
            self.mesh_key = None;
        }
        if self.score_generation != session.ranking.generation {
            let r = &session.ranking;
            let (lo, hi) = r
                .passing_score_range()
                .unwrap_or((f64::INFINITY, f64::NEG_INFINITY));
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

    /// Find the candidates in view: those whose rim reaches within 40 points of the map.
    fn find_in_view(&mut self, view: &MarkStyle) {
        let key = view.key();
        if self.in_view_for == Some(key) {
            return;
        }
        let z = view.zoom as f32;
        let cull = view.rect.expand(40.0);
        let is_visible =
            |g: &GridItem| cull.expand(g.radius_px * z).contains(view.to_screen(g.pos));
        self.in_view.clear();
        self.in_view.resize(self.marks.len(), false);
        // The grid is asked for every centre that a rim of the largest size could reach the
        // view from; each is then tested exactly.
        let (c, reach) = (view.rect.center(), self.grid.max_radius_px);
        let src = |p: Pos2| {
            [
                view.centre_px[0] as f32 + (p.x - c.x) / z,
                view.centre_px[1] as f32 + (p.y - c.y) / z,
            ]
        };
        let (a, b) = (src(cull.min), src(cull.max));
        let bounds = [a[0] - reach, a[1] - reach, b[0] + reach, b[1] + reach];
        let in_view = &mut self.in_view;
        self.grid.for_each_near(bounds, |g| {
            in_view[g.index as usize] = is_visible(g);
        });
        self.in_view_list.clear();
        self.in_view_list.extend(
            self.in_view
                .iter()
                .enumerate()
                .filter(|(_, v)| **v)
                .map(|(i, _)| i as u32),
        );
        self.in_view_for = Some(key);
    }

    /// Score range the colours stretch over: lowest and highest score among the passing
    /// candidates of the current ranking (what the legend shows).
    pub fn score_range(&self) -> (f64, f64) {
        self.score_range
    }

    /// The candidates to draw, best first: the first `MARK_BUDGET` in view in ranking order
    /// (survey order while the ranking does not cover the survey); failing ones only with
    /// `show_failing`.
    fn choose_drawn(&mut self, session: &Session, show_failing: bool) {
        let ranking = &session.ranking;
        self.drawn.clear();
        if ranking.len() != self.marks.len() {
            self.drawn
                .extend(self.in_view_list.iter().take(MARK_BUDGET));
            return;
        }
        if self.in_view_list.len() <= MARK_BUDGET {
            // Few in view: put them in ranking order by the order's own key, and runs equal
            // on it by their places (the tie order).
            self.drawn.extend(
                self.in_view_list
                    .iter()
                    .filter(|&&i| show_failing || ranking.passed(i as usize)),
            );
            self.drawn
                .sort_unstable_by_key(|&i| (ranking.sort_key(i as usize), i));
            let mut k = 0;
            while k < self.drawn.len() {
                let key = ranking.sort_key(self.drawn[k] as usize);
                let mut end = k + 1;
                while end < self.drawn.len() && ranking.sort_key(self.drawn[end] as usize) == key {
                    end += 1;
                }
                if end - k > 1 {
                    self.drawn[k..end].sort_by_key(|&i| ranking.place(i as usize));
                }
                k = end;
            }
        } else {
            // Many: walk the ranking until the budget is full (passing candidates fill the
            // first places, so without failing ones the walk ends at the last that passes).
            let (in_view, drawn) = (&self.in_view, &mut self.drawn);
            let passing = ranking.passing_count();
            let mut place = 0usize;
            ranking.walk(0, |i| {
                place += 1;
                if !show_failing && place > passing {
                    return false;
                }
                if in_view.get(i as usize).copied().unwrap_or(false) {
                    drawn.push(i);
                }
                drawn.len() < MARK_BUDGET
            });
        }
    }

    /// Triangles of every drawn rim, worst first so good rims sit on top. A long list is
    /// split in two, the worse part and the better part built side by side on both cores,
    /// then joined in that order: the same triangles in the same order as one pass would
    /// give. Outlines cost far more than dots and only the best `OUTLINE_BUDGET` of a dense
    /// view get them, so a dense view is split in the middle of those.
    fn build_mesh(&mut self, session: &Session, view: &MarkStyle, ctx: &egui::Context) {
        let ppp = ctx.pixels_per_point();
        let feathering = ctx.tessellation_options(|o| {
            if o.feathering {
                o.feathering_size_in_pixels / ppp
            } else {
                0.0
            }
        });
        let style = MeshStyle {
            view,
            feathering,
            dense: self.drawn.len() > OUTLINE_BUDGET,
            score_range: self.score_range,
        };
        let (marks, drawn) = (&self.marks, &self.drawn);
        let ranking = &session.ranking;
        let n = drawn.len();
        let split = if style.dense {
            OUTLINE_BUDGET / 2
        } else {
            n / 2
        };
        let [worse, better] = &mut self.meshes;
        let (worse, better) = (reusable(worse), reusable(better));
        let build = |range: std::ops::Range<usize>, mesh: &mut Mesh| {
            build_mesh_part(marks, drawn, ranking, &style, range, mesh)
        };
        let (mut on_screen, rest) = if n >= PARALLEL_MARKS {
            let (w, b) = rayon::join(|| build(split..n, worse), || build(0..split, better));
            (w, b)
        } else {
            better.indices.clear();
            better.vertices.clear();
            (build(0..n, worse), Vec::new())
        };
        on_screen.extend(rest);
        self.drawn_on_screen = on_screen;
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
        let key = MeshKey {
            view: view.key(),
            ranking: session.ranking.generation,
            pixels_per_point: painter.ctx().pixels_per_point().to_bits(),
            built_for: self.built_for.unwrap_or_default(),
            show_failing: view.show_failing,
        };
        if self.mesh_key != Some(key) {
            self.find_in_view(view);
            self.choose_drawn(session, view.show_failing);
            self.build_mesh(session, view, painter.ctx());
            self.mesh_key = Some(key);
        }
        for mesh in &self.meshes {
            if !mesh.is_empty() {
                painter.add(Shape::Mesh(mesh.clone()));
            }
        }
        let z = view.zoom as f32;
        // The rim under the pointer: the nearest centre within its rim (at least 6 points),
        // the better-ranked of equals.
        let mut hovered: Option<(usize, f32)> = None;
        if let Some(p) = pointer {
            for &(i, centre, r_screen) in &self.drawn_on_screen {
                let d = p.distance(centre);
                if d <= r_screen.max(6.0) && hovered.is_none_or(|(_, best)| d < best) {
                    hovered = Some((i as usize, d));
                }
            }
        }
        if let Some(sel) = session
            .selected
            .and_then(|i| self.marks.get(i).copied().flatten())
        {
            let mut pts = Vec::new();
            ellipse_points_into(&sel, view.to_screen(sel.pos), z, &mut pts);
            draw_selected(painter, pts, view.to_screen(sel.pos));
        }
        hovered.map(|(i, _)| i)
    }
}

/// The selected rim: white over a wider dark stroke, with its centre.
fn draw_selected(painter: &Painter, outline: Vec<Pos2>, centre: Pos2) {
    painter.add(Shape::closed_line(
        outline.clone(),
        Stroke::new(SELECTED_WIDTH_PT + 2.5, Color32::from_black_alpha(160)),
    ));
    painter.add(Shape::closed_line(
        outline,
        Stroke::new(SELECTED_WIDTH_PT, Color32::WHITE),
    ));
    painter.circle_filled(centre, 2.5, Color32::WHITE);
}

/// What the legend shows for each kind of mark, drawn by the same code as the map.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum LegendMark {
    /// A passing rim in the colour of the given score fraction.
    Passing(f64),
    Failing,
    /// A dot of a passing rim in the colour of the given score fraction.
    Dot(f64),
    Selected,
}

/// Draw `mark` as the map draws it, a circle of radius `r_pt` around `centre`.
pub fn draw_legend_mark(painter: &Painter, mark: LegendMark, centre: Pos2, r_pt: f32) {
    let circle = Mark::circle(r_pt, 0.0);
    let mut s = Scratch::default();
    ellipse_points_into(&circle, centre, 1.0, &mut s.points);
    let ctx = painter.ctx();
    let feathering = ctx.tessellation_options(|o| {
        if o.feathering {
            o.feathering_size_in_pixels
        } else {
            0.0
        }
    }) / ctx.pixels_per_point();
    let mut mesh = Mesh::default();
    match mark {
        LegendMark::Passing(t) => {
            let profile = haloed_profile(RIM_WIDTH_PT.0, score_colour(t), feathering);
            stroke_path(&s.points, true, &profile, &mut s.normals, &mut mesh);
        }
        LegendMark::Failing => {
            let profile = haloed_profile(RIM_WIDTH_PT.1, FAILING_COLOUR, feathering);
            let pts = std::mem::take(&mut s.points);
            stroke_dashed(&pts, &profile, &mut s, &mut mesh);
        }
        LegendMark::Dot(t) => add_dot(&mut mesh, centre, score_colour(t), true),
        LegendMark::Selected => {
            draw_selected(painter, s.points, centre);
            return;
        }
    }
    painter.add(Shape::mesh(mesh));
}

/// What every part of the mesh is drawn with.
struct MeshStyle<'a> {
    view: &'a MarkStyle,
    feathering: f32,
    /// Too many marks for all to be outlines.
    dense: bool,
    /// Scores mapped to the ends of the colour scale.
    score_range: (f64, f64),
}

/// Triangles of the drawn candidates at positions `range` of `drawn` (best first), built
/// worst first, with the screen centre and radius of each (worst first, for hovering).
fn build_mesh_part(
    marks: &[Option<Mark>],
    drawn: &[u32],
    ranking: &crate::engine::Ranking,
    style: &MeshStyle,
    range: std::ops::Range<usize>,
    mesh: &mut Mesh,
) -> Vec<(u32, Pos2, f32)> {
    let view = style.view;
    let z = view.zoom as f32;
    let (lo, hi) = style.score_range;
    let feathering = style.feathering;
    // A dense view's outlines are a few points across and overlap one another; there the
    // feathered (anti-aliased) edge adds triangles, and time to rebuild them on every
    // re-rank, for little that can be seen. Sparser views keep it.
    let outline_feathering = if style.dense { 0.0 } else { feathering };
    let part = drawn.get(range.clone()).unwrap_or(&[]);
    // Emptied by hand: `Mesh::clear` in epaint 0.37 drops the vertex buffer.
    mesh.indices.clear();
    mesh.vertices.clear();
    let outlines = OUTLINE_BUDGET.saturating_sub(range.start).min(part.len());
    mesh.reserve_vertices(outlines * 80 + part.len() * 8);
    // Gathered first in a loop of independent loads: the drawn candidates lie scattered
    // over arrays of hundreds of thousands, and a long loop body would wait for each.
    let gathered: Vec<(Option<Mark>, bool, f64)> = part
        .iter()
        .map(|&i| {
            let i = i as usize;
            (
                marks.get(i).copied().flatten(),
                ranking.passed(i),
                ranking.score(i).unwrap_or(0.0),
            )
        })
        .collect();
    let mut scratch = Scratch::default();
    let mut on_screen = Vec::with_capacity(part.len());
    for (j, &(m, pass, score)) in gathered.iter().enumerate().rev() {
        let Some(m) = m else { continue };
        // Place in the whole drawn list: decides outline or dot.
        let k = range.start + j;
        let centre = view.to_screen(m.pos);
        let r_screen = m.radius_px() * z;
        on_screen.push((part[j], centre, r_screen));
        let colour = if pass {
            score_colour((score - lo) / (hi - lo))
        } else {
            FAILING_COLOUR
        };
        if r_screen < 2.0 || (style.dense && (r_screen < 3.0 || k >= OUTLINE_BUDGET)) {
            if view.rect.expand(DOT_SIDE_PT).contains(centre) {
                add_dot(mesh, centre, colour, pass);
            }
            continue;
        }
        let width = if pass { RIM_WIDTH_PT.0 } else { RIM_WIDTH_PT.1 };
        // Rims wholly off the map are left out, as the tessellator's coarse culling would.
        let reach = m.semi_major_m.max(m.semi_minor_m) / m.px_m[0].min(m.px_m[1]).max(1e-6) * z
            + width
            + HALO_PT
            + feathering;
        if !view
            .rect
            .intersects(Rect::from_center_size(centre, Vec2::splat(2.0 * reach)))
        {
            continue;
        }
        ellipse_points_into(&m, centre, z, &mut scratch.points);
        let profile = haloed_profile(width, colour, outline_feathering);
        if pass {
            stroke_path(&scratch.points, true, &profile, &mut scratch.normals, mesh);
        } else {
            let points = std::mem::take(&mut scratch.points);
            stroke_dashed(&points, &profile, &mut scratch, mesh);
            scratch.points = points;
        }
    }
    on_screen
}

/// Buffers re-used from rim to rim.
#[derive(Default)]
struct Scratch {
    points: Vec<Pos2>,
    normals: Vec<Vec2>,
    dash: Vec<Pos2>,
}

/// A dot for a rim too small or too crowded to outline: a square over a dark one a halo
/// wider; a failing candidate's dot is hollow (its colour around a dark centre).
fn add_dot(mesh: &mut Mesh, centre: Pos2, colour: Color32, pass: bool) {
    mesh.add_colored_rect(
        Rect::from_center_size(centre, Vec2::splat(DOT_SIDE_PT + 2.0 * HALO_PT)),
        HALO_COLOUR,
    );
    mesh.add_colored_rect(
        Rect::from_center_size(centre, Vec2::splat(DOT_SIDE_PT)),
        colour,
    );
    if !pass {
        mesh.add_colored_rect(
            Rect::from_center_size(centre, Vec2::splat(DOT_SIDE_PT * 0.4)),
            Color32::BLACK,
        );
    }
}

/// The mesh behind `arc` to refill: itself when nothing else holds it (egui lets go of the
/// shapes of a frame once it has tessellated them), else a fresh one in its place.
fn reusable(arc: &mut Arc<Mesh>) -> &mut Mesh {
    if Arc::get_mut(arc).is_none() {
        *arc = Arc::new(Mesh::default());
    }
    Arc::make_mut(arc)
}

/// Screen outline of a rim: the fitted ellipse, major axis at its azimuth from north, with
/// as many vertices as its size on screen needs ([`outline_vertices`]).
fn ellipse_points_into(m: &Mark, centre: Pos2, zoom: f32, out: &mut Vec<Pos2>) {
    let r_screen = m.radius_px() * zoom;
    let n = outline_vertices(r_screen);
    let (sa, ca) = m.azimuth_rad.sin_cos();
    // The angle steps by a fixed rotation (no sine or cosine per point).
    let (sd, cd) = (std::f32::consts::TAU / n as f32).sin_cos();
    let (mut c, mut s) = (1.0f32, 0.0f32);
    out.clear();
    out.extend((0..n).map(|_| {
        let (u, v) = (m.semi_major_m * c, m.semi_minor_m * s);
        (c, s) = (c * cd - s * sd, s * cd + c * sd);
        let east = u * sa + v * ca;
        let north = u * ca - v * sa;
        Pos2::new(
            centre.x + east / m.px_m[0] * zoom,
            centre.y - north / m.px_m[1] * zoom,
        )
    }));
}

/// Vertices of a drawn circle of radius `r_pt` points so a chord strays at most
/// [`OUTLINE_TOLERANCE_PT`] from the arc: the sagitta of a chord spanning 2 pi / n is
/// r (1 - cos(pi / n)), about r pi^2 / (2 n^2), hence n = pi sqrt(r / (2 tol)).
pub fn outline_vertices(r_pt: f32) -> usize {
    let n = std::f32::consts::PI * (r_pt.max(0.0) / (2.0 * OUTLINE_TOLERANCE_PT)).sqrt();
    (n.ceil() as usize).clamp(OUTLINE_VERTICES.0, OUTLINE_VERTICES.1)
}

/// Across-the-line profile of a rim over its halo, from one edge to the other: offsets from
/// the centre line (points) and colours. With `feathering`, each edge fades to transparent
/// over that width (anti-aliasing, as `epaint` feathers its strokes).
fn haloed_profile(width: f32, colour: Color32, feathering: f32) -> Vec<(f32, Color32)> {
    let a = 0.5 * width;
    let h = a + HALO_PT;
    if feathering > 0.0 {
        let f = 0.5 * feathering;
        vec![
            (h + f, Color32::TRANSPARENT),
            (h - f, HALO_COLOUR),
            (a, colour),
            (-a, colour),
            (-h + f, HALO_COLOUR),
            (-h - f, Color32::TRANSPARENT),
        ]
    } else {
        vec![
            (h, HALO_COLOUR),
            (a, colour),
            (-a, colour),
            (-h, HALO_COLOUR),
        ]
    }
}

/// A closed outline in dashes of [`DASH_PT`] with gaps between, each dash stroked with
/// `profile` and square ends.
fn stroke_dashed(points: &[Pos2], profile: &[(f32, Color32)], s: &mut Scratch, out: &mut Mesh) {
    let n = points.len();
    if n < 2 {
        return;
    }
    let (on, off) = DASH_PT;
    let mut drawing = true;
    let mut left = on;
    s.dash.clear();
    s.dash.push(points[0]);
    for i in 0..n {
        let (a, b) = (points[i], points[(i + 1) % n]);
        let mut from = a;
        let mut seg = b.distance(a);
        while seg > left {
            let t = left / seg;
            let p = from + (b - from) * t;
            if drawing {
                s.dash.push(p);
                stroke_path(&s.dash, false, profile, &mut s.normals, out);
            }
            s.dash.clear();
            s.dash.push(p);
            drawing = !drawing;
            seg -= left;
            left = if drawing { on } else { off };
            from = p;
        }
        left -= seg;
        if drawing {
            s.dash.push(b);
        }
    }
    if drawing && s.dash.len() >= 2 {
        stroke_path(&s.dash, false, profile, &mut s.normals, out);
    }
}

/// Stroke a path (closed or open) along its middle with an across-the-line `profile`
/// (offsets, edge to edge, and colours): miter joins as `epaint`'s tessellator makes them,
/// one vertex per profile stop at every point, without its per-shape overhead.
fn stroke_path(
    points: &[Pos2],
    closed: bool,
    profile: &[(f32, Color32)],
    normals: &mut Vec<Vec2>,
    out: &mut Mesh,
) {
    let n = points.len();
    let k = profile.len();
    if n < 2 || k < 2 {
        return;
    }
    normals.clear();
    let dir = |i: usize, j: usize| (points[j] - points[i]).normalized().rot90();
    let mut n0 = if closed { dir(n - 1, 0) } else { dir(0, 1) };
    for i in 0..n {
        let mut n1 = if i + 1 < n {
            dir(i, i + 1)
        } else if closed {
            dir(i, 0)
        } else {
            n0
        };
        if n0 == Vec2::ZERO {
            n0 = n1;
        } else if n1 == Vec2::ZERO {
            n1 = n0;
        }
        let normal = (n0 + n1) * 0.5;
        let len_sq = normal.length_sq();
        normals.push(if len_sq > 0.0 {
            normal / len_sq
        } else {
            normal
        });
        n0 = n1;
    }
    let idx = out.vertices.len() as u32;
    for (p, nm) in points.iter().zip(normals.iter()) {
        for &(offset, color) in profile {
            out.vertices.push(Vertex {
                pos: *p + *nm * offset,
                uv: WHITE_UV,
                color,
            });
        }
    }
    let (n, k) = (n as u32, k as u32);
    let mut quad = |i0: u32, i1: u32| {
        for s in 0..k - 1 {
            let (a, b) = (idx + k * i0 + s, idx + k * i1 + s);
            out.add_triangle(a, a + 1, b);
            out.add_triangle(a + 1, b, b + 1);
        }
    };
    if closed {
        quad(n - 1, 0);
    }
    for i in 1..n {
        quad(i - 1, i);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The drawn outline stays within the tolerance of the true circle: the midpoint of every
    /// chord lies at most `OUTLINE_TOLERANCE_PT` inside the radius (plane geometry; a chord's
    /// midpoint is the point of the polygon farthest from the arc).
    #[test]
    fn rims_are_smooth_at_every_size_on_screen() {
        for r_pt in [2.0f32, 3.0, 5.0, 10.0, 20.0, 60.0, 200.0, 1000.0] {
            let m = Mark::circle(r_pt, 0.3);
            let mut pts = Vec::new();
            ellipse_points_into(&m, Pos2::ZERO, 1.0, &mut pts);
            let n = pts.len();
            let worst = (0..n)
                .map(|i| {
                    let mid = pts[i] + (pts[(i + 1) % n] - pts[i]) * 0.5;
                    r_pt - mid.to_vec2().length()
                })
                .fold(0.0f32, f32::max);
            assert!(
                worst <= OUTLINE_TOLERANCE_PT * 1.05,
                "radius {r_pt} pt, {n} vertices: chord {worst} pt inside the circle"
            );
        }
        // A small rim is no longer a decagon.
        assert!(outline_vertices(5.0) > 10);
    }

    #[test]
    fn dashes_cover_a_share_of_the_outline_set_by_dash_and_gap() {
        let m = Mark::circle(100.0, 0.0);
        let mut s = Scratch::default();
        ellipse_points_into(&m, Pos2::ZERO, 1.0, &mut s.points);
        let pts = s.points.clone();
        let mut mesh = Mesh::default();
        let profile = [(0.5, Color32::RED), (-0.5, Color32::RED)];
        stroke_dashed(&pts, &profile, &mut s, &mut mesh);
        // Area of the strokes (width 1): the dashed length.
        let area: f32 = mesh
            .indices
            .chunks(3)
            .map(|t| {
                let [a, b, c] = [0, 1, 2].map(|k| mesh.vertices[t[k] as usize].pos);
                ((b - a).x * (c - a).y - (b - a).y * (c - a).x).abs() / 2.0
            })
            .sum();
        let perimeter = std::f32::consts::TAU * 100.0;
        let share = DASH_PT.0 / (DASH_PT.0 + DASH_PT.1);
        assert!(
            (area / perimeter - share).abs() < 0.02,
            "dashed share {} against {share}",
            area / perimeter
        );
    }
}
