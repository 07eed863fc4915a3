//! Structure fit: will a rim-suspended reflector of a given size and shape fit a measured
//! crater, where should it hang, and with what clearance.
//!
//! Input: an [`ElevationGrid`](terrain::ElevationGrid) window, a
//! [`CraterMeasurement`](craters::CraterMeasurement) of one crater on it (centre, rim crest per
//! azimuth) and a [`StructureSpec`] (aperture, surface shape, anchor count, clearance, largest
//! anchor height difference). Output: a [`StructureFit`].
//!
//! Method (docs/structure-fit.md has the long form):
//! 1. The terrain is resampled onto a square lattice in the crater's local azimuthal
//!    equidistant frame at the DEM's post spacing ([`patch`]); the rim crest becomes a closed
//!    polygon from the measured crest radii ([`rim`]).
//! 2. The structure is rigid with its axis vertical. For a horizontal offset of its axis, the
//!    lowest vertex keeping the surface at least the clearance above every lattice node and edge
//!    point inside the aperture is `max(ground + clearance - sag(r))`. Anchors stand where rays
//!    from the axis at evenly spaced azimuths meet the crest; their ground height is the anchor
//!    height. The surface hangs at that lowest vertex unless its edge would then rise above the
//!    lowest anchor: then it hangs with its edge level with that anchor and the ground still
//!    within the clearance is reported as excavation.
//! 3. Placements are ranked in order: aperture inside the crest; anchors on traced crest;
//!    clearance met at every sample; least excavation; anchor height spread within the limit;
//!    most headroom (how far the surface could rise before its edge reaches the lowest
//!    anchor); shortest longest span; smallest offset. A coarse grid over offsets within a
//!    quarter diameter and eight rotations per anchor period seeds a compass search
//!    ([`placement`]).
//! 4. `fit_ok` requires the first five to hold and 95% of the aperture to have data; each
//!    failure adds a reason. The clearance requirement reads every sample (lattice nodes,
//!    vertex, edge points) of the surface as hung over the ground as it is, within
//!    [`CLEARANCE_TOLERANCE_M`] of round-off: excavation is the remedy the fit prices, not a
//!    repair it assumes, so a fit that needs any digging is not `fit_ok`.
//!
//! Limits: a rigid, axis-vertical surface; ground known only at the DEM's posts (features
//! smaller than a post are invisible, so the clearance should cover the DEM's vertical and
//! horizontal error); straight spans without cable sag or loads; anchors on the crest as the
//! crater measurement traced it.

pub mod error;
mod fit;
pub mod patch;
pub mod placement;
mod result;
pub mod rim;
mod spec;

pub use error::StructureError;
pub use fit::{
    clearance_map, fit, fit_with_samples, ClearanceSample, FitDetail, CLEARANCE_MAP_CELLS,
};
pub use placement::{SampleKind, CLEARANCE_TOLERANCE_M};
pub use result::{Anchor, ClearanceMap, FitMetric, StructureFit, FIT_METRICS};
pub use spec::{
    Shape, StructureSpec, DEFAULT_ANCHORS, DEFAULT_APERTURE_M, DEFAULT_F_OVER_D,
    DEFAULT_MAX_ANCHOR_HEIGHT_DIFFERENCE_M, DEFAULT_MIN_CLEARANCE_M, MAX_ANCHORS, MIN_ANCHORS,
};
