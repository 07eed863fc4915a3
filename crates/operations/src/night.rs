//! The night: how much of the time the Sun's upper limb is below a point's skyline, the
//! longest such stretch, and the sunlit hours in a mean synodic month.

use crate::sky::{AboveSkyline, SYNODIC_MONTH_DAYS};
use serde::{Deserialize, Serialize};

/// Darkness at one point.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct NightFigures {
    /// Fraction of the time the Sun's upper limb is below the skyline.
    pub dark_fraction: f64,
    /// Longest continuous darkness, hours.
    pub longest_dark_h: f64,
    /// Sunlit hours per synodic month (29.530589 d): (1 - dark fraction) x the month.
    pub sunlit_h_per_month: f64,
}

impl NightFigures {
    /// From the Sun's upper limb against the skyline with no margin.
    pub fn from_sun(a: &AboveSkyline) -> NightFigures {
        NightFigures {
            dark_fraction: 1.0 - a.fraction,
            longest_dark_h: a.longest_gap_h,
            sunlit_h_per_month: a.fraction * SYNODIC_MONTH_DAYS * 24.0,
        }
    }
}
