//! Where the relay and the Sun stand in the Moon's body frame over time (computed once per
//! survey), and how long each stands above a site's skyline.
//!
//! Time: the libration envelope's series (every 0.25 d from 2025-01-01 0h TT over the
//! 6800-day nodal cycle) for the relay, so the Moon's real orientation and the relay's phase
//! are sampled together; its first 13 synodic months (383.9 days) for the Sun: more than a
//! year, so every sub-solar latitude (the lunar seasons repeat every 346.6-day eclipse year),
//! and whole lunations, so no part-month weighs day against night; every other sample (0.5 d)
//! suffices for the Sun, which moves 6 deg a step.
//!
//! Above the skyline: at each sample the source's topocentric elevation (parallax included)
//! against the skyline bound of the 720-sector horizon in its azimuth, plus a margin. The
//! fraction of time and the gaps are integrated with the crossings interpolated linearly
//! between samples.

use crate::relay::{earth_moon_mu, l2_gamma, RelayOrbit};
use crate::sun::{sun_j2000_km, SUN_RADIUS_KM};
use serde::{Deserialize, Serialize};
use visibility::frames::{apply, dot, lonlat, unit, MoonOrientation, Vec3};
use visibility::libration::moon_j2000_km;
use visibility::Horizon;

/// Start, span and step of the series (those of `visibility::LibrationEnvelope::standard`).
pub const SERIES_START_JD_TT: f64 = 2_460_676.5;
pub const SERIES_SPAN_DAYS: f64 = 6800.0;
pub const SERIES_STEP_DAYS: f64 = 0.25;
/// Synodic month, days (Meeus 1998 ch. 49, mean value at J2000, from memory).
pub const SYNODIC_MONTH_DAYS: f64 = 29.530_589;
/// The Sun is followed over the first 13 synodic months of the series.
pub const SUN_SPAN_DAYS: f64 = 13.0 * SYNODIC_MONTH_DAYS;
/// The Sun is read every this many samples of the series (every 0.5 d): it moves about
/// 12.2 deg a day across the lunar sky, 6 deg a step, and the crossings are interpolated
/// within a step, so a finer step changes the figures by less than the skyline's own bound.
pub const SUN_EVERY: usize = 2;

/// A source's position relative to the Moon's centre in the Moon's body frame, km, at equal
/// steps of time.
#[derive(Clone, Debug)]
pub struct Track {
    pub start_jd_tt: f64,
    pub step_days: f64,
    pub positions_km: Vec<Vec3>,
    /// Radius of the source, km: its upper limb counts (0 for the relay).
    pub radius_km: f64,
}

/// The sub-source points of a track as a closed outline (convex hull in lon/lat, densified),
/// with the source's smallest distance: enough to bound its lowest elevation from any site.
#[derive(Clone, Debug)]
pub struct Outline {
    pub points: Vec<Vec3>,
    pub distance_min_km: f64,
}

impl Outline {
    fn of(track: &Track) -> Outline {
        let mean = track
            .positions_km
            .iter()
            .fold([0.0; 3], |a, p| [a[0] + p[0], a[1] + p[1], a[2] + p[2]]);
        let (lon0, _) = lonlat(&mean);
        let pts: Vec<(f64, f64)> = track
            .positions_km
            .iter()
            .map(|p| {
                let (lon, lat) = lonlat(p);
                (terrain::projection::wrap_deg_180(lon - lon0), lat)
            })
            .collect();
        let ring = visibility::libration::densify(
            &visibility::libration::convex_hull(pts),
            visibility::libration::OUTLINE_STEP_DEG,
        );
        let distance_min_km = track
            .positions_km
            .iter()
            .map(|p| dot(p, p).sqrt())
            .fold(f64::INFINITY, f64::min);
        Outline {
            points: ring.iter().map(|&(l, b)| unit(l + lon0, b)).collect(),
            distance_min_km,
        }
    }
}

/// The relay's and the Sun's tracks for one survey.
#[derive(Clone, Debug)]
pub struct SkyTracks {
    pub relay: Track,
    pub relay_outline: Outline,
    pub sun: Track,
    /// L2's distance beyond the Moon in Earth-Moon distances.
    pub gamma: f64,
}

impl SkyTracks {
    /// Sample the relay on `orbit` and the Sun over the standard series.
    pub fn compute(orbit: &RelayOrbit) -> SkyTracks {
        Self::compute_over(
            orbit,
            SERIES_START_JD_TT,
            SERIES_SPAN_DAYS,
            SERIES_STEP_DAYS,
            SUN_SPAN_DAYS,
        )
    }

