//! The skyline the operations read: the highest terrain in each of 720 azimuth sectors round a
//! point, swept over the crater's lattice (`structure::patch`, the DEM resampled at its post
//! spacing in the crater's local azimuthal equidistant frame).
//!
//! Every lattice node within reach stands at elevation atan2((R + h) cos g - (R + h_s),
//! (R + h) sin g), g = d / R (the exact form on the sphere, as `visibility::horizon`), and
//! counts in every sector its post-wide footprint overlaps (half-width atan(post / 2d)): an
//! upper bound of the skyline in each sector, so a source above it is above the terrain
//! anywhere in the sector. (The Earth margin reads a lower bound instead, `Horizon`: each
//! errs on the cautious side of its own question.)
//!
//! Not every node is read, yet the skyline is the one of every node, sector for sector (the
//! crate's tests compare the two on the demo terrain). The nodes within [`NEAR_POSTS`] posts of
//! the point (in each axis; every node of a reach up to [`ALL_NODES_UP_TO_POSTS`]) are read
//! one by one. Beyond, the lattice's max-pooled pyramid
//! (level l: the highest height of each block of 2^l x 2^l posts and which node holds it,
//! built once per lattice as far as its skylines need and shared by all of them) is read in
//! square rings, each level from where the one below stops, so a level-l block lies about
//! NEAR_POSTS / 2 blocks or more from the point. A block is opened (its highest node first,
//! then, if still needed, its nodes or its four blocks of the level below) only where a bound
//! of what any of its nodes could raise exceeds the skyline found so far in some sector of the
//! bound's run; where it does not, none of its nodes could change the result. The bound:
//! - height: the block's highest; the elevation rises with the height;
//! - distance: with k = (R + h_s) / (R + h) the elevation rises with distance while
//!   k cos g > 1 and falls after, so over the distances from the block's nearest node to its
//!   farthest the largest is at the nearest (where k cos g is at most 1), at the farthest
//!   (where it is at least 1), or else the peak -sqrt(k^2 - 1); a 1e-12 relative pad covers
//!   the sine and cosine series;
//! - sectors: every node's azimuth lies within asin(rb / dc) <= rb / sqrt(dc^2 - rb^2) of the
//!   block centre's (rb the half-diagonal, dc the centre's distance), and its footprint adds at
//!   most half a post over the nearest distance; three times the arctangent's error covers the
//!   centre's azimuth, the node's and the node's footprint.
//!
//! Sector indices come from products by the sectors per radian, whose rounding lies far inside
//! the room the arctangent's allowance leaves. On a crater floor the walls hide most of what
//! lies beyond them: the far blocks are mostly left shut.
//!
//! Limits: distances and azimuths are the frame's, exact from the crater centre and off by
//! under 0.05 deg over the few kilometres the skylines read (the meridians converge by about
//! (s / R) tan(lat) radians at a distance s from the centre); terrain beyond the reach is not
//! read; missing heights raise nothing.

mod pyramid;
mod spans;
#[cfg(test)]
mod tests;

use pyramid::Pyramid;
use spans::SpanMax;
use structure::patch::Patch;
use visibility::horizon::sphere_dip_deg;
use visibility::Horizon;

/// Nodes within this many posts of the point, in each axis, are read one by one; the pyramid's
/// blocks beyond (a block's size over its distance at most about 2 / NEAR_POSTS). Of 8, 16, 24
/// and 32, the fastest on the skyline bench's 2.8 and 8 km reaches.
pub const NEAR_POSTS: i64 = 16;
/// A reach of at most this many posts is read node by node: the pyramid's rings cost more
/// than they spare there (the skyline bench's 500 m reach).
pub const ALL_NODES_UP_TO_POSTS: f64 = 32.0;

/// The skyline at local (x0, y0) of `patch`, `mast_m` above the ground there, in `sectors`
/// sectors, reading nodes out to `reach_m`. `None` without ground at the point. For several
/// skylines on one lattice, [`Skylines`] shares the pyramid and the buffers.
pub fn sweep(
    patch: &Patch,
    point: (f64, f64),
    mast_m: f64,
    reach_m: f64,
    sectors: usize,
) -> Option<Horizon> {
    Skylines::new(patch).sweep(point, mast_m, reach_m, sectors)
}

