//! The local horizon around a site: the skyline's elevation angle in azimuth sectors, from an
//! elevation grid, on a sphere.
//!
//! A terrain point at ground distance d and height h_t, seen from a site at height h_s, stands
//! at elevation atan2((R+h_t) cos g - (R+h_s), (R+h_t) sin g) with g = d/R: the exact form of
//! the usual (h_t - h_s - d^2/(2R)) / d, whose d^2/(2R) is the curvature drop. Past
//! `max_distance_m` a site sees only the sphere, whose horizon for a raised site is the dip
//! -acos(R/(R+h)) (0 at or below the datum).
//!
//! Sectors, not rays: what shields a site is the lowest the skyline gets over the azimuths a
//! source spans, and a ray misses any notch between two rays. For each sector the march takes,
//! at every distance step, the lowest height on the arc across the sector (the four pixels
//! round samples at most one pixel apart, so every pixel the arc crosses), and keeps the
//! highest elevation those lowest heights reach. As max over distance of min over azimuth
//! never exceeds min over azimuth of max over distance, the result is a lower bound of the
//! skyline anywhere in the sector: a notch of any width down to a pixel lowers it. The radial
//! steps (a pixel, growing to 1 % of the distance) can only miss a crest, which lowers the
//! bound too.
//!
//! Speed without changing a bit of the result: [`LazyHorizon`] marches a sector only when it
//! is first read; an arc stops being read once one of its heights is too low to top the skyline
//! found; a step is passed over when the block maxima round its span (`MaxPyramid`) show that
//! nothing its arc can read reaches that height; sector edges share their exact positions with
//! the neighbouring sector. `docs/visibility.md` gives the conditions.

use serde::{Deserialize, Serialize};
use std::collections::HashMap;
use terrain::geodesy::destination_sin_cos;
use terrain::ElevationGrid;

/// What a missing height (nodata, or beyond the grid window) on the way to the horizon means.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum NodataRule {
    /// The missing ground may be as low as anything: at a distance where any part of a
    /// sector's arc lacks data, that distance shields nothing in the sector. Missing data
    /// never adds shielding; a hole in a rim is judged as a notch.
    #[default]
    CountsAgainst,
    /// Missing heights are passed over: the lowest valid height on the arc stands for the
    /// whole arc (assumes a hole is no lower than the ground around it).
    Skip,
}

/// A grid prepared for repeated horizon queries: its height ceiling and pixel size, found once.
#[derive(Clone, Debug)]
pub struct HorizonTerrain<'a> {
    pub grid: &'a ElevationGrid,
    /// Highest valid height in the grid, m: lets a march stop when nothing further can rise
    /// above the skyline already found.
    pub height_max_m: f64,
    /// Ground step of the first radial samples, m (the smaller pixel side).
    pub pixel_m: f64,
    pub radius_m: f64,
    /// Block maxima of the heights, for the march to pass over ground too low to matter.
    peaks: MaxPyramid,
}

impl<'a> HorizonTerrain<'a> {
    /// `None` when the grid holds no data or its pixel size cannot be found.
    pub fn new(grid: &'a ElevationGrid) -> Option<Self> {
        let (_, hi) = grid.min_max()?;
        let (px, py) = grid.geometry.pixel_size_m()?;
        let pixel_m = px.min(py);
        (pixel_m.is_finite() && pixel_m > 0.0).then_some(HorizonTerrain {
            grid,
            height_max_m: hi as f64,
            pixel_m,
            radius_m: grid.geometry.body_radius_m,
            peaks: MaxPyramid::new(grid),
        })
    }
}

/// The highest valid height in 2^L x 2^L pixel blocks of a grid, L = 1, 2, ... up to one
/// block: an upper bound of the ground in any pixel box from a few reads.
#[derive(Clone)]
struct MaxPyramid {
    /// Level L - 1 holds the blocks of 2^L pixels: (blocks across, blocks down, maxima).
    levels: Vec<(usize, usize, Vec<f32>)>,
}

impl std::fmt::Debug for MaxPyramid {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "MaxPyramid({} levels)", self.levels.len())
    }
}

/// Blocks read at most by one [`MaxPyramid::max_in`] query (a coarser level covers the box
/// in fewer).
const PEAK_BLOCKS: isize = 16;

impl MaxPyramid {
    fn new(grid: &ElevationGrid) -> Self {
        Self::of(grid.width, grid.height, &grid.heights_m)
    }

    /// The pyramid of a `w` x `h` row-major field.
    fn of(w: usize, h: usize, v: &[f32]) -> Self {
        let mut levels = vec![halve(w, h, v)];
        while let Some((w, h, m)) = levels.last().filter(|(w, h, _)| *w > 1 || *h > 1) {
            let next = halve(*w, *h, m);
            levels.push(next);
        }
        MaxPyramid { levels }
    }

