//! The recovery file: what the user decided since the last save (criteria, decisions, notes),
//! written in the background of normal work to the user's data folder and removed on a clean
//! quit. A restart that finds it (the window died, the machine went down) offers to restore it.
//!
//! It names the survey it belongs to by file and by key (`session::survey_key`), so it is
//! only ever applied to that survey. A survey run in the window and never saved is written
//! once beside it, as that survey's file.

use crate::engine::Criteria;
use serde::{Deserialize, Serialize};
use siting::study::CandidateReview;
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

/// The value of the `format` key of a recovery file.
pub const RECOVERY_FORMAT: &str = "quietbowl-recovery";
/// Layout version; a file of another version is not offered (it is recovery, not archive).
pub const RECOVERY_VERSION: u32 = 1;
/// Name of the app's folder in the user data folder (as eframe names its storage).
pub const APP_ID: &str = "quietbowl-workbench";

#[derive(Debug, thiserror::Error)]
pub enum RecoveryError {
    #[error("cannot write the recovery file {path}: {source}")]
    Write {
        path: PathBuf,
        source: std::io::Error,
    },
    #[error("cannot read the recovery file {path}: {source}")]
    Read {
        path: PathBuf,
        source: std::io::Error,
    },
    #[error("the recovery file {path} is damaged or from another version: {reason}")]
    Bad { path: PathBuf, reason: String },
    #[error("cannot write the survey for recovery: {0}")]
    Survey(String),
}

/// Unsaved work, as the recovery file holds it.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Recovery {
    pub format: String,
    pub version: u32,
    /// Seconds since 1970 (UTC) when it was written, to tell the user how old it is.
    pub written_unix_s: u64,
    /// Where to read the survey: a survey or study file.
    pub survey_file: PathBuf,
    /// The survey's key (`session::survey_key`): the work is applied only to that survey.
    pub survey_key: String,
    /// The study file the work was last saved to, if any (a later save goes there).
    pub study_path: Option<PathBuf>,
    /// Criteria as edited, and as last loaded (what "Revert to loaded" goes back to).
    pub criteria: Criteria,
    pub criteria_baseline: Criteria,
    pub reviews: BTreeMap<u32, CandidateReview>,
}

impl Recovery {
    pub fn new(
        survey_file: PathBuf,
        survey_key: String,
        study_path: Option<PathBuf>,
        criteria: Criteria,
        criteria_baseline: Criteria,
        reviews: BTreeMap<u32, CandidateReview>,
    ) -> Recovery {
        let written_unix_s = std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map_or(0, |d| d.as_secs());
        Recovery {
            format: RECOVERY_FORMAT.into(),
            version: RECOVERY_VERSION,
            written_unix_s,
            survey_file,
            survey_key,
            study_path,
            criteria,
            criteria_baseline,
            reviews,
        }
    }

    /// "3 min ago", "2 h ago", "5 days ago".
    pub fn age_words(&self) -> String {
        let now = std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map_or(0, |d| d.as_secs());
        let s = now.saturating_sub(self.written_unix_s);
        match s {
            0..=89 => "moments ago".into(),
            90..=5399 => format!("{} min ago", (s + 30) / 60),
            5400..=172_799 => format!("{} h ago", (s + 1800) / 3600),
            _ => format!("{} days ago", s / 86_400),
        }
    }
}

/// The folder the recovery file lives in.
#[derive(Clone, Debug)]
pub struct RecoveryStore {
    pub dir: PathBuf,
}

impl RecoveryStore {
    /// The user's data folder for the workbench (`$XDG_DATA_HOME/quietbowl-workbench` on
    /// Linux, as eframe keeps its settings).
    pub fn in_user_data() -> Option<RecoveryStore> {
        eframe::storage_dir(APP_ID).map(|dir| RecoveryStore { dir })
    }

    pub fn new(dir: impl Into<PathBuf>) -> RecoveryStore {
        RecoveryStore { dir: dir.into() }
    }

    pub fn file(&self) -> PathBuf {
        self.dir.join("recovery.json")
    }

    /// Where a survey run in the window is written for recovery.
    pub fn survey_file(&self) -> PathBuf {
        self.dir.join("recovery.survey.json")
    }

    pub fn write(&self, r: &Recovery) -> Result<(), RecoveryError> {
        let path = self.file();
        let write_err = |source| RecoveryError::Write {
            path: path.clone(),
            source,
        };
        std::fs::create_dir_all(&self.dir).map_err(write_err)?;
        let text = serde_json::to_string_pretty(r).map_err(|e| RecoveryError::Bad {
            path: path.clone(),
            reason: e.to_string(),
        })?;
        terrain::atomic::write_bytes(&path, text.as_bytes()).map_err(write_err)
    }

    /// The recovery file, if one was left behind.
    pub fn read(&self) -> Result<Option<Recovery>, RecoveryError> {
        let path = self.file();
        let text = match std::fs::read_to_string(&path) {
            Ok(t) => t,
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => return Ok(None),
            Err(source) => return Err(RecoveryError::Read { path, source }),
        };
        let bad = |reason: String| RecoveryError::Bad {
            path: path.clone(),
            reason,
        };
        let r: Recovery = serde_json::from_str(&text).map_err(|e| bad(e.to_string()))?;
        if r.format != RECOVERY_FORMAT || r.version != RECOVERY_VERSION {
            return Err(bad(format!("format {} version {}", r.format, r.version)));
        }
        r.criteria.validate().map_err(|e| bad(e.to_string()))?;
        Ok(Some(r))
    }

    /// Write a survey run in the window for recovery (atomically); returns its path.
    pub fn write_survey(&self, survey: &survey::SurveyFile) -> Result<PathBuf, RecoveryError> {
        std::fs::create_dir_all(&self.dir).map_err(|source| RecoveryError::Write {
            path: self.dir.clone(),
            source,
        })?;
        let path = self.survey_file();
        survey
            .write(&path)
            .map_err(|e| RecoveryError::Survey(e.to_string()))?;
        Ok(path)
    }

    /// Forget the unsaved work (a clean quit, a save, or the user declined to restore).
    pub fn clear(&self) {
        for p in [self.file(), self.survey_file()] {
            if let Err(e) = std::fs::remove_file(&p) {
                if e.kind() != std::io::ErrorKind::NotFound {
                    eprintln!("could not remove {}: {e}", p.display());
                }
            }
        }
    }

    /// Only the recovery file, keeping a survey written for it (still needed by it).
    pub fn clear_work(&self) {
        let _ = std::fs::remove_file(self.file());
    }

    pub fn holds(&self, path: &Path) -> bool {
        path == self.survey_file()
    }
}
