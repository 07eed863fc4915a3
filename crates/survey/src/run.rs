//! The survey run: a DEM in, a [`SurveyFile`] out.
//!
//! The DEM is cut into a fixed grid of square tiles (row-major indices), each read with a halo
//! wide enough to measure the largest crater whose centre lies in the tile. A tile keeps only
//! the craters centred in its own core, so every crater is measured once, whole, and a tile's
//! result depends on nothing but its own window. That is what makes the other features exact:
//! a shard is a subset of tile indices, a checkpoint is the list of finished tiles, and merging
//! shards or resuming gives the same file as one uninterrupted run.

use crate::checkpoint::Checkpoint;
use crate::model::{
    Candidate, CandidateSource, InputFile, Shard, SurveyFile, SurveyParameters, SCHEMA_VERSION,
};
use crate::SurveyError;
use craters::catalogue::{self, CatalogueRow, OnBadRow, RowProblem};
use craters::{CraterMeasurement, DetectOptions, MeasureOptions};
use rayon::prelude::*;
use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};
use std::io::Read;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, AtomicU64, AtomicUsize, Ordering};
use std::sync::Mutex;
use terrain::{Dem, OpenOptions};
use visibility::{SiteVisibility, VisibilityOptions};

/// Measurement reaches 2.5 crater radii from the centre (profiles and the plain around the rim).
const MEASURE_REACH_RADII: f64 = 2.5;
/// Working memory per pixel of a tile window in flight: heights, filled copy, pyramid levels,
/// symmetry votes and per-crater patches. Measured: the default demo survey (one 3670 px
/// window with its halo) peaks at 787 MB resident, 58 bytes per window pixel; rounded up.
const BYTES_PER_WINDOW_PX: usize = 64;

/// What to survey and how.
#[derive(Clone, Debug)]
pub struct RunOptions {
    /// Diameter range; `None` means the default: 3 pixels up to a third of a tile.
    pub diameter_min_m: Option<f64>,
    pub diameter_max_m: Option<f64>,
    /// Tile core size in pixels (lowered if the memory budget asks for it).
    pub tile_px: usize,
    /// Working-memory budget for tile windows in flight, bytes.
    pub memory_budget_bytes: usize,
    pub catalogue: Option<PathBuf>,
    pub catalogue_on_bad_row: OnBadRow,
    /// Detect craters (false: measure only the catalogue's).
    pub detect: bool,
    /// Fill the visibility columns.
    pub visibility: bool,
    pub open: OpenOptions,
    pub visibility_options: VisibilityOptions,
    /// Survey only shard `k` of `n` (1-based): tiles whose index is k-1 modulo n.
    pub shard: Option<Shard>,
    /// Record finished tiles here and skip those already recorded.
    pub checkpoint: Option<PathBuf>,
    /// Fit this structure into every candidate.
    pub structure: Option<structure::StructureSpec>,
    /// Compute the operations figures (landing, shots, relay, night) for every candidate with
    /// a fit, with these inputs; `None` turns them off. A relative relay-orbit CSV path is
    /// read from the working folder.
    pub operations: Option<operations::OperationsInputs>,
}

impl Default for RunOptions {
    fn default() -> Self {
        RunOptions {
            diameter_min_m: None,
            diameter_max_m: None,
            tile_px: 2048,
            memory_budget_bytes: 2 << 30,
            catalogue: None,
            catalogue_on_bad_row: OnBadRow::Stop,
            detect: true,
            visibility: true,
            open: OpenOptions::default(),
            visibility_options: VisibilityOptions::default(),
            shard: None,
            checkpoint: None,
            structure: Some(structure::StructureSpec::default()),
            operations: Some(operations::OperationsInputs::default()),
        }
    }
}

/// Where the run is, for a progress bar.
#[derive(Clone, Copy, Debug)]
pub struct Progress {
    pub tiles_done: usize,
    pub tiles_total: usize,
    pub candidates: usize,
    pub pixels_done: u64,
}

/// A finished run: the survey and what the user should hear about it.
pub struct RunOutcome {
    pub survey: SurveyFile,
    /// Catalogue rows skipped in lenient mode, with their line numbers.
    pub skipped_rows: Vec<RowProblem>,
    pub width_px: usize,
    pub height_px: usize,
    /// Tiles taken from a checkpoint rather than computed.
    pub tiles_resumed: usize,
    /// Pixels in the tiles this run computed.
    pub pixels_computed: u64,
}

