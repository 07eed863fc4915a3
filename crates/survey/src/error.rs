/// What can stop a survey, with what to do about it.
#[derive(Debug, thiserror::Error)]
pub enum SurveyError {
    #[error(transparent)]
    Terrain(#[from] terrain::TerrainError),
    #[error(transparent)]
    Craters(#[from] craters::CraterError),
    #[error("the DEM ({width} x {height} px at {pixel_m:.1} m) is too small for craters of {diameter_min_m:.0} m and more: it needs at least {needed_px} px a side. Lower --diameter or use a larger DEM")]
    TooSmall {
        width: usize,
        height: usize,
        pixel_m: f64,
        diameter_min_m: f64,
        needed_px: usize,
    },
    #[error("invalid survey parameters: {0}")]
    Parameters(String),
    #[error("the survey was cancelled; nothing was written")]
    Cancelled,
    #[error("the refit was cancelled; the survey is unchanged")]
    RefitCancelled,
    #[error("the DEM this survey was made from ({recorded}) was not found; looked at: {}", tried.join(", "))]
    DemNotFound {
        recorded: String,
        tried: Vec<String>,
    },
    #[error("{path} is not the DEM this survey was made from: {reason}")]
    DemMismatch { path: String, reason: String },
    #[error("{path}: {reason}")]
    Io { path: String, reason: String },
    #[error("not a readable survey file: {0}")]
    Parse(String),
    #[error("the survey file was written with schema version {found}, newer than this build reads ({supported}); update quietbowl")]
    FutureSchema { found: u64, supported: u32 },
}
