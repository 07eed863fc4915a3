//! Utility of a metric value under a soft criterion: a value function in the sense of
//! multi-attribute value theory (Keeney and Raiffa 1976, "Decisions with Multiple
//! Objectives", Wiley), piecewise linear, 0 at the worst acceptable value and 1 at the ideal.

use crate::criteria::{SoftCriterion, UtilityShape};

/// Utility in [0, 1] of `value` under `criterion`. A missing or non-finite value (metric not
/// measured) gets 0: an unmeasured property earns no credit.
///
/// ```
/// use siting::criteria::{SoftCriterion, UtilityShape};
/// let c = SoftCriterion { metric: "floor_tilt_deg".into(), worst: 10.0, ideal: 0.0,
///     shape: UtilityShape::Linear, weight: 1.0, why: String::new() };
/// assert_eq!(siting::utility::utility(&c, Some(2.5)), 0.75);
/// assert_eq!(siting::utility::utility(&c, None), 0.0);
/// ```
pub fn utility(criterion: &SoftCriterion, value: Option<f64>) -> f64 {
    let Some(v) = value.filter(|v| v.is_finite()) else {
        return 0.0;
    };
    let u = match &criterion.shape {
        UtilityShape::Linear => linear(criterion.worst, criterion.ideal, v),
        UtilityShape::Breakpoints { points } => piecewise(points, v),
    };
    if u.is_finite() {
        u.clamp(0.0, 1.0)
    } else {
        0.0
    }
}

fn linear(worst: f64, ideal: f64, v: f64) -> f64 {
    ((v - worst) / (ideal - worst)).clamp(0.0, 1.0)
}

/// Interpolate through points sorted by value; flat beyond the ends.
fn piecewise(points: &[[f64; 2]], v: f64) -> f64 {
    let (Some(first), Some(last)) = (points.first(), points.last()) else {
        return 0.0;
    };
    if v <= first[0] {
        return first[1];
    }
    if v >= last[0] {
        return last[1];
    }
    let i = points.partition_point(|p| p[0] <= v);
    let (a, b) = (points[i - 1], points[i]);
    let t = (v - a[0]) / (b[0] - a[0]);
    a[1] + t * (b[1] - a[1])
}
