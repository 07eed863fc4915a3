//! Study areas and keep-out zones: polygons read from any vector file OGR reads, each a hard
//! requirement "at least `margin_km` inside" (a study area) or "at least `margin_km` outside"
//! (a keep-out zone). Geometry on the sphere: `sphere.rs`; reading and checking files:
//! `load.rs`. docs/siting.md, "Areas".

mod load;
pub mod sphere;

use std::path::{Path, PathBuf};

use rayon::prelude::*;
use serde::{Deserialize, Serialize};

pub use load::AreaError;
pub use sphere::Place;
use sphere::SphereIndex;

/// Which side of an area's edge a candidate must be on.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Keep {
    /// A study area: the candidate must lie inside (and `margin_km` in from the edge).
    Inside,
    /// A keep-out zone: the candidate must lie outside (and `margin_km` away from it).
    Outside,
}

impl Keep {
    pub fn key(self) -> &'static str {
        match self {
            Keep::Inside => "inside",
            Keep::Outside => "outside",
        }
    }

    /// What a person calls such an area.
    pub fn noun(self) -> &'static str {
        match self {
            Keep::Inside => "Study area",
            Keep::Outside => "Keep-out zone",
        }
    }
}

/// One `[[area]]` entry of a criteria file (or an `--inside` / `--outside` flag).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct AreaSpec {
    /// Any vector dataset name GDAL opens (a file, or a /vsi path). A relative path is taken
    /// from the criteria file's folder.
    pub file: String,
    /// The layer to read; None: the dataset's only layer.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub layer: Option<String>,
    /// An OGR SQL attribute filter (the WHERE clause), e.g. `kind = 'landing site'`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub filter: Option<String>,
    pub keep: Keep,
    /// At least this far inside the edge (study area) or outside it (keep-out), km; >= 0.
    #[serde(default)]
    pub margin_km: f64,
    #[serde(default)]
    pub why: String,
}

impl AreaSpec {
    /// The dataset name to open: `file` under `base` when it is relative and found there.
    pub fn resolve(&self, base: Option<&Path>) -> PathBuf {
        let file = Path::new(&self.file);
        match base {
            Some(b) if file.is_relative() && b.join(file).exists() => b.join(file),
            _ => file.to_path_buf(),
        }
    }
}

/// One polygon feature of an area, as read: its name for a person and its rings in
/// (lon, lat) degrees (outer ring first, then holes; closed), for drawing and export.
#[derive(Clone, Debug, PartialEq)]
pub struct AreaFeature {
    pub label: String,
    /// Polygons, each a list of closed rings (outer first).
    pub polygons: Vec<Vec<Vec<(f64, f64)>>>,
}

/// An area read and indexed, ready to judge candidates.
pub struct Area {
    pub spec: AreaSpec,
    /// Where it was read from.
    pub path: PathBuf,
    /// SHA-256 of the file's bytes ("" when the name is not a plain file).
    pub sha256: String,
    pub features: Vec<AreaFeature>,
    index: SphereIndex,
}

impl std::fmt::Debug for Area {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Area")
            .field("spec", &self.spec)
            .field("path", &self.path)
            .field("features", &self.features.len())
            .field("edges", &self.index.edge_count())
            .finish()
    }
}

/// How far beyond its margin a candidate's distance to an area is still measured exactly,
/// metres. Farther out only a lower bound is kept (from a cap holding the whole area), which
/// decides pass or fail all the same and spares the edge index; a reason then says "more
/// than". Common practice, no source: a reviewer reads distances near a limit.
pub const EXACT_BEYOND_MARGIN_M: f64 = 100_000.0;

/// Where a candidate stands with one area.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct AreaStanding {
    /// Index of the feature whose edge is nearest (any feature when not `exact`).
    pub feature: usize,
    /// Distance to the nearest edge on the side the area asks for, metres: positive inside a
    /// study area or outside a keep-out zone, negative on the wrong side.
    pub clearance_m: f64,
    /// False when the candidate lies more than [`EXACT_BEYOND_MARGIN_M`] beyond the margin,
    /// outside the area: then `clearance_m` is a bound (the distance is at least its size).
    pub exact: bool,
}

impl Area {
    /// Read and check the area `spec` names (`base`: the criteria file's folder).
    pub fn load(spec: &AreaSpec, base: Option<&Path>) -> Result<Area, AreaError> {
        load::load(spec, base)
    }

    /// Where the point (degrees) stands on a sphere of `radius_m`: exact up to
    /// [`EXACT_BEYOND_MARGIN_M`] beyond the margin.
    pub fn standing(&self, radius_m: f64, lon_deg: f64, lat_deg: f64) -> Option<AreaStanding> {
        let horizon_m = self.margin_m() + EXACT_BEYOND_MARGIN_M;
        self.standing_within(radius_m, lon_deg, lat_deg, horizon_m)
    }

    /// [`Area::standing`], exact up to `horizon_m` from the area (`f64::INFINITY`: always).
    pub fn standing_within(
        &self,
        radius_m: f64,
        lon_deg: f64,
        lat_deg: f64,
        horizon_m: f64,
    ) -> Option<AreaStanding> {
        self.standing_at(radius_m, &Place::new(lon_deg, lat_deg), horizon_m)
    }

    fn standing_at(&self, radius_m: f64, place: &Place, horizon_m: f64) -> Option<AreaStanding> {
        let n = self.index.nearest(radius_m, place, horizon_m)?;
        let signed = n.signed_m();
        Some(AreaStanding {
            feature: n.feature as usize,
            clearance_m: match self.spec.keep {
                Keep::Inside => signed,
                Keep::Outside => -signed,
            },
            exact: n.exact,
        })
    }

    /// The feature's name for a person: its name, or "file #index".
    pub fn feature_label(&self, feature: usize) -> &str {
        self.features
            .get(feature)
            .map_or(self.spec.file.as_str(), |f| f.label.as_str())
    }

    /// The file's name, for a person.
    pub fn name(&self) -> String {
        self.path.file_name().map_or_else(
            || self.spec.file.clone(),
            |n| n.to_string_lossy().into_owned(),
        )
    }

    /// The required clearance, metres.
    pub fn margin_m(&self) -> f64 {
        self.spec.margin_km * 1000.0
    }

    /// [`Area::standing`] of every place, in parallel and in order.
    pub fn standings(&self, radius_m: f64, places: &[Place]) -> Vec<Option<AreaStanding>> {
        let horizon_m = self.margin_m() + EXACT_BEYOND_MARGIN_M;
        places
            .par_iter()
            .with_min_len(1024)
            .map(|p| self.standing_at(radius_m, p, horizon_m))
            .collect()
    }
}

/// Read every area of a criteria set, in order.
pub fn load_all(specs: &[AreaSpec], base: Option<&Path>) -> Result<Vec<Area>, AreaError> {
    specs.iter().map(|s| Area::load(s, base)).collect()
}
