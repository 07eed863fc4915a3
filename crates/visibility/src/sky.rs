//! The sky a zenith-fixed beam sweeps: its track in galactic coordinates, its closest approach
//! to the galactic centre and its time near the galactic plane.
//!
//! A site at selenographic latitude phi has its zenith on the circle of declination phi about
//! the Moon's spin axis (IAU rotation model, Archinal et al. 2011), swept once per sidereal
//! month; the axis circles the ecliptic pole every 18.6 years. Over a month the closest approach
//! to a source at lunar declination delta is |phi - delta| (domain notes sec. 6).

use crate::constants::{AIRY_HALF_POWER_U, J1_FIRST_ZERO, SIDEREAL_MONTH_DAYS, SPEED_OF_LIGHT_M_S};
use crate::frames::{
    apply, dot, j2000_to_galactic, lonlat, transpose, unit, MoonOrientation, Vec3,
};
use serde::Serialize;
use std::sync::OnceLock;

/// The lunar spin axis over one nodal cycle, in the terms a beam-track summary needs.
///
/// Sampling: every 6 hours for 6800 days from 2025-01-01 0h TT (the same span as the
/// libration envelope, covering the 18.6-year cycle): the pole's monthly wobble in the IAU
/// model is a few hundredths of a degree, and this step resolves it.
#[derive(Clone, Debug, Serialize)]
pub struct PoleCycle {
    /// Lunar declination of the galactic centre: smallest and largest over the cycle, degrees.
    pub gc_dec_min_deg: f64,
    pub gc_dec_max_deg: f64,
    /// For every 27th sample (6.75 days apart), the galactic pole's components in the lunar equator frame: the part in
    /// the equator plane (length) and along the spin axis. They give the plane fraction in
    /// closed form.
    pub ngp_equatorial: Vec<(f64, f64)>,
}

const CYCLE_START_JD_TT: f64 = 2_460_676.5;
const CYCLE_SPAN_DAYS: f64 = 6800.0;
const CYCLE_STEP_DAYS: f64 = 0.25;
const PLANE_FRACTION_DECIMATION: usize = 27;

/// J2000 unit vectors of the galactic centre and the north galactic pole.
pub fn galactic_centre_and_pole_j2000() -> (Vec3, Vec3) {
    let g2e = transpose(&j2000_to_galactic());
    (apply(&g2e, &[1.0, 0.0, 0.0]), apply(&g2e, &[0.0, 0.0, 1.0]))
}

/// Lunar declination of the galactic centre at an instant, degrees.
pub fn gc_lunar_dec_deg(jd_tt: f64) -> f64 {
    let (gc, _) = galactic_centre_and_pole_j2000();
    dot(&MoonOrientation::at(jd_tt).pole(), &gc)
        .clamp(-1.0, 1.0)
        .asin()
        .to_degrees()
}

