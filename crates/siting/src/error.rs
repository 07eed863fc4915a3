use std::path::PathBuf;

use crate::criteria::CriteriaError;

/// Everything that can go wrong in ranking, export and study files.
#[derive(Debug, thiserror::Error)]
pub enum SitingError {
    #[error("criteria: {0}")]
    Criteria(#[from] CriteriaError),
    #[error("the prepared table was built for other criteria or requirements ({0}); rebuild or refresh it")]
    StaleTable(String),
    #[error("survey has {survey} candidates but the prepared table has {table}: they do not belong together")]
    SurveyMismatch { survey: usize, table: usize },
    #[error("cannot write {path}: {source}")]
    Write {
        path: PathBuf,
        source: std::io::Error,
    },
    #[error("cannot read {path}: {source}")]
    Read {
        path: PathBuf,
        source: std::io::Error,
    },
    #[error("GDAL could not write the GeoPackage {path}: {message}")]
    Gdal { path: PathBuf, message: String },
    #[error("study file: {0}")]
    Study(#[from] crate::study::StudyError),
    #[error("area: {0}")]
    Area(#[from] crate::areas::AreaError),
    #[error("JSON: {0}")]
    Json(#[from] serde_json::Error),
}
