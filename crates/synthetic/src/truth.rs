//! The ground truth of a generated patch: every planted crater as it was planted, and the
//! `truth.json` document built from them (fixed key order, fixed rounding).

use crate::patch::{PatchGrid, CRS_AUTHORITY};
use crate::population::{ground_distance_m, CraterPlan};
use crate::profile::CraterProfile;
use crate::spec::DemoSpec;
use serde::{Deserialize, Serialize};

/// Bumped whenever the generator's output changes for the same spec.
pub const GENERATOR_REVISION: u32 = 1;

#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum DegradationState {
    Fresh,
    Degraded,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum PlantedAs {
    /// Fresh, complete, level-floored, untouched by other craters: planted as a good host.
    Host,
    Background,
}

/// One planted crater. Field order is the key order in `truth.json`.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct PlantedCrater {
    /// Emplacement order, 1 = oldest; a larger id is younger.
    pub id: u32,
    /// Centre, longitude in [-180, 180) (east of the 180 meridian reads -179.x).
    pub lon_deg: f64,
    pub lat_deg: f64,
    /// Centre as a fractional pixel position (pixel-corner convention).
    pub centre_col_px: f64,
    pub centre_row_px: f64,
    /// Rim-crest diameter of the fresh shape (the nominal size).
    pub diameter_m: f64,
    /// Rim-crest diameter after degradation (equals `diameter_m` when fresh).
    pub rim_crest_diameter_m: f64,
    /// Rim crest minus floor, and rim crest above the pre-impact surface, measured on the
    /// planted radial profile after degradation.
    pub depth_m: f64,
    pub rim_height_m: f64,
    pub depth_to_diameter: f64,
    /// 1 - gap / 360 for a breached rim, else 1.
    pub rim_completeness: f64,
    /// Centre and width of the rim gap, degrees clockwise from north, or null.
    pub gap_azimuth_deg: Option<f64>,
    pub gap_width_deg: Option<f64>,
    pub degradation: DegradationState,
    /// Topographic-diffusion exposure kappa * t applied to the profile (0 when fresh).
    pub kappa_t_m2: f64,
    pub boulder_floor: bool,
    pub planted_as: PlantedAs,
    /// Younger craters whose rim crosses this crater's rim, by id, ascending.
    pub overprinted_by: Vec<u32>,
}

/// Build the truth records from the plans (emplacement order) and their profiles.
pub fn planted_craters(
    grid: &PatchGrid,
    plans: &[CraterPlan],
    profiles: &[CraterProfile],
) -> Vec<PlantedCrater> {
    plans
        .iter()
        .zip(profiles)
        .enumerate()
        .map(|(i, (plan, prof))| {
            let (lon, lat) = grid.lonlat(plan.col_px, plan.row_px);
            let overprinted_by = plans
                .iter()
                .enumerate()
                .skip(i + 1)
                .filter(|(_, y)| {
                    let dist =
                        ground_distance_m(grid, (plan.col_px, plan.row_px), (y.col_px, y.row_px));
                    dist < plan.radius_m() + y.radius_m()
                        && dist > (plan.radius_m() - y.radius_m()).abs()
                })
                .map(|(j, _)| j as u32 + 1)
                .collect();
            PlantedCrater {
                id: i as u32 + 1,
                lon_deg: round_to(lon, 1e-7),
                lat_deg: round_to(lat, 1e-7),
                centre_col_px: round_to(plan.col_px, 1e-3),
                centre_row_px: round_to(plan.row_px, 1e-3),
                diameter_m: round_to(plan.diameter_m, 1e-2),
                rim_crest_diameter_m: round_to(2.0 * prof.rim_crest_radius_m, 1e-2),
                depth_m: round_to(prof.depth_m, 1e-2),
                rim_height_m: round_to(prof.rim_height_m, 1e-2),
                depth_to_diameter: round_to(prof.depth_m / plan.diameter_m, 1e-4),
                rim_completeness: round_to(
                    1.0 - plan.breach.map_or(0.0, |b| b.width_deg) / 360.0,
                    1e-4,
                ),
                gap_azimuth_deg: plan.breach.map(|b| round_to(b.azimuth_deg, 1e-2)),
                gap_width_deg: plan.breach.map(|b| round_to(b.width_deg, 1e-2)),
                degradation: if plan.kappa_t_m2 > 0.0 {
                    DegradationState::Degraded
                } else {
                    DegradationState::Fresh
                },
                kappa_t_m2: round_to(plan.kappa_t_m2, 1e-1),
                boulder_floor: plan.boulder_floor,
                planted_as: if plan.host {
                    PlantedAs::Host
                } else {
                    PlantedAs::Background
                },
                overprinted_by,
            }
        })
        .collect()
}

