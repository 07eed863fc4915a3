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

use serde::{Deserialize, Serialize};
use terrain::geodesy::destination;
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
        })
    }
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
        let n = spec.sectors.max(4);
        let ground = terrain.and_then(|t| t.grid.sample_lonlat(lon_deg, lat_deg).map(|h| (t, h)));
        let Some((t, ground_m)) = ground else {
            let radius_m = terrain.map_or(terrain::MOON_RADIUS_M, |t| t.radius_m);
            let h = spec.observer_height_m.max(0.0);
            let dip = sphere_dip_deg(radius_m, h);
            return Horizon {
                elevation_deg: vec![dip; n],
                site_height_m: h,
                sphere_horizon_deg: dip,
                max_distance_m: spec.max_distance_m,
                from_terrain: false,
            };
        };
        let hs = ground_m + spec.observer_height_m;
        let dip = sphere_dip_deg(t.radius_m, hs);
        let march = March {
            t,
            steps: Steps::new(t.pixel_m, t.radius_m, spec.max_distance_m),
            site: (lon_deg, lat_deg),
            hs,
            nodata: spec.nodata,
        };
        let w = 360.0 / n as f64;
        let elevation_deg = (0..n)
            .map(|i| {
                if wanted.is_some_and(|wt| !wt.get(i).copied().unwrap_or(true)) {
                    return dip;
                }
                let centre = i as f64 * w;
                march
                    .sector_elevation_deg(centre - w / 2.0, centre + w / 2.0)
                    .max(dip)
            })
            .collect();
        Horizon {
            elevation_deg,
            site_height_m: hs,
            sphere_horizon_deg: dip,
            max_distance_m: spec.max_distance_m,
            from_terrain: true,
        }
    }

    /// Width of one sector, degrees.
    pub fn sector_width_deg(&self) -> f64 {
        360.0 / self.elevation_deg.len().max(1) as f64
    }

    /// The sector holding an azimuth.
    pub fn sector_of(&self, azimuth_deg: f64) -> usize {
        let n = self.elevation_deg.len().max(1) as i64;
        ((azimuth_deg / self.sector_width_deg() + 0.5).floor() as i64).rem_euclid(n) as usize
    }

    /// The skyline bound of the sector holding an azimuth, degrees.
    pub fn at(&self, azimuth_deg: f64) -> f64 {
        self.elevation_deg[self.sector_of(azimuth_deg)]
    }

    /// The lowest skyline bound over every sector that meets the azimuth range `from..=to`
    /// (degrees, `from <= to`, either may lie outside 0..360), degrees.
    pub fn lowest_between(&self, from_deg: f64, to_deg: f64) -> f64 {
        let n = self.elevation_deg.len() as i64;
        let w = self.sector_width_deg();
        let all = || {
            self.elevation_deg
                .iter()
                .copied()
                .fold(f64::INFINITY, f64::min)
        };
        // A range that cannot be read (NaN) is the whole circle.
        let span = to_deg - from_deg;
        if span.is_nan() || span >= 360.0 - w {
            return all();
        }
        let k0 = (from_deg / w + 0.5).floor() as i64;
        let k1 = (to_deg / w + 0.5).floor() as i64;
        (k0..=k1)
            .map(|k| self.elevation_deg[k.rem_euclid(n) as usize])
            .fold(f64::INFINITY, f64::min)
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

fn window_pixel(t: &HorizonTerrain, site: (f64, f64), azimuth_deg: f64, d_m: f64) -> Option<Px> {
    let (lon, lat) = destination(t.radius_m, site, azimuth_deg, d_m);
    let (col, row) = t.grid.geometry.lonlat_to_pixel(lon, lat)?;
    Some((
        col - 0.5 - t.grid.col0 as f64,
        row - 0.5 - t.grid.row0 as f64,
    ))
}

/// Window pixel positions along one sector edge, step by step, from exact positions every
/// `EXACT_EVERY` steps.
struct Edge<'m> {
    m: &'m March<'m>,
    azimuth_deg: f64,
    /// The current span: its first step and the positions at both of its ends.
    span: Option<(usize, Option<Px>, Option<Px>)>,
}

impl<'m> Edge<'m> {
    fn new(m: &'m March<'m>, azimuth_deg: f64) -> Self {
        Edge {
            m,
            azimuth_deg,
            span: None,
        }
    }

    fn exact(&self, j: usize) -> Option<Px> {
        window_pixel(self.m.t, self.m.site, self.azimuth_deg, self.m.steps.d_m[j])
    }