/// Skylines on one lattice: its pyramid, built as far as the skylines need, and the sector
/// table, reused from one skyline to the next.
pub struct Skylines<'a> {
    patch: &'a Patch,
    near_posts: i64,
    pyramid: Pyramid,
    spans: SpanMax,
    /// The skyline being swept, tangents per sector.
    sky: Vec<f64>,
    /// Nodes and blocks the last skyline read.
    read: usize,
}

impl<'a> Skylines<'a> {
    pub fn new(patch: &'a Patch) -> Skylines<'a> {
        Skylines::with_near_posts(patch, NEAR_POSTS)
    }

    fn with_near_posts(patch: &'a Patch, near_posts: i64) -> Skylines<'a> {
        Skylines {
            patch,
            near_posts: near_posts.max(4),
            pyramid: Pyramid::default(),
            spans: SpanMax::new(crate::SKYLINE_SECTORS),
            sky: Vec::with_capacity(crate::SKYLINE_SECTORS),
            read: 0,
        }
    }

    /// How many lattice nodes and pyramid blocks the last skyline read.
    pub fn last_read(&self) -> usize {
        self.read
    }

    /// The lattice the skylines are swept over.
    pub fn patch(&self) -> &'a Patch {
        self.patch
    }

    /// As [`sweep`].
    pub fn sweep(
        &mut self,
        (x0, y0): (f64, f64),
        mast_m: f64,
        reach_m: f64,
        sectors: usize,
    ) -> Option<Horizon> {
        let patch = self.patch;
        let ground = patch.sample(x0, y0);
        if !ground.is_finite() {
            return None;
        }
        let hs = ground + mast_m;
        let dip = sphere_dip_deg(patch.frame.radius_m, hs);
        let n = sectors.max(4);
        if self.spans.sectors() == n {
            self.spans.reset();
        } else {
            self.spans = SpanMax::new(n);
        }
        let eye = Eye::new(patch, (x0, y0), hs, reach_m, n);
        self.sweep_rings(&eye);
        Some(Horizon {
            elevation_deg: self
                .sky
                .iter()
                .map(|t| t.atan().to_degrees().max(dip))
                .collect(),
            site_height_m: hs,
            sphere_horizon_deg: dip,
            max_distance_m: reach_m,
            from_terrain: true,
        })
    }

    /// The nodes near the point one by one, then the pyramid's rings until they hold the
    /// reach, each block opened only where it could raise the skyline found so far.
    fn sweep_rings(&mut self, eye: &Eye) {
        let patch = self.patch;
        let centre = [eye.x0, eye.y0].map(|v| ((v + patch.half_m) / patch.cell_m).round() as i64);
        let near_posts = match eye.reach_m <= ALL_NODES_UP_TO_POSTS * patch.cell_m {
            true => self.near_posts.max(ALL_NODES_UP_TO_POSTS as i64),
            false => self.near_posts,
        };
        let plan = rings(centre, near_posts, eye.reach_square(patch));
        let (_, near, _) = plan[0];
        let (spans, read) = (&mut self.spans, &mut self.read);
        *read = 0;
        for_ring(near, Square::EMPTY, |i, j| {
            *read += 1;
            if let Some((k0, k1, tan_e)) = eye.node(patch, i, j) {
                spans.raise(k0, k1, tan_e);
            }
        });
        self.sky.clear();
        self.sky.extend(self.spans.finish());
        let top = plan.last().map_or(0, |r| r.0);
        self.pyramid.build_to(patch, top);
        let mut far = Far {
            patch,
            eye,
            pyramid: &self.pyramid,
            sky: &mut self.sky,
            read: 0,
        };
        for &(level, region, hole) in &plan[1..] {
            for_ring(region, hole, |bi, bj| far.open(level, bi, bj));
        }
        self.read += far.read;
    }
}

/// The pyramid read beyond the near square: blocks are opened (their four blocks of the level
/// below, down to the nodes) only where their bound exceeds the skyline found so far.
struct Far<'s> {
    patch: &'s Patch,
    eye: &'s Eye,
    pyramid: &'s Pyramid,
    /// The tangent of the skyline so far in each sector.
    sky: &'s mut Vec<f64>,
    /// Nodes and blocks read.
    read: usize,
}

