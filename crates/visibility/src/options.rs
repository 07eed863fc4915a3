//! Parameters of the visibility computation and the errors they can raise.

use crate::horizon::NodataRule;
use serde::{Deserialize, Serialize};
use thiserror::Error;

#[derive(Debug, Error, Clone, PartialEq)]
pub enum VisibilityError {
    #[error("site position lon {lon_deg}, lat {lat_deg} is not a point on the Moon (latitude must lie in [-90, 90])")]
    InvalidSite { lon_deg: f64, lat_deg: f64 },
    #[error("option {name} = {value} is out of range: {expected}")]
    InvalidOption {
        name: &'static str,
        value: f64,
        expected: &'static str,
    },
}

/// How to compute a site's visibility. Defaults are stated in [`VisibilityOptions::default`].
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct VisibilityOptions {
    /// Terrain beyond this ground distance is not examined, m.
    pub horizon_max_distance_m: f64,
    /// Equal azimuth sectors around the site; each holds the lowest skyline anywhere in it
    /// (`horizon.rs`), so the sector width only adds caution, never hides a notch.
    pub horizon_azimuths: usize,
    /// What missing heights on the way to the horizon mean (default: they count against the
    /// site, as if the hole were a notch).
    pub horizon_nodata: NodataRule,
    /// Height of the instrument above the ground at the site, m.
    pub observer_height_m: f64,
    /// Half-width of the band about the galactic plane counted in `plane_fraction`, degrees.
    pub plane_band_deg: f64,
    /// Aperture diameter of the reflector, m, and the frequency its beam is quoted at, Hz.
    pub aperture_m: f64,
    pub frequency_hz: f64,
}

impl Default for VisibilityOptions {
    /// - 250 km of terrain: beyond it a point must stand d^2/(2R) = 18 km above the site to
    ///   reach 0 deg of elevation, more than the Moon's total relief (about 20 km from the
    ///   lowest to the highest point, from memory).
    /// - 720 sectors (0.5 deg each): the Earth's disc, 1.9-2.1 deg across, is tested against the
    ///   lowest skyline over every sector it touches, at most 0.5 deg wider on each side.
    /// - Missing heights count against the site.
    /// - Instrument on the ground; galactic band +-10 deg; a 1 km aperture at 10 MHz. The last
    ///   three are illustrative choices of this project, not from a source.
    fn default() -> Self {
        VisibilityOptions {
            horizon_max_distance_m: 250_000.0,
            horizon_azimuths: 720,
            horizon_nodata: NodataRule::CountsAgainst,
            observer_height_m: 0.0,
            plane_band_deg: 10.0,
            aperture_m: 1000.0,
            frequency_hz: 10.0e6,
        }
    }
}

impl VisibilityOptions {
    /// The horizon march these options ask for, with `sectors` sectors.
    pub fn horizon_spec(&self, sectors: usize) -> crate::horizon::HorizonSpec {
        crate::horizon::HorizonSpec {
            observer_height_m: self.observer_height_m,
            max_distance_m: self.horizon_max_distance_m,
            sectors,
            nodata: self.horizon_nodata,
        }
    }

    pub fn validate(&self) -> Result<(), VisibilityError> {
        let bad = |name, value: f64, expected| {
            Err(VisibilityError::InvalidOption {
                name,
                value,
                expected,
            })
        };
        if !(self.horizon_max_distance_m.is_finite() && self.horizon_max_distance_m > 0.0) {
            return bad(
                "horizon_max_distance_m",
                self.horizon_max_distance_m,
                "a positive distance",
            );
        }
        if !(4..=36_000).contains(&self.horizon_azimuths) {
            return bad(
                "horizon_azimuths",
                self.horizon_azimuths as f64,
                "between 4 and 36000",
            );
        }
        if !(self.observer_height_m.is_finite() && self.observer_height_m >= 0.0) {
            return bad("observer_height_m", self.observer_height_m, "zero or more");
        }
        if !(self.plane_band_deg.is_finite() && (0.0..=90.0).contains(&self.plane_band_deg)) {
            return bad("plane_band_deg", self.plane_band_deg, "between 0 and 90");
        }
        if !(self.aperture_m.is_finite() && self.aperture_m > 0.0) {
            return bad("aperture_m", self.aperture_m, "a positive diameter");
        }
        if !(self.frequency_hz.is_finite() && self.frequency_hz > 0.0) {
            return bad("frequency_hz", self.frequency_hz, "a positive frequency");
        }
        Ok(())
    }
}

pub fn validate_site(lon_deg: f64, lat_deg: f64) -> Result<(), VisibilityError> {
    if lon_deg.is_finite() && lat_deg.is_finite() && (-90.0..=90.0).contains(&lat_deg) {
        Ok(())
    } else {
        Err(VisibilityError::InvalidSite { lon_deg, lat_deg })
    }
}
