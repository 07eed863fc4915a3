//! Every number this crate takes from outside the project, with its source. Everything else
//! in the generator (counts, fractions, amplitudes) is invented for the demo scenario.

/// IAU mean radius of the Moon, metres: the reference sphere heights are measured from
/// (Archinal et al. 2018, Celest. Mech. Dyn. Astron. 130:22). Re-exported from `terrain`.
pub const MOON_RADIUS_M: f64 = terrain::MOON_RADIUS_M;

/// Fresh simple lunar craters, rim-crest-to-floor depth d = a D^b with D, d in km
/// (Pike 1977, "Size-dependence in the shape of fresh impact craters on the Moon", in Impact
/// and Explosion Cratering, Pergamon; from memory).
pub const PIKE_DEPTH_COEFF_KM: f64 = 0.196;
pub const PIKE_DEPTH_EXPONENT: f64 = 1.010;

/// Fresh simple lunar craters, rim height above the surrounding plain h = a D^b, km
/// (Pike 1977, same source; from memory).
pub const PIKE_RIM_COEFF_KM: f64 = 0.036;
pub const PIKE_RIM_EXPONENT: f64 = 1.014;

/// Ejecta thickness outside the rim falls as (r/R)^-3 (McGetchin, Settle and Head 1973,
/// "Radial thickness variation in impact crater ejecta: implications for lunar basin
/// deposits", Earth Planet. Sci. Lett. 20:226-236).
pub const EJECTA_DECAY_EXPONENT: f64 = 3.0;

/// Cumulative size-frequency slope N(>D) ~ D^-2 for small craters on old surfaces
/// (common practice, no source; the Neukum production function is the careful form).
pub const SFD_CUMULATIVE_SLOPE: f64 = 2.0;

/// Hurst exponent of lunar highland topography over metres to kilometres, 0.8-0.95
/// (from memory; Rosenburg et al. 2011, JGR 116, E02001, from laser altimetry). The demo uses
/// a value inside that range.
pub const HIGHLAND_HURST: f64 = 0.85;

/// Fresh simple craters in the demo are at most this large; above the simple-to-complex
/// transition near D = 15-20 km (Pike 1977, from memory) a bowl shape would be wrong.
pub const SIMPLE_CRATER_MAX_D_M: f64 = 15_000.0;

/// Fresh simple-crater depth from Pike (1977), metres.
pub fn pike_depth_m(diameter_m: f64) -> f64 {
    PIKE_DEPTH_COEFF_KM * (diameter_m / 1000.0).powf(PIKE_DEPTH_EXPONENT) * 1000.0
}

/// Fresh simple-crater rim height from Pike (1977), metres.
pub fn pike_rim_height_m(diameter_m: f64) -> f64 {
    PIKE_RIM_COEFF_KM * (diameter_m / 1000.0).powf(PIKE_RIM_EXPONENT) * 1000.0
}
