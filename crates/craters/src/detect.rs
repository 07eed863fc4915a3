//! Provisional craters from three published cues over a pyramid of scale levels:
//! closed depressions ([`crate::depressions`], Barnes et al. 2014), radial-symmetry voting
//! ([`crate::radial_symmetry`], Loy and Zelinsky 2003) and bowl-shaped blobs of the
//! scale-normalised Laplacian of Gaussian ([`crate::blobs`], Lindeberg 1998). Every provisional crater is then measured;
//! measurement, not detection, decides what is a crater.

use crate::error::CraterError;
use crate::{blobs, depressions, pyramid, radial_symmetry};
use rstar::RTree;
use serde::{Deserialize, Serialize};
use terrain::ElevationGrid;

/// Which cue proposed a crater.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Cue {
    Depression,
    RadialSymmetry,
    /// A bowl-shaped blob of the Laplacian of Gaussian ([`crate::blobs`]).
    Blob,
}

/// A provisional crater.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Detection {
    pub lon_deg: f64,
    pub lat_deg: f64,
    pub diameter_m: f64,
    /// Cue strength: fill depth over diameter for depressions, transform value for symmetry.
    pub score: f64,
    pub cue: Cue,
}

/// Choices of detection.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct DetectOptions {
    pub diameter_min_m: f64,
    pub diameter_max_m: f64,
    /// Closed depressions shallower than this fraction of their equivalent diameter are ignored.
    pub min_depression_depth_ratio: f64,
    /// Radial-symmetry peaks below this score are ignored (dimensionless; see radial_symmetry).
    pub min_symmetry_score: f64,
    pub use_depressions: bool,
    pub use_symmetry: bool,
    /// Bowl-shaped blobs (scale-normalised Laplacian of Gaussian) responding with at least this
    /// fraction of their diameter are proposed; see [`crate::blobs`].
    #[serde(default = "default_min_blob_ratio")]
    pub min_blob_ratio: f64,
    #[serde(default = "default_true")]
    pub use_blobs: bool,
    /// Measured craters shallower than this fraction of the fresh depth-to-diameter ratio at
    /// their size ([`crate::fresh_depth_to_diameter`]) are not reported.
    pub min_fraction_of_fresh_depth: f64,
    /// Measured craters scoring under this on [`crate::crater_score`] (0..1) are not reported;
    /// 0 leaves only the shape gates of [`crate::looks_like_crater`].
    #[serde(default = "default_min_crater_score")]
    pub min_crater_score: f64,
}

impl DetectOptions {
    /// Whether diameter `d_m` lies more than `factor` times outside the requested range
    /// (`factor` 1: outside it at all).
    pub(crate) fn outside_range(&self, d_m: f64, factor: f64) -> bool {
        d_m > factor * self.diameter_max_m || d_m * factor < self.diameter_min_m
    }

    /// The default range for a window: 3 pixels up to a third of the window's shorter side.
    pub fn for_grid(grid: &ElevationGrid) -> Result<DetectOptions, CraterError> {
        let (dx, dy) = pyramid::window_pixel_size_m(grid)
            .ok_or_else(|| CraterError::Geometry("no pixel size at the window centre".into()))?;
        let px = dx.max(dy);
        Ok(DetectOptions {
            diameter_min_m: 3.0 * px,
            diameter_max_m: grid.width.min(grid.height) as f64 / 3.0 * dx.min(dy),
            ..DetectOptions::default()
        })
    }
}

impl Default for DetectOptions {
    fn default() -> Self {
        DetectOptions {
            diameter_min_m: 0.0,
            diameter_max_m: f64::INFINITY,
            min_depression_depth_ratio: 0.01,
            min_symmetry_score: 1.0,
            use_depressions: true,
            use_symmetry: true,
            min_blob_ratio: default_min_blob_ratio(),
            use_blobs: true,
            min_fraction_of_fresh_depth: 0.2,
            min_crater_score: default_min_crater_score(),
        }
    }
}

