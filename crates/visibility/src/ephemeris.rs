//! Geocentric position of the Moon by the truncated ELP-2000/82 lunar theory of Meeus,
//! Astronomical Algorithms, 2nd ed. (Willmann-Bell 1998), chapter 47 (tables 47.A and 47.B;
//! after Chapront-Touzé & Chapront 1988). Accuracy about 10" in longitude, 4" in latitude.
//!
//! ```
//! let p = visibility::ephemeris::moon_position(2_448_724.5); // Meeus example 47.a
//! assert!((p.lon_deg - 133.162655).abs() < 1e-4);
//! ```

use crate::constants::{DAYS_PER_JULIAN_CENTURY, JD_J2000};

/// The Moon's geometric position referred to the mean ecliptic and equinox of date.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MoonPosition {
    pub lon_deg: f64,
    pub lat_deg: f64,
    pub distance_km: f64,
}

/// Mean arguments of the lunar theory, degrees (Meeus eqs. 47.1-47.5, 47.7).
#[derive(Clone, Copy, Debug)]
pub struct FundamentalArgs {
    /// Mean longitude L'.
    pub l_mean_deg: f64,
    /// Mean elongation D.
    pub d_deg: f64,
    /// Sun's mean anomaly M.
    pub m_deg: f64,
    /// Moon's mean anomaly M'.
    pub mp_deg: f64,
    /// Argument of latitude F.
    pub f_deg: f64,
    /// Longitude of the mean ascending node.
    pub node_deg: f64,
    /// Eccentricity factor E (eq. 47.6).
    pub e: f64,
}

/// Julian centuries of TD from J2000.
pub fn centuries_tt(jd_tt: f64) -> f64 {
    (jd_tt - JD_J2000) / DAYS_PER_JULIAN_CENTURY
}

fn poly(t: f64, c: &[f64]) -> f64 {
    c.iter().rev().fold(0.0, |acc, &k| acc * t + k)
}

impl FundamentalArgs {
    pub fn at(jd_tt: f64) -> Self {
        let t = centuries_tt(jd_tt);
        let n = |c: &[f64]| poly(t, c).rem_euclid(360.0);
        FundamentalArgs {
            l_mean_deg: n(&[
                218.316_447_7,
                481_267.881_234_21,
                -0.001_578_6,
                1.0 / 538_841.0,
                -1.0 / 65_194_000.0,
            ]),
            d_deg: n(&[
                297.850_192_1,
                445_267.111_403_4,
                -0.001_881_9,
                1.0 / 545_868.0,
                -1.0 / 113_065_000.0,
            ]),
            m_deg: n(&[
                357.529_109_2,
                35_999.050_290_9,
                -0.000_153_6,
                1.0 / 24_490_000.0,
            ]),
            mp_deg: n(&[
                134.963_396_4,
                477_198.867_505_5,
                0.008_741_4,
                1.0 / 69_699.0,
                -1.0 / 14_712_000.0,
            ]),
            f_deg: n(&[
                93.272_095_0,
                483_202.017_523_3,
                -0.003_653_9,
                -1.0 / 3_526_000.0,
                1.0 / 863_310_000.0,
            ]),
            node_deg: n(&[
                125.044_547_9,
                -1_934.136_289_1,
                0.002_075_4,
                1.0 / 467_441.0,
                -1.0 / 60_616_000.0,
            ]),
            e: poly(t, &[1.0, -0.002_516, -0.000_007_4]),
        }
    }
}