/// One measured crater before ids are given.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Found {
    pub source: CandidateSource,
    pub crater: CraterMeasurement,
    pub visibility: Option<SiteVisibility>,
    #[serde(default)]
    pub fit: Option<structure::StructureFit>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub operations: Option<operations::OperationsReport>,
}

pub(crate) struct Tile {
    pub index: usize,
    pub col: usize,
    pub row: usize,
    pub width: usize,
    pub height: usize,
}

/// The tile size to use: `tile_px`, or the whole raster as one tile when every tile's window
/// would span the raster's longer side anyway (each would read, detect and measure nearly the
/// same ground again: on a 3000 x 3000 px grid surveyed to 20 km, four tiles cost 2.5 times
/// the CPU of one; ours) and one window of the whole raster fits the memory budget with room
/// for a second.
fn whole_raster_tile(
    width: usize,
    height: usize,
    tile_px: usize,
    halo_px: usize,
    budget_bytes: usize,
) -> usize {
    let side = width.max(height);
    let fits = (width * height).saturating_mul(2 * BYTES_PER_WINDOW_PX) <= budget_bytes;
    if tile_px < side && tile_px + 2 * halo_px >= side && fits {
        side
    } else {
        tile_px
    }
}

/// Pixels of halo read round each tile: the measurement's reach for the largest crater.
/// `pixel_m` is the larger of the DEM's two pixel sizes at its centre.
pub(crate) fn halo_px(pixel_m: f64, diameter_max_m: f64) -> usize {
    (diameter_max_m / 2.0 * MEASURE_REACH_RADII / pixel_m).ceil() as usize + 2
}

pub(crate) fn tiles(width: usize, height: usize, tile_px: usize) -> Vec<Tile> {
    let mut v = Vec::new();
    for row in (0..height).step_by(tile_px) {
        for col in (0..width).step_by(tile_px) {
            v.push(Tile {
                index: v.len(),
                col,
                row,
                width: tile_px.min(width - col),
                height: tile_px.min(height - row),
            });
        }
    }
    v
}

/// SHA-256 of a file, read in blocks.
pub fn sha256_file(path: &Path) -> std::io::Result<(u64, String)> {
    let mut f = std::fs::File::open(path)?;
    let mut hasher = Sha256::new();
    let mut buf = vec![0u8; 1 << 20];
    let mut size = 0u64;
    loop {
        let n = f.read(&mut buf)?;
        if n == 0 {
            break;
        }
        size += n as u64;
        hasher.update(&buf[..n]);
    }
    let hex = hasher
        .finalize()
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect();
    Ok((size, hex))
}

/// Sort found craters north to south, then west to east, and number them from 1. The order
/// depends only on the craters, so any grouping of tiles gives the same table.
pub fn into_candidates(mut found: Vec<Found>) -> Vec<Candidate> {
    found.sort_by(|a, b| {
        b.crater
            .centre_lat_deg
            .total_cmp(&a.crater.centre_lat_deg)
            .then(a.crater.centre_lon_deg.total_cmp(&b.crater.centre_lon_deg))
            .then(a.crater.diameter_m.total_cmp(&b.crater.diameter_m))
    });
    found
        .into_iter()
        .enumerate()
        .map(|(i, f)| Candidate {
            id: i as u32 + 1,
            source: f.source,
            crater: f.crater,
            visibility: f.visibility,
            fit: f.fit,
            operations: f.operations,
        })
        .collect()
}

