//! What the operations figures depend on: the criteria file's `[operations]` table, with its
//! defaults and their sources.

use serde::{Deserialize, Serialize};

/// Where the lander is aimed.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum AimRule {
    /// Under the structure's vertex (its axis), where the fit wants the feed and the lander.
    #[default]
    Structure,
    /// The crater's centre on the floor.
    FloorCentre,
}

impl AimRule {
    pub fn key(self) -> &'static str {
        match self {
            AimRule::Structure => "structure",
            AimRule::FloorCentre => "floor_centre",
        }
    }
}

/// The operations inputs. Every key is optional in a file; each default says where it comes
/// from.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct OperationsInputs {
    /// Touchdown dispersion, 3-sigma radius of a circular Gaussian, m. Default 100 m: precision
    /// landing (common practice, no source).
    pub landing_dispersion_3sigma_m: f64,
    /// Steepest ground a lander tolerates at the post scale, degrees. Default 12: landers are
    /// typically specified for 8-15 deg (common practice, no source).
    pub landing_max_slope_deg: f64,
    /// Obstacle proxy: largest departure of a neighbouring post from the local slope's plane,
    /// m. Default 3 m: invented for the demo.
    pub landing_max_roughness_m: f64,
    /// Where the lander is aimed: `structure` (under the vertex) or `floor_centre`.
    pub aim: AimRule,
    /// Longest shot the anchor launcher can make, m. Default 3000: invented for the demo.
    pub launcher_range_m: f64,
    /// Clearance a shot line needs above the terrain, m. Default 1: invented for the demo, and
    /// below the launcher's own height (`mast_height_m`), since the line starts that high.
    pub shot_min_clearance_m: f64,
    /// Ground distance before an anchor left out of a shot's clearance, m. Default 60 (two
    /// 30 m posts of the demo: the anchor's own ground): invented for the demo.
    pub shot_end_exclusion_m: f64,
    /// Height of the launcher, antenna and solar array above the ground, m. Default 2:
    /// invented for the demo.
    pub mast_height_m: f64,
    /// Elevation the relay must stand above the skyline, degrees. Default 5 (common practice,
    /// no source).
    pub relay_margin_deg: f64,
    /// The default relay orbit: a circle of this radius about L2, perpendicular to the
    /// Earth-Moon line, km. Default 13,000: invented (halo orbits about L2 have out-of-plane
    /// amplitudes of order 10,000-15,000 km, from memory).
    pub relay_orbit_radius_km: f64,
    /// The relay orbit's period, days. Default 14: invented.
    pub relay_period_days: f64,
    /// A CSV (header `x_km,y_km,z_km`) of the relay's offsets from L2 in the Earth-Moon
    /// rotating frame over one period, equally spaced in time; replaces the circle.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub relay_orbit_csv: Option<String>,
    /// Terrain out to this many crater diameters from each point shapes the skyline (from
    /// 500 m to 8 km). Default 3: the wall and the plain round the rim; farther ground is not
    /// read, which can only lower the skyline (common practice, no source).
    pub skyline_reach_diameters: f64,
}

impl Default for OperationsInputs {
    fn default() -> Self {
        OperationsInputs {
            landing_dispersion_3sigma_m: 100.0,
            landing_max_slope_deg: 12.0,
            landing_max_roughness_m: 3.0,
            aim: AimRule::Structure,
            launcher_range_m: 3000.0,
            shot_min_clearance_m: 1.0,
            shot_end_exclusion_m: 60.0,
            mast_height_m: 2.0,
            relay_margin_deg: 5.0,
            relay_orbit_radius_km: 13_000.0,
            relay_period_days: 14.0,
            relay_orbit_csv: None,
            skyline_reach_diameters: 3.0,
        }
    }
}

impl OperationsInputs {
    /// Every number in its range; the reason names the key as a file spells it.
    pub fn validate(&self) -> Result<(), String> {
        let positive = [
            (
                "landing_dispersion_3sigma_m",
                self.landing_dispersion_3sigma_m,
            ),
            ("landing_max_roughness_m", self.landing_max_roughness_m),
            ("launcher_range_m", self.launcher_range_m),
            ("relay_period_days", self.relay_period_days),
            ("skyline_reach_diameters", self.skyline_reach_diameters),
        ];
        for (key, v) in positive {
            if !(v.is_finite() && v > 0.0) {
                return Err(format!("{key} must be a positive number (got {v})"));
            }
        }
        let non_negative = [
            ("shot_min_clearance_m", self.shot_min_clearance_m),
            ("shot_end_exclusion_m", self.shot_end_exclusion_m),
            ("mast_height_m", self.mast_height_m),
            ("relay_orbit_radius_km", self.relay_orbit_radius_km),
        ];
        for (key, v) in non_negative {
            if !(v.is_finite() && v >= 0.0) {
                return Err(format!("{key} must be zero or more (got {v})"));
            }
        }
        if !(self.landing_max_slope_deg > 0.0 && self.landing_max_slope_deg < 90.0) {
            return Err(format!(
                "landing_max_slope_deg must lie between 0 and 90 degrees (got {})",
                self.landing_max_slope_deg
            ));
        }
        if !(self.relay_margin_deg > -90.0 && self.relay_margin_deg < 90.0) {
            return Err(format!(
                "relay_margin_deg must lie between -90 and 90 degrees (got {})",
                self.relay_margin_deg
            ));
        }
        if self.relay_orbit_radius_km > 50_000.0 {
            return Err(format!(
                "relay_orbit_radius_km {} is more than 50,000 km: not an orbit about L2",
                self.relay_orbit_radius_km
            ));
        }
        Ok(())
    }
}