/// Table 47.A: multiples of D, M, M', F; coefficient of sin for longitude (1e-6 deg) and of
/// cos for distance (1e-3 km).
#[rustfmt::skip]
const TABLE_47A: [(i8, i8, i8, i8, i32, i32); 60] = [
    (0, 0, 1, 0, 6288774, -20905355), (2, 0, -1, 0, 1274027, -3699111),
    (2, 0, 0, 0, 658314, -2955968), (0, 0, 2, 0, 213618, -569925),
    (0, 1, 0, 0, -185116, 48888), (0, 0, 0, 2, -114332, -3149),
    (2, 0, -2, 0, 58793, 246158), (2, -1, -1, 0, 57066, -152138),
    (2, 0, 1, 0, 53322, -170733), (2, -1, 0, 0, 45758, -204586),
    (0, 1, -1, 0, -40923, -129620), (1, 0, 0, 0, -34720, 108743),
    (0, 1, 1, 0, -30383, 104755), (2, 0, 0, -2, 15327, 10321),
    (0, 0, 1, 2, -12528, 0), (0, 0, 1, -2, 10980, 79661),
    (4, 0, -1, 0, 10675, -34782), (0, 0, 3, 0, 10034, -23210),
    (4, 0, -2, 0, 8548, -21636), (2, 1, -1, 0, -7888, 24208),
    (2, 1, 0, 0, -6766, 30824), (1, 0, -1, 0, -5163, -8379),
    (1, 1, 0, 0, 4987, -16675), (2, -1, 1, 0, 4036, -12831),
    (2, 0, 2, 0, 3994, -10445), (4, 0, 0, 0, 3861, -11650),
    (2, 0, -3, 0, 3665, 14403), (0, 1, -2, 0, -2689, -7003),
    (2, 0, -1, 2, -2602, 0), (2, -1, -2, 0, 2390, 10056),
    (1, 0, 1, 0, -2348, 6322), (2, -2, 0, 0, 2236, -9884),
    (0, 1, 2, 0, -2120, 5751), (0, 2, 0, 0, -2069, 0),
    (2, -2, -1, 0, 2048, -4950), (2, 0, 1, -2, -1773, 4130),
    (2, 0, 0, 2, -1595, 0), (4, -1, -1, 0, 1215, -3958),
    (0, 0, 2, 2, -1110, 0), (3, 0, -1, 0, -892, 3258),
    (2, 1, 1, 0, -810, 2616), (4, -1, -2, 0, 759, -1897),
    (0, 2, -1, 0, -713, -2117), (2, 2, -1, 0, -700, 2354),
    (2, 1, -2, 0, 691, 0), (2, -1, 0, -2, 596, 0),
    (4, 0, 1, 0, 549, -1423), (0, 0, 4, 0, 537, -1117),
    (4, -1, 0, 0, 520, -1571), (1, 0, -2, 0, -487, -1739),
    (2, 1, 0, -2, -399, 0), (0, 0, 2, -2, -381, -4421),
    (1, 1, 1, 0, 351, 0), (3, 0, -2, 0, -340, 0),
    (4, 0, -3, 0, 330, 0), (2, -1, 2, 0, 327, 0),
    (0, 2, 1, 0, -323, 1165), (1, 1, -1, 0, 299, 0),
    (2, 0, 3, 0, 294, 0), (2, 0, -1, -2, 0, 8752),
];