    fn at(&mut self, j: usize) -> Option<Px> {
        let d = &self.m.steps.d_m;
        let k0 = j / EXACT_EVERY * EXACT_EVERY;
        let k1 = (k0 + EXACT_EVERY).min(d.len() - 1);
        if self.span.is_none_or(|(s, _, _)| s != k0) {
            self.span = Some((k0, self.exact(k0), self.exact(k1)));
        }
        let (_, a, b) = self.span?;
        if j == k0 {
            return a;
        }
        let (w, h) = (self.m.t.grid.width as f64, self.m.t.grid.height as f64);
        match (a, b) {
            // A jump of half the window means the path crossed a wrap seam: no interpolation.
            (Some(a), Some(b)) if (b.0 - a.0).abs() < w / 2.0 && (b.1 - a.1).abs() < h / 2.0 => {
                let f = (d[j] - d[k0]) / (d[k1] - d[k0]);
                Some((a.0 + f * (b.0 - a.0), a.1 + f * (b.1 - a.1)))
            }
            _ => self.exact(j),
        }
    }
}

/// The lowest height on one arc across a sector.
enum Arc {
    Height(f64),
    /// Some (counts against) or all (skip) of the arc has no data: this distance shields nothing.
    Missing,
    /// The whole arc is outside the window: so is everything farther.
    Outside,
}

/// One site's march: shared by all its sectors.
struct March<'a> {
    t: &'a HorizonTerrain<'a>,
    steps: Steps,
    site: (f64, f64),
    hs: f64,
    nodata: NodataRule,
}

impl March<'_> {
    /// Lower bound of the skyline over azimuths `az0..az1`, degrees (-inf: none above the
    /// sphere's horizon found).
    fn sector_elevation_deg(&self, az0: f64, az1: f64) -> f64 {
        let (t, r, hs) = (self.t, self.t.radius_m, self.hs);
        if t.height_max_m <= hs || self.steps.d_m.is_empty() {
            // No terrain rises to the observer: the sphere's dip is the skyline.
            return f64::NEG_INFINITY;
        }
        let (mut lo, mut hi) = (Edge::new(self, az0), Edge::new(self, az1));
        let mut best_tan = f64::NEG_INFINITY;
        for j in 0..self.steps.d_m.len() {
            let (sg, cg) = (self.steps.sin_g[j], self.steps.cos_g[j]);
            // The highest terrain in the grid, placed here, would stand at this elevation; with
            // h_max > h_s that bound falls with distance, so once it is below the skyline found
            // so far no farther point can matter.
            let ceiling_tan = ((r + t.height_max_m) * cg - (r + hs)) / ((r + t.height_max_m) * sg);
            if ceiling_tan <= best_tan {
                break;
            }
            match self.arc_min_height(j, lo.at(j), hi.at(j), az0, az1) {
                Arc::Height(ht) => {
                    let tan_e = ((r + ht) * cg - (r + hs)) / ((r + ht) * sg);
                    best_tan = best_tan.max(tan_e);
                }
                Arc::Missing => {}
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

    /// The lowest height on the arc at step `j` between the sector's edges `a` and `b`.
    fn arc_min_height(&self, j: usize, a: Option<Px>, b: Option<Px>, az0: f64, az1: f64) -> Arc {
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
        let mut acc = ArcMin::new(self.nodata);
        match straight {
            Some((a, b, len)) => {
                // The arc's sagitta over a sector is d (1 - cos(w/2)): metres at most, far below
                // a pixel, so the chord stands for the arc.
                let n = len.ceil().max(1.0) as usize;
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
                    let p = window_pixel(self.t, self.site, az, d);
                    if !acc.add_opt(self.t.grid, p) {
                        break;
                    }
                }
            }
        }
        acc.result()
    }
}

/// Running minimum over the samples of one arc.
struct ArcMin {
    nodata: NodataRule,
    min_m: f64,
    missing: bool,
    any_inside: bool,
}

impl ArcMin {
    fn new(nodata: NodataRule) -> Self {
        ArcMin {
            nodata,
            min_m: f64::INFINITY,
            missing: false,
            any_inside: false,
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
        let (c0, r0) = (col.floor(), row.floor());
        for (dc, dr) in [(0.0, 0.0), (1.0, 0.0), (0.0, 1.0), (1.0, 1.0)] {
            let (c, r) = (c0 + dc, r0 + dr);
            let v = if c >= 0.0 && r >= 0.0 {
                grid.get(c as usize, r as usize)
            } else {
                None
            };
            match v {
                Some(v) => self.min_m = self.min_m.min(v as f64),
                None => {
                    if !self.note_missing() {
                        return false;
                    }
                }
            }
        }
        true
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
        } else if (self.missing && self.nodata == NodataRule::CountsAgainst)
            || !self.min_m.is_finite()
        {
            Arc::Missing
        } else {
            Arc::Height(self.min_m)
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
