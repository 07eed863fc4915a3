//! Reference bodies and the numbers that define them, each with its source.

use serde::{Deserialize, Serialize};

/// IAU mean radius of the Moon, metres (Archinal et al. 2018, Celest. Mech. Dyn. Astron. 130:22).
pub const MOON_RADIUS_M: f64 = 1_737_400.0;
/// WGS 84 semi-major axis, metres (NIMA TR8350.2). Seen on a lunar file it means a mislabelled CRS.
pub const EARTH_WGS84_A_M: f64 = 6_378_137.0;
/// Mars IAU mean radius, metres (Archinal et al. 2018), recognised so we can say which body a file is on.
pub const MARS_RADIUS_M: f64 = 3_389_500.0;

/// The body a grid's reference sphere belongs to, judged from its radius.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Body {
    Moon,
    Earth,
    Mars,
    Unknown,
}

impl Body {
    /// Identify a body from a sphere or semi-major radius. Tolerance 10 km: lunar products use
    /// 1737.4 km or 1737.15 km (older LOLA products), both well inside it.
    pub fn from_radius_m(radius_m: f64) -> Body {
        let near = |r: f64| (radius_m - r).abs() < 10_000.0;
        if near(MOON_RADIUS_M) {
            Body::Moon
        } else if near(EARTH_WGS84_A_M) || near(6_371_000.0) {
            Body::Earth
        } else if near(MARS_RADIUS_M) || near(3_396_190.0) {
            Body::Mars
        } else {
            Body::Unknown
        }
    }

    pub fn name(self) -> &'static str {
        match self {
            Body::Moon => "Moon",
            Body::Earth => "Earth",
            Body::Mars => "Mars",
            Body::Unknown => "unknown body",
        }
    }
}