/// On demo terrains of seeds 1-3 and the committed demo (none used to fit the score), 0.25
/// kept 97-99% of the planted craters the shape gates alone let through and removed 55-70% of
/// the false ones; 0.2 and 0.3 moved recall and precision by about 0.005 and 0.01 (ours,
/// docs/metrics.md).
fn default_min_crater_score() -> f64 {
    0.25
}

fn default_true() -> bool {
    true
}

/// A paraboloid bowl responds with about 0.6 of its depth ([`crate::blobs`]), so 0.02 of the
/// diameter is a bowl of d/D about 0.033, just under the shallowest a measured crater may be
/// (a fifth of a fresh crater's d/D, about 0.039): weaker blobs would mostly be measured and
/// rejected. Set on the demo terrain, where 0.015 let through more false craters than true ones
/// and 0.03 missed degraded craters (ours).
fn default_min_blob_ratio() -> f64 {
    0.02
}

/// A level covers craters of BAND_LO..2*BAND_LO cells across (the first level also everything
/// smaller down to the requested minimum).
const BAND_LO_CELLS: f64 = 8.0;
/// Symmetry votes find the wall about 0.8 R from the centre; the best voting radius n thus
/// maps to a diameter of about 2.4 n (a provisional size, refined by measurement).
const DIAMETER_PER_VOTE_RADIUS: f64 = 2.4;

/// Propose craters in the window with diameters in [diameter_min_m, diameter_max_m].
pub fn detect(grid: &ElevationGrid, opts: &DetectOptions) -> Result<Vec<Detection>, CraterError> {
    if !(opts.diameter_min_m > 0.0 && opts.diameter_max_m >= opts.diameter_min_m) {
        return Err(CraterError::Options(format!(
            "diameter range must be positive and ordered (got {} to {} m)",
            opts.diameter_min_m, opts.diameter_max_m
        )));
    }
    let (dx, dy) = pyramid::window_pixel_size_m(grid)
        .ok_or_else(|| CraterError::Geometry("no pixel size at the window centre".into()))?;
    let g0 = (dx * dy).sqrt();
    let window_m = (grid.width as f64 * dx).min(grid.height as f64 * dy);
    // A crater needs room for its profiles (out to 2.5 R) to be measured; ask for 2 D at least.
    if window_m < 2.0 * opts.diameter_min_m || grid.width < 8 || grid.height < 8 {
        return Err(CraterError::GridTooSmall {
            width: grid.width,
            height: grid.height,
            diameter_min_m: opts.diameter_min_m,
            pixel_m: g0,
            needed_px: (2.0 * opts.diameter_min_m / dx.min(dy)).ceil() as usize,
        });
    }
    if grid.heights_m.iter().all(|h| h.is_nan()) {
        return Err(CraterError::AllNodata);
    }
    let d_max = opts.diameter_max_m.min(window_m / 2.0);
    // Level by level (at most two levels in memory), each level's three cues at once: the
    // priority-flood fill is serial, so running it beside the other cues keeps both cores busy.
    // Within a level the proposals are joined as depressions, blobs, symmetry peaks.
    let mut out = Vec::new();
    let mut level_idx = 0u32;
    let mut next: Option<pyramid::Level> = None;
    loop {
        let cell = g0 * 2f64.powi(level_idx as i32);
        let (band_lo, band_hi) = (BAND_LO_CELLS * cell, 2.0 * BAND_LO_CELLS * cell);
        let lo = if level_idx == 0 {
            opts.diameter_min_m.min(band_lo)
        } else {
            band_lo
        };
        if lo > d_max {
            break;
        }
        level_idx += 1;
        if band_hi < opts.diameter_min_m {
            continue;
        }
        let lo = lo.max(opts.diameter_min_m);
        let hi = band_hi.min(d_max);
        let level = match next.take() {
            Some(l) if (l.cell_m - cell).abs() < 1e-9 * cell => l,
            _ => pyramid::build(grid, (dx, dy), cell),
        };
        if level.width < 8 || level.height < 8 {
            break;
        }
        let coarse = pyramid::build(grid, (dx, dy), 2.0 * cell);
        out.extend(scan_level(grid, &level, &coarse, lo, hi, opts));
        next = Some(coarse);
    }
    Ok(suppress(out, grid.geometry.body_radius_m))
}

