//! The Sun's geocentric position by the low-accuracy method of Meeus, Astronomical Algorithms,
//! 2nd ed. (Willmann-Bell 1998), chapter 25 ("Solar coordinates", accuracy 0.01 deg), and its
//! direction in the Moon's body frame through the existing lunar ephemeris and orientation.
//!
//! ```
//! // Meeus example 25.a, 1992 October 13.0 TD.
//! let s = operations::sun::sun_position(2_448_908.5);
//! assert!((s.lon_deg - 199.909_88).abs() < 1e-4);
//! ```

use visibility::ephemeris::centuries_tt;
use visibility::frames::{apply, ecliptic_of_date_to_j2000, mul, r1, r3, unit, Vec3};

/// Astronomical unit, km (IAU 2012 resolution B2, exact).
pub const AU_KM: f64 = 149_597_870.7;
/// The Sun's radius, km (IAU 2015 resolution B3 nominal solar radius, 695,700 km).
pub const SUN_RADIUS_KM: f64 = 695_700.0;

/// The Sun's geometric position, mean ecliptic and equinox of date, and its apparent longitude.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SunPosition {
    /// True geometric longitude (Meeus's "sun's true longitude"), degrees in [0, 360).
    pub lon_deg: f64,
    /// Distance from the Earth's centre, astronomical units.
    pub distance_au: f64,
    /// Apparent longitude (nutation and aberration by Meeus's short correction), degrees.
    pub apparent_lon_deg: f64,
    /// Longitude of the Moon's ascending node used in that correction, degrees.
    pub node_deg: f64,
}

/// Meeus 1998 eqs. 25.2-25.5 and the apparent-longitude correction of ch. 25.
pub fn sun_position(jd_tt: f64) -> SunPosition {
    let t = centuries_tt(jd_tt);
    let l0 = 280.466_46 + t * (36_000.769_83 + t * 0.000_303_2);
    let m = 357.529_11 + t * (35_999.050_29 - t * 0.000_153_7);
    let e = 0.016_708_634 - t * (0.000_042_037 + t * 0.000_000_126_7);
    let mr = m.to_radians();
    let c = (1.914_602 - t * (0.004_817 + t * 0.000_014)) * mr.sin()
        + (0.019_993 - t * 0.000_101) * (2.0 * mr).sin()
        + 0.000_289 * (3.0 * mr).sin();
    let lon = (l0 + c).rem_euclid(360.0);
    let nu = (m + c).to_radians();
    let r = 1.000_001_018 * (1.0 - e * e) / (1.0 + e * nu.cos());
    let node = 125.04 - 1_934.136 * t;
    let apparent = lon - 0.005_69 - 0.004_78 * node.to_radians().sin();
    SunPosition {
        lon_deg: lon,
        distance_au: r,
        apparent_lon_deg: apparent.rem_euclid(360.0),
        node_deg: node,
    }
}

/// Apparent right ascension and declination, degrees, by Meeus 1998 eqs. 25.6-25.7 with the
/// obliquity corrected by 0.00256 cos(node) (mean obliquity from eq. 22.2).
pub fn sun_apparent_ra_dec_deg(jd_tt: f64) -> (f64, f64) {
    let s = sun_position(jd_tt);
    let eps =
        visibility::frames::mean_obliquity_deg(jd_tt) + 0.002_56 * s.node_deg.to_radians().cos();
    let (sl, cl) = s.apparent_lon_deg.to_radians().sin_cos();
    let (se, ce) = eps.to_radians().sin_cos();
    let ra = (ce * sl).atan2(cl).to_degrees().rem_euclid(360.0);
    let dec = (se * sl).asin().to_degrees();
    (ra, dec)
}

/// The Sun's geometric geocentric position in the J2000 mean equator frame, km (latitude 0,
/// as in the low-accuracy method: the true latitude stays under 1.2 arcsec).
pub fn sun_j2000_km(jd_tt: f64) -> Vec3 {
    let s = sun_position(jd_tt);
    let u = apply(&ecliptic_of_date_to_j2000(jd_tt), &unit(s.lon_deg, 0.0));
    u.map(|c| c * s.distance_au * AU_KM)
}

/// A rotation about z by 180 deg: from the Earth-Moon rotating frame (x from the Earth to the
/// Moon, z along the orbital angular momentum) to the Moon's mean body frame, where the mean
/// sub-Earth point is 0 E 0 N (body x towards the Earth) and the leading direction of the orbit
/// is 90 W.
pub fn rotating_to_mean_body() -> visibility::frames::Mat3 {
    mul(&r3(180.0), &r1(0.0))
}