impl Far<'_> {
    /// Block (bi, bj) of pyramid level `level` >= 1: skipped when its bound raises no sector
    /// of its run; otherwise its highest node first (the most likely to raise the skyline
    /// enough to skip the rest), then its nodes one by one (blocks of up to 4 x 4 posts) or
    /// its four blocks of the level below.
    fn open(&mut self, level: usize, bi: usize, bj: usize) {
        let (patch, eye) = (self.patch, self.eye);
        let blocks = self.pyramid.level(level);
        let k = bj * blocks.n + bi;
        let h = blocks.heights_m[k];
        if h == f64::NEG_INFINITY {
            return;
        }
        self.read += 1;
        let b = 1usize << level;
        let Some((k0, k1, tan_e)) = eye.block(patch, h, [bi * b, bj * b], b) else {
            return;
        };
        if !self.raises(k0, k1, tan_e) {
            return;
        }
        let [i, j] = blocks.highest[k];
        self.raise(eye.node_at(patch, h, i as usize, j as usize));
        if !self.raises(k0, k1, tan_e) {
            return;
        }
        if level <= 2 {
            for j in bj * b..(bj * b + b).min(patch.n) {
                for i in bi * b..(bi * b + b).min(patch.n) {
                    self.node(i, j);
                }
            }
        } else {
            let below = self.pyramid.level(level - 1).n;
            for cj in 2 * bj..(2 * bj + 2).min(below) {
                for ci in 2 * bi..(2 * bi + 2).min(below) {
                    self.open(level - 1, ci, cj);
                }
            }
        }
    }

    /// Lattice node (i, j), as it is.
    fn node(&mut self, i: usize, j: usize) {
        let h = self.patch.heights_m[j * self.patch.n + i];
        self.raise(self.eye.node_at(self.patch, h, i, j));
    }

    /// Raise sectors k0..=k1 to at least `tan_e`.
    fn raise(&mut self, run: Option<(i64, i64, f64)>) {
        self.read += 1;
        if let Some((k0, k1, tan_e)) = run {
            let (head, tail) = self.run(k0, k1);
            let (first, rest) = self.sky.split_at_mut(head.start);
            for v in rest[..head.len()].iter_mut().chain(&mut first[..tail]) {
                if *v < tan_e {
                    *v = tan_e;
                }
            }
        }
    }

    /// Whether `tan_e` is above the skyline so far in any of sectors k0..=k1.
    fn raises(&self, k0: i64, k1: i64, tan_e: f64) -> bool {
        let (head, tail) = self.run(k0, k1);
        let below = |s: &[f64]| s.iter().any(|&v| v < tan_e);
        below(&self.sky[head]) || below(&self.sky[..tail])
    }

    /// The sectors k0..=k1 taken round the circle, each once: a range up to the last sector
    /// and the count taken again from the first.
    fn run(&self, k0: i64, k1: i64) -> (std::ops::Range<usize>, usize) {
        let n = self.sky.len();
        let len = (k1 - k0 + 1).clamp(1, n as i64) as usize;
        let start = visibility::horizon::wrap_sector(k0, n as i64) as usize;
        let wrap = (start + len).saturating_sub(n);
        (start..start + len - wrap, wrap)
    }
}

/// The point a skyline is seen from, and its sectors.
struct Eye {
    x0: f64,
    y0: f64,
    radius_m: f64,
    /// R + h_s.
    eye_radius_m: f64,
    reach_m: f64,
    reach2: f64,
    cell_m: f64,
    /// Sectors per radian, and the sector count.
    per_rad: f64,
    n: f64,
    /// 1 / R.
    per_radius: f64,
}

impl Eye {
    fn new(patch: &Patch, (x0, y0): (f64, f64), hs: f64, reach_m: f64, sectors: usize) -> Eye {
        let r = patch.frame.radius_m;
        Eye {
            x0,
            y0,
            radius_m: r,
            eye_radius_m: r + hs,
            reach_m,
            reach2: reach_m * reach_m,
            cell_m: patch.cell_m,
            per_rad: sectors as f64 / std::f64::consts::TAU,
            n: sectors as f64,
            per_radius: 1.0 / r,
        }
    }