/// One level's proposals: depressions, blobs, then symmetry peaks, the three computed at once.
fn scan_level(
    grid: &ElevationGrid,
    level: &pyramid::Level,
    coarse: &pyramid::Level,
    lo: f64,
    hi: f64,
    opts: &DetectOptions,
) -> Vec<Detection> {
    let (mut out, (blobs, symmetry)) = rayon::join(
        || {
            if opts.use_depressions {
                scan_depressions(grid, coarse, lo, hi, opts)
            } else {
                Vec::new()
            }
        },
        || {
            rayon::join(
                || {
                    if opts.use_blobs {
                        scan_blobs(grid, coarse, lo, hi, opts)
                    } else {
                        Vec::new()
                    }
                },
                || {
                    if opts.use_symmetry {
                        scan_symmetry(grid, level, lo, hi, opts)
                    } else {
                        Vec::new()
                    }
                },
            )
        },
    );
    out.extend(blobs);
    out.extend(symmetry);
    out
}

/// Radial-symmetry peaks on the level itself, voting radii over the band.
fn scan_symmetry(
    grid: &ElevationGrid,
    level: &pyramid::Level,
    lo: f64,
    hi: f64,
    opts: &DetectOptions,
) -> Vec<Detection> {
    let mut out = Vec::new();
    let cell = level.cell_m;
    let (w, h) = (level.width, level.height);
    let to_lonlat = |i: f64, j: f64| {
        let (c, r) = level.to_window(i, j);
        grid.geometry
            .pixel_to_lonlat(grid.col0 as f64 + c + 0.5, grid.row0 as f64 + r + 0.5)
    };
    let n_lo = (0.4 * lo / cell).max(1.0);
    let n_hi = (0.45 * hi / cell).max(n_lo);
    let mut radii = Vec::new();
    let mut n = n_lo.round().max(1.0);
    while n <= n_hi.round() {
        radii.push(n);
        n += 1.0;
    }
    for p in radial_symmetry::peaks(&level.z, w, h, &radii, opts.min_symmetry_score) {
        let dia = (DIAMETER_PER_VOTE_RADIUS * p.radius_cells * cell).clamp(lo, hi);
        if let Some((lon, lat)) = to_lonlat(p.i as f64, p.j as f64) {
            out.push(Detection {
                lon_deg: lon,
                lat_deg: lat,
                diameter_m: dia,
                score: p.score,
                cue: Cue::RadialSymmetry,
            });
        }
    }
    out
}

/// Closed depressions, looked for one level coarser than the symmetry votes (craters of the
/// band span 4-8 cells there): a filled bowl stays a closed region at that size, and the fill,
/// the costliest step of detection, then touches a quarter of the cells.
fn scan_depressions(
    grid: &ElevationGrid,
    level: &pyramid::Level,
    lo: f64,
    hi: f64,
    opts: &DetectOptions,
) -> Vec<Detection> {
    let mut out = Vec::new();
    let cell = level.cell_m;
    let (w, h) = (level.width, level.height);
    if w < 8 || h < 8 {
        return out;
    }
    // Remove relief broader than the band so a small crater on a large one's floor is a
    // closed depression of its own.
    let k = ((2.0 * hi / cell).ceil() as usize).max(2);
    let smooth = pyramid::box_mean(&level.z, w, h, k);
    let hp: Vec<f32> = level.z.iter().zip(&smooth).map(|(a, b)| a - b).collect();
    for d in depressions::find(&hp, w, h, 0.0) {
        let dia = 2.0 * (d.cells as f64 / std::f64::consts::PI).sqrt() * cell;
        if dia < 0.6 * lo || dia > 1.3 * hi || d.max_depth < opts.min_depression_depth_ratio * dia {
            continue;
        }
        let (c, r) = level.to_window(d.ci, d.cj);
        if let Some((lon, lat)) = grid
            .geometry
            .pixel_to_lonlat(grid.col0 as f64 + c + 0.5, grid.row0 as f64 + r + 0.5)
        {
            out.push(Detection {
                lon_deg: lon,
                lat_deg: lat,
                diameter_m: dia.clamp(lo, hi),
                score: d.max_depth / dia,
                cue: Cue::Depression,
            });
        }
    }
    out
}

