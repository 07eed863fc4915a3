//! The survey model: a table of measured candidate craters with the provenance needed to
//! reproduce it, its versioned JSON file, and the run that produces it from a DEM.
//!
//! The GUI, the command line and the exporters only read this model.

pub mod checkpoint;
mod error;
pub mod io;
pub mod merge;
pub mod metrics;
pub mod model;
pub mod place;
pub mod refit;
pub mod run;

pub use error::SurveyError;
pub use merge::merge;
pub use metrics::{label_of, metric, MetricInfo, MetricKind, Scope, METRICS};
pub use model::{
    Candidate, CandidateSource, InputFile, Shard, SurveyFile, SurveyParameters, SCHEMA_VERSION,
};
pub use place::{candidate_name, LonConvention};
pub use refit::{fitted_for, locate_dem, refit, RefitProgress};
pub use run::{into_candidates, run, Found, Progress, RunOptions, RunOutcome};
