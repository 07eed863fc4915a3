//! Elevation grids for quietbowl: open any raster GDAL reads, turn its values into heights in
//! metres above the body's reference sphere, read it by windows, convert between pixels,
//! lon/lat and a local metric frame, and compute slope, hillshade and roughness.
//!
//! Terrain knows nothing of craters, visibility or ranking.

pub mod atomic;
pub mod body;
pub mod derivatives;
pub mod error;
pub mod geodesy;
pub mod grid;
pub mod ingest;
pub mod projection;

pub use body::{Body, MOON_RADIUS_M};
pub use error::TerrainError;
pub use geodesy::LocalFrame;
pub use grid::{ElevationGrid, GridGeometry};
pub use ingest::{Dem, DemInfo, HeightConvention, OpenOptions};
pub use projection::MapProjection;