    /// The highest valid height over pixel columns `c.0..=c.1` and rows `r.0..=r.1` (clipped
    /// to the grid), or above it; -inf when the box holds no pixel or no data.
    fn max_in(&self, c: (isize, isize), r: (isize, isize)) -> f32 {
        let Some(&(w1, h1, _)) = self.levels.first() else {
            return f32::NEG_INFINITY;
        };
        let (c0, c1) = (c.0.max(0), c.1.min(2 * w1 as isize - 1));
        let (r0, r1) = (r.0.max(0), r.1.min(2 * h1 as isize - 1));
        if c0 > c1 || r0 > r1 {
            return f32::NEG_INFINITY;
        }
        for (i, (w, _, m)) in self.levels.iter().enumerate() {
            let l = i + 1;
            let (bc, br) = ((c0 >> l, c1 >> l), (r0 >> l, r1 >> l));
            if (bc.1 - bc.0 + 1) * (br.1 - br.0 + 1) <= PEAK_BLOCKS || i + 1 == self.levels.len() {
                let mut top = f32::NEG_INFINITY;
                for row in br.0..=br.1 {
                    let line = &m[row as usize * w..][..*w];
                    for &v in &line[bc.0 as usize..=(bc.1 as usize).min(w - 1)] {
                        top = top.max(v);
                    }
                }
                return top;
            }
        }
        f32::NEG_INFINITY
    }
}

/// Maxima over 2 x 2 blocks of a `w` x `h` row-major field (NaN is no data: passed over).
fn halve(w: usize, h: usize, v: &[f32]) -> (usize, usize, Vec<f32>) {
    let (w2, h2) = (w.div_ceil(2), h.div_ceil(2));
    let mut out = vec![f32::NEG_INFINITY; w2 * h2];
    for row in 0..h {
        let line = &v[row * w..][..w];
        let dst = &mut out[row / 2 * w2..][..w2];
        for (col, &x) in line.iter().enumerate() {
            dst[col / 2] = dst[col / 2].max(x);
        }
    }
    (w2, h2, out)
}

/// How to march a horizon: observer, reach, sectors and the nodata rule.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct HorizonSpec {
    /// Height of the instrument above the ground, m.
    pub observer_height_m: f64,
    /// Terrain farther than this is not examined, m.
    pub max_distance_m: f64,
    /// Number of equal azimuth sectors around the site (at least 4).
    pub sectors: usize,
    pub nodata: NodataRule,
}

/// The lowest skyline elevation in each of `n` equal azimuth sectors around a site.
#[derive(Clone, Debug, PartialEq)]
pub struct Horizon {
    /// Elevation, degrees, of sector `i`, which spans azimuths `(i - 1/2) w .. (i + 1/2) w`
    /// with `w = 360 / n` (clockwise from north): a lower bound of the skyline anywhere in the
    /// sector, never below the sphere's horizon.
    pub elevation_deg: Vec<f64>,
    /// Height of the observer above the reference sphere (terrain + mast), m; 0 without a grid.
    pub site_height_m: f64,
    /// Horizon of the bare sphere for this observer, degrees (dip, <= 0).
    pub sphere_horizon_deg: f64,
    /// Terrain farther than this was not examined, m.
    pub max_distance_m: f64,
    /// Whether the grid supplied any terrain (false: sphere only).
    pub from_terrain: bool,
}

/// Dip of the bare sphere's horizon for an observer `height_m` above it, degrees.
pub fn sphere_dip_deg(radius_m: f64, height_m: f64) -> f64 {
    if height_m > 0.0 {
        -(radius_m / (radius_m + height_m))
            .clamp(-1.0, 1.0)
            .acos()
            .to_degrees()
    } else {
        0.0
    }
}

/// Growth of the radial step with distance: samples every 1 % of the distance once that exceeds
/// a pixel. A crest narrower than that in range can be missed, which only lowers the skyline.
const STEP_FRACTION: f64 = 0.01;

impl Horizon {
    /// March `n_sectors` sectors from (lon, lat) out to `max_distance_m`, missing data counting
    /// against the site.
    pub fn compute(
        lon_deg: f64,
        lat_deg: f64,
        terrain: Option<&HorizonTerrain>,
        observer_height_m: f64,
        max_distance_m: f64,
        n_sectors: usize,
    ) -> Horizon {
        let spec = HorizonSpec {
            observer_height_m,
            max_distance_m,
            sectors: n_sectors,
            nodata: NodataRule::default(),
        };
        Self::compute_sectors(lon_deg, lat_deg, terrain, &spec, None)
    }

