use serde::{Deserialize, Serialize};

/// The per-site visibility figures that join the survey table.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct SiteVisibility {
    /// Smallest margin, over the whole libration envelope, between the local horizon (terrain or
    /// sphere, whichever is higher) and the Earth's upper limb. Positive = Earth hidden.
    pub earth_clearance_deg: f64,
    /// The same with the bare sphere's horizon only (no terrain), for comparison.
    pub earth_clearance_sphere_deg: f64,
    /// Angular distance of the site behind the libration-extended limb on the sphere.
    pub limb_margin_deg: f64,
    /// Within 45 degrees of the 180 meridian (common practice, no source).
    pub far_side_band: bool,
    /// Closest approach of a zenith-fixed beam to the galactic centre over the 18.6-year cycle.
    pub gc_separation_deg: f64,
    /// Fraction of the beam's sky track within `plane_band_deg` of the galactic plane.
    pub plane_fraction: f64,
    pub plane_band_deg: f64,
}