/// The parameters a run will use, resolved from the options and the DEM.
fn resolve(
    info: &terrain::DemInfo,
    opts: &RunOptions,
) -> Result<(SurveyParameters, usize), SurveyError> {
    let (px_ew, px_ns) = info.pixel_size_m;
    let pixel_m = px_ew.max(px_ns);
    if !(pixel_m.is_finite() && pixel_m > 0.0) {
        return Err(SurveyError::Parameters(
            "the DEM's pixel size could not be worked out at its centre".into(),
        ));
    }
    if opts.tile_px < 64 {
        return Err(SurveyError::Parameters(format!(
            "tile size {} px is too small (64 at least)",
            opts.tile_px
        )));
    }
    let mut tile_px = opts.tile_px.min(info.width.max(info.height));
    let d_min = opts.diameter_min_m.unwrap_or(3.0 * pixel_m);
    let d_max = opts
        .diameter_max_m
        .unwrap_or(tile_px as f64 / 3.0 * px_ew.min(px_ns));
    let needed_px = (d_min * MEASURE_REACH_RADII / pixel_m).ceil() as usize + 3;
    if info.width < needed_px || info.height < needed_px {
        return Err(SurveyError::TooSmall {
            width: info.width,
            height: info.height,
            pixel_m,
            diameter_min_m: d_min,
            needed_px,
        });
    }
    if !(d_min > 0.0 && d_max >= d_min && d_max.is_finite()) {
        return Err(SurveyError::Parameters(format!(
            "diameter range {d_min}..{d_max} m is not a range of positive diameters"
        )));
    }
    let halo_px = halo_px(pixel_m, d_max);
    // Windows in flight at once: one per worker thread.
    let in_flight = rayon::current_num_threads().max(1);
    let window_budget_px = opts.memory_budget_bytes / BYTES_PER_WINDOW_PX / in_flight;
    let max_side = (window_budget_px as f64).sqrt() as usize;
    if max_side < 2 * halo_px + 64 {
        return Err(SurveyError::Parameters(format!(
            "the memory budget ({} MB) cannot hold a tile window for craters up to {d_max:.0} m ({} px of halo); raise --memory or lower the largest diameter",
            opts.memory_budget_bytes >> 20, halo_px
        )));
    }
    tile_px = tile_px.min(max_side - 2 * halo_px);
    tile_px = whole_raster_tile(
        info.width,
        info.height,
        tile_px,
        halo_px,
        opts.memory_budget_bytes,
    );
    let params = SurveyParameters {
        diameter_min_m: d_min,
        diameter_max_m: d_max,
        tile_px,
        catalogue: opts.catalogue.as_ref().map(|p| p.display().to_string()),
        detect: opts.detect,
        structure: opts.structure.clone(),
        // Recorded even without a structure: a refit that adds one computes them with these.
        operations: opts.operations.clone(),
    };
    if let Some(spec) = &params.structure {
        spec.validate()
            .map_err(|e| SurveyError::Parameters(format!("structure: {e}")))?;
    }
    Ok((params, halo_px))
}

/// The operations figures of a tile's candidates (those with a fit), in their order.
fn tile_operations(
    ops: Option<&operations::Operations>,
    window: &terrain::ElevationGrid,
    here: &[(CandidateSource, CraterMeasurement)],
    fits: &[Option<structure::StructureFit>],
) -> Vec<Option<operations::OperationsReport>> {
    // The skylines' and the landing lattice's spacing: the DEM's post (the smaller side).
    let post_m = window
        .geometry
        .pixel_size_m()
        .map(|(a, b)| a.min(b))
        .filter(|p| p.is_finite() && *p > 0.0);
    match (ops, post_m) {
        (Some(ops), Some(post_m)) => here
            .par_iter()
            .zip(fits)
            .map(|((_, m), fit)| ops.for_candidate(window, post_m, m, fit.as_ref()?))
            .collect(),
        _ => vec![None; here.len()],
    }
}