impl PoleCycle {
    pub fn standard() -> &'static PoleCycle {
        static CELL: OnceLock<PoleCycle> = OnceLock::new();
        CELL.get_or_init(|| {
            let (gc, ngp) = galactic_centre_and_pole_j2000();
            let n = (CYCLE_SPAN_DAYS / CYCLE_STEP_DAYS) as usize;
            let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
            let mut ngp_equatorial = Vec::with_capacity(n);
            for i in 0..n {
                let p = MoonOrientation::at(CYCLE_START_JD_TT + i as f64 * CYCLE_STEP_DAYS).pole();
                let dec = dot(&p, &gc).clamp(-1.0, 1.0).asin().to_degrees();
                lo = lo.min(dec);
                hi = hi.max(dec);
                // The plane fraction needs the pole's slow 18.6-year circle, not its hourly
                // wobble: one sample in PLANE_FRACTION_DECIMATION (every 6.75 days) is plenty.
                if i % PLANE_FRACTION_DECIMATION == 0 {
                    let along = dot(&p, &ngp);
                    ngp_equatorial.push(((1.0 - along * along).max(0.0).sqrt(), along));
                }
            }
            PoleCycle {
                gc_dec_min_deg: lo,
                gc_dec_max_deg: hi,
                ngp_equatorial,
            }
        })
    }

    /// Closest approach of the beam centre to the galactic centre over the cycle, degrees.
    pub fn gc_separation_deg(&self, lat_deg: f64) -> f64 {
        (self.gc_dec_min_deg - lat_deg)
            .max(lat_deg - self.gc_dec_max_deg)
            .max(0.0)
    }

    /// Largest monthly closest approach over the cycle (the epoch least favourable to a site
    /// that wants to be far from the centre is the smallest; this is the other end), degrees.
    pub fn gc_separation_worst_month_deg(&self, lat_deg: f64) -> f64 {
        (lat_deg - self.gc_dec_min_deg)
            .abs()
            .max((lat_deg - self.gc_dec_max_deg).abs())
    }

    /// Fraction of time the beam centre spends within `band_deg` of the galactic plane, over
    /// the cycle. Per sample the zenith is z = cos(phi) u + sin(phi) p with u turning uniformly
    /// in the equator, so sin(b) = A cos(t) + C with A = cos(phi) |n_eq|, C = sin(phi) n_p, and
    /// the fraction of t with |sin b| < sin(band) follows from acos.
    pub fn plane_fraction(&self, lat_deg: f64, band_deg: f64) -> f64 {
        if self.ngp_equatorial.is_empty() {
            return f64::NAN;
        }
        let (sp, cp) = lat_deg.to_radians().sin_cos();
        let s = band_deg.to_radians().sin();
        // Fraction of a uniform phase t with cos(t) <= x.
        let below = |x: f64| 1.0 - x.clamp(-1.0, 1.0).acos() / std::f64::consts::PI;
        let total: f64 = self
            .ngp_equatorial
            .iter()
            .map(|&(eq, along)| {
                let (a, c) = (cp * eq, sp * along);
                if a < 1e-12 {
                    if c.abs() < s {
                        1.0
                    } else {
                        0.0
                    }
                } else {
                    below((s - c) / a) - below((-s - c) / a)
                }
            })
            .sum();
        total / self.ngp_equatorial.len() as f64
    }
}

/// The beam centre's path in galactic (l, b) degrees, l in [0, 360), for a site at
/// (lon, lat): `n` points evenly spaced over `days` from `start_jd_tt`, from the full IAU
/// rotation model. One sidereal month ([`SIDEREAL_MONTH_DAYS`]) traces the whole circle.
pub fn beam_track_galactic(
    lon_deg: f64,
    lat_deg: f64,
    start_jd_tt: f64,
    days: f64,
    n: usize,
) -> Vec<(f64, f64)> {
    let zenith_body = unit(lon_deg, lat_deg);
    let to_gal = j2000_to_galactic();
    (0..n)
        .map(|i| {
            let jd = start_jd_tt + days * i as f64 / n.max(1) as f64;
            let z = apply(
                &transpose(&MoonOrientation::at(jd).j2000_to_body()),
                &zenith_body,
            );
            lonlat(&apply(&to_gal, &z))
        })
        .collect()
}

/// Closest angular distance of a galactic track to the galactic centre, degrees.
pub fn track_gc_separation_deg(track: &[(f64, f64)]) -> f64 {
    let gc = [1.0, 0.0, 0.0];
    track
        .iter()
        .map(|&(l, b)| dot(&unit(l, b), &gc).clamp(-1.0, 1.0).acos().to_degrees())
        .fold(f64::INFINITY, f64::min)
}

/// Beam widths of a uniformly illuminated circular aperture, degrees: (full width at half
/// power, radius of the first null) of the Airy pattern, 2 asin(1.61634 lambda/(pi D)) and
/// asin(3.831706 lambda/(pi D)), about 1.029 and 1.220 lambda/D. An aperture too small for a
/// half-power point or a null gets 180 and 90 deg.
pub fn beam_widths_deg(aperture_m: f64, frequency_hz: f64) -> (f64, f64) {
    let lambda_m = SPEED_OF_LIGHT_M_S / frequency_hz;
    let angle = |u: f64| {
        (u * lambda_m / (std::f64::consts::PI * aperture_m))
            .clamp(0.0, 1.0)
            .asin()
            .to_degrees()
    };
    (2.0 * angle(AIRY_HALF_POWER_U), angle(J1_FIRST_ZERO))
}

/// One sidereal month, days: the period of a zenith beam's sky circle.
pub const TRACK_PERIOD_DAYS: f64 = SIDEREAL_MONTH_DAYS;
