//! Detect, measure and merge over one grid window, in parallel (rayon). The survey crate tiles
//! a DEM, calls this per tile (with a halo) and merges across tiles with [`crate::merge_duplicates`].

use crate::detect::{detect, DetectOptions};
use crate::error::CraterError;
use crate::measure::{measure_screened, MeasureOptions};
use crate::merge::merge_duplicates_on;
use crate::CraterMeasurement;
use rayon::prelude::*;
use terrain::ElevationGrid;

/// Depth-to-diameter of a fresh lunar crater of diameter `diameter_m`: simple craters
/// d = 0.196 D^1.010, complex craters (D >= 15 km) d = 1.044 D^0.301, D and d in km (Pike 1977,
/// from memory).
pub fn fresh_depth_to_diameter(diameter_m: f64) -> f64 {
    let d_km = diameter_m / 1000.0;
    if d_km < SIMPLE_COMPLEX_TRANSITION_KM {
        0.196 * d_km.powf(0.010)
    } else {
        1.044 * d_km.powf(0.301) / d_km
    }
}

/// Simple-to-complex transition on the Moon, 15-20 km (Pike 1977, from memory); the lower end.
const SIMPLE_COMPLEX_TRANSITION_KM: f64 = 15.0;

/// Shape gates a measured candidate must pass to be reported as a crater:
/// - d/D at least `min_fraction_of_fresh_depth` (default a fifth) of a fresh crater's at that
///   size, and at most 0.4: degraded craters keep a good part of their depth, while random
///   hollows of rough ground are far shallower for their width (on the demo terrain, 95% of
///   false candidates had d/D < 0.034 and 95% of true ones d/D > 0.08);
/// - a rim traced as crests ([`CraterMeasurement::crest_fraction`]) on at least 35% of the
///   azimuths, scattered by at most 6% of D about its circle, and level: rim-height standard
///   deviation at most half the depth.
///
/// The thresholds are common practice, no source, checked on the demo terrain and LOLA.
pub fn looks_like_crater(m: &CraterMeasurement, opts: &DetectOptions) -> bool {
    m.diameter_m >= opts.diameter_min_m
        && m.diameter_m <= opts.diameter_max_m
        && m.depth_to_diameter
            >= opts.min_fraction_of_fresh_depth * fresh_depth_to_diameter(m.diameter_m)
        && m.depth_to_diameter <= 0.4
        && m.crest_fraction() >= 0.35
        && m.rim_fit_rms_m <= 0.06 * m.diameter_m
        && m.rim_height_sd_m <= 0.5 * m.depth_m
}

const GUESS_FACTORS: [f64; 3] = [1.0, 1.5, 1.0 / 1.5];

/// A retry's size guess that lies more than this factor outside the survey's diameter range
/// is not measured: on a 144 Mpx mosaic surveyed for 1-2 km craters such retries took a fifth
/// of all measurement rounds and passed the gates 4 times in 2,159 (ours).
const RETRY_REACH: f64 = 1.4;

/// Every crater found and measured in the window, duplicates merged, sorted by (lat, lon).
pub fn survey_grid(
    grid: &ElevationGrid,
    detect_opts: &DetectOptions,
    measure_opts: &MeasureOptions,
) -> Result<Vec<CraterMeasurement>, CraterError> {
    let dets = detect(grid, detect_opts)?;
    let measured: Vec<CraterMeasurement> = dets
        .par_iter()
        .filter_map(|d| {
            // A proposal's size is rough (a voting radius, a filled area); when the rim is not
            // found from it, look once more on either side.
            GUESS_FACTORS.iter().find_map(|f| {
                let dia = f * d.diameter_m;
                if f != &1.0 && detect_opts.outside_range(dia, RETRY_REACH) {
                    return None;
                }
                let least = detect_opts.min_fraction_of_fresh_depth * fresh_depth_to_diameter(dia);
                measure_screened(
                    grid,
                    d.lon_deg,
                    d.lat_deg,
                    dia,
                    measure_opts,
                    least,
                    Some(detect_opts),
                )
                .ok()
                .filter(|m| looks_like_crater(m, detect_opts))
            })
        })
        .collect();
    Ok(merge_duplicates_on(grid.geometry.body_radius_m, measured))
}