/// Round to a multiple of `step`, so the JSON carries only meaningful digits.
pub fn round_to(x: f64, step: f64) -> f64 {
    let r = (x / step).round() * step;
    // Print 0 rather than -0 and keep the shortest decimal form of the rounded value.
    let r = if r == 0.0 { 0.0 } else { r };
    format!("{:.*}", decimals(step), r).parse().unwrap_or(r)
}

fn decimals(step: f64) -> usize {
    (-step.log10()).round().max(0.0) as usize
}

/// The whole `truth.json` document.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct TruthDocument {
    pub about: String,
    pub generator: String,
    pub generator_version: String,
    pub seed: u64,
    pub spec: DemoSpec,
    pub raster: RasterRecord,
    pub conventions: Conventions,
    pub crater_count: usize,
    pub craters: Vec<PlantedCrater>,
}

#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct RasterRecord {
    pub file: String,
    pub crs: String,
    pub width_px: usize,
    pub height_px: usize,
    pub geotransform: [f64; 6],
    pub post_m: f64,
    pub heights: String,
    /// SHA-256 of the heights as little-endian f32, row-major: ties this truth to its raster.
    pub heights_sha256: String,
}

#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Conventions {
    pub id: String,
    pub centre: String,
    pub depth_m: String,
    pub rim_completeness: String,
    pub degradation: String,
    pub overprinted_by: String,
    pub planted_as: String,
}

impl TruthDocument {
    pub fn new(
        spec: &DemoSpec,
        grid: &PatchGrid,
        file: &str,
        heights_sha256: String,
        craters: Vec<PlantedCrater>,
    ) -> Self {
        TruthDocument {
            about: "Invented terrain for the quietbowl demo only: not a real place and not real data. \
                    Every crater below was planted by the generator."
                .into(),
            generator: env!("CARGO_PKG_NAME").into(),
            generator_version: format!("{}+rev{}", env!("CARGO_PKG_VERSION"), GENERATOR_REVISION),
            seed: spec.seed,
            spec: spec.clone(),
            raster: RasterRecord {
                file: file.into(),
                crs: CRS_AUTHORITY.into(),
                width_px: grid.width_px,
                height_px: grid.height_px,
                geotransform: grid.geotransform,
                post_m: grid.post_m,
                heights: "float32 metres above the 1737.4 km reference sphere; nodata NaN; pixel is area".into(),
                heights_sha256,
            },
            conventions: Conventions {
                id: "emplacement order, 1 = oldest".into(),
                centre: "lon_deg in [-180, 180), planetocentric; centre_col_px/centre_row_px in the raster, pixel-corner convention (pixel centres at +0.5); a crater near an edge may be cut by it".into(),
                depth_m: "rim crest minus floor on the planted radial profile after degradation (for a breached crater, on the intact part of the rim), before the background and later craters were added; rim_height_m is the crest above the pre-impact surface".into(),
                rim_completeness: "1 - gap/360; gap_azimuth_deg is the centre of the cut sector, degrees clockwise from north".into(),
                degradation: "fresh = Pike 1977 shape untouched; degraded = topographic diffusion with exposure kappa_t_m2 (Fassett and Thomson 2014)".into(),
                overprinted_by: "ids of younger craters whose rim circle crosses this crater's rim circle".into(),
                planted_as: "host = planted on purpose: fresh, complete rim, level floor, no other crater touching it".into(),
            },
            crater_count: craters.len(),
            craters,
        }
    }

    /// Pretty JSON with a trailing newline; keys in declaration order.
    pub fn to_json(&self) -> Result<String, serde_json::Error> {
        serde_json::to_string_pretty(self).map(|s| s + "\n")
    }
}
