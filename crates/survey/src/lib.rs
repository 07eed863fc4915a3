//! The survey model: a table of measured candidate craters with the provenance needed to
//! reproduce it, its versioned JSON file, and the run that produces it from a DEM.
//!
//! The GUI, the command line and the exporters only read this model.

pub mod metrics;
pub mod model;

pub use metrics::{MetricInfo, METRICS};
pub use model::{Candidate, CandidateSource, InputFile, SurveyFile, SurveyParameters, SCHEMA_VERSION};
