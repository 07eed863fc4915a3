//! Reading and writing survey files: versioned JSON, written atomically (`terrain::atomic`).

use crate::model::{SurveyFile, SCHEMA_VERSION};
use crate::SurveyError;
use std::io::Write;
use std::path::Path;

/// Candidates printed at once, in parallel, before they are written out in order.
const PRINT_CHUNK: usize = 1024;

impl SurveyFile {
    /// Pretty JSON with a trailing newline. Field order is the struct order and every float is
    /// printed by serde_json's shortest round-trip form, so equal surveys give equal bytes.
    pub fn to_json(&self) -> String {
        let mut out = Vec::new();
        // Writing into memory cannot fail.
        let _ = self.write_json(&mut out);
        String::from_utf8(out).unwrap_or_default()
    }

    /// [`SurveyFile::to_json`]'s bytes, written to `out`. The candidates, nearly all of the
    /// bytes, are printed in parallel a chunk at a time (each at the indentation it has in the
    /// whole document) and written in order, giving the bytes serde_json prints for the whole
    /// value (checked by the survey_file tests) without holding them all in memory.
    pub fn write_json(&self, out: &mut dyn Write) -> std::io::Result<()> {
        use rayon::prelude::*;
        const LAST_FIELD: &str = "\n  \"candidates\": []\n}";
        let head = serde_json::to_string_pretty(&self.clone_without_candidates())
            .map_err(std::io::Error::other)?;
        let Some(head) = head.strip_suffix(LAST_FIELD) else {
            // Not the layout assumed here: print the whole value in one go.
            serde_json::to_writer_pretty(&mut *out, self).map_err(std::io::Error::other)?;
            return out.write_all(b"\n");
        };
        out.write_all(head.as_bytes())?;
        if self.candidates.is_empty() {
            out.write_all(LAST_FIELD.as_bytes())?;
            return out.write_all(b"\n");
        }
        out.write_all(b"\n  \"candidates\": [\n")?;
        for (n, chunk) in self.candidates.chunks(PRINT_CHUNK).enumerate() {
            let parts: Vec<String> = chunk
                .par_iter()
                .map(|c| {
                    let one = serde_json::to_string_pretty(c).unwrap_or_default();
                    // JSON strings hold no raw line breaks, so every line break is layout.
                    let mut s = String::with_capacity(one.len() + one.len() / 8);
                    for (i, line) in one.split('\n').enumerate() {
                        if i > 0 {
                            s.push('\n');
                        }
                        s.push_str("    ");
                        s.push_str(line);
                    }
                    s
                })
                .collect();
            for (i, p) in parts.iter().enumerate() {
                if n > 0 || i > 0 {
                    out.write_all(b",\n")?;
                }
                out.write_all(p.as_bytes())?;
            }
        }
        out.write_all(b"\n  ]\n}\n")
    }

    fn clone_without_candidates(&self) -> SurveyFile {
        SurveyFile {
            schema_version: self.schema_version,
            tool_version: self.tool_version.clone(),
            input: self.input.clone(),
            parameters: self.parameters.clone(),
            shard: self.shard,
            candidates: Vec::new(),
        }
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
        terrain::atomic::write_with(path, |w| self.write_json(w)).map_err(|e| SurveyError::Io {
            path: path.display().to_string(),
            reason: e.to_string(),
        })
    }
}
