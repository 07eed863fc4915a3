//! Where the Earth stands over the Moon: the sub-Earth point (libration) at one instant, and the
//! envelope of all sub-Earth points over a full nodal cycle.
//!
//! Two published routes, both implemented:
//! - Meeus 1998, Astronomical Algorithms 2nd ed., ch. 53: optical libration (l', b') from the
//!   geometric ecliptic position of ch. 47 and the inclination I of the lunar equator. Kept for
//!   the worked example 53.a and as a cross-check.
//! - The IAU rotation model of the Moon (Archinal et al. 2011, Celest. Mech. Dyn. Astron.
//!   109:101) applied to the ch. 47 position carried to the J2000 equator: gives the total
//!   (optical + physical) libration. The envelope uses this route.

use crate::constants::LUNAR_EQUATOR_INCLINATION_DEG;
use crate::ephemeris::{moon_position, FundamentalArgs};
use crate::frames::{apply, ecliptic_of_date_to_j2000, unit, MoonOrientation};
use serde::Serialize;
use std::sync::OnceLock;
use terrain::projection::wrap_deg_180;

/// The sub-Earth point on the Moon and the Earth-Moon centre distance at one instant.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct SubEarthPoint {
    /// Selenographic longitude, east positive, in [-180, 180).
    pub lon_deg: f64,
    pub lat_deg: f64,
    pub distance_km: f64,
}

/// Optical libration (l', b') in degrees by Meeus 1998 ch. 53 (eqs. for W, A, l', b').
pub fn optical_libration_meeus(jd_tt: f64) -> (f64, f64) {
    let (l, b, _) = optical_with_a(jd_tt);
    (l, b)
}

/// (l', b', A) in degrees; A is the auxiliary angle the physical libration also needs.
fn optical_with_a(jd_tt: f64) -> (f64, f64, f64) {
    let pos = moon_position(jd_tt);
    let args = FundamentalArgs::at(jd_tt);
    let i = LUNAR_EQUATOR_INCLINATION_DEG.to_radians();
    // Meeus writes W = lambda - dpsi - Omega with the apparent lambda; the geometric longitude
    // of ch. 47 is already lambda - dpsi.
    let w = (pos.lon_deg - args.node_deg).to_radians();
    let beta = pos.lat_deg.to_radians();
    let a = (w.sin() * beta.cos() * i.cos() - beta.sin() * i.sin()).atan2(w.cos() * beta.cos());
    let l = wrap_deg_180(a.to_degrees() - args.f_deg);
    let b = (-w.sin() * beta.cos() * i.sin() - beta.sin() * i.cos())
        .asin()
        .to_degrees();
    (l, b, a.to_degrees())
}

/// Total libration (l' + l'', b' + b'') in degrees by Meeus 1998 ch. 53: optical plus the
/// physical libration series rho, sigma, tau (after Eckhardt 1981, The Moon and the Planets
/// 25:3). The physical part is a few hundredths of a degree.
pub fn total_libration_meeus(jd_tt: f64) -> (f64, f64) {
    let (lp, bp, a_deg) = optical_with_a(jd_tt);
    let g = FundamentalArgs::at(jd_tt);
    let t = crate::ephemeris::centuries_tt(jd_tt);
    let (d, m, mp, f, om) = (
        g.d_deg.to_radians(),
        g.m_deg.to_radians(),
        g.mp_deg.to_radians(),
        g.f_deg.to_radians(),
        g.node_deg.to_radians(),
    );
    let k1 = (119.75 + 131.849 * t).to_radians();
    let k2 = (72.56 + 20.186 * t).to_radians();
    let rho = -0.02752 * mp.cos() - 0.02245 * f.sin() + 0.00684 * (mp - 2.0 * f).cos()
        - 0.00293 * (2.0 * f).cos()
        - 0.00085 * (2.0 * f - 2.0 * d).cos()
        - 0.00054 * (mp - 2.0 * d).cos()
        - 0.00020 * (mp + f).sin()
        - 0.00020 * (mp + 2.0 * f).cos()
        - 0.00020 * (mp - f).cos()
        + 0.00014 * (mp + 2.0 * f - 2.0 * d).cos();
    let sigma = -0.02816 * mp.sin() + 0.02244 * f.cos()
        - 0.00682 * (mp - 2.0 * f).sin()
        - 0.00279 * (2.0 * f).sin()
        - 0.00083 * (2.0 * f - 2.0 * d).sin()
        + 0.00069 * (mp - 2.0 * d).sin()
        + 0.00040 * (mp + f).cos()
        - 0.00025 * (2.0 * mp).sin()
        - 0.00023 * (mp + 2.0 * f).sin()
        + 0.00020 * (mp - f).cos()
        + 0.00019 * (mp - f).sin()
        + 0.00013 * (mp + 2.0 * f - 2.0 * d).sin()
        - 0.00010 * (mp - 3.0 * f).cos();
    let tau = 0.02520 * g.e * m.sin() + 0.00473 * (2.0 * mp - 2.0 * f).sin() - 0.00467 * mp.sin()
        + 0.00396 * k1.sin()
        + 0.00276 * (2.0 * mp - 2.0 * d).sin()
        + 0.00196 * om.sin()
        - 0.00183 * (mp - f).cos()
        + 0.00115 * (mp - 2.0 * d).sin()
        - 0.00096 * (mp - d).sin()
        + 0.00046 * (2.0 * f - 2.0 * d).sin()
        - 0.00039 * (mp - f).sin()
        - 0.00032 * (mp - m - d).sin()
        + 0.00027 * (2.0 * mp - m - 2.0 * d).sin()
        + 0.00023 * k2.sin()
        - 0.00014 * (2.0 * d).sin()
        + 0.00014 * (2.0 * mp - 2.0 * f).cos()
        - 0.00012 * (mp - 2.0 * f).sin()
        - 0.00012 * (2.0 * mp).sin()
        + 0.00011 * (2.0 * mp - 2.0 * m - 2.0 * d).sin();
    let (sa, ca) = a_deg.to_radians().sin_cos();
    let l2 = -tau + (rho * ca + sigma * sa) * bp.to_radians().tan();
    let b2 = sigma * ca - rho * sa;
    (wrap_deg_180(lp + l2), bp + b2)
}

