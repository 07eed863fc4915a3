//! Scoring one placement of the structure (horizontal offset of its axis and rotation of its
//! anchor ring) and searching for the best one.
//!
//! For an offset d the lowest vertex that keeps the surface at least the clearance c above the
//! ground is vertex_lo = max over the aperture of (ground + c - sag(r)), taken over the lattice
//! nodes inside the aperture disc, the vertex and 64 points on the edge. The surface hangs from anchors on
//! the rim crest, so its edge may rise no higher than the lowest anchor:
//! vertex_hi = lowest anchor - sag(a). When vertex_lo <= vertex_hi the surface hangs at
//! vertex_lo (deepest, with the clearance) and vertex_hi - vertex_lo is headroom; otherwise it
//! hangs at vertex_hi and the ground that still stands within c of it must be dug away.
//!
//! Placements are compared in order (the first that differs decides): the aperture inside the
//! crest, every anchor on a traced crest, the clearance met at every sample, least excavation,
//! anchor height spread within the limit (left out when no placement meets it), largest
//! headroom, shortest longest span, smallest offset. A grid over offsets within
//! a quarter diameter of the crater centre and eight rotations per anchor period seeds a
//! compass search (Torczon 1997, SIAM J. Optim. 7:1, pattern search) on offset and rotation.

use crate::patch::Patch;
use crate::rim::Crest;
use crate::spec::StructureSpec;

/// Points on the aperture edge checked besides the lattice nodes inside it.
pub const EDGE_POINTS: usize = 64;
/// Offsets are searched within this fraction of the crater diameter from its centre.
pub const MAX_OFFSET_FRAC: f64 = 0.25;
const COARSE_OFFSET_STEPS: i32 = 4;
const COARSE_ROTATIONS: usize = 8;
const MAX_ITERATIONS: usize = 200;
/// Round-off allowed when comparing a clearance with the spec's: heights are f64 metres of a
/// few thousand, whose last bit is about 1e-12 m, so 1e-6 m is pure arithmetic slack and far
/// below anything a DEM resolves.
pub const CLEARANCE_TOLERANCE_M: f64 = 1e-6;
/// The reported excavation samples each lattice cell on sub-cells no wider than this (up to
/// `MAX_SUBCELLS` a side), so that a shortfall narrower than a DEM post still shows a volume.
const EXCAVATION_SUBCELL_M: f64 = 1.0;
const MAX_SUBCELLS: f64 = 16.0;

/// Which kind of point a clearance sample is.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SampleKind {
    /// A node of the terrain lattice inside the aperture.
    Lattice,
    /// The point under the vertex (the axis).
    Vertex,
    /// One of the `EDGE_POINTS` points on the aperture edge.
    Edge,
}

/// The offset (east, north) of the last excavation asked for, and its nodes' (ground +
/// clearance, sag) pairs.
type ExcavationNodes = ((f64, f64), Vec<(f64, f64)>);

/// Everything the search reuses between placements.
pub struct Ctx<'a> {
    pub patch: &'a Patch,
    pub crest: &'a Crest,
    pub spec: &'a StructureSpec,
    pub a_m: f64,
    pub edge_sag_m: f64,
    pub max_offset_m: f64,
    edge_dirs: Vec<(f64, f64)>,
    /// Whether the anchor height spread takes part in the ranking (see [`Ctx::search`]).
    rank_spread: bool,
    /// For the last offset whose excavation was asked for: (ground + clearance, sag) of every
    /// lattice node with data inside the aperture, in lattice order. The search scores several
    /// rotations at one offset, and each may need the excavation at another vertex height.
    excavation_nodes: std::cell::RefCell<ExcavationNodes>,
}

/// The aperture's vertical fit at one offset.
#[derive(Clone, Copy, Debug)]
pub struct Vertical {
    pub vertex_lo_m: f64,
    /// Where the clearance binds (local frame).
    pub binding_xy: (f64, f64),
    pub valid: usize,
    pub total: usize,
    /// How far the aperture reaches past the crest (0 when inside).
    pub intrusion_m: f64,
}