    /// March the sectors whose `wanted[i]` is true (all with `None`); the others hold the
    /// sphere's horizon, a lower bound too. The Earth margin needs only the sectors the
    /// Earth's disc can reach, often a small part of the circle.
    pub fn compute_sectors(
        lon_deg: f64,
        lat_deg: f64,
        terrain: Option<&HorizonTerrain>,
        spec: &HorizonSpec,
        wanted: Option<&[bool]>,
    ) -> Horizon {
        let mut lazy = LazyHorizon::new(lon_deg, lat_deg, terrain, spec, wanted);
        let elevation_deg = (0..lazy.sectors()).map(|i| lazy.sector_deg(i)).collect();
        Horizon {
            elevation_deg,
            site_height_m: lazy.site_height_m,
            sphere_horizon_deg: lazy.sphere_horizon_deg,
            max_distance_m: lazy.max_distance_m,
            from_terrain: lazy.from_terrain,
        }
    }

    /// Width of one sector, degrees.
    pub fn sector_width_deg(&self) -> f64 {
        360.0 / self.elevation_deg.len().max(1) as f64
    }

    /// The sector holding an azimuth.
    pub fn sector_of(&self, azimuth_deg: f64) -> usize {
        let n = self.elevation_deg.len().max(1) as i64;
        wrap_sector(floor_i64(azimuth_deg / self.sector_width_deg() + 0.5), n) as usize
    }

    /// The skyline bound of the sector holding an azimuth, degrees.
    pub fn at(&self, azimuth_deg: f64) -> f64 {
        self.elevation_deg[self.sector_of(azimuth_deg)]
    }

    /// The lowest skyline bound over every sector that meets the azimuth range `from..=to`
    /// (degrees, `from <= to`, either may lie outside 0..360), degrees.
    pub fn lowest_between(&self, from_deg: f64, to_deg: f64) -> f64 {
        lowest_over(self.elevation_deg.len(), from_deg, to_deg, |i| {
            self.elevation_deg[i]
        })
    }

    /// (sector centre azimuth, elevation) pairs in degrees, for tables and polar plots.
    pub fn pairs(&self) -> Vec<(f64, f64)> {
        let w = self.sector_width_deg();
        self.elevation_deg
            .iter()
            .enumerate()
            .map(|(i, &e)| (i as f64 * w, e))
            .collect()
    }
}

/// The lowest of `value(i)` over the sectors of a circle of `n` that meet the azimuth range
/// `from..=to` (degrees, `from <= to`); a range that cannot be read (NaN) or spans the circle
/// is the whole circle.
fn lowest_over(n: usize, from_deg: f64, to_deg: f64, mut value: impl FnMut(usize) -> f64) -> f64 {
    let w = 360.0 / n.max(1) as f64;
    let span = to_deg - from_deg;
    if span.is_nan() || span >= 360.0 - w {
        return (0..n).map(value).fold(f64::INFINITY, f64::min);
    }
    let k0 = floor_i64(from_deg / w + 0.5);
    let k1 = floor_i64(to_deg / w + 0.5);
    (k0..=k1)
        .map(|k| value(wrap_sector(k, n as i64) as usize))
        .fold(f64::INFINITY, f64::min)
}

/// `k.rem_euclid(n)`, with a comparison instead of a division for the sector indices of a
/// circle of `n` sectors, which mostly lie within one turn either side of it.
#[inline]
pub fn wrap_sector(k: i64, n: i64) -> i64 {
    if (0..n).contains(&k) {
        k
    } else if (-n..0).contains(&k) {
        k + n
    } else if (n..2 * n).contains(&k) {
        k - n
    } else {
        k.rem_euclid(n)
    }
}

/// A site's horizon whose sectors are marched only when first read, each at most once: sector
/// for sector the values of [`Horizon::compute_sectors`] with the same arguments, for callers
/// that read few sectors (the Earth margin reads only those its worst discs span).
pub struct LazyHorizon<'a> {
    /// Height of the observer above the reference sphere (terrain + mast), m; 0 without a grid.
    pub site_height_m: f64,
    /// Horizon of the bare sphere for this observer, degrees (dip, <= 0): no sector is lower.
    pub sphere_horizon_deg: f64,
    /// Terrain farther than this is not examined, m.
    pub max_distance_m: f64,
    /// Whether the grid supplied any terrain (false: sphere only).
    pub from_terrain: bool,
    march: Option<March<'a>>,
    wanted: Option<Vec<bool>>,
    memo: Vec<Option<f64>>,
    /// Exact positions along the sector edges marched so far, by the azimuth's bits.
    edges: HashMap<u64, EdgeMemo>,
}

