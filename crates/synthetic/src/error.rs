//! Errors of the demo-terrain generator.

use std::path::PathBuf;

#[derive(Debug, thiserror::Error)]
pub enum SynthError {
    #[error("invalid demo spec: {0}")]
    InvalidSpec(String),
    #[error("GDAL could not write {path}: {reason}")]
    Gdal { path: PathBuf, reason: String },
    #[error("could not write {path}: {source}")]
    Io {
        path: PathBuf,
        source: std::io::Error,
    },
    #[error("could not serialise the truth file: {0}")]
    Json(#[from] serde_json::Error),
}