/// Bowl-shaped blobs, on the coarser level like the depressions (craters of the band span 4-8
/// cells there): four scales per octave over the band, sigma = D / [`blobs::DIAMETER_PER_SIGMA`].
fn scan_blobs(
    grid: &ElevationGrid,
    level: &pyramid::Level,
    lo: f64,
    hi: f64,
    opts: &DetectOptions,
) -> Vec<Detection> {
    let mut out = Vec::new();
    let cell = level.cell_m;
    let (w, h) = (level.width, level.height);
    if w < 8 || h < 8 {
        return out;
    }
    let to_sigma = |d: f64| d / (blobs::DIAMETER_PER_SIGMA * cell);
    let (s_lo, s_hi) = (to_sigma(lo).max(0.7), to_sigma(hi).max(0.7));
    // One scale beyond each end of the band bounds the search (see `blobs::find`).
    let step = 2f64.powf(0.25);
    let mut sigmas = vec![s_lo / step, s_lo];
    while let Some(&s) = sigmas.last() {
        if s > s_hi * 1.0001 {
            break;
        }
        sigmas.push(s * step);
    }
    for b in blobs::find(&level.z, w, h, &sigmas, cell, opts.min_blob_ratio) {
        let dia = (blobs::DIAMETER_PER_SIGMA * b.sigma_cells * cell).clamp(lo, hi);
        let (c, r) = level.to_window(b.i as f64, b.j as f64);
        if let Some((lon, lat)) = grid
            .geometry
            .pixel_to_lonlat(grid.col0 as f64 + c + 0.5, grid.row0 as f64 + r + 0.5)
        {
            out.push(Detection {
                lon_deg: lon,
                lat_deg: lat,
                diameter_m: dia,
                score: b.response / dia,
                cue: Cue::Blob,
            });
        }
    }
    out
}

/// Drop proposals that repeat a stronger-placed one: centre within 0.25 D and diameter within
/// a factor 1.3. Depressions are kept before symmetry peaks (they locate the floor better), and
/// both before blobs, which only add bowls the other two cues missed.
fn suppress(mut d: Vec<Detection>, radius_m: f64) -> Vec<Detection> {
    let rank = |c: Cue| match c {
        Cue::Depression => 0,
        Cue::RadialSymmetry => 1,
        Cue::Blob => 2,
    };
    d.sort_by(|a, b| {
        rank(a.cue)
            .cmp(&rank(b.cue))
            .then(b.score.total_cmp(&a.score))
            .then(a.lat_deg.total_cmp(&b.lat_deg))
            .then(a.lon_deg.total_cmp(&b.lon_deg))
    });
    let mut tree: RTree<rstar::primitives::GeomWithData<[f64; 3], f64>> = RTree::new();
    let mut keep = Vec::new();
    for det in d {
        let p = crate::merge::cartesian(radius_m, det.lon_deg, det.lat_deg);
        let r = 0.25 * det.diameter_m;
        let dup = tree
            .locate_within_distance(p, r * r)
            .any(|q| (1.0 / 1.3..=1.3).contains(&(q.data / det.diameter_m)));
        if !dup {
            tree.insert(rstar::primitives::GeomWithData::new(p, det.diameter_m));
            keep.push(det);
        }
    }
    keep
}