    /// As [`SkyTracks::compute`] over another span (tests use short ones).
    pub fn compute_over(
        orbit: &RelayOrbit,
        start_jd_tt: f64,
        span_days: f64,
        step_days: f64,
        sun_span_days: f64,
    ) -> SkyTracks {
        let n = (span_days / step_days).ceil().max(1.0) as usize;
        let n_sun = ((sun_span_days / step_days).ceil() as usize + 1).min(n);
        let gamma = l2_gamma(earth_moon_mu());
        let jd = |i: isize| start_jd_tt + i as f64 * step_days;
        // The Moon's geocentric positions with one sample either side, for its velocity.
        let moon: Vec<Vec3> = (-1..=n as isize).map(|i| moon_j2000_km(jd(i))).collect();
        let mut relay = Vec::with_capacity(n);
        let mut sun = Vec::with_capacity(n_sun);
        for i in 0..n {
            let t = jd(i as isize);
            let r = moon[i + 1];
            let to_body = MoonOrientation::at(t).j2000_to_body();
            let (x, y, z) = rotating_axes(&r, &moon[i], &moon[i + 2]);
            let d = dot(&r, &r).sqrt();
            let off = orbit.offset_km(t - start_jd_tt);
            let along = gamma * d + off[0];
            let p = [0, 1, 2].map(|k| along * x[k] + off[1] * y[k] + off[2] * z[k]);
            relay.push(apply(&to_body, &p));
            if i < n_sun && i % SUN_EVERY == 0 {
                let s = sun_j2000_km(t);
                let rel = [s[0] - r[0], s[1] - r[1], s[2] - r[2]];
                sun.push(apply(&to_body, &rel));
            }
        }
        let relay = Track {
            start_jd_tt,
            step_days,
            positions_km: relay,
            radius_km: 0.0,
        };
        SkyTracks {
            relay_outline: Outline::of(&relay),
            relay,
            sun: Track {
                start_jd_tt,
                step_days: step_days * SUN_EVERY as f64,
                positions_km: sun,
                radius_km: SUN_RADIUS_KM,
            },
            gamma,
        }
    }
}

/// Unit axes of the Earth-Moon rotating frame from the Moon's geocentric position `r` and its
/// neighbours one step before and after (their cross product is the orbit's normal).
fn rotating_axes(r: &Vec3, before: &Vec3, after: &Vec3) -> (Vec3, Vec3, Vec3) {
    let norm = |v: Vec3| {
        let l = dot(&v, &v).sqrt();
        v.map(|c| c / l)
    };
    let x = norm(*r);
    let z = norm(cross(before, after));
    let y = cross(&z, &x);
    (x, y, z)
}

fn cross(a: &Vec3, b: &Vec3) -> Vec3 {
    [
        a[1] * b[2] - a[2] * b[1],
        a[2] * b[0] - a[0] * b[2],
        a[0] * b[1] - a[1] * b[0],
    ]
}

/// A point on the Moon with its local east, north and up, for topocentric directions.
#[derive(Clone, Copy, Debug)]
pub struct Site {
    pub lon_deg: f64,
    pub lat_deg: f64,
    /// Distance from the Moon's centre, km.
    pub radius_km: f64,
    up: Vec3,
    east: Vec3,
    north: Vec3,
}

impl Site {
    /// A site `height_m` above a sphere of `body_radius_m`.
    pub fn new(lon_deg: f64, lat_deg: f64, height_m: f64, body_radius_m: f64) -> Site {
        let (sl, cl) = lon_deg.to_radians().sin_cos();
        let (sb, cb) = lat_deg.to_radians().sin_cos();
        Site {
            lon_deg,
            lat_deg,
            radius_km: (body_radius_m + height_m) / 1000.0,
            up: [cb * cl, cb * sl, sb],
            east: [-sl, cl, 0.0],
            north: [-sb * cl, -sb * sl, cb],
        }
    }

    /// Topocentric (elevation, azimuth clockwise from north) in degrees and range in km of a
    /// body-frame position in km.
    pub fn look(&self, p_km: &Vec3) -> (f64, f64, f64) {
        let o = self.up.map(|c| c * self.radius_km);
        let v = [p_km[0] - o[0], p_km[1] - o[1], p_km[2] - o[2]];
        let range = dot(&v, &v).sqrt();
        let el = (dot(&v, &self.up) / range)
            .clamp(-1.0, 1.0)
            .asin()
            .to_degrees();
        // Within 2e-5 rad (0.001 deg) of atan2: far inside a 0.5 deg sector.
        let az = crate::skyline::atan2_approx(dot(&v, &self.east), dot(&v, &self.north))
            .to_degrees()
            .rem_euclid(360.0);
        (el, az, range)
    }
}