/// The Moon's geocentric position in the J2000 equatorial frame, km.
pub fn moon_j2000_km(jd_tt: f64) -> [f64; 3] {
    let p = moon_position(jd_tt);
    let u = apply(
        &ecliptic_of_date_to_j2000(jd_tt),
        &unit(p.lon_deg, p.lat_deg),
    );
    u.map(|c| c * p.distance_km)
}

/// Total libration: the sub-Earth point from the IAU rotation model applied to the Meeus
/// ch. 47 position (light time of 1.3 s neglected: under 0.001 deg of rotation).
pub fn sub_earth_point(jd_tt: f64) -> SubEarthPoint {
    let r = moon_j2000_km(jd_tt);
    let to_earth = r.map(|c| -c);
    let body = apply(&MoonOrientation::at(jd_tt).j2000_to_body(), &to_earth);
    let d = (body[0] * body[0] + body[1] * body[1] + body[2] * body[2]).sqrt();
    SubEarthPoint {
        lon_deg: wrap_deg_180(body[1].atan2(body[0]).to_degrees()),
        lat_deg: (body[2] / d).asin().to_degrees(),
        distance_km: d,
    }
}

/// All sub-Earth points over one nodal cycle, with their extremes and a conservative outline.
///
/// Sampling: every 6 hours from 2025-01-01 0h TT for 6800 days (27,200 instants), which covers
/// the 6793.5-day regression of the nodes (18.6 years) and so every combination of the
/// monthly librations with the nodal phase. The libration in longitude moves at most about
/// 1.8 deg/day, so a 6-hour step misses an extreme by at most about 0.01 deg.
#[derive(Clone, Debug, Serialize)]
pub struct LibrationEnvelope {
    pub start_jd_tt: f64,
    pub step_days: f64,
    pub samples: Vec<SubEarthPoint>,
    pub lon_min_deg: f64,
    pub lon_max_deg: f64,
    pub lat_min_deg: f64,
    pub lat_max_deg: f64,
    pub distance_min_km: f64,
    pub distance_max_km: f64,
    /// Convex hull of the samples in the (lon, lat) plane, counter-clockwise, densified to at
    /// most `OUTLINE_STEP_DEG` between points. It contains every sample, so a margin computed
    /// over it is never larger than one computed over the samples.
    pub outline: Vec<(f64, f64)>,
}

/// Largest spacing of the densified outline, degrees. Between two outline points the hull is
/// straight, so the Earth's elevation varies smoothly along it; 0.25 deg is an eighth of the
/// 2-degree ray spacing of the horizon seen from a site at the limb.
pub const OUTLINE_STEP_DEG: f64 = 0.25;
const ENVELOPE_START_JD_TT: f64 = 2_460_676.5;
const ENVELOPE_SPAN_DAYS: f64 = 6800.0;
const ENVELOPE_STEP_DAYS: f64 = 0.25;

