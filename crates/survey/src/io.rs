//! Reading and writing survey files: versioned JSON, written atomically.

use crate::model::{SurveyFile, SCHEMA_VERSION};
use crate::SurveyError;
use std::io::Write;
use std::path::Path;

/// Write `bytes` to `path` so that readers see either the old file or the whole new one: write a
/// temporary file in the same directory, flush it to disk, then rename it over the target. On
/// any failure the temporary file is removed and the target is untouched.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> std::io::Result<()> {
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => std::path::PathBuf::from("."),
    };
    let name = path.file_name().ok_or_else(|| {
        std::io::Error::new(
            std::io::ErrorKind::InvalidInput,
            "the output path names no file",
        )
    })?;
    let tmp = dir.join(format!(
        ".{}.{}.tmp",
        name.to_string_lossy(),
        std::process::id()
    ));
    let result = (|| {
        let mut f = std::fs::File::create(&tmp)?;
        f.write_all(bytes)?;
        f.sync_all()?;
        std::fs::rename(&tmp, path)
    })();
    if result.is_err() {
        let _ = std::fs::remove_file(&tmp);
    }
    result
}

impl SurveyFile {
    /// Pretty JSON with a trailing newline. Field order is the struct order and every float is
    /// printed by serde_json's shortest round-trip form, so equal surveys give equal bytes.
    pub fn to_json(&self) -> String {
        let mut s = serde_json::to_string_pretty(self).unwrap_or_default();
        s.push('\n');
        s
    }

    /// Parse a survey file, refusing one from a newer schema with the reason.
    pub fn from_json(text: &str) -> Result<SurveyFile, SurveyError> {
        let value: serde_json::Value =
            serde_json::from_str(text).map_err(|e| SurveyError::Parse(e.to_string()))?;
        let version = value
            .get("schema_version")
            .and_then(|v| v.as_u64())
            .ok_or_else(|| {
                SurveyError::Parse("no schema_version: this is not a quietbowl survey file".into())
            })?;
        if version > SCHEMA_VERSION as u64 {
            return Err(SurveyError::FutureSchema {
                found: version,
                supported: SCHEMA_VERSION,
            });
        }
        // Version 1 is the first and only layout; older versions would be migrated here.
        let survey: SurveyFile =
            serde_json::from_value(value).map_err(|e| SurveyError::Parse(e.to_string()))?;
        // Resuming and merging index tiles and shards by it: refuse a share that cannot be.
        if let Some(shard) = survey.shard {
            shard
                .validate()
                .map_err(|e| SurveyError::Parse(e.to_string()))?;
        }
        Ok(survey)
    }

    pub fn read(path: &Path) -> Result<SurveyFile, SurveyError> {
        let text = std::fs::read_to_string(path).map_err(|e| SurveyError::Io {
            path: path.display().to_string(),
            reason: e.to_string(),
        })?;
        SurveyFile::from_json(&text)
    }

    pub fn write(&self, path: &Path) -> Result<(), SurveyError> {
        write_atomic(path, self.to_json().as_bytes()).map_err(|e| SurveyError::Io {
            path: path.display().to_string(),
            reason: e.to_string(),
        })
    }
}