impl<'a> LazyHorizon<'a> {
    /// The horizon of [`Horizon::compute_sectors`], nothing marched yet.
    pub fn new(
        lon_deg: f64,
        lat_deg: f64,
        terrain: Option<&'a HorizonTerrain<'a>>,
        spec: &HorizonSpec,
        wanted: Option<&[bool]>,
    ) -> Self {
        let n = spec.sectors.max(4);
        let ground = terrain.and_then(|t| t.grid.sample_lonlat(lon_deg, lat_deg).map(|h| (t, h)));
        let (site_height_m, radius_m) = match ground {
            Some((t, ground_m)) => (ground_m + spec.observer_height_m, t.radius_m),
            None => (
                spec.observer_height_m.max(0.0),
                terrain.map_or(terrain::MOON_RADIUS_M, |t| t.radius_m),
            ),
        };
        let march = ground.map(|(t, _)| March {
            t,
            steps: Steps::new(t.pixel_m, t.radius_m, spec.max_distance_m),
            site: SiteTrig::new((lon_deg, lat_deg)),
            hs: site_height_m,
            nodata: spec.nodata,
        });
        LazyHorizon {
            site_height_m,
            sphere_horizon_deg: sphere_dip_deg(radius_m, site_height_m),
            max_distance_m: spec.max_distance_m,
            from_terrain: march.is_some(),
            march,
            wanted: wanted.map(<[bool]>::to_vec),
            memo: vec![None; n],
            edges: HashMap::new(),
        }
    }

    /// How many sectors have been read so far (each marched once, or set to the sphere's
    /// horizon when not wanted).
    pub fn sectors_read(&self) -> usize {
        self.memo.iter().filter(|m| m.is_some()).count()
    }

    /// Number of sectors.
    pub fn sectors(&self) -> usize {
        self.memo.len()
    }

    /// Sector `i`'s skyline bound, degrees, marched on first reading.
    pub fn sector_deg(&mut self, i: usize) -> f64 {
        if let Some(e) = self.memo[i] {
            return e;
        }
        let e = self.march_sector(i);
        self.memo[i] = Some(e);
        e
    }

    fn march_sector(&mut self, i: usize) -> f64 {
        let dip = self.sphere_horizon_deg;
        let unwanted = self
            .wanted
            .as_ref()
            .is_some_and(|wt| !wt.get(i).copied().unwrap_or(true));
        let w = 360.0 / self.sectors() as f64;
        let centre = i as f64 * w;
        let edges = (centre - w / 2.0, centre + w / 2.0);
        let Some(march) = self.march.as_ref().filter(|_| !unwanted) else {
            return dip;
        };
        let mut memo0 = self.edges.remove(&edges.0.to_bits()).unwrap_or_default();
        let mut memo1 = self.edges.remove(&edges.1.to_bits()).unwrap_or_default();
        let e = march.sector_elevation_deg(edges, &mut memo0, &mut memo1);
        self.edges.insert(edges.0.to_bits(), memo0);
        self.edges.insert(edges.1.to_bits(), memo1);
        e.max(dip)
    }

    /// [`Horizon::lowest_between`], marching only the sectors it reads.
    pub fn lowest_between(&mut self, from_deg: f64, to_deg: f64) -> f64 {
        lowest_over(self.sectors(), from_deg, to_deg, |i| self.sector_deg(i))
    }
}

/// The radial sample distances with sin/cos of their central angles, shared by every sector
/// of a site.
struct Steps {
    d_m: Vec<f64>,
    sin_g: Vec<f64>,
    cos_g: Vec<f64>,
}

impl Steps {
    fn new(pixel_m: f64, radius_m: f64, max_distance_m: f64) -> Steps {
        let mut d_m = Vec::new();
        let mut d = pixel_m;
        while d <= max_distance_m {
            d_m.push(d);
            d += pixel_m.max(STEP_FRACTION * d);
        }
        let (sin_g, cos_g) = d_m.iter().map(|&d| (d / radius_m).sin_cos()).unzip();
        Steps { d_m, sin_g, cos_g }
    }
}

/// Exact positions (great-circle `destination`, then the grid's projection) are computed every
/// this many samples along a sector's edge and the pixel position interpolated linearly
/// between: over such a span (at most 8 % of the distance) the path's image in any of our
/// projections is straight to far below a pixel, and it saves most of the trigonometry.
const EXACT_EVERY: usize = 8;

type Px = (f64, f64);

/// Sine and cosine of an angle.
type SinCos = (f64, f64);

/// A site's longitude in radians and the sine and cosine of its latitude.
#[derive(Clone, Copy)]
struct SiteTrig {
    lon_rad: f64,
    lat: SinCos,
}

impl SiteTrig {
    fn new((lon_deg, lat_deg): (f64, f64)) -> Self {
        let p1 = lat_deg.to_radians();
        SiteTrig {
            lon_rad: lon_deg.to_radians(),
            lat: (p1.sin(), p1.cos()),
        }
    }
}

