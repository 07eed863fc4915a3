//! The relay near the Earth-Moon L2 point: the collinear point from the circular restricted
//! three-body problem, and the relay's orbit about it in the Earth-Moon rotating frame.
//!
//! Rotating frame: x from the Earth to the Moon, z along the Moon's orbital angular momentum,
//! y completing the right-handed set (the direction of the Moon's motion). Its scale follows
//! the instantaneous Earth-Moon distance for L2 (the point sits `gamma` distances beyond the
//! Moon); the relay's offsets from L2 are in kilometres as given.

use crate::OperationsError;
use std::path::Path;

/// Earth/Moon mass ratio 81.300 56 (IAU 2009 system of astronomical constants, from memory),
/// so the CR3BP mass parameter mu = 1 / (1 + 81.30056) = 0.012150585.
pub const EARTH_MOON_MASS_RATIO: f64 = 81.300_56;

/// The mass parameter mu = m_moon / (m_earth + m_moon).
pub fn earth_moon_mu() -> f64 {
    1.0 / (1.0 + EARTH_MOON_MASS_RATIO)
}

/// Distance of the collinear point L2 beyond the smaller primary, in units of the primaries'
/// separation: the real root of Euler's quintic
/// `g^5 + (3 - mu) g^4 + (3 - 2 mu) g^3 - mu g^2 - 2 mu g - mu = 0`
/// (Szebehely 1967, Theory of Orbits, sec. 4.5; Richardson 1980, Celest. Mech. 22:241, eq. 2),
/// by Newton's method from Hill's approximation (mu/3)^(1/3).
pub fn l2_gamma(mu: f64) -> f64 {
    let f = |g: f64| ((((g + 3.0 - mu) * g + 3.0 - 2.0 * mu) * g - mu) * g - 2.0 * mu) * g - mu;
    let df = |g: f64| {
        (((5.0 * g + 4.0 * (3.0 - mu)) * g + 3.0 * (3.0 - 2.0 * mu)) * g - 2.0 * mu) * g - 2.0 * mu
    };
    let mut g = (mu / 3.0).cbrt();
    for _ in 0..50 {
        let step = f(g) / df(g);
        g -= step;
        if step.abs() < 1e-15 {
            break;
        }
    }
    g
}

/// The relay's path about L2 over one period: offsets from L2 in the rotating frame, km,
/// equally spaced in time and closing on themselves (the row after the last is the first).
#[derive(Clone, Debug, PartialEq)]
pub struct RelayOrbit {
    pub offsets_km: Vec<[f64; 3]>,
    pub period_days: f64,
}

impl RelayOrbit {
    /// A circle of `radius_km` about L2 in the plane perpendicular to the Earth-Moon line,
    /// starting north (+z) and turning towards +y, one turn per `period_days`.
    pub fn circle(radius_km: f64, period_days: f64) -> RelayOrbit {
        const POINTS: usize = 720;
        let offsets_km = (0..POINTS)
            .map(|k| {
                let a = std::f64::consts::TAU * k as f64 / POINTS as f64;
                [0.0, radius_km * a.sin(), radius_km * a.cos()]
            })
            .collect();
        RelayOrbit {
            offsets_km,
            period_days,
        }
    }

    /// Read a CSV with the header `x_km,y_km,z_km`: offsets from L2 in the rotating frame,
    /// one row per equal step of time over one period.
    pub fn from_csv(path: &Path, period_days: f64) -> Result<RelayOrbit, OperationsError> {
        let bad = |reason: String| OperationsError::RelayOrbit {
            path: path.display().to_string(),
            reason,
        };
        let mut reader = csv::ReaderBuilder::new()
            .trim(csv::Trim::All)
            .from_path(path)
            .map_err(|e| bad(e.to_string()))?;
        let headers = reader.headers().map_err(|e| bad(e.to_string()))?.clone();
        let want = ["x_km", "y_km", "z_km"];
        if headers.iter().collect::<Vec<_>>() != want {
            return Err(bad(format!(
                "the header must be x_km,y_km,z_km (found {})",
                headers.iter().collect::<Vec<_>>().join(",")
            )));
        }
        let mut offsets_km = Vec::new();
        for (i, rec) in reader.deserialize::<[f64; 3]>().enumerate() {
            let p = rec.map_err(|e| bad(format!("row {}: {e}", i + 2)))?;
            if p.iter().any(|v| !v.is_finite()) {
                return Err(bad(format!(
                    "row {}: every coordinate must be finite",
                    i + 2
                )));
            }
            offsets_km.push(p);
        }
        if offsets_km.len() < 3 {
            return Err(bad(format!(
                "an orbit needs at least 3 rows (found {})",
                offsets_km.len()
            )));
        }
        let orbit = RelayOrbit {
            offsets_km,
            period_days,
        };
        orbit.validate().map_err(bad)?;
        Ok(orbit)
    }

    /// Period positive and offsets well inside the Moon's distance from L2.
    pub fn validate(&self) -> Result<(), String> {
        if !(self.period_days.is_finite() && self.period_days > 0.0) {
            return Err(format!(
                "the period must be a positive number of days (got {})",
                self.period_days
            ));
        }
        const MAX_OFFSET_KM: f64 = 50_000.0;
        if let Some(p) = self
            .offsets_km
            .iter()
            .find(|p| (p[0] * p[0] + p[1] * p[1] + p[2] * p[2]).sqrt() > MAX_OFFSET_KM)
        {
            return Err(format!(
                "offset ({:.0}, {:.0}, {:.0}) km is more than {MAX_OFFSET_KM:.0} km from L2: not an orbit about L2",
                p[0], p[1], p[2]
            ));
        }
        Ok(())
    }

    /// Offset from L2 at a time `days` after the orbit's first row, km (linear between rows).
    pub fn offset_km(&self, days: f64) -> [f64; 3] {
        let n = self.offsets_km.len();
        let u = (days / self.period_days).rem_euclid(1.0) * n as f64;
        let i = (u.floor() as usize).min(n - 1);
        let f = u - i as f64;
        let (a, b) = (self.offsets_km[i], self.offsets_km[(i + 1) % n]);
        [0, 1, 2].map(|k| a[k] + f * (b[k] - a[k]))
    }
}