    /// The tangent of the elevation of ground at height `h` a distance `d` away.
    fn tan_elevation(&self, h: f64, d: f64) -> f64 {
        let r = self.radius_m;
        // sin and cos of g = d / R by their series: g stays under 0.005 rad within the
        // 8 km reach, where the next terms are below 1e-13 of the first. (Products, not
        // quotients: a division costs several multiplications.)
        let g = d * self.per_radius;
        let g2 = g * g;
        let sg = g * (1.0 - g2 * (1.0 / 6.0));
        let cg = 1.0 - g2 * (0.5 - g2 * (1.0 / 24.0));
        ((r + h) * cg - self.eye_radius_m) / ((r + h) * sg)
    }

    /// The sectors and the tangent lattice node (i, j) raises, as it is: in every sector its
    /// post-wide footprint overlaps. `None` without a height, beyond the reach, or under half a
    /// post from the point.
    fn node(&self, patch: &Patch, i: usize, j: usize) -> Option<(i64, i64, f64)> {
        self.node_at(patch, patch.heights_m[j * patch.n + i], i, j)
    }

    /// As [`Eye::node`], given the node's height `h`.
    fn node_at(&self, patch: &Patch, h: f64, i: usize, j: usize) -> Option<(i64, i64, f64)> {
        let (x, y) = patch.node_xy(i, j);
        let (dx, dy) = (x - self.x0, y - self.y0);
        let d2 = dx * dx + dy * dy;
        let c = self.cell_m;
        if !h.is_finite() || d2 > self.reach2 || d2 < 0.25 * c * c {
            return None;
        }
        let d = d2.sqrt();
        let tan_e = self.tan_elevation(h, d);
        // The footprint's half-width 0.5 c / d is above atan(0.5 c / d): a little wider,
        // so still an upper bound.
        let az = atan2_approx(dx, dy);
        let half = 0.5 * c / d + AZIMUTH_ERROR_RAD;
        let (k0, k1) = self.sector_run(az - half, az + half);
        Some((k0, k1, tan_e))
    }

    /// The largest tangent of the elevation of ground at height `h` anywhere from `d_min` to
    /// `d_max` away (the module's argument): with k = (R + h_s) / (R + h) it rises while
    /// k cos g > 1 and falls after, peaking at -sqrt(k^2 - 1) where cos g = 1 / k.
    fn highest_tan(&self, h: f64, d_min: f64, d_max: f64) -> f64 {
        let k = self.eye_radius_m / (self.radius_m + h);
        let cos_at = |d: f64| {
            let g = d * self.per_radius;
            let g2 = g * g;
            1.0 - g2 * (0.5 - g2 * (1.0 / 24.0))
        };
        let t = if k * cos_at(d_min) <= 1.0 {
            self.tan_elevation(h, d_min)
        } else if k * cos_at(d_max) >= 1.0 {
            self.tan_elevation(h, d_max)
        } else {
            -(k * k - 1.0).sqrt()
        };
        t + 1e-12 * (1.0 + t.abs())
    }

    /// The sectors from azimuth `lo` to `hi` (radians, lo <= hi, within 2 pi of 0); indices
    /// offset by n to stay positive.
    fn sector_run(&self, lo: f64, hi: f64) -> (i64, i64) {
        let (per_rad, n) = (self.per_rad, self.n);
        let k0 = (lo * per_rad + 0.5 + n) as i64 - n as i64;
        let k1 = (hi * per_rad + 0.5 + n) as i64 - n as i64;
        (k0, k1)
    }