/// Window pixel position of the point at step `j` along an azimuth (its sine and cosine).
fn window_pixel(m: &March, azimuth: SinCos, j: usize) -> Option<Px> {
    let (t, step) = (m.t, (m.steps.sin_g[j], m.steps.cos_g[j]));
    let (lon, lat) = destination_sin_cos(m.site.lon_rad, m.site.lat, step, azimuth);
    let (col, row) = t.grid.geometry.lonlat_to_pixel(lon, lat)?;
    Some((
        col - 0.5 - t.grid.col0 as f64,
        row - 0.5 - t.grid.row0 as f64,
    ))
}

/// The exact positions found so far along one edge azimuth, by span end (steps that are
/// multiples of `EXACT_EVERY`, then the last step): two neighbouring sectors share an edge.
type EdgeMemo = Vec<Option<Option<Px>>>;

/// Window pixel positions along one sector edge, step by step, from exact positions every
/// `EXACT_EVERY` steps.
struct Edge<'m> {
    m: &'m March<'m>,
    azimuth: SinCos,
    memo: &'m mut EdgeMemo,
    /// The current span: its first step and the positions at both of its ends.
    span: Option<(usize, Option<Px>, Option<Px>)>,
}

impl<'m> Edge<'m> {
    fn new(m: &'m March<'m>, azimuth_deg: f64, memo: &'m mut EdgeMemo) -> Self {
        memo.resize(m.steps.d_m.len() / EXACT_EVERY + 2, None);
        Edge {
            m,
            azimuth: azimuth_deg.to_radians().sin_cos(),
            memo,
            span: None,
        }
    }

    fn exact(&self, j: usize) -> Option<Px> {
        window_pixel(self.m, self.azimuth, j)
    }

    /// The exact position at span end `k`, from the memo when known.
    fn span_end(&mut self, k: usize) -> Option<Px> {
        let slot = k / EXACT_EVERY + usize::from(k % EXACT_EVERY != 0);
        if let Some(p) = self.memo[slot] {
            return p;
        }
        let p = self.exact(k);
        self.memo[slot] = Some(p);
        p
    }

    /// The span holding step `j`: its first step and the exact positions at both its ends.
    fn span_of(&mut self, j: usize) -> (usize, Option<Px>, Option<Px>) {
        let k0 = j / EXACT_EVERY * EXACT_EVERY;
        let k1 = (k0 + EXACT_EVERY).min(self.m.steps.d_m.len() - 1);
        match self.span {
            Some(span) if span.0 == k0 => span,
            _ => {
                let span = (k0, self.span_end(k0), self.span_end(k1));
                self.span = Some(span);
                span
            }
        }
    }

    /// Both ends of the span holding step `j` when every position inside it is interpolated
    /// between them (no wrap seam crossed, none missing).
    fn interpolated_span(&mut self, j: usize) -> Option<(Px, Px)> {
        let (_, a, b) = self.span_of(j);
        let (a, b) = (a?, b?);
        self.no_seam(a, b).then_some((a, b))
    }

    /// A jump of half the window means the path crossed a wrap seam: no interpolation.
    fn no_seam(&self, a: Px, b: Px) -> bool {
        let (w, h) = (self.m.t.grid.width as f64, self.m.t.grid.height as f64);
        (b.0 - a.0).abs() < w / 2.0 && (b.1 - a.1).abs() < h / 2.0
    }

    fn at(&mut self, j: usize) -> Option<Px> {
        let (k0, a, b) = self.span_of(j);
        if j == k0 {
            return a;
        }
        match (a, b) {
            (Some(a), Some(b)) if self.no_seam(a, b) => {
                let d = &self.m.steps.d_m;
                let k1 = (k0 + EXACT_EVERY).min(d.len() - 1);
                let f = (d[j] - d[k0]) / (d[k1] - d[k0]);
                Some((a.0 + f * (b.0 - a.0), a.1 + f * (b.1 - a.1)))
            }
            _ => self.exact(j),
        }
    }
}

/// Slack, in pixels, for the rounding of interpolated positions when a whole span is judged
/// from its ends.
const SPAN_SLACK_PX: f64 = 1e-6;

