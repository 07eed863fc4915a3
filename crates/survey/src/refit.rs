//! Refit: hang another structure in every candidate of a finished survey without measuring the
//! craters again. Only the structure fit is rerun, with the same `structure::fit` the survey
//! run calls, on the survey's own DEM.
//!
//! Each candidate is fitted on a small window read round it, cut from the window the survey
//! run read for the tile that owns it (same tile grid, same halo) and never reaching past it.
//! `structure::fit` samples the grid in whole-raster pixel coordinates (see
//! `structure::patch`), so on those heights it gives the survey's own numbers to the last bit:
//! refitting with the survey's spec returns the same file.
//!
//! The operations figures (landing, shots, relay, night) hang on the fit, so they are computed
//! again with the survey's recorded operations inputs, on a window that also holds their
//! lattice (cut to the tile's window as the run's was): the same numbers as a survey run.
//!
//! One exception: a catalogue-seeded crater belongs to the tile holding its catalogue position,
//! which the survey file does not keep; it is refitted in the tile holding its measured centre.
//! The two differ only for a crater whose measured centre moved across a tile edge, and then
//! only when its fit reaches past the other tile's halo.

use crate::model::SurveyFile;
use crate::run::{halo_px, sha256_file};
use crate::SurveyError;
use craters::CraterMeasurement;
use rayon::prelude::*;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use structure::{StructureFit, StructureSpec};
use terrain::{Dem, GridGeometry, OpenOptions, TerrainError};

/// Where a refit is, for a progress bar.
#[derive(Clone, Copy, Debug)]
pub struct RefitProgress {
    pub candidates_done: usize,
    pub candidates_total: usize,
}

/// Fit `spec` into every candidate of `file` again, reading heights from `dem_path`, which must
/// be the DEM the survey was made from (same size and SHA-256 as recorded; a file with no
/// recorded checksum is taken on trust). Returns the survey with every `Candidate::fit` and
/// `SurveyParameters::structure` replaced; everything else is kept. Candidates are fitted in
/// parallel; the result does not depend on the thread count. `progress` is called after each
/// candidate; setting `cancel` stops with [`SurveyError::RefitCancelled`].
pub fn refit(
    file: &SurveyFile,
    dem_path: &Path,
    spec: &StructureSpec,
    progress: &(dyn Fn(RefitProgress) + Sync),
    cancel: &AtomicBool,
) -> Result<SurveyFile, SurveyError> {
    spec.validate()
        .map_err(|e| SurveyError::Parameters(format!("structure: {e}")))?;
    let total = file.candidates.len();
    progress(RefitProgress {
        candidates_done: 0,
        candidates_total: total,
    });
    check_same_dem(file, dem_path)?;
    // The survey's body radius, whatever the CRS says: the same heights and pixel sizes as the
    // run (which may have been told --assume-body-radius).
    let dem = Dem::open(
        dem_path,
        &OpenOptions {
            assume_body_radius_m: Some(file.input.body_radius_m),
        },
    )?;
    let layout = TileLayout::of(&dem, file)?;
    // The relay's and the Sun's tracks, once for the whole refit.
    let ops = match &file.parameters.operations {
        Some(inputs) => Some(
            operations::Operations::new(inputs, None)
                .map_err(|e| SurveyError::Parameters(e.to_string()))?,
        ),
        None => None,
    };
    let done = AtomicUsize::new(0);
    let fits = file
        .candidates
        .par_iter()
        .map(|c| -> Result<Fitted, SurveyError> {
            if cancel.load(Ordering::Relaxed) {
                return Err(SurveyError::RefitCancelled);
            }
            let fit = fit_one(&dem, &layout, &c.crater, spec, ops.as_ref())?;
            let d = done.fetch_add(1, Ordering::Relaxed) + 1;
            progress(RefitProgress {
                candidates_done: d,
                candidates_total: total,
            });
            Ok(fit)
        })
        .collect::<Result<Vec<_>, _>>()?;
    let mut out = file.clone();
    out.tool_version = env!("CARGO_PKG_VERSION").to_string();
    out.parameters.structure = Some(spec.clone());
    for (c, (fit, operations)) in out.candidates.iter_mut().zip(fits) {
        c.fit = fit;
        c.operations = operations;
    }
    Ok(out)
}