#[derive(Clone, Copy, Debug)]
pub struct AnchorAt {
    pub x_m: f64,
    pub y_m: f64,
    pub azimuth_deg: f64,
    /// Horizontal distance from the aperture centre.
    pub reach_m: f64,
    pub height_m: f64,
    pub on_crest: bool,
}

/// One scored placement.
#[derive(Clone, Debug)]
pub struct Placement {
    pub offset: (f64, f64),
    pub rotation_deg: f64,
    pub vertical: Vertical,
    pub anchors: Vec<AnchorAt>,
    pub vertex_m: f64,
    pub headroom_m: f64,
    pub excavation_m3: f64,
    pub spread_m: f64,
    pub max_span_m: f64,
    pub bad_anchors: usize,
}

impl<'a> Ctx<'a> {
    pub fn new(
        patch: &'a Patch,
        crest: &'a Crest,
        spec: &'a StructureSpec,
        crater_diameter_m: f64,
    ) -> Ctx<'a> {
        let edge_dirs = (0..EDGE_POINTS)
            .map(|k| {
                let t = k as f64 * std::f64::consts::TAU / EDGE_POINTS as f64;
                (t.sin(), t.cos())
            })
            .collect();
        Ctx {
            patch,
            crest,
            spec,
            a_m: spec.aperture_radius_m(),
            edge_sag_m: spec.edge_sag_m(),
            max_offset_m: MAX_OFFSET_FRAC * crater_diameter_m,
            edge_dirs,
            rank_spread: true,
            excavation_nodes: std::cell::RefCell::new(((f64::NAN, f64::NAN), Vec::new())),
        }
    }

    pub fn period_deg(&self) -> f64 {
        360.0 / self.spec.anchors as f64
    }

    /// Lattice index range covering [c - r, c + r] along one axis.
    fn span(&self, c: f64, r: f64) -> (usize, usize) {
        let p = self.patch;
        let lo = ((c - r + p.half_m) / p.cell_m).ceil().max(0.0) as usize;
        let hi = (((c + r + p.half_m) / p.cell_m).floor().max(-1.0) + 1.0).min(p.n as f64) as usize;
        (lo, hi.max(lo))
    }

    /// Calls `f(x, y, ground, sag)` for every lattice node inside the aperture at `d`.
    fn for_nodes(&self, d: (f64, f64), mut f: impl FnMut(f64, f64, f64, f64)) {
        let a2 = self.a_m * self.a_m;
        let (i0, i1) = self.span(d.0, self.a_m);
        let (j0, j1) = self.span(d.1, self.a_m);
        for j in j0..j1 {
            for i in i0..i1 {
                let (x, y) = self.patch.node_xy(i, j);
                let r2 = (x - d.0).powi(2) + (y - d.1).powi(2);
                if r2 <= a2 {
                    f(
                        x,
                        y,
                        self.patch.heights_m[j * self.patch.n + i],
                        self.spec.sag_m(r2),
                    );
                }
            }
        }
    }

    /// Calls `f(kind, x, y, ground, sag)` for every point where the clearance is checked at
    /// offset `d`: the lattice nodes inside the aperture (in lattice order), the vertex, then the
    /// edge points. Ground is NaN where there is no data. The vertex and the edge rarely fall on
    /// lattice nodes, and either may be where the clearance binds (a level floor, a bowl more
    /// curved than the dish).
    pub fn for_samples(&self, d: (f64, f64), mut f: impl FnMut(SampleKind, f64, f64, f64, f64)) {
        self.for_nodes(d, |x, y, g, sag| f(SampleKind::Lattice, x, y, g, sag));
        f(
            SampleKind::Vertex,
            d.0,
            d.1,
            self.patch.sample(d.0, d.1),
            0.0,
        );
        for u in &self.edge_dirs {
            let (x, y) = (d.0 + self.a_m * u.0, d.1 + self.a_m * u.1);
            f(
                SampleKind::Edge,
                x,
                y,
                self.patch.sample(x, y),
                self.edge_sag_m,
            );
        }
    }

    pub fn vertical(&self, d: (f64, f64)) -> Vertical {
        let c = self.spec.min_clearance_m;
        let (mut lo, mut at, mut valid, mut total) = (f64::NEG_INFINITY, d, 0, 0);
        self.for_samples(d, |_, x, y, g, sag| {
            total += 1;
            if g.is_finite() {
                valid += 1;
                if g + c - sag > lo {
                    lo = g + c - sag;
                    at = (x, y);
                }
            }
        });
        let intrusion_m = (self.a_m - self.crest.signed_distance_m(d)).max(0.0);
        Vertical {
            vertex_lo_m: if valid > 0 { lo } else { f64::NAN },
            binding_xy: at,
            valid,
            total,
            intrusion_m,
        }
    }

    pub fn anchors(&self, d: (f64, f64), rotation_deg: f64) -> Vec<AnchorAt> {
        (0..self.spec.anchors)
            .map(|k| {
                let az = (rotation_deg + k as f64 * self.period_deg()).rem_euclid(360.0);
                let u = (az.to_radians().sin(), az.to_radians().cos());
                match self.crest.ray_hit(d, u) {
                    Some(h) => {
                        let height_m = self.patch.sample(h.x_m, h.y_m);
                        let on_crest = height_m.is_finite() && !self.crest.in_gap((h.x_m, h.y_m));
                        AnchorAt {
                            x_m: h.x_m,
                            y_m: h.y_m,
                            azimuth_deg: az,
                            reach_m: h.t_m,
                            height_m,
                            on_crest,
                        }
                    }
                    None => AnchorAt {
                        x_m: d.0,
                        y_m: d.1,
                        azimuth_deg: az,
                        reach_m: 0.0,
                        height_m: f64::NAN,
                        on_crest: false,
                    },
                }
            })
            .collect()
    }

    /// Ground to remove so the surface with its vertex at `vertex_m` clears it by c, m^3, as the
    /// search ranks it: one sample per lattice node (midpoint rule on the lattice cells). It
    /// misses a shortfall narrower than a cell; [`Ctx::excavation_fine_m3`] gives the reported
    /// figure.
    pub fn excavation_m3(&self, d: (f64, f64), vertex_m: f64) -> f64 {
        let c = self.spec.min_clearance_m;
        let mut cache = self.excavation_nodes.borrow_mut();
        if cache.0 != d {
            cache.1.clear();
            let nodes = &mut cache.1;
            self.for_nodes(d, |_, _, g, sag| {
                if g.is_finite() {
                    nodes.push((g + c, sag));
                }
            });
            cache.0 = d;
        }
        // Summed in lattice order and grouped as ((g + c) - vertex) - sag: the same value, to
        // the bit, as summing over the lattice afresh.
        let mut v = 0.0;
        for &(gc, sag) in &cache.1 {
            v += (gc - vertex_m - sag).max(0.0);
        }
        v * self.patch.cell_m * self.patch.cell_m
    }

    /// The excavation reported for the chosen placement: the midpoint rule over the aperture
    /// on sub-cells of at most `EXCAVATION_SUBCELL_M`, on the bilinear ground between lattice
    /// nodes (the ground every clearance sample reads), so a shortfall at the vertex or the edge
    /// between two nodes is counted. Cells where no point can fall short are skipped whole: the
    /// ground in a cell is at most its highest corner and the sag at least its value at the
    /// cell's point nearest the axis (sag grows with the distance from the axis).
    pub fn excavation_fine_m3(&self, d: (f64, f64), vertex_m: f64) -> f64 {
        let (c, a2) = (self.spec.min_clearance_m, self.a_m * self.a_m);
        let p = self.patch;
        let h = p.cell_m;
        let k = (h / EXCAVATION_SUBCELL_M).ceil().clamp(1.0, MAX_SUBCELLS) as usize;
        let sub = h / k as f64;
        let (i0, i1) = self.span(d.0, self.a_m);
        let (j0, j1) = self.span(d.1, self.a_m);
        // Cells are named by their south-west node; those holding any of the aperture.
        let cells = |lo: usize, hi: usize| lo.saturating_sub(1)..hi.min(p.n - 1);
        let mut v = 0.0;
        for j in cells(j0, j1) {
            for i in cells(i0, i1) {
                let n0 = j * p.n + i;
                let z = [
                    p.heights_m[n0],
                    p.heights_m[n0 + 1],
                    p.heights_m[n0 + p.n],
                    p.heights_m[n0 + p.n + 1],
                ];
                if z.iter().any(|g| !g.is_finite()) {
                    continue;
                }
                let (x0, y0) = p.node_xy(i, j);
                let near = (d.0.clamp(x0, x0 + h) - d.0, d.1.clamp(y0, y0 + h) - d.1);
                let near2 = near.0 * near.0 + near.1 * near.1;
                let top = z.iter().fold(f64::NEG_INFINITY, |m, &g| m.max(g));
                if near2 > a2 || top + c - vertex_m - self.spec.sag_m(near2) <= 0.0 {
                    continue;
                }
                for sj in 0..k {
                    let t = (sj as f64 + 0.5) / k as f64;
                    for si in 0..k {
                        let s = (si as f64 + 0.5) / k as f64;
                        let (x, y) = (x0 + s * h, y0 + t * h);
                        let r2 = (x - d.0).powi(2) + (y - d.1).powi(2);
                        if r2 > a2 {
                            continue;
                        }
                        let g = z[0] * (1.0 - s) * (1.0 - t)
                            + z[1] * s * (1.0 - t)
                            + z[2] * (1.0 - s) * t
                            + z[3] * s * t;
                        v += (g + c - vertex_m - self.spec.sag_m(r2)).max(0.0);
                    }
                }
            }
        }
        v * sub * sub
    }

    pub fn score(&self, d: (f64, f64), rotation_deg: f64, vertical: Vertical) -> Placement {
        let anchors = self.anchors(d, rotation_deg);
        let heights: Vec<f64> = anchors
            .iter()
            .map(|a| a.height_m)
            .filter(|h| h.is_finite())
            .collect();
        let (lowest, highest) = heights
            .iter()
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), &v| {
                (l.min(v), h.max(v))
            });
        let vertex_hi = lowest - self.edge_sag_m;
        let headroom_m = vertex_hi - vertical.vertex_lo_m;
        let (vertex_m, excavation_m3) = if !headroom_m.is_finite() {
            (vertical.vertex_lo_m, f64::INFINITY)
        } else if headroom_m >= 0.0 {
            (vertical.vertex_lo_m, 0.0)
        } else if headroom_m >= -CLEARANCE_TOLERANCE_M {
            // Short by round-off only: nothing to dig.
            (vertex_hi, 0.0)
        } else {
            (vertex_hi, self.excavation_m3(d, vertex_hi))
        };
        let edge_z = vertex_m + self.edge_sag_m;
        let max_span_m = anchors
            .iter()
            .filter(|a| a.height_m.is_finite())
            .map(|a| (a.reach_m - self.a_m).hypot(a.height_m - edge_z))
            .fold(0.0, f64::max);
        Placement {
            offset: d,
            rotation_deg: rotation_deg.rem_euclid(self.period_deg()),
            vertical,
            spread_m: if heights.is_empty() {
                f64::NAN
            } else {
                highest - lowest
            },
            bad_anchors: anchors.iter().filter(|a| !a.on_crest).count(),
            anchors,
            vertex_m,
            headroom_m,
            excavation_m3,
            max_span_m,
        }
    }

    /// Keys in order of importance, smaller is better; NaN counts as worst.
    fn keys(&self, p: &Placement) -> [f64; 8] {
        let w = |v: f64| if v.is_nan() { f64::INFINITY } else { v };
        let spread_excess = if self.rank_spread {
            w((p.spread_m - self.spec.max_anchor_height_difference_m).max(0.0))
        } else {
            0.0
        };
        [
            w(p.vertical.intrusion_m),
            p.bad_anchors as f64,
            // A shortfall at a vertex or edge sample may leave no lattice node to dig under.
            if p.headroom_m < -CLEARANCE_TOLERANCE_M {
                1.0
            } else {
                0.0
            },
            w(p.excavation_m3),
            spread_excess,
            w(-p.headroom_m),
            w(p.max_span_m),
            p.offset.0.hypot(p.offset.1),
        ]
    }

    /// Lexicographic comparison with a small tolerance on each key, so that round-off in one
    /// key does not hide a real difference in the next.
    pub fn better(&self, a: &Placement, b: &Placement) -> bool {
        const TOL: [f64; 8] = [1e-6, 0.5, 0.5, 1e-3, 1e-6, 1e-6, 1e-6, 1e-9];
        let (ka, kb) = (self.keys(a), self.keys(b));
        for i in 0..TOL.len() {
            if ka[i] == kb[i] || (ka[i] - kb[i]).abs() <= TOL[i] {
                continue;
            }
            return ka[i] < kb[i];
        }
        false
    }

    /// Best placement. When no placement brings the anchor height spread within the limit,
    /// chasing the smallest excess would drag the structure to the edge of the search area for
    /// a requirement it fails anyway; the search is then run again without the spread, so the
    /// structure sits where the other criteria put it and reports its spread there.
    pub fn search(&mut self) -> Placement {
        self.rank_spread = true;
        let best = self.search_once();
        if best.spread_m > self.spec.max_anchor_height_difference_m {
            self.rank_spread = false;
            return self.search_once();
        }
        best
    }

    fn search_once(&self) -> Placement {
        let step = self.max_offset_m / COARSE_OFFSET_STEPS as f64;
        let period = self.period_deg();
        let mut best: Option<Placement> = None;
        for j in -COARSE_OFFSET_STEPS..=COARSE_OFFSET_STEPS {
            for i in -COARSE_OFFSET_STEPS..=COARSE_OFFSET_STEPS {
                if i * i + j * j > COARSE_OFFSET_STEPS * COARSE_OFFSET_STEPS {
                    continue;
                }
                let d = (i as f64 * step, j as f64 * step);
                let v = self.vertical(d);
                for r in 0..COARSE_ROTATIONS {
                    let p = self.score(d, r as f64 * period / COARSE_ROTATIONS as f64, v);
                    if best.as_ref().is_none_or(|b| self.better(&p, b)) {
                        best = Some(p);
                    }
                }
            }
        }
        let best = best.unwrap_or_else(|| self.score((0.0, 0.0), 0.0, self.vertical((0.0, 0.0))));
        self.refine(best, step / 2.0, period / (2.0 * COARSE_ROTATIONS as f64))
    }

    /// Compass search: try one step each way along x, y and rotation; move to the best that
    /// improves, else halve the steps; stop below a twentieth of a lattice cell and 0.05 degree
    /// (the clearance has a kink at the optimum in a bowl, so the last halvings still pay).
    fn refine(&self, mut best: Placement, mut step_m: f64, mut step_deg: f64) -> Placement {
        let min_step_m = 0.05 * self.patch.cell_m;
        for _ in 0..MAX_ITERATIONS {
            if step_m < min_step_m && step_deg < 0.05 {
                break;
            }
            let (d, r) = (best.offset, best.rotation_deg);
            let mut moved: Option<Placement> = None;
            let sm = if step_m >= min_step_m { step_m } else { 0.0 };
            let moves = [
                (sm, 0.0, 0.0),
                (-sm, 0.0, 0.0),
                (0.0, sm, 0.0),
                (0.0, -sm, 0.0),
                (0.0, 0.0, step_deg),
                (0.0, 0.0, -step_deg),
            ];
            for (k, &(dx, dy, dr)) in moves.iter().enumerate() {
                if (k < 4 && sm == 0.0) || (k >= 4 && step_deg < 0.05) {
                    continue;
                }
                let nd = (d.0 + dx, d.1 + dy);
                if nd.0.hypot(nd.1) > self.max_offset_m + 1e-9 {
                    continue;
                }
                let v = if k < 4 {
                    self.vertical(nd)
                } else {
                    best.vertical
                };
                let p = self.score(nd, r + dr, v);
                let reference = moved.as_ref().unwrap_or(&best);
                if self.better(&p, reference) {
                    moved = Some(p);
                }
            }
            match moved {
                Some(p) => best = p,
                None => {
                    step_m /= 2.0;
                    step_deg /= 2.0;
                }
            }
        }
        best
    }
}
