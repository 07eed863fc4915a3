//! Rims rounded by topographic diffusion, measured on otherwise flat ground against the crest
//! of the diffused profile itself.
//!
//! The profiles are the demo generator's: a fresh simple crater (depth and rim height from Pike
//! 1977, from memory; ejecta thinning as (r/R)^-3, McGetchin, Settle and Head 1973) diffused for
//! kappa t / R^2 by the radial diffusion equation of Fassett and Thomson 2014 (JGR Planets
//! 119:2255). Diffusion moves the highest point of the rim outwards; `rim_crest_radius_m` is
//! that highest point, and it is what the measurement should report as the rim.
//!
//! What this shows (printed; the run of 2026-12-04 in brackets, profiles sampled by cubic
//! convolution):
//! - from 13 px across the crest, every exposure is measured within 2% of the crest diameter
//!   (largest difference +1.4%; 2.3% when profiles were sampled bilinearly);
//! - below 13 px, the rim rounded by kappa t / R^2 of 0.01 at 9.1 px is read 10% inside the
//!   crest (0.896): the sharp-rim rule (`flank_meet` in the profiles module) takes the corner
//!   where the flanks meet, which is where the fresh rim stood, and at this size the rounding is
//!   too small against a pixel to tell it from a sharp rim; every other case is within 2.2%.
//!   Both stay well inside the 20% the demo accuracy test matches by; docs/metrics.md states
//!   the bias.

mod common;
use common::*;
use craters::{measure, MeasureOptions};
use synthetic::profile::CraterProfile;

fn measured_over_crest(fresh_d_m: f64, kappa_t_over_r2: f64) -> (f64, f64) {
    let r = fresh_d_m / 2.0;
    let prof = CraterProfile::new(fresh_d_m, kappa_t_over_r2 * r * r);
    let crest_d = 2.0 * prof.rim_crest_radius_m;
    let g = grid_around(240, 240, 16.0, LON_C, LAT_C, |x, y| {
        prof.height_at_rho(x.hypot(y) / r)
    });
    let m = measure(&g, LON_C, LAT_C, crest_d, &MeasureOptions::default())
        .unwrap_or_else(|e| panic!("D {fresh_d_m} kappa t/R^2 {kappa_t_over_r2}: {e}"));
    (crest_d, m.diameter_m / crest_d)
}

#[test]
fn diffused_rims_are_measured_at_their_crest() {
    let exposures = [0.0, 0.01, 0.02, 0.05, 0.08, 0.12];
    for fresh_d in [240.0, 300.0, 400.0, 800.0, 1600.0] {
        for k in exposures {
            let (crest_d, ratio) = measured_over_crest(fresh_d, k);
            let px = crest_d / PIXEL_M;
            println!(
                "fresh D {fresh_d:>6} m, kappa t/R^2 {k:.2}: crest {crest_d:>6.0} m ({px:>4.1} px), measured / crest {ratio:.3}"
            );
            let tolerance = if px >= 13.0 { 0.02 } else { 0.12 };
            assert!(
                (ratio - 1.0).abs() <= tolerance,
                "fresh D {fresh_d} m, kappa t/R^2 {k}: measured / crest {ratio:.3}, beyond {tolerance}"
            );
        }
    }
}
