//! Radial height profile of one simple crater relative to the surface it formed on: the fresh
//! shape from published morphometry, optionally degraded by topographic diffusion, tabulated
//! in rho = r / R for fast lookup, with the depth and rim height measured on the result.

use crate::diffusion::diffuse_radial;
use crate::published::{pike_depth_m, pike_rim_height_m, EJECTA_DECAY_EXPONENT};

/// The profile reaches to this many crater radii; the ejecta is gone well before.
pub const PROFILE_EXTENT_RHO: f64 = 6.0;
/// The (r/R)^-3 ejecta law is followed to here, then tapered smoothly to zero by
/// `EJECTA_END_RHO` (a demo choice: the thin distal blanket would otherwise reach everywhere).
const EJECTA_TAPER_START_RHO: f64 = 3.0;
const EJECTA_END_RHO: f64 = 5.0;
/// Table spacing in rho: 1/100 of a radius, finer than a post for any demo crater below 6 km.
const STEP_RHO: f64 = 0.01;

/// A tabulated axisymmetric crater profile (metres relative to the pre-impact surface).
#[derive(Clone, Debug)]
pub struct CraterProfile {
    pub radius_m: f64,
    heights_m: Vec<f64>,
    /// Rim crest height above the pre-impact surface and rim-crest-to-floor depth, as planted.
    pub rim_height_m: f64,
    pub depth_m: f64,
    /// Radius of the rim crest (moves outward as diffusion rounds the rim).
    pub rim_crest_radius_m: f64,
}

impl CraterProfile {
    /// Fresh simple crater of diameter `diameter_m`: a parabolic bowl whose floor lies
    /// d - h below the surroundings (depth d and rim height h from Pike 1977, from memory)
    /// rising to the rim crest at r = R, then ejecta thinning as h (r/R)^-3 (McGetchin,
    /// Settle and Head 1973). Then topographic diffusion for `kappa_t_m2` (Fassett and
    /// Thomson 2014); zero leaves it fresh.
    pub fn new(diameter_m: f64, kappa_t_m2: f64) -> CraterProfile {
        let radius_m = diameter_m / 2.0;
        let (d, h) = (pike_depth_m(diameter_m), pike_rim_height_m(diameter_m));
        let n = (PROFILE_EXTENT_RHO / STEP_RHO).round() as usize + 1;
        let mut z: Vec<f64> = (0..n)
            .map(|i| fresh_height_m(i as f64 * STEP_RHO, d, h))
            .collect();
        let tau = kappa_t_m2 / (radius_m * radius_m);
        diffuse_radial(&mut z, STEP_RHO, tau);
        let (crest_i, crest) =
            z.iter()
                .copied()
                .enumerate()
                .fold((0, f64::NEG_INFINITY), |best, (i, v)| {
                    if v > best.1 {
                        (i, v)
                    } else {
                        best
                    }
                });
        let floor = z[..=crest_i].iter().copied().fold(f64::INFINITY, f64::min);
        CraterProfile {
            radius_m,
            rim_height_m: crest,
            depth_m: crest - floor,
            rim_crest_radius_m: crest_i as f64 * STEP_RHO * radius_m,
            heights_m: z,
        }
    }

    /// Height at `rho` = r / R, linearly interpolated; zero beyond the table.
    #[inline]
    pub fn height_at_rho(&self, rho: f64) -> f64 {
        let x = rho / STEP_RHO;
        let i = x as usize;
        if i + 1 >= self.heights_m.len() {
            return 0.0;
        }
        let t = x - i as f64;
        self.heights_m[i] * (1.0 - t) + self.heights_m[i + 1] * t
    }
}

fn fresh_height_m(rho: f64, depth_m: f64, rim_m: f64) -> f64 {
    if rho <= 1.0 {
        (rim_m - depth_m) + depth_m * rho * rho
    } else if rho < EJECTA_END_RHO {
        let taper = if rho <= EJECTA_TAPER_START_RHO {
            1.0
        } else {
            let t = (rho - EJECTA_TAPER_START_RHO) / (EJECTA_END_RHO - EJECTA_TAPER_START_RHO);
            0.5 * (1.0 + (std::f64::consts::PI * t).cos())
        };
        rim_m * rho.powf(-EJECTA_DECAY_EXPONENT) * taper
    } else {
        0.0
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fresh_profile_depth_and_rim_equal_pike_1977() {
        // Pike 1977 (from memory): D = 1 km gives d = 196 m, h = 36 m.
        let p = CraterProfile::new(1000.0, 0.0);
        assert!((p.depth_m - 196.0).abs() < 1e-6);
        assert!((p.rim_height_m - 36.0).abs() < 1e-6);
        assert!((p.rim_crest_radius_m - 500.0).abs() < 1e-6);
        // Ejecta at 2R is h / 8 (McGetchin et al. 1973).
        assert!((p.height_at_rho(2.0) - 36.0 / 8.0).abs() < 1e-9);
    }

    #[test]
    fn diffusion_makes_the_bowl_shallower_and_widens_the_rim() {
        let fresh = CraterProfile::new(1000.0, 0.0);
        let old = CraterProfile::new(1000.0, 0.1 * 500.0 * 500.0);
        assert!(
            old.depth_m < 0.8 * fresh.depth_m,
            "{} vs {}",
            old.depth_m,
            fresh.depth_m
        );
        assert!(old.rim_height_m < fresh.rim_height_m);
        assert!(old.rim_crest_radius_m > fresh.rim_crest_radius_m);
    }
}
