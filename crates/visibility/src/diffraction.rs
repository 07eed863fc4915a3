//! ESTIMATE ONLY: attenuation of a radio wave that creeps round a smooth sphere into its shadow.
//!
//! Past the shadow boundary the field is carried by creeping waves whose first mode decays as
//! exp(-alpha psi) with psi the angle travelled into the shadow (radians) and
//! alpha = (sqrt(3)/2) q1 (k a / 2)^(1/3) nepers per radian, k = 2 pi / lambda, a the sphere's
//! radius, q1 the first zero of Ai' (hard boundary, least attenuated) or Ai (soft boundary)
//! (Fock 1946, J. Phys. USSR 10:130; Keller 1956, IRE Trans. Antennas Propag. AP-4:312; Keller
//! 1962, J. Opt. Soc. Am. 52:116). It ignores the launch coefficient at the boundary (so it is
//! not valid within a fraction of a degree of it), the regolith's finite conductivity, terrain
//! edges and the ionosphere of the Earth: treat it as an order of magnitude, not a margin.

use crate::constants::{
    AIRY_AI_FIRST_ZERO, AIRY_AI_PRIME_FIRST_ZERO, MOON_RADIUS_KM, SPEED_OF_LIGHT_M_S,
};
use crate::earth::EarthMargin;
use serde::Serialize;

/// Attenuation in dB, (hard boundary, soft boundary), after `shadow_angle_deg` into the lunar
/// shadow at `frequency_hz`. Zero for angles at or before the boundary.
pub fn creeping_wave_attenuation_db(shadow_angle_deg: f64, frequency_hz: f64) -> (f64, f64) {
    let psi = shadow_angle_deg.max(0.0).to_radians();
    let k = 2.0 * std::f64::consts::PI * frequency_hz / SPEED_OF_LIGHT_M_S;
    let m = (k * MOON_RADIUS_KM * 1000.0 / 2.0).cbrt();
    let np_to_db = 20.0 / std::f64::consts::LN_10;
    let db = |q: f64| np_to_db * 3.0_f64.sqrt() / 2.0 * q * m * psi;
    (db(AIRY_AI_PRIME_FIRST_ZERO), db(AIRY_AI_FIRST_ZERO))
}

/// One row of the diffraction estimate.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct DiffractionEstimate {
    pub frequency_hz: f64,
    pub shadow_angle_deg: f64,
    pub attenuation_hard_db: f64,
    pub attenuation_soft_db: f64,
}

/// Frequencies the report tabulates, Hz: the low-frequency band a far-side reflector targets.
pub const REPORT_FREQUENCIES_HZ: [f64; 4] = [1.0e6, 5.0e6, 10.0e6, 30.0e6];

pub fn estimate_table(shadow_angle_deg: f64) -> Vec<DiffractionEstimate> {
    REPORT_FREQUENCIES_HZ
        .iter()
        .map(|&f| {
            let (h, s) = creeping_wave_attenuation_db(shadow_angle_deg, f);
            DiffractionEstimate {
                frequency_hz: f,
                shadow_angle_deg,
                attenuation_hard_db: h,
                attenuation_soft_db: s,
            }
        })
        .collect()
}

/// The table a site report carries for a site with Earth margin `m`: the attenuation at the
/// bare-sphere clearance (the angle into the smooth sphere's shadow); empty when the Earth can
/// rise over the bare sphere's horizon, where the estimate does not apply.
pub fn estimate_for_margin(m: &EarthMargin) -> Vec<DiffractionEstimate> {
    if m.clearance_sphere_deg > 0.0 {
        estimate_table(m.clearance_sphere_deg)
    } else {
        Vec::new()
    }
}