/// How a source stands above a site's skyline over a track.
#[derive(Clone, Copy, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct AboveSkyline {
    /// Fraction of the time the source (its upper limb, for the Sun) stands at least the
    /// margin above the skyline.
    pub fraction: f64,
    /// Longest continuous time below, hours (a gap cut by the series' ends counts as far as
    /// the series reaches).
    pub longest_gap_h: f64,
    /// Smallest height above the skyline plus margin, degrees (negative: blocked then).
    pub worst_margin_deg: f64,
    /// Azimuth of that worst case, degrees clockwise from north.
    pub worst_azimuth_deg: f64,
}

/// The source's height above the skyline plus `margin_deg` at one position, and its azimuth.
fn clearance(
    site: &Site,
    skyline: &Horizon,
    p: &Vec3,
    radius_km: f64,
    margin_deg: f64,
) -> (f64, f64) {
    let (el, az, range) = site.look(p);
    let limb = if radius_km > 0.0 {
        (radius_km / range).clamp(-1.0, 1.0).asin().to_degrees()
    } else {
        0.0
    };
    (el + limb - skyline.at(az) - margin_deg, az)
}

/// The source of `track` against `skyline` (the horizon of `site`) with `margin_deg`.
pub fn above_skyline(
    track: &Track,
    site: &Site,
    skyline: &Horizon,
    margin_deg: f64,
) -> AboveSkyline {
    let m: Vec<(f64, f64)> = track
        .positions_km
        .iter()
        .map(|p| clearance(site, skyline, p, track.radius_km, margin_deg))
        .collect();
    integrate(&m, track.step_days)
}

/// Like [`above_skyline`] for the relay, first bounding its lowest margin over the outline of
/// its sub-relay points at its smallest distance: when even that clears, the relay is in view
/// all the time and the series need not be read.
pub fn relay_above_skyline(
    tracks: &SkyTracks,
    site: &Site,
    skyline: &Horizon,
    margin_deg: f64,
) -> AboveSkyline {
    let o = &tracks.relay_outline;
    let worst = o
        .points
        .iter()
        .map(|u| {
            clearance(
                site,
                skyline,
                &u.map(|c| c * o.distance_min_km),
                0.0,
                margin_deg,
            )
        })
        .fold(
            (f64::INFINITY, f64::NAN),
            |a, b| if b.0 < a.0 { b } else { a },
        );
    if worst.0 > 0.0 {
        return AboveSkyline {
            fraction: 1.0,
            longest_gap_h: 0.0,
            worst_margin_deg: worst.0,
            worst_azimuth_deg: worst.1,
        };
    }
    above_skyline(&tracks.relay, site, skyline, margin_deg)
}

/// Fraction above zero, longest run below zero (hours) and the lowest value of a series of
/// (margin, azimuth) sampled every `step_days`, crossings interpolated linearly.
fn integrate(m: &[(f64, f64)], step_days: f64) -> AboveSkyline {
    let worst = m.iter().copied().fold(
        (f64::INFINITY, f64::NAN),
        |a, b| if b.0 < a.0 { b } else { a },
    );
    if m.len() < 2 {
        let up = m.first().is_some_and(|v| v.0 >= 0.0);
        return AboveSkyline {
            fraction: if up { 1.0 } else { 0.0 },
            longest_gap_h: 0.0,
            worst_margin_deg: worst.0,
            worst_azimuth_deg: worst.1,
        };
    }
    let (mut up_steps, mut gap, mut longest) = (0.0, 0.0_f64, 0.0_f64);
    for w in m.windows(2) {
        let (a, b) = (w[0].0, w[1].0);
        // Part of this step spent at or above zero.
        let above = if a >= 0.0 && b >= 0.0 {
            1.0
        } else if a < 0.0 && b < 0.0 {
            0.0
        } else if a >= 0.0 {
            a / (a - b)
        } else {
            b / (b - a)
        };
        up_steps += above;
        if a < 0.0 {
            gap += 1.0 - above;
            if b >= 0.0 {
                longest = longest.max(gap);
                gap = 0.0;
            }
        } else if b < 0.0 {
            gap = 1.0 - above;
        }
    }
    longest = longest.max(gap);
    let steps = (m.len() - 1) as f64;
    AboveSkyline {
        fraction: up_steps / steps,
        longest_gap_h: longest * step_days * 24.0,
        worst_margin_deg: worst.0,
        worst_azimuth_deg: worst.1,
    }
}

#[cfg(test)]
mod tests {
    use super::integrate;

    #[test]
    fn crossings_are_interpolated() {
        // +1, -1, -1, +1 at unit steps: below from 0.5 to 2.5, 2 of 3 steps.
        let m = [(1.0, 0.0), (-1.0, 0.0), (-1.0, 0.0), (1.0, 0.0)];
        let a = integrate(&m, 1.0);
        assert!((a.fraction - 1.0 / 3.0).abs() < 1e-12, "{a:?}");
        assert!((a.longest_gap_h - 48.0).abs() < 1e-9, "{a:?}");
    }
}
