//! Detect, measure and merge over one grid window, in parallel (rayon). The survey crate tiles
//! a DEM, calls this per tile (with a halo) and merges across tiles with [`crate::merge_duplicates`].

use crate::detect::{detect, DetectOptions, Detection};
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

/// Whether a measured candidate is reported as a crater: it passes the shape gates and scores
/// at least `opts.min_crater_score` on [`crater_score`].
///
/// Shape gates (common practice, no source; loose on purpose, the score does the fine sorting):
/// - diameter within the requested range;
/// - d/D at least `min_fraction_of_fresh_depth` (default a fifth) of a fresh crater's at that
///   size, and at most 0.4: degraded craters keep a good part of their depth, while random
///   hollows of rough ground are far shallower for their width;
/// - a rim traced as crests ([`CraterMeasurement::crest_fraction`]) on at least a quarter of
///   the azimuths, scattered by at most 8% of D about its circle, with a rim-height standard
///   deviation at most 0.8 of the depth.
pub fn looks_like_crater(m: &CraterMeasurement, opts: &DetectOptions) -> bool {
    failed_crater_test(m, opts).is_none()
}

/// The first test of [`looks_like_crater`] that `m` fails, in a few words (for diagnostics),
/// or `None` when it passes them all. Not-a-number fails every test it enters.
pub fn failed_crater_test(m: &CraterMeasurement, opts: &DetectOptions) -> Option<&'static str> {
    // Each test is written as what passes, so that NaN fails it.
    let failed = if !(m.diameter_m >= opts.diameter_min_m) {
        "diameter below the range"
    } else if !(m.diameter_m <= opts.diameter_max_m) {
        "diameter above the range"
    } else if !(m.depth_to_diameter
        >= opts.min_fraction_of_fresh_depth * fresh_depth_to_diameter(m.diameter_m))
    {
        "shallow"
    } else if !(m.depth_to_diameter <= 0.4) {
        "d/D above 0.4"
    } else if !(m.crest_fraction() >= 0.25) {
        "crest fraction"
    } else if !(m.rim_fit_rms_m <= 0.08 * m.diameter_m) {
        "rim scatter"
    } else if !(m.rim_height_sd_m <= 0.8 * m.depth_m) {
        "rim height sd"
    } else if !(opts.min_crater_score <= 0.0 || crater_score(m) >= opts.min_crater_score) {
        "score"
    } else {
        return None;
    };
    Some(failed)
}

/// How crater-like a measured candidate is, 0..1: a logistic regression (Cox 1958) on six
/// dimensionless measurements, each named in docs/metrics.md:
///
/// | term | measurement | weight |
/// |---|---|---|
/// | d/D over a fresh crater's at that size ([`fresh_depth_to_diameter`]) | deeper is likelier | +8.821 |
/// | share of azimuths with a rim crest | | +4.653 |
/// | rim relief over depth | | +1.146 |
/// | diameter uncertainty over diameter | | -30.56 |
/// | depth uncertainty over depth | | -17.59 |
/// | floor roughness over depth | | -10.71 |
///
/// plus an intercept of -3.872. Fitted (scikit-learn's LogisticRegression, C = 1, on
/// standardised terms, then folded back to these raw-unit weights) on every candidate that
/// passed the shape gates on demo terrains of seeds 11, 12 and 13, 2,993 candidates of which
/// 2,486 matched a planted crater; those patches are never scored. A term that is not a
/// number (a floor too small for roughness, say) adds nothing. `scripts/fit-crater-score.py`
/// refits it.
pub fn crater_score(m: &CraterMeasurement) -> f64 {
    let term = |x: f64, w: f64| if x.is_finite() { x * w } else { 0.0 };
    let z = SCORE_INTERCEPT
        + term(
            m.depth_to_diameter / fresh_depth_to_diameter(m.diameter_m),
            SCORE_WEIGHTS[0],
        )
        + term(m.crest_fraction(), SCORE_WEIGHTS[1])
        + term(m.rim_relief_m / m.depth_m, SCORE_WEIGHTS[2])
        + term(m.diameter_sd_m / m.diameter_m, SCORE_WEIGHTS[3])
        + term(m.depth_sd_m / m.depth_m, SCORE_WEIGHTS[4])
        + term(m.roughness_rms_m / m.depth_m, SCORE_WEIGHTS[5]);
    1.0 / (1.0 + (-z).exp())
}

/// [`crater_score`]'s intercept and weights, in the order of its table.
const SCORE_INTERCEPT: f64 = -3.8718;
const SCORE_WEIGHTS: [f64; 6] = [8.8208, 4.6527, 1.1456, -30.5646, -17.5856, -10.7075];

/// Size guesses tried per proposal, as factors of its diameter, in order ([`measure_proposal`]).
const GUESS_FACTORS: [f64; 2] = [1.0, 1.5];

/// A retry's size guess that lies more than this factor outside the survey's diameter range
/// is not measured: on a 144 Mpx mosaic surveyed for 1-2 km craters such retries took a fifth
/// of all measurement rounds and passed the gates 4 times in 2,159 (ours).
const RETRY_REACH: f64 = 1.4;

/// The crater a proposal leads to, if any. A proposal's size is rough (a voting radius, a
/// filled area): when the rim is not found from it, look once more at 1.5 times that size. A
/// bowl found too shallow for the depth gate is not looked at again: its rim was traced. On the
/// demo terrain the other size guesses after such a failure passed the gates 2 times in 3,018
/// tries, a quarter of all measurements, and a guess of 1/1.5 times the proposal 3 times in
/// 2,451; without either, recall and precision on the demo and seeds 1-2 stayed or rose and
/// seed 3's recall fell by 0.002 (ours; docs/metrics.md).
fn measure_proposal(
    grid: &ElevationGrid,
    d: &Detection,
    detect_opts: &DetectOptions,
    measure_opts: &MeasureOptions,
) -> Option<CraterMeasurement> {
    for f in GUESS_FACTORS {
        let dia = f * d.diameter_m;
        if f != 1.0 && detect_opts.outside_range(dia, RETRY_REACH) {
            continue;
        }
        let least = detect_opts.min_fraction_of_fresh_depth * fresh_depth_to_diameter(dia);
        match measure_screened(
            grid,
            d.lon_deg,
            d.lat_deg,
            dia,
            measure_opts,
            least,
            Some(detect_opts),
        ) {
            Ok(m) if looks_like_crater(&m, detect_opts) => return Some(m),
            Err(CraterError::BelowDepthGate { .. }) => return None,
            Ok(_) | Err(_) => {}
        }
    }
    None
}

/// Every crater found and measured in the window, duplicates merged, sorted by (lat, lon).
pub fn survey_grid(
    grid: &ElevationGrid,
    detect_opts: &DetectOptions,
    measure_opts: &MeasureOptions,
) -> Result<Vec<CraterMeasurement>, CraterError> {
    let dets = detect(grid, detect_opts)?;
    let measured: Vec<CraterMeasurement> = dets
        .par_iter()
        .filter_map(|d| measure_proposal(grid, d, detect_opts, measure_opts))
        .collect();
    Ok(merge_duplicates_on(grid.geometry.body_radius_m, measured))
}