/// True when `file`'s fits were made for `spec` (nothing to refit).
pub fn fitted_for(file: &SurveyFile, spec: &StructureSpec) -> bool {
    file.parameters.structure.as_ref() == Some(spec)
}

/// The DEM a survey was made from, as recorded in it: an absolute path as it is; a relative one
/// (the run's working folder) beside the survey file, then from the working folder, then by its
/// file name beside the survey. `Err` lists the places looked at.
pub fn locate_dem(file: &SurveyFile, survey_path: Option<&Path>) -> Result<PathBuf, SurveyError> {
    let recorded = PathBuf::from(&file.input.path);
    let base = survey_path
        .and_then(Path::parent)
        .filter(|b| !b.as_os_str().is_empty());
    let mut tries = Vec::new();
    if recorded.is_absolute() {
        tries.push(recorded.clone());
    } else {
        if let Some(b) = base {
            tries.push(b.join(&recorded));
        }
        tries.push(recorded.clone());
    }
    if let (Some(b), Some(name)) = (base, recorded.file_name()) {
        tries.push(b.join(name));
    }
    tries.dedup();
    tries
        .iter()
        .find(|p| p.is_file())
        .cloned()
        .ok_or_else(|| SurveyError::DemNotFound {
            recorded: file.input.path.clone(),
            tried: tries.iter().map(|p| p.display().to_string()).collect(),
        })
}

fn check_same_dem(file: &SurveyFile, dem_path: &Path) -> Result<(), SurveyError> {
    if file.input.sha256.is_empty() {
        return Ok(());
    }
    let mismatch = |reason: String| SurveyError::DemMismatch {
        path: dem_path.display().to_string(),
        reason,
    };
    let meta = std::fs::metadata(dem_path).map_err(|e| SurveyError::Io {
        path: dem_path.display().to_string(),
        reason: e.to_string(),
    })?;
    if meta.len() != file.input.size_bytes {
        return Err(mismatch(format!(
            "it is {} bytes, the survey's DEM was {}",
            meta.len(),
            file.input.size_bytes
        )));
    }
    let (_, sha) = sha256_file(dem_path).map_err(|e| SurveyError::Io {
        path: dem_path.display().to_string(),
        reason: e.to_string(),
    })?;
    if sha != file.input.sha256 {
        return Err(mismatch(format!(
            "its SHA-256 is {sha}, the survey recorded {}",
            file.input.sha256
        )));
    }
    Ok(())
}

/// The survey run's tile grid, rebuilt from the DEM and the recorded parameters.
struct TileLayout {
    geometry: std::sync::Arc<GridGeometry>,
    width: usize,
    height: usize,
    tile_px: usize,
    halo_px: usize,
}

impl TileLayout {
    fn of(dem: &Dem, file: &SurveyFile) -> Result<TileLayout, SurveyError> {
        let info = dem.info();
        let (px_ew, px_ns) = info.pixel_size_m;
        let pixel_m = px_ew.max(px_ns);
        let p = &file.parameters;
        if !(pixel_m.is_finite() && pixel_m > 0.0) {
            return Err(SurveyError::Parameters(
                "the DEM's pixel size could not be worked out at its centre".into(),
            ));
        }
        if p.tile_px == 0 || !(p.diameter_max_m.is_finite() && p.diameter_max_m > 0.0) {
            return Err(SurveyError::Parameters(format!(
                "the survey records tile size {} px and largest diameter {} m: not a survey this build can refit",
                p.tile_px, p.diameter_max_m
            )));
        }
        Ok(TileLayout {
            geometry: dem.geometry(),
            width: info.width,
            height: info.height,
            tile_px: p.tile_px,
            halo_px: halo_px(pixel_m, p.diameter_max_m),
        })
    }

    /// Columns (or rows) `[start, end)` of the owning tile's window along one axis, for a
    /// crater centred at pixel coordinate `x` on an axis of `len` pixels.
    fn tile_span(&self, x: f64, len: usize) -> Option<(isize, isize)> {
        if !(x >= 0.0 && x < len as f64) {
            return None;
        }
        let start = (x.floor() as usize / self.tile_px) * self.tile_px;
        let size = self.tile_px.min(len - start);
        // As the survey run reads it: the halo stops at the raster's edges.
        Some((
            start.saturating_sub(self.halo_px) as isize,
            (start + size + self.halo_px).min(len) as isize,
        ))
    }
}

