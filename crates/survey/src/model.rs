use craters::CraterMeasurement;
use serde::{Deserialize, Serialize};
use visibility::SiteVisibility;

/// Version of the survey file layout. Bump on any incompatible change and teach
/// [`SurveyFile::from_json`] to migrate or refuse older files with a reason.
pub const SCHEMA_VERSION: u32 = 1;

/// Where a candidate came from.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum CandidateSource {
    Detected,
    /// Seeded from a catalogue row (1-based line or feature number in that file).
    Catalogue {
        row: usize,
    },
}

/// One measured crater: the row of the survey table.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Candidate {
    /// Stable within a survey file: assigned in order of (lat, lon) after merging.
    pub id: u32,
    pub source: CandidateSource,
    pub crater: CraterMeasurement,
    pub visibility: Option<SiteVisibility>,
    /// How the survey's target structure fits this crater; `None` when no structure was given
    /// or the crater could not be fitted (no usable rim).
    #[serde(default)]
    pub fit: Option<structure::StructureFit>,
    /// Landing, anchor shots, relay link and night from the floor (docs/operations.md); `None`
    /// without a fit, with operations turned off, or in a survey made before they existed.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub operations: Option<operations::OperationsReport>,
}

/// The input DEM, identified so a result can be audited.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct InputFile {
    pub path: String,
    pub size_bytes: u64,
    pub sha256: String,
    pub crs_wkt: String,
    pub crs_authority: Option<String>,
    pub body_radius_m: f64,
}

/// Every parameter of the survey run.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct SurveyParameters {
    pub diameter_min_m: f64,
    pub diameter_max_m: f64,
    pub tile_px: usize,
    pub catalogue: Option<String>,
    pub detect: bool,
    /// The structure fitted into every candidate, if any.
    #[serde(default)]
    pub structure: Option<structure::StructureSpec>,
    /// The operations inputs every candidate's operations figures were computed with (a refit
    /// computes them again with these); `None` when they are turned off.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub operations: Option<operations::OperationsInputs>,
}

/// A share of a survey's tiles: shard `index` of `count` (1-based) takes the tiles whose
/// row-major index is `index - 1` modulo `count`, so shards interleave and balance.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Shard {
    pub index: usize,
    pub count: usize,
}

impl Shard {
    /// Parse `K/N`.
    pub fn parse(s: &str) -> Result<Shard, String> {
        let (k, n) = s
            .split_once('/')
            .ok_or_else(|| format!("'{s}' is not a shard; write K/N, e.g. 2/8"))?;
        let k: usize = k
            .trim()
            .parse()
            .map_err(|_| format!("'{k}' is not a shard number"))?;
        let n: usize = n
            .trim()
            .parse()
            .map_err(|_| format!("'{n}' is not a shard count"))?;
        let shard = Shard { index: k, count: n };
        shard.validate().map_err(|e| e.to_string())?;
        Ok(shard)
    }

    pub fn validate(&self) -> Result<(), crate::SurveyError> {
        if self.count == 0 || self.index == 0 || self.index > self.count {
            return Err(crate::SurveyError::Parameters(format!(
                "shard {}/{}: K must lie in 1..N",
                self.index, self.count
            )));
        }
        Ok(())
    }

    pub fn owns(&self, tile_index: usize) -> bool {
        tile_index % self.count == self.index - 1
    }
}

/// A whole survey: provenance, parameters and the candidate table.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct SurveyFile {
    pub schema_version: u32,
    pub tool_version: String,
    pub input: InputFile,
    pub parameters: SurveyParameters,
    /// Present on a shard's partial survey; absent on a whole one (or a merge of all shards).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub shard: Option<Shard>,
    pub candidates: Vec<Candidate>,
}
