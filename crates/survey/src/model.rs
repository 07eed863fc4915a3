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
    Catalogue { row: usize },
}

/// One measured crater: the row of the survey table.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Candidate {
    /// Stable within a survey file: assigned in order of (lat, lon) after merging.
    pub id: u32,
    pub source: CandidateSource,
    pub crater: CraterMeasurement,
    pub visibility: Option<SiteVisibility>,
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
}

/// A whole survey: provenance, parameters and the candidate table.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct SurveyFile {
    pub schema_version: u32,
    pub tool_version: String,
    pub input: InputFile,
    pub parameters: SurveyParameters,
    pub candidates: Vec<Candidate>,
}
