//! Crater detection and measurement from elevation grids.
//!
//! Input: a [`terrain::ElevationGrid`] window. Output: [`CraterMeasurement`]s, one per crater,
//! measured the same way whether the crater was detected here or seeded from a catalogue.
//! Craters knows nothing of visibility, ranking or the GUI.

mod measurement;
pub use measurement::CraterMeasurement;
