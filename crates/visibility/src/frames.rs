//! Celestial reference frames as rotation matrices: ecliptic of date, J2000 equator (IAU 1976
//! precession, Lieske et al. 1977, A&A 58:1), galactic (IAU 1958), and the Moon's body frame
//! from the IAU rotation model (Archinal et al. 2011, Celest. Mech. Dyn. Astron. 109:101).
//!
//! Matrices rotate the coordinate frame (the R1/R2/R3 convention of the Explanatory Supplement
//! to the Astronomical Almanac, 1992, sec. 11.4): `r_new = M r_old`.

use crate::constants::*;
use crate::ephemeris::centuries_tt;

pub type Vec3 = [f64; 3];
pub type Mat3 = [[f64; 3]; 3];

pub fn r1(a_deg: f64) -> Mat3 {
    let (s, c) = a_deg.to_radians().sin_cos();
    [[1.0, 0.0, 0.0], [0.0, c, s], [0.0, -s, c]]
}

pub fn r2(a_deg: f64) -> Mat3 {
    let (s, c) = a_deg.to_radians().sin_cos();
    [[c, 0.0, -s], [0.0, 1.0, 0.0], [s, 0.0, c]]
}

pub fn r3(a_deg: f64) -> Mat3 {
    let (s, c) = a_deg.to_radians().sin_cos();
    [[c, s, 0.0], [-s, c, 0.0], [0.0, 0.0, 1.0]]
}

pub fn mul(a: &Mat3, b: &Mat3) -> Mat3 {
    let mut m = [[0.0; 3]; 3];
    for (i, row) in m.iter_mut().enumerate() {
        for (j, v) in row.iter_mut().enumerate() {
            *v = (0..3).map(|k| a[i][k] * b[k][j]).sum();
        }
    }
    m
}

pub fn transpose(a: &Mat3) -> Mat3 {
    let mut m = [[0.0; 3]; 3];
    for (i, row) in a.iter().enumerate() {
        for (j, v) in row.iter().enumerate() {
            m[j][i] = *v;
        }
    }
    m
}

pub fn apply(m: &Mat3, v: &Vec3) -> Vec3 {
    [0, 1, 2].map(|i| m[i][0] * v[0] + m[i][1] * v[1] + m[i][2] * v[2])
}

pub fn dot(a: &Vec3, b: &Vec3) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}

/// Unit vector of a (longitude, latitude) pair in degrees.
pub fn unit(lon_deg: f64, lat_deg: f64) -> Vec3 {
    let (sl, cl) = lon_deg.to_radians().sin_cos();
    let (sb, cb) = lat_deg.to_radians().sin_cos();
    [cb * cl, cb * sl, sb]
}

/// (longitude in [0, 360), latitude) in degrees of any non-zero vector.
pub fn lonlat(v: &Vec3) -> (f64, f64) {
    let r = dot(v, v).sqrt();
    (
        v[1].atan2(v[0]).to_degrees().rem_euclid(360.0),
        (v[2] / r).clamp(-1.0, 1.0).asin().to_degrees(),
    )
}

/// Mean obliquity of the ecliptic of date, degrees (Meeus 1998 eq. 22.2).
pub fn mean_obliquity_deg(jd_tt: f64) -> f64 {
    let t = centuries_tt(jd_tt);
    let c = OBLIQUITY_J2000_ARCSEC;
    (c[0] + t * (c[1] + t * (c[2] + t * c[3]))) / 3600.0
}

/// Precession matrix from the J2000 mean equator to the mean equator of date (IAU 1976).
pub fn precession_from_j2000(jd_tt: f64) -> Mat3 {
    let t = centuries_tt(jd_tt);
    let p = |c: [f64; 3]| t * (c[0] + t * (c[1] + t * c[2])) / 3600.0;
    let (zeta, z, theta) = (
        p(PRECESSION_ZETA_ARCSEC),
        p(PRECESSION_Z_ARCSEC),
        p(PRECESSION_THETA_ARCSEC),
    );
    mul(&r3(-z), &mul(&r2(theta), &r3(-zeta)))
}

/// From the mean ecliptic and equinox of date to the J2000 mean equator.
pub fn ecliptic_of_date_to_j2000(jd_tt: f64) -> Mat3 {
    let to_equator_of_date = r1(-mean_obliquity_deg(jd_tt));
    mul(
        &transpose(&precession_from_j2000(jd_tt)),
        &to_equator_of_date,
    )
}

/// From the J2000 mean equator to the J2000 mean ecliptic.
pub fn j2000_to_ecliptic_j2000() -> Mat3 {
    r1(OBLIQUITY_J2000_ARCSEC[0] / 3600.0)
}

/// From the J2000 equator (ICRS to the precision that matters here) to galactic coordinates:
/// bring the galactic pole to +z, then put the north celestial pole at its galactic longitude.
pub fn j2000_to_galactic() -> Mat3 {
    mul(
        &r3(180.0 - GALACTIC_NCP_LON_DEG),
        &mul(&r2(90.0 - GALACTIC_POLE_DEC_DEG), &r3(GALACTIC_POLE_RA_DEG)),
    )
}

/// Orientation of the Moon from the IAU rotation model: pole (RA, Dec) in the J2000 frame and
/// prime-meridian angle W, degrees.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MoonOrientation {
    pub pole_ra_deg: f64,
    pub pole_dec_deg: f64,
    pub w_deg: f64,
}

impl MoonOrientation {
    /// At a Julian date in TDB (TT is the same to 2 ms, far below what matters here).
    pub fn at(jd_tdb: f64) -> Self {
        let d = jd_tdb - JD_J2000;
        let t = d / DAYS_PER_JULIAN_CENTURY;
        let (mut ra, mut dec) = (
            IAU_MOON_RA0_DEG[0] + IAU_MOON_RA0_DEG[1] * t,
            IAU_MOON_DEC0_DEG[0] + IAU_MOON_DEC0_DEG[1] * t,
        );
        let mut w = IAU_MOON_W_DEG[0] + IAU_MOON_W_DEG[1] * d + IAU_MOON_W_DEG[2] * d * d;
        for (i, &(e0, rate)) in IAU_MOON_E.iter().enumerate() {
            let (s, c) = (e0 + rate * d).rem_euclid(360.0).to_radians().sin_cos();
            ra += IAU_MOON_RA_SIN[i] * s;
            dec += IAU_MOON_DEC_COS[i] * c;
            w += IAU_MOON_W_SIN[i] * s;
        }
        MoonOrientation {
            pole_ra_deg: ra,
            pole_dec_deg: dec,
            w_deg: w.rem_euclid(360.0),
        }
    }

    /// Unit vector of the Moon's north pole in the J2000 frame.
    pub fn pole(&self) -> Vec3 {
        unit(self.pole_ra_deg, self.pole_dec_deg)
    }

    /// From the J2000 frame to the Moon's equator with x on the equinox-like node (no spin).
    pub fn j2000_to_lunar_equator(&self) -> Mat3 {
        mul(&r1(90.0 - self.pole_dec_deg), &r3(90.0 + self.pole_ra_deg))
    }

    /// From the J2000 frame to the Moon's body-fixed frame (selenographic lon/lat).
    pub fn j2000_to_body(&self) -> Mat3 {
        mul(&r3(self.w_deg), &self.j2000_to_lunar_equator())
    }
}