    /// The sectors and the tangent a pyramid block at height `h` raises: the block holds
    /// the nodes from `first` (lattice indices) on, `b` posts a side (fewer at the lattice's
    /// edge). `None` when all of it lies beyond the reach.
    fn block(&self, patch: &Patch, h: f64, first: [usize; 2], b: usize) -> Option<(i64, i64, f64)> {
        let last = patch.n - 1;
        let (x_lo, y_lo) = patch.node_xy(first[0], first[1]);
        let (x_hi, y_hi) =
            patch.node_xy((first[0] + b - 1).min(last), (first[1] + b - 1).min(last));
        let (xs, ys) = (
            [x_lo - self.x0, x_hi - self.x0],
            [y_lo - self.y0, y_hi - self.y0],
        );
        let nearest = |s: [f64; 2]| s[0].max(-s[1]).max(0.0);
        let farthest = |s: [f64; 2]| s[0].abs().max(s[1].abs());
        let d_min = norm(nearest(xs), nearest(ys));
        if d_min > self.reach_m {
            return None;
        }
        let d_max = norm(farthest(xs), farthest(ys));
        let tan_e = self.highest_tan(h, d_min, d_max);
        // Every node lies within the half-diagonal rb of the block's centre, a distance dc
        // away: its azimuth within asin(rb / dc) <= rb / sqrt(dc^2 - rb^2) of the centre's.
        let (xc, yc) = (0.5 * (xs[0] + xs[1]), 0.5 * (ys[0] + ys[1]));
        let rb2 = 0.25 * ((x_hi - x_lo).powi(2) + (y_hi - y_lo).powi(2));
        let dc2 = xc * xc + yc * yc;
        let spread = match dc2 > rb2 {
            true => rb2.sqrt() / (dc2 - rb2).sqrt(),
            false => std::f64::consts::PI,
        };
        let az = atan2_approx(xc, yc);
        let half = spread + 0.5 * self.cell_m / d_min + 3.0 * AZIMUTH_ERROR_RAD;
        let (k0, k1) = self.sector_run(az - half, az + half);
        Some((k0, k1, tan_e))
    }

    /// The lattice nodes within the reach's square.
    fn reach_square(&self, patch: &Patch) -> Square {
        let c = patch.cell_m;
        let last = patch.n as i64 - 1;
        let span = |v: f64| {
            let lo = ((v - self.reach_m + patch.half_m) / c).floor().max(0.0) as i64;
            let hi = (((v + self.reach_m + patch.half_m) / c).ceil() as i64).min(last);
            (lo, hi)
        };
        let ((xl, xh), (yl, yh)) = (span(self.x0), span(self.y0));
        Square {
            lo: [xl, yl],
            hi: [xh, yh],
        }
    }
}

/// sqrt(x^2 + y^2) without the overflow care of `hypot` (lattice offsets are small).
fn norm(x: f64, y: f64) -> f64 {
    (x * x + y * y).sqrt()
}

/// A square of lattice nodes or pyramid blocks, bounds inclusive, [x, y].
#[derive(Clone, Copy, Debug, PartialEq)]
struct Square {
    lo: [i64; 2],
    hi: [i64; 2],
}

impl Square {
    const EMPTY: Square = Square {
        lo: [0, 0],
        hi: [-1, -1],
    };

    fn round(centre: [i64; 2], r: i64) -> Square {
        Square {
            lo: centre.map(|c| c - r),
            hi: centre.map(|c| c + r),
        }
    }

    /// Grown to whole blocks of the next level: even low bounds, odd high ones.
    fn aligned(self) -> Square {
        Square {
            lo: self.lo.map(|v| v - v.rem_euclid(2)),
            hi: self.hi.map(|v| v | 1),
        }
    }

    /// The blocks of the next level an aligned square is made of.
    fn halved(self) -> Square {
        Square {
            lo: self.lo.map(|v| v.div_euclid(2)),
            hi: self.hi.map(|v| v.div_euclid(2)),
        }
    }

    fn grown(self, by: i64) -> Square {
        Square {
            lo: self.lo.map(|v| v - by),
            hi: self.hi.map(|v| v + by),
        }
    }

    fn clip(self, other: &Square) -> Square {
        Square {
            lo: [0, 1].map(|a| self.lo[a].max(other.lo[a])),
            hi: [0, 1].map(|a| self.hi[a].min(other.hi[a])),
        }
    }