/// Survey a DEM. `progress` is called after each tile; setting `cancel` stops the run between
/// tiles with [`SurveyError::Cancelled`] (nothing is returned, so nothing half-made is written;
/// finished tiles stay in the checkpoint if there is one).
pub fn run(
    dem_path: &Path,
    opts: &RunOptions,
    progress: &(dyn Fn(Progress) + Sync),
    cancel: &AtomicBool,
) -> Result<RunOutcome, SurveyError> {
    let dem = Dem::open(dem_path, &opts.open)?;
    let info = dem.info().clone();
    let (parameters, halo_px) = resolve(&info, opts)?;
    // The relay's and the Sun's positions are sampled once for the whole survey.
    let ops = match &parameters.operations {
        Some(inputs) => Some(
            operations::Operations::new(inputs, None)
                .map_err(|e| SurveyError::Parameters(e.to_string()))?,
        ),
        None => None,
    };
    if let Some(s) = opts.shard {
        s.validate()?;
    }
    let (seeds, skipped_rows) = match &opts.catalogue {
        Some(path) => catalogue::read_on(path, opts.catalogue_on_bad_row, info.body_radius_m)?,
        None => (Vec::new(), Vec::new()),
    };
    let (size_bytes, sha256) = sha256_file(dem_path).map_err(|e| SurveyError::Io {
        path: dem_path.display().to_string(),
        reason: e.to_string(),
    })?;
    let input = InputFile {
        path: dem_path.display().to_string(),
        size_bytes,
        sha256,
        crs_wkt: info.crs_wkt.clone(),
        crs_authority: info.crs_authority.clone(),
        body_radius_m: info.body_radius_m,
    };

    let all_tiles = tiles(info.width, info.height, parameters.tile_px);
    let mine: Vec<&Tile> = all_tiles
        .iter()
        .filter(|t| opts.shard.is_none_or(|s| s.owns(t.index)))
        .collect();
    let mut checkpoint = match &opts.checkpoint {
        Some(path) => Some(Checkpoint::open(path, &input, &parameters, opts.shard)?),
        None => None,
    };
    let done_before = checkpoint
        .as_ref()
        .map(|c| c.finished().clone())
        .unwrap_or_default();
    let todo: Vec<&&Tile> = mine
        .iter()
        .filter(|t| !done_before.contains_key(&t.index))
        .collect();

    let detect_opts = DetectOptions {
        diameter_min_m: parameters.diameter_min_m,
        diameter_max_m: parameters.diameter_max_m,
        ..DetectOptions::default()
    };
    let measure_opts = MeasureOptions::default();
    let total = mine.len();
    let done = AtomicUsize::new(mine.len() - todo.len());
    let candidates_so_far = AtomicUsize::new(done_before.values().map(Vec::len).sum());
    let pixels_done = AtomicU64::new(0);
    let valid_px = AtomicU64::new(0);
    let geometry = dem.geometry();
    let checkpoint_lock = Mutex::new(checkpoint.as_mut());
    let computed = Mutex::new(Vec::<(usize, Vec<Found>)>::new());

    todo.par_iter()
        .try_for_each(|t| -> Result<(), SurveyError> {
            if cancel.load(Ordering::Relaxed) {
                return Err(SurveyError::Cancelled);
            }
            // The halo stops at the raster's edge: beyond it there is nothing to read, and a
            // window padded with no-data would only cost memory and detection time.
            let c0 = t.col.saturating_sub(halo_px);
            let r0 = t.row.saturating_sub(halo_px);
            let c1 = (t.col + t.width + halo_px).min(info.width);
            let r1 = (t.row + t.height + halo_px).min(info.height);
            let window = dem.read_window(c0 as isize, r0 as isize, c1 - c0, r1 - r0)?;
            let (core_c, core_r) = (t.col - c0, t.row - r0);
            // A crater belongs to the tile whose core holds its centre.
            let owns = |lon: f64, lat: f64| {
                geometry.lonlat_to_pixel(lon, lat).is_some_and(|(c, r)| {
                    c >= t.col as f64
                        && c < (t.col + t.width) as f64
                        && r >= t.row as f64
                        && r < (t.row + t.height) as f64
                })
            };
            let core_valid = (core_r..core_r + t.height)
                .map(|r| {
                    window.heights_m[r * window.width + core_c..r * window.width + core_c + t.width]
                        .iter()
                        .filter(|h| !h.is_nan())
                        .count() as u64
                })
                .sum::<u64>();
            valid_px.fetch_add(core_valid, Ordering::Relaxed);
            let mut here: Vec<(CandidateSource, CraterMeasurement)> = Vec::new();
            if opts.detect && window.valid_fraction() > 0.0 {
                match craters::survey_grid(&window, &detect_opts, &measure_opts) {
                    Ok(v) => here.extend(
                        v.into_iter()
                            .filter(|m| owns(m.centre_lon_deg, m.centre_lat_deg))
                            .map(|m| (CandidateSource::Detected, m)),
                    ),
                    Err(craters::CraterError::AllNodata) => {}
                    Err(e) => return Err(e.into()),
                }
            }
            let tile_seeds: Vec<&CatalogueRow> = seeds
                .iter()
                .filter(|s| owns(s.lon_deg, s.lat_deg))
                .collect();
            here.extend(
                tile_seeds
                    .par_iter()
                    .filter_map(|s| {
                        craters::measure(&window, s.lon_deg, s.lat_deg, s.diameter_m, &measure_opts)
                            .ok()
                            .map(|m| (CandidateSource::Catalogue { row: s.line }, m))
                    })
                    .collect::<Vec<_>>(),
            );
            let vis: Vec<Option<SiteVisibility>> = if opts.visibility {
                let sites: Vec<(f64, f64)> = here
                    .iter()
                    .map(|(_, m)| (m.centre_lon_deg, m.centre_lat_deg))
                    .collect();
                visibility::bulk(&sites, Some(&window), &opts.visibility_options)
                    .into_iter()
                    .map(Some)
                    .collect()
            } else {
                vec![None; here.len()]
            };
            let fits: Vec<Option<structure::StructureFit>> = match &parameters.structure {
                Some(spec) => here
                    .par_iter()
                    .map(|(_, m)| structure::fit(&window, m, spec).ok())
                    .collect(),
                None => vec![None; here.len()],
            };
            let reports = tile_operations(ops.as_ref(), &window, &here, &fits);
            let found: Vec<Found> = here
                .into_iter()
                .zip(vis)
                .zip(fits)
                .zip(reports)
                .map(
                    |((((source, crater), visibility), fit), operations)| Found {
                        source,
                        crater,
                        visibility,
                        fit,
                        operations,
                    },
                )
                .collect();
            if let Some(cp) = checkpoint_lock
                .lock()
                .unwrap_or_else(|p| p.into_inner())
                .as_mut()
            {
                cp.record(t.index, &found)?;
            }
            let n = candidates_so_far.fetch_add(found.len(), Ordering::Relaxed) + found.len();
            computed
                .lock()
                .unwrap_or_else(|p| p.into_inner())
                .push((t.index, found));
            let d = done.fetch_add(1, Ordering::Relaxed) + 1;
            let px = (t.width * t.height) as u64;
            let p = pixels_done.fetch_add(px, Ordering::Relaxed) + px;
            progress(Progress {
                tiles_done: d,
                tiles_total: total,
                candidates: n,
                pixels_done: p,
            });
            Ok(())
        })?;

    // A whole survey of a raster without a single height is a mistake worth stopping for; one
    // empty shard among many is not.
    if opts.shard.is_none() && done_before.is_empty() && valid_px.into_inner() == 0 {
        return Err(terrain::TerrainError::AllNodata {
            path: dem_path.to_path_buf(),
        }
        .into());
    }
    let mut found: Vec<Found> = done_before.into_values().flatten().collect();
    found.extend(
        computed
            .into_inner()
            .unwrap_or_else(|p| p.into_inner())
            .into_iter()
            .flat_map(|(_, f)| f),
    );
    let survey = SurveyFile {
        schema_version: SCHEMA_VERSION,
        tool_version: env!("CARGO_PKG_VERSION").to_string(),
        input,
        parameters,
        shard: opts.shard,
        candidates: into_candidates(found),
    };
    Ok(RunOutcome {
        survey,
        skipped_rows,
        width_px: info.width,
        height_px: info.height,
        tiles_resumed: mine.len() - todo.len(),
        pixels_computed: pixels_done.into_inner(),
    })
}

#[cfg(test)]
mod tests {
    use super::whole_raster_tile;

    #[test]
    fn one_tile_only_when_every_window_spans_the_raster_and_one_fits() {
        let gb2 = 2usize << 30;
        // 3000 px square, 2048 px tiles, 855 px halo (20 km craters on 30 m posts): one tile.
        assert_eq!(whole_raster_tile(3000, 3000, 2048, 855, gb2), 3000);
        // Narrow halos leave the tiling alone (1-2 km craters on a large mosaic).
        assert_eq!(whole_raster_tile(40_000, 40_000, 2048, 86, gb2), 2048);
        assert_eq!(whole_raster_tile(2000, 2000, 500, 169, gb2), 500);
        // A raster whose window would not fit twice in the budget keeps its tiles.
        assert_eq!(whole_raster_tile(3000, 3000, 2048, 855, 512 << 20), 2048);
        // Already one tile.
        assert_eq!(whole_raster_tile(2000, 2000, 2048, 855, gb2), 2048);
    }
}