impl March<'_> {
    /// An upper bound of every height the arcs of the span holding step `j` can read, when
    /// each of those arcs is certain to be a straight chord between the edges with its first
    /// sample inside the window (so it is never [`Arc::Outside`]); +inf otherwise.
    fn span_peak_m(&self, lo: &mut Edge, hi: &mut Edge, j: usize, (az0, az1): (f64, f64)) -> f32 {
        let (Some((a0, a1)), Some((b0, b1))) = (lo.interpolated_span(j), hi.interpolated_span(j))
        else {
            return f32::INFINITY;
        };
        let corners = [a0, a1, b0, b1];
        if corners
            .iter()
            .any(|p| !(p.0.is_finite() && p.1.is_finite()))
        {
            return f32::INFINITY;
        }
        // Each arc's chord joins points between a0..a1 and b0..b1 at the same fraction: no
        // longer than the longer end chord, while the allowed length grows with distance.
        let k0 = j / EXACT_EVERY * EXACT_EVERY;
        let expect_px = self.steps.d_m[k0] * (az1 - az0).to_radians() / self.t.pixel_m;
        let chord = |a: Px, b: Px| (b.0 - a.0).abs().max((b.1 - a.1).abs());
        let straight = chord(a0, b0).max(chord(a1, b1)) + SPAN_SLACK_PX <= 4.0 * expect_px + 8.0;
        let (w, h) = (self.t.grid.width as f64, self.t.grid.height as f64);
        let e = -1.0 + SPAN_SLACK_PX;
        let inside =
            |p: Px| p.0 >= e && p.1 >= e && p.0 <= w - SPAN_SLACK_PX && p.1 <= h - SPAN_SLACK_PX;
        if !(straight && inside(a0) && inside(a1)) {
            return f32::INFINITY;
        }
        // Every sample lies in the corners' hull; it reads its pixel and the next ones.
        let (mut c, mut r) = (
            (f64::INFINITY, f64::NEG_INFINITY),
            (f64::INFINITY, f64::NEG_INFINITY),
        );
        for p in corners {
            c = (c.0.min(p.0), c.1.max(p.0));
            r = (r.0.min(p.1), r.1.max(p.1));
        }
        self.t.peaks.max_in(
            (floor_px(c.0) - 1, floor_px(c.1) + 2),
            (floor_px(r.0) - 1, floor_px(r.1) + 2),
        )
    }
}

/// The lowest height on one arc across a sector.
enum Arc {
    Height(f64),
    /// Some (counts against) or all (skip) of the arc has no data: this distance shields nothing.
    Missing,
    /// Part of the arc is already too low to raise the skyline found so far: whatever its
    /// lowest height, this distance changes nothing.
    Below,
    /// The whole arc is outside the window: so is everything farther.
    Outside,
}

/// One site's march: shared by all its sectors.
struct March<'a> {
    t: &'a HorizonTerrain<'a>,
    steps: Steps,
    site: SiteTrig,
    hs: f64,
    nodata: NodataRule,
}

impl March<'_> {
    /// Lower bound of the skyline over azimuths `az0..az1`, degrees (-inf: none above the
    /// sphere's horizon found).
    /// `memo0` and `memo1` keep the exact positions along the two edges for the neighbours.
    fn sector_elevation_deg(
        &self,
        (az0, az1): (f64, f64),
        memo0: &mut EdgeMemo,
        memo1: &mut EdgeMemo,
    ) -> f64 {
        let (t, r, hs) = (self.t, self.t.radius_m, self.hs);
        if t.height_max_m <= hs || self.steps.d_m.is_empty() {
            // No terrain rises to the observer: the sphere's dip is the skyline.
            return f64::NEG_INFINITY;
        }
        let (mut lo, mut hi) = (Edge::new(self, az0, memo0), Edge::new(self, az1, memo1));
        let mut best_tan = f64::NEG_INFINITY;
        let mut peak: Option<(usize, f32)> = None;
        for j in 0..self.steps.d_m.len() {
            let (sg, cg) = (self.steps.sin_g[j], self.steps.cos_g[j]);
            // The highest terrain in the grid, placed here, would stand at this elevation; with
            // h_max > h_s that bound falls with distance, so once it is below the skyline found
            // so far no farther point can matter.
            let ceiling_tan = ((r + t.height_max_m) * cg - (r + hs)) / ((r + t.height_max_m) * sg);
            if ceiling_tan <= best_tan {
                break;
            }
            let below_m = height_at_tan(best_tan, r, hs, sg, cg) - SETTLE_MARGIN_M;
            // Nothing in reach of this span's arcs can raise the skyline: skip the step.
            let k0 = j / EXACT_EVERY;
            let span_peak = match peak {
                Some((k, p)) if k == k0 => p,
                _ => {
                    let p = self.span_peak_m(&mut lo, &mut hi, j, (az0, az1));
                    peak = Some((k0, p));
                    p
                }
            };
            if (span_peak as f64) < below_m {
                continue;
            }
            match self.arc_min_height(j, lo.at(j), hi.at(j), (az0, az1), below_m) {
                Arc::Height(ht) => {
                    let tan_e = ((r + ht) * cg - (r + hs)) / ((r + ht) * sg);
                    best_tan = best_tan.max(tan_e);
                }
                Arc::Missing | Arc::Below => {}
                // Over a few hundred km a path does not come back into the window.
                Arc::Outside => break,
            }
        }
        if best_tan.is_finite() {
            best_tan.atan().to_degrees()
        } else {
            f64::NEG_INFINITY
        }
    }

    /// The lowest height on the arc at step `j` between the sector's edges `a` and `b`, or
    /// [`Arc::Below`] once a height under `below_m` is met.
    fn arc_min_height(
        &self,
        j: usize,
        a: Option<Px>,
        b: Option<Px>,
        (az0, az1): (f64, f64),
        below_m: f64,
    ) -> Arc {
        let d = self.steps.d_m[j];
        // Pixels the arc can cross at most (the pixel size is the smaller side at the window's
        // centre, so this is generous); a longer straight segment crossed a wrap seam.
        let expect_px = d * (az1 - az0).to_radians() / self.t.pixel_m;
        let straight = match (a, b) {
            (Some(a), Some(b)) => {
                let len = (b.0 - a.0).abs().max((b.1 - a.1).abs());
                (len <= 4.0 * expect_px + 8.0).then_some((a, b, len))
            }
            _ => None,
        };
        let mut acc = ArcMin::new(self.nodata, below_m);
        match straight {
            Some((a, b, len)) => {
                // The arc's sagitta over a sector is d (1 - cos(w/2)): metres at most, far below
                // a pixel, so the chord stands for the arc.
                // ceil(len) (len is finite and >= 0 here), without a libm call.
                let n = (-floor_i64(-len)).max(1) as usize;
                for k in 0..=n {
                    let f = k as f64 / n as f64;
                    if !acc.add(self.t.grid, (a.0 + f * (b.0 - a.0), a.1 + f * (b.1 - a.1))) {
                        break;
                    }
                }
            }
            None => {
                let n = (2.0 * expect_px).ceil().max(1.0) as usize;
                for k in 0..=n {
                    let az = az0 + (az1 - az0) * k as f64 / n as f64;
                    let p = window_pixel(self, az.to_radians().sin_cos(), j);
                    if !acc.add_opt(self.t.grid, p) {
                        break;
                    }
                }
            }
        }
        acc.result()
    }
}