/// Ground reach of a fit round the crater centre, metres: the patch `structure::fit` builds
/// (half-side the larger of 1.05 crest radii and a quarter diameter plus the aperture radius,
/// plus a few cells) and the clearance map round an axis at most a quarter diameter off,
/// with a quarter to spare.
fn fit_reach_m(c: &CraterMeasurement, spec: &StructureSpec, pixel_m: f64) -> f64 {
    let crest = c
        .rim_crest_radius_m
        .iter()
        .filter(|r| r.is_finite())
        .fold(c.diameter_m / 2.0, |m, &r| m.max(r as f64));
    let a = spec.aperture_radius_m();
    let half = (1.05 * crest).max(structure::placement::MAX_OFFSET_FRAC * c.diameter_m + a);
    1.25 * (half + 0.25 * a) + 4.0 * pixel_m
}

/// A candidate's fit and the operations figures that hang on it.
type Fitted = (Option<StructureFit>, Option<operations::OperationsReport>);

/// Ground reach of the operations round the crater centre, m: the anchors and the aim point
/// (within a diameter), the skylines' reach beyond them and the landing's dispersion.
fn operations_reach_m(c: &CraterMeasurement, ops: &operations::Operations, pixel_m: f64) -> f64 {
    let inputs = &ops.inputs;
    let reach = (inputs.skyline_reach_diameters * c.diameter_m).clamp(
        operations::SKYLINE_REACH_MIN_M,
        operations::SKYLINE_REACH_MAX_M,
    );
    c.diameter_m + reach.max(4.0 * inputs.landing_dispersion_3sigma_m / 3.0) + 4.0 * pixel_m
}

fn fit_one(
    dem: &Dem,
    layout: &TileLayout,
    c: &CraterMeasurement,
    spec: &StructureSpec,
    ops: Option<&operations::Operations>,
) -> Result<Fitted, SurveyError> {
    let geom = &layout.geometry;
    let Some((col, row)) = geom.lonlat_to_pixel(c.centre_lon_deg, c.centre_lat_deg) else {
        return Ok((None, None));
    };
    let Some((px_ew, px_ns)) = geom
        .pixel_size_m_at(col, row)
        .filter(|(a, b)| a.is_finite() && b.is_finite() && *a > 0.0 && *b > 0.0)
    else {
        return Ok((None, None));
    };
    if !(c.diameter_m.is_finite() && c.diameter_m > 0.0) {
        return Ok((None, None));
    }
    // The patch is a square in the crater's local frame; its corners are sqrt(2) half-sides
    // out in any direction the grid's axes may point.
    let pixel_m = px_ew.max(px_ns);
    let reach_m = ops.map_or(0.0, |o| operations_reach_m(c, o, pixel_m));
    let reach_px = (std::f64::consts::SQRT_2 * fit_reach_m(c, spec, pixel_m).max(reach_m)
        / px_ew.min(px_ns))
    .ceil() as isize
        + 3;
    let span = |x: f64, len: usize| -> (isize, isize) {
        let (lo, hi) = (
            x.floor() as isize - reach_px,
            x.floor() as isize + reach_px + 2,
        );
        match layout.tile_span(x, len) {
            Some((t0, t1)) => (lo.max(t0), hi.min(t1)),
            None => (lo, hi),
        }
    };
    let (c0, c1) = span(col, layout.width);
    let (r0, r1) = span(row, layout.height);
    if c1 <= c0 || r1 <= r0 {
        return Ok((None, None));
    }
    let window = match dem.read_window(c0, r0, (c1 - c0) as usize, (r1 - r0) as usize) {
        Ok(w) => w,
        Err(TerrainError::WindowOutside { .. }) => return Ok((None, None)),
        Err(e) => return Err(e.into()),
    };
    // As in the survey run: a crater the fit cannot take (no traced rim, no data) has no fit,
    // and the operations are computed for every fit, with the run's post spacing.
    let fit = structure::fit(&window, c, spec).ok();
    let post_m = window
        .geometry
        .pixel_size_m()
        .map(|(a, b)| a.min(b))
        .filter(|p| p.is_finite() && *p > 0.0);
    let report = match (ops, &fit, post_m) {
        (Some(o), Some(f), Some(p)) => o.for_candidate(&window, p, c, f),
        _ => None,
    };
    Ok((fit, report))
}