impl LibrationEnvelope {
    /// Sample the envelope over `span_days` from `start_jd_tt` every `step_days`.
    pub fn compute(start_jd_tt: f64, span_days: f64, step_days: f64) -> Self {
        let n = (span_days / step_days).ceil().max(1.0) as usize;
        // Serial on purpose: this runs inside a `OnceLock` initialiser that may be reached from
        // rayon workers, and a nested parallel loop could steal a task that waits on the same
        // lock from the initialising thread.
        let samples: Vec<SubEarthPoint> = (0..n)
            .map(|i| sub_earth_point(start_jd_tt + i as f64 * step_days))
            .collect();
        let fold = |f: fn(&SubEarthPoint) -> f64| {
            samples
                .iter()
                .map(f)
                .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| {
                    (lo.min(v), hi.max(v))
                })
        };
        let (lon_min_deg, lon_max_deg) = fold(|s| s.lon_deg);
        let (lat_min_deg, lat_max_deg) = fold(|s| s.lat_deg);
        let (distance_min_km, distance_max_km) = fold(|s| s.distance_km);
        let hull = convex_hull(samples.iter().map(|s| (s.lon_deg, s.lat_deg)).collect());
        LibrationEnvelope {
            start_jd_tt,
            step_days,
            lon_min_deg,
            lon_max_deg,
            lat_min_deg,
            lat_max_deg,
            distance_min_km,
            distance_max_km,
            outline: densify(&hull, OUTLINE_STEP_DEG),
            samples,
        }
    }

    /// The envelope over the standard cycle (see the type's doc), computed once per process.
    pub fn standard() -> &'static LibrationEnvelope {
        static CELL: OnceLock<LibrationEnvelope> = OnceLock::new();
        CELL.get_or_init(|| {
            LibrationEnvelope::compute(ENVELOPE_START_JD_TT, ENVELOPE_SPAN_DAYS, ENVELOPE_STEP_DAYS)
        })
    }

    /// Whether a selenographic point lies inside the outline (the Earth can stand at its zenith).
    pub fn contains(&self, lon_deg: f64, lat_deg: f64) -> bool {
        let p = (wrap_deg_180(lon_deg), lat_deg);
        let n = self.outline.len();
        n >= 3
            && (0..n).all(|i| {
                let (a, b) = (self.outline[i], self.outline[(i + 1) % n]);
                cross(a, b, p) >= 0.0
            })
    }
}

fn cross(o: (f64, f64), a: (f64, f64), b: (f64, f64)) -> f64 {
    (a.0 - o.0) * (b.1 - o.1) - (a.1 - o.1) * (b.0 - o.0)
}

/// Andrew's monotone chain (Andrew 1979, Inf. Process. Lett. 9:216); counter-clockwise.
pub fn convex_hull(mut pts: Vec<(f64, f64)>) -> Vec<(f64, f64)> {
    pts.retain(|p| p.0.is_finite() && p.1.is_finite());
    pts.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.total_cmp(&b.1)));
    pts.dedup();
    if pts.len() < 3 {
        return pts;
    }
    let mut hull: Vec<(f64, f64)> = Vec::with_capacity(pts.len() / 8);
    for pass in 0..2 {
        let start = hull.len();
        let iter: Box<dyn Iterator<Item = &(f64, f64)>> = if pass == 0 {
            Box::new(pts.iter())
        } else {
            Box::new(pts.iter().rev())
        };
        for &p in iter {
            while hull.len() >= start + 2
                && cross(hull[hull.len() - 2], hull[hull.len() - 1], p) <= 0.0
            {
                hull.pop();
            }
            hull.push(p);
        }
        hull.pop();
    }
    hull
}

/// A closed ring with points added so that none lies more than `step_deg` from the next.
pub fn densify(ring: &[(f64, f64)], step_deg: f64) -> Vec<(f64, f64)> {
    let n = ring.len();
    let mut out = Vec::new();
    for i in 0..n {
        let (a, b) = (ring[i], ring[(i + 1) % n]);
        let k = ((b.0 - a.0).hypot(b.1 - a.1) / step_deg).ceil().max(1.0) as usize;
        out.extend((0..k).map(|j| {
            let f = j as f64 / k as f64;
            (a.0 + f * (b.0 - a.0), a.1 + f * (b.1 - a.1))
        }));
    }
    out
}