/// Table 47.B: multiples of D, M, M', F; coefficient of sin for latitude (1e-6 deg).
#[rustfmt::skip]
const TABLE_47B: [(i8, i8, i8, i8, i32); 60] = [
    (0, 0, 0, 1, 5128122), (0, 0, 1, 1, 280602), (0, 0, 1, -1, 277693), (2, 0, 0, -1, 173237),
    (2, 0, -1, 1, 55413), (2, 0, -1, -1, 46271), (2, 0, 0, 1, 32573), (0, 0, 2, 1, 17198),
    (2, 0, 1, -1, 9266), (0, 0, 2, -1, 8822), (2, -1, 0, -1, 8216), (2, 0, -2, -1, 4324),
    (2, 0, 1, 1, 4200), (2, 1, 0, -1, -3359), (2, -1, -1, 1, 2463), (2, -1, 0, 1, 2211),
    (2, -1, -1, -1, 2065), (0, 1, -1, -1, -1870), (4, 0, -1, -1, 1828), (0, 1, 0, 1, -1794),
    (0, 0, 0, 3, -1749), (0, 1, -1, 1, -1565), (1, 0, 0, 1, -1491), (0, 1, 1, 1, -1475),
    (0, 1, 1, -1, -1410), (0, 1, 0, -1, -1344), (1, 0, 0, -1, -1335), (0, 0, 3, 1, 1107),
    (4, 0, 0, -1, 1021), (4, 0, -1, 1, 833), (0, 0, 1, -3, 777), (4, 0, -2, 1, 671),
    (2, 0, 0, -3, 607), (2, 0, 2, -1, 596), (2, -1, 1, -1, 491), (2, 0, -2, 1, -451),
    (0, 0, 3, -1, 439), (2, 0, 2, 1, 422), (2, 0, -3, -1, 421), (2, 1, -1, 1, -366),
    (2, 1, 0, 1, -351), (4, 0, 0, 1, 331), (2, -1, 1, 1, 315), (2, -2, 0, -1, 302),
    (0, 0, 1, 3, -283), (2, 1, 1, -1, -229), (1, 1, 0, -1, 223), (1, 1, 0, 1, 223),
    (0, 1, -2, -1, -220), (2, 1, -1, -1, -220), (1, 0, 1, 1, -185), (2, -1, -2, -1, 181),
    (0, 1, 2, 1, -177), (4, 0, -2, -1, 176), (4, -1, -1, -1, 166), (1, 0, 1, -1, -164),
    (4, 0, 1, -1, 132), (1, 0, -1, -1, -119), (4, -1, 0, -1, 115), (2, -2, 0, 1, 107),
];

/// Mean Earth-Moon distance of the theory, km (Meeus eq. 47 "385000.56 + Sigma r").
const MEAN_DISTANCE_KM: f64 = 385_000.56;

/// The Moon's geometric geocentric position at a Julian date in TD (TT), referred to the mean
/// ecliptic and equinox of date (nutation not applied: apparent longitude = this + dpsi).
pub fn moon_position(jd_tt: f64) -> MoonPosition {
    let a = FundamentalArgs::at(jd_tt);
    let t = centuries_tt(jd_tt);
    let (d, m, mp, f) = (
        a.d_deg.to_radians(),
        a.m_deg.to_radians(),
        a.mp_deg.to_radians(),
        a.f_deg.to_radians(),
    );
    // Terms in M carry E per power of M: the Earth's orbital eccentricity is shrinking.
    let efac = |km: i8| match km.abs() {
        1 => a.e,
        2 => a.e * a.e,
        _ => 1.0,
    };
    let (mut sl, mut sr, mut sb) = (0.0_f64, 0.0_f64, 0.0_f64);
    for &(kd, km, kmp, kf, cl, cr) in TABLE_47A.iter() {
        let arg = kd as f64 * d + km as f64 * m + kmp as f64 * mp + kf as f64 * f;
        let (s, c) = arg.sin_cos();
        let e = efac(km);
        sl += cl as f64 * e * s;
        sr += cr as f64 * e * c;
    }
    for &(kd, km, kmp, kf, cb) in TABLE_47B.iter() {
        let arg = kd as f64 * d + km as f64 * m + kmp as f64 * mp + kf as f64 * f;
        sb += cb as f64 * efac(km) * arg.sin();
    }
    // Additive terms: Venus (A1), Jupiter (A2) and the Earth's flattening (L').
    let a1 = (119.75 + 131.849 * t).to_radians();
    let a2 = (53.09 + 479_264.290 * t).to_radians();
    let a3 = (313.45 + 481_266.484 * t).to_radians();
    let lm = a.l_mean_deg.to_radians();
    sl += 3958.0 * a1.sin() + 1962.0 * (lm - f).sin() + 318.0 * a2.sin();
    sb += -2235.0 * lm.sin()
        + 382.0 * a3.sin()
        + 175.0 * (a1 - f).sin()
        + 175.0 * (a1 + f).sin()
        + 127.0 * (lm - mp).sin()
        - 115.0 * (lm + mp).sin();
    MoonPosition {
        lon_deg: (a.l_mean_deg + sl / 1e6).rem_euclid(360.0),
        lat_deg: sb / 1e6,
        distance_km: MEAN_DISTANCE_KM + sr / 1000.0,
    }
}