/// Safety margin under the height that would just reach the skyline found, m: far above the
/// rounding of the elevation formula (~1e-9 m at lunar radii), far below any height step.
const SETTLE_MARGIN_M: f64 = 1e-3;

/// The height, m, that stands at elevation tangent `tan_e` at the step with central angle
/// sin `sg`, cos `cg`, seen from height `hs`: solves ((r+h) cg - (r+hs)) / ((r+h) sg) = tan_e.
/// Anything lower stands lower. +inf when no height reaches `tan_e` (it is at or above the
/// elevation of the point at infinity, 90 deg - g); -r for `tan_e` = -inf.
fn height_at_tan(tan_e: f64, r: f64, hs: f64, sg: f64, cg: f64) -> f64 {
    let k = cg - tan_e * sg;
    if k > 0.0 {
        (r + hs) / k - r
    } else {
        f64::INFINITY
    }
}

/// `x.floor() as i64`, the same value for every `x` (NaN, infinities and saturation
/// included), from a cast and a compare instead of a libm call.
fn floor_i64(x: f64) -> i64 {
    let t = x as i64;
    t.saturating_sub(i64::from((t as f64) > x))
}

/// floor() of a pixel position.
fn floor_px(x: f64) -> isize {
    floor_i64(x) as isize
}

/// Running minimum over the samples of one arc, settled early once it falls under `below_m`.
struct ArcMin {
    nodata: NodataRule,
    below_m: f64,
    min_m: f32,
    missing: bool,
    any_inside: bool,
    below: bool,
}

impl ArcMin {
    fn new(nodata: NodataRule, below_m: f64) -> Self {
        ArcMin {
            nodata,
            below_m,
            min_m: f32::INFINITY,
            missing: false,
            any_inside: false,
            below: false,
        }
    }

    fn add_opt(&mut self, grid: &ElevationGrid, p: Option<Px>) -> bool {
        match p {
            Some(p) => self.add(grid, p),
            None => self.note_missing(),
        }
    }

    /// Take in the four pixels round a window position; false once the result is settled.
    fn add(&mut self, grid: &ElevationGrid, (col, row): Px) -> bool {
        let (w, h) = (grid.width as f64, grid.height as f64);
        if col < -1.0 || row < -1.0 || col > w || row > h {
            return self.note_missing();
        }
        self.any_inside = true;
        if self.missing && self.nodata == NodataRule::CountsAgainst {
            return false;
        }
        let (c0, r0) = (floor_px(col), floor_px(row));
        let inner =
            c0 >= 0 && r0 >= 0 && (c0 as usize) + 1 < grid.width && (r0 as usize) + 1 < grid.height;
        if inner {
            // One bounds check for the four pixels; nodata (NaN) takes the general path.
            let i = r0 as usize * grid.width + c0 as usize;
            let (top, bottom) = (
                &grid.heights_m[i..i + 2],
                &grid.heights_m[i + grid.width..][..2],
            );
            let q = [top[0], top[1], bottom[0], bottom[1]];
            if !q.iter().any(|v| v.is_nan()) {
                self.min_m = self.min_m.min(q[0].min(q[1]).min(q[2].min(q[3])));
                return self.not_below();
            }
        }
        self.add_each(grid, c0, r0)
    }

