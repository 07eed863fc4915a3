use std::path::PathBuf;

/// What can go wrong detecting, measuring or reading craters, each with what the user can do.
#[derive(Debug, thiserror::Error)]
pub enum CraterError {
    #[error("invalid options: {0}")]
    Options(String),
    #[error("the grid window ({width} x {height} px) is too small for craters of {diameter_min_m} m and up at {pixel_m:.1} m/px: it must be at least {needed_px} px across. Use a larger window or a smaller diameter range")]
    GridTooSmall {
        width: usize,
        height: usize,
        diameter_min_m: f64,
        pixel_m: f64,
        needed_px: usize,
    },
    #[error("the grid window holds no valid heights (all nodata)")]
    AllNodata,
    #[error("the grid has no usable georeferencing at this position: {0}")]
    Geometry(String),
    #[error("crater at lon {lon_deg:.4}, lat {lat_deg:.4} (D about {diameter_m:.0} m) cannot be measured: {reason}")]
    NotMeasurable {
        lon_deg: f64,
        lat_deg: f64,
        diameter_m: f64,
        reason: String,
    },
    /// Measured, but the bowl is shallower than the survey's depth gate: the rim was traced, so
    /// another size guess at the same place finds the same shallow bowl.
    #[error("crater at lon {lon_deg:.4}, lat {lat_deg:.4} (D about {diameter_m:.0} m) is not reported: {reason}")]
    BelowDepthGate {
        lon_deg: f64,
        lat_deg: f64,
        diameter_m: f64,
        reason: String,
    },
    #[error("cannot read catalogue {path}: {reason}")]
    Catalogue { path: PathBuf, reason: String },
    #[error("catalogue {path}, line {line}: {reason} (pass lenient mode to skip bad rows)")]
    CatalogueRow {
        path: PathBuf,
        line: usize,
        reason: String,
    },
}
