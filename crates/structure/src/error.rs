/// What can stop a structure fit, each with what the user can do about it. A fit that runs but
/// finds the structure does not fit is not an error: it is a [`crate::StructureFit`] with
/// `fit_ok = false` and its reasons.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum StructureError {
    #[error("invalid structure spec: {0}. Fix the structure section of the criteria file")]
    Spec(String),
    #[error("the crater measurement cannot carry a structure fit: {0}")]
    Crater(String),
    #[error("no elevation data under the crater at lon {lon_deg:.4}, lat {lat_deg:.4}: is the grid window the one the crater was measured on?")]
    NoData { lon_deg: f64, lat_deg: f64 },
    #[error("the grid has no usable georeferencing at lon {lon_deg:.4}, lat {lat_deg:.4}")]
    Geometry { lon_deg: f64, lat_deg: f64 },
}