    /// The four pixels one by one, any of them missing.
    fn add_each(&mut self, grid: &ElevationGrid, c0: isize, r0: isize) -> bool {
        for (dc, dr) in [(0, 0), (1, 0), (0, 1), (1, 1)] {
            let (c, r) = (c0 + dc, r0 + dr);
            let v = if c >= 0 && r >= 0 {
                grid.get(c as usize, r as usize)
            } else {
                None
            };
            match v {
                Some(v) => self.min_m = self.min_m.min(v),
                None => {
                    if !self.note_missing() {
                        return false;
                    }
                }
            }
        }
        self.not_below()
    }

    /// False (settled) once a height under `below_m` has been met.
    fn not_below(&mut self) -> bool {
        self.below = (self.min_m as f64) < self.below_m;
        !self.below
    }

    fn note_missing(&mut self) -> bool {
        self.missing = true;
        // Under the default rule one missing height settles the arc; keep looking only to
        // learn whether any of it lies inside the window.
        self.nodata == NodataRule::Skip || !self.any_inside
    }

    fn result(&self) -> Arc {
        if !self.any_inside {
            Arc::Outside
        } else if self.below {
            Arc::Below
        } else if (self.missing && self.nodata == NodataRule::CountsAgainst)
            || !self.min_m.is_finite()
        {
            Arc::Missing
        } else {
            Arc::Height(self.min_m as f64)
        }
    }
}

/// Horizon profile around a site as (azimuth_deg, elevation_deg) pairs, `n_sectors` sector
/// centres from north, each the lowest skyline over its sector: for polar plots. Falls back to
/// the sphere where the grid is missing.
pub fn horizon_profile(
    lon_deg: f64,
    lat_deg: f64,
    grid: Option<&ElevationGrid>,
    max_distance_m: f64,
    n_sectors: usize,
) -> Vec<(f64, f64)> {
    let terrain = grid.and_then(HorizonTerrain::new);
    Horizon::compute(
        lon_deg,
        lat_deg,
        terrain.as_ref(),
        0.0,
        max_distance_m,
        n_sectors,
    )
    .pairs()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn wrap_sector_is_the_euclidean_remainder() {
        for n in [1i64, 4, 720] {
            for k in -5 * n..5 * n {
                assert_eq!(wrap_sector(k, n), k.rem_euclid(n), "{k} mod {n}");
            }
        }
    }

    #[test]
    fn floor_i64_matches_floor_everywhere() {
        let specials = [
            0.0,
            -0.0,
            -1.0,
            -0.5,
            0.999_999_999_999_999_9,
            -1e-300,
            1e300,
            -1e300,
            9.3e18,
            -9.3e18,
            f64::INFINITY,
            f64::NEG_INFINITY,
            f64::NAN,
            f64::MAX,
            f64::MIN,
        ];
        let lattice = (0..20_000).map(|i| (i as f64 - 10_000.0) * 0.123_456_789);
        for x in specials.into_iter().chain(lattice) {
            assert_eq!(floor_i64(x), x.floor() as i64, "{x}");
        }
    }

    #[test]
    fn block_maxima_bound_every_box_and_pass_over_nodata() {
        // An invented 37 x 23 field with a NaN hole; every box's maximum against a direct scan.
        let (w, h) = (37, 23);
        let v: Vec<f32> = (0..w * h)
            .map(|i| {
                if i % 97 == 5 {
                    f32::NAN
                } else {
                    ((i * 7919) % 1000) as f32
                }
            })
            .collect();
        let p = MaxPyramid::of(w, h, &v);
        for (c0, c1, r0, r1) in [
            (0, 0, 0, 0),
            (3, 20, 2, 9),
            (-4, 40, -2, 30),
            (30, 36, 20, 22),
        ] {
            let mut exact = f32::NEG_INFINITY;
            for r in r0.max(0)..=r1.min(h as isize - 1) {
                for c in c0.max(0)..=c1.min(w as isize - 1) {
                    exact = exact.max(v[r as usize * w + c as usize]);
                }
            }
            let got = p.max_in((c0, c1), (r0, r1));
            assert!(got >= exact, "{got} < {exact}");
        }
        assert_eq!(
            p.max_in((0, 1), (0, 1)),
            v[0].max(v[1]).max(v[w]).max(v[w + 1])
        );
        assert_eq!(p.max_in((50, 60), (0, 3)), f32::NEG_INFINITY);
    }
}
