//! Crater detection and measurement from elevation grids.
//!
//! Input: a [`terrain::ElevationGrid`] window. Output: [`CraterMeasurement`]s, one per crater,
//! measured the same way whether the crater was detected here or seeded from a catalogue.
//! Craters knows nothing of visibility, ranking or the GUI.
//!
//! - [`detect`]: provisional craters from three cues: closed depressions, radial symmetry and
//!   bowl-shaped blobs.
//! - [`measure`]: rim, floor and uncertainties of one crater in a local metric frame.
//! - [`merge_duplicates`]: one measurement per crater across tiles and scales (R-tree).
//! - [`survey_grid`]: all three over one window, in parallel.
//! - [`catalogue::read`]: seeds from a crater list.

// `!(x > 0.0)` is how this crate refuses NaN together with the values out of range; written
// with `partial_cmp` it would say the same less plainly.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

mod blobs;
mod bootstrap;
pub mod catalogue;
mod circle_fit;
mod depressions;
mod detect;
mod ellipse_fit;
mod error;
mod floor;
mod lsq;
mod measure;
mod measurement;
mod merge;
mod profiles;
mod pyramid;
mod radial_symmetry;
mod sampler;
mod stats;
mod survey;
/// The integration tests' analytic grids, for unit tests that need a crater.
#[cfg(test)]
#[path = "../tests/common/mod.rs"]
mod test_grids;

pub use detect::{detect, Cue, DetectOptions, Detection};
pub use error::CraterError;
pub use measure::{measure, MeasureOptions};
pub use measurement::CraterMeasurement;
pub use merge::{merge_duplicates, merge_duplicates_on, same_crater};
pub use survey::{
    crater_score, failed_crater_test, fresh_depth_to_diameter, looks_like_crater, survey_grid,
};
