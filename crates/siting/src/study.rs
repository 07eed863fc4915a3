//! The study file: one versioned JSON file holding a whole piece of siting work (the DEM it
//! rests on, the survey, the criteria, and per-candidate notes and accept/reject decisions),
//! so it can be closed, reopened, handed on and audited.
//!
//! Versioning policy (docs/siting.md): `schema_version` is read before anything else. A file
//! from a newer layout is refused (this build cannot know what it means). An older layout
//! is brought forward one version at a time by the steps in [`migrate`]; a version with no
//! step is refused with the reason. Layout 1 is the first, so there are no steps yet.

use std::collections::BTreeMap;
use std::path::Path;

use serde::{Deserialize, Serialize};
use serde_json::Value;
use survey::SurveyFile;

use crate::criteria::Criteria;
use crate::SitingError;

pub const STUDY_FORMAT: &str = "quietbowl-study";
/// Current study layout. Bump on any incompatible change and add a step to [`migrate`].
pub const STUDY_VERSION: u32 = 1;

/// A reviewer's decision on one candidate.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Decision {
    #[default]
    Undecided,
    Accepted,
    Rejected,
}

/// Notes and decision on one candidate.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct CandidateReview {
    pub decision: Decision,
    pub note: String,
}

/// A whole study.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Study {
    pub format: String,
    pub schema_version: u32,
    /// quietbowl version that last saved the study.
    pub tool_version: String,
    /// The screening caution ([`crate::SCREENING_CAUTION`]), so the file carries it wherever
    /// it goes. Files saved before the field existed read with the current one.
    #[serde(default = "current_caution")]
    pub caution: String,
    pub dem_path: String,
    pub dem_sha256: String,
    pub survey: SurveyFile,
    pub criteria: Criteria,
    /// Keyed by candidate id.
    pub reviews: BTreeMap<u32, CandidateReview>,
}

fn current_caution() -> String {
    crate::SCREENING_CAUTION.to_string()
}

/// Why a study file cannot be opened.
#[derive(Debug, thiserror::Error)]
pub enum StudyError {
    #[error("not a quietbowl study file (format is {found:?}, expected \"quietbowl-study\")")]
    NotAStudy { found: Option<String> },
    #[error("the file has no schema_version, so its layout cannot be known")]
    NoVersion,
    #[error("written by a newer quietbowl (study layout {found}); this build reads layouts up to {supported}: open it with a newer version")]
    Newer { found: u64, supported: u32 },
    #[error("study layout {found} cannot be migrated: {reason}")]
    CannotMigrate { found: u64, reason: String },
    #[error("the embedded survey has layout {found}; this build reads survey layout {supported}")]
    SurveyVersion { found: u32, supported: u32 },
    #[error("DEM checksum {study} recorded in the study differs from the survey's {survey}: the file was edited inconsistently")]
    ChecksumMismatch { study: String, survey: String },
    #[error("criteria in the study are invalid: {0}")]
    Criteria(#[from] crate::criteria::CriteriaError),
    #[error("malformed study JSON: {0}")]
    Json(#[from] serde_json::Error),
}

impl Study {
    pub fn new(survey: SurveyFile, criteria: Criteria) -> Study {
        Study {
            format: STUDY_FORMAT.to_string(),
            schema_version: STUDY_VERSION,
            tool_version: crate::TOOL_VERSION.to_string(),
            caution: current_caution(),
            dem_path: survey.input.path.clone(),
            dem_sha256: survey.input.sha256.clone(),
            survey,
            criteria,
            reviews: BTreeMap::new(),
        }
    }

    /// Pretty JSON text; maps are ordered, so the same study gives the same text.
    pub fn to_json(&self) -> Result<String, SitingError> {
        let mut s = serde_json::to_string_pretty(self)?;
        s.push('\n');
        Ok(s)
    }

    /// Read study text, migrating an older layout or refusing with the reason.
    pub fn from_json(text: &str) -> Result<Study, StudyError> {
        let mut value: Value = serde_json::from_str(text)?;
        let format = value.get("format").and_then(Value::as_str);
        if format != Some(STUDY_FORMAT) {
            return Err(StudyError::NotAStudy {
                found: format.map(str::to_string),
            });
        }
        let version = value
            .get("schema_version")
            .and_then(Value::as_u64)
            .ok_or(StudyError::NoVersion)?;
        if version > u64::from(STUDY_VERSION) {
            return Err(StudyError::Newer {
                found: version,
                supported: STUDY_VERSION,
            });
        }
        let mut v = version;
        while v < u64::from(STUDY_VERSION) {
            value = migrate(v, value)?;
            v += 1;
        }
        if let Some(sv) = value
            .pointer("/survey/schema_version")
            .and_then(Value::as_u64)
        {
            if sv != u64::from(survey::SCHEMA_VERSION) {
                return Err(StudyError::SurveyVersion {
                    found: sv as u32,
                    supported: survey::SCHEMA_VERSION,
                });
            }
        }
        let mut study: Study = serde_json::from_value(value)?;
        // The caution is the tool's, not the file's: an older wording is not kept.
        study.caution = current_caution();
        if study.dem_sha256 != study.survey.input.sha256 {
            return Err(StudyError::ChecksumMismatch {
                study: study.dem_sha256.clone(),
                survey: study.survey.input.sha256.clone(),
            });
        }
        study.criteria.validate()?;
        Ok(study)
    }

    /// Save atomically.
    pub fn save(&self, path: &Path) -> Result<(), SitingError> {
        crate::atomic::write_bytes(path, self.to_json()?.as_bytes())
    }

    pub fn open(path: &Path) -> Result<Study, SitingError> {
        let text = std::fs::read_to_string(path).map_err(|source| SitingError::Read {
            path: path.to_path_buf(),
            source,
        })?;
        Ok(Study::from_json(&text)?)
    }

    /// Record a decision and note on candidate `id`.
    pub fn review(&mut self, id: u32, decision: Decision, note: impl Into<String>) {
        self.reviews.insert(
            id,
            CandidateReview {
                decision,
                note: note.into(),
            },
        );
    }
}

/// Bring a study from layout `from` to `from + 1`.
fn migrate(from: u64, _value: Value) -> Result<Value, StudyError> {
    // Layout 1 is the first released; anything below it never existed as a study file.
    Err(StudyError::CannotMigrate {
        found: from,
        reason: format!("layout {from} predates the first study layout (1); no migration exists"),
    })
}