    /// The blocks of level `level` that meet this square of nodes.
    fn blocks(self, level: usize) -> Square {
        Square {
            lo: self.lo.map(|v| v >> level),
            hi: self.hi.map(|v| v >> level),
        }
    }

    /// Whether this square of level-`level` blocks covers the square of nodes `nodes`.
    fn holds(&self, nodes: &Square, level: usize) -> bool {
        (0..2).all(|a| {
            self.lo[a] << level <= nodes.lo[a] && ((self.hi[a] + 1) << level) > nodes.hi[a]
        })
    }
}

/// What a skyline reads round the lattice node `centre`: (level, region, hole), the blocks of
/// that pyramid level (0: the nodes) in the region and outside the hole, clipped to the
/// square of nodes `reach`. The level-0 square reaches `near_posts` from the centre; each
/// level's square is made of whole blocks of the next, whose ring starts at it and is
/// `near_posts / 2` blocks wide; the rings stop once they hold `reach`.
fn rings(centre: [i64; 2], near_posts: i64, reach: Square) -> Vec<(usize, Square, Square)> {
    let mut region = Square::round(centre, near_posts).aligned();
    let mut out = vec![(0, region.clip(&reach), Square::EMPTY)];
    let mut level = 0;
    while !region.holds(&reach, level) {
        let hole = region.halved();
        level += 1;
        region = hole.grown(near_posts / 2).aligned();
        out.push((level, region.clip(&reach.blocks(level)), hole));
    }
    out
}

/// Every (i, j) of `region` outside `hole`, row by row (none when either bound is crossed).
fn for_ring(region: Square, hole: Square, mut f: impl FnMut(usize, usize)) {
    for j in region.lo[1]..=region.hi[1] {
        let in_hole_row = (hole.lo[1]..=hole.hi[1]).contains(&j);
        let runs = if in_hole_row {
            [
                (region.lo[0], region.hi[0].min(hole.lo[0] - 1)),
                (region.lo[0].max(hole.hi[0] + 1), region.hi[0]),
            ]
        } else {
            [(region.lo[0], region.hi[0]), (0, -1)]
        };
        for (a, b) in runs {
            for i in a..=b {
                f(i as usize, j as usize);
            }
        }
    }
}

/// Largest error of [`atan2_approx`], radians (with room).
pub const AZIMUTH_ERROR_RAD: f64 = 2e-5;

/// atan2(y, x) in (-pi, pi] from the minimax polynomial of Hastings (1955), as printed in
/// Abramowitz and Stegun 1964, eq. 4.4.49 (|error| <= 1e-5 on [-1, 1], from memory; the
/// crate's tests measure it), folded to the other octants.
pub fn atan2_approx(y: f64, x: f64) -> f64 {
    use std::f64::consts::{FRAC_PI_2, PI};
    let (ax, ay) = (x.abs(), y.abs());
    if ax == 0.0 && ay == 0.0 {
        return 0.0;
    }
    let (t, swap) = if ay <= ax {
        (ay / ax, false)
    } else {
        (ax / ay, true)
    };
    let t2 = t * t;
    let mut a = t
        * (0.999_866_0
            + t2 * (-0.330_299_5 + t2 * (0.180_141_0 + t2 * (-0.085_133_0 + t2 * 0.020_835_1))));
    if swap {
        a = FRAC_PI_2 - a;
    }
    if x < 0.0 {
        a = PI - a;
    }
    if y < 0.0 {
        -a
    } else {
        a
    }
}

#[cfg(test)]
mod atan_tests {
    #[test]
    fn atan2_approx_is_within_its_stated_error() {
        let mut worst: f64 = 0.0;
        for k in 0..100_000 {
            let a = k as f64 * std::f64::consts::TAU / 100_000.0 - std::f64::consts::PI + 1e-7;
            for r in [1e-3, 1.0, 7e5] {
                let (y, x) = (r * a.sin(), r * a.cos());
                worst = worst.max((super::atan2_approx(y, x) - y.atan2(x)).abs());
            }
        }
        assert!(worst < super::AZIMUTH_ERROR_RAD, "{worst}");
        assert!(
            worst > 1e-7,
            "an exact atan2 would not need the allowance: {worst}"
        );
    }
}
