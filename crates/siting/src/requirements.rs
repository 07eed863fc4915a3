//! Hard requirements: which bounds a candidate breaks and by how much.

use serde::{Deserialize, Serialize};

use crate::criteria::Requirement;

/// One broken hard requirement of one candidate.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct FailedRequirement {
    pub metric: String,
    pub min: Option<f64>,
    pub max: Option<f64>,
    /// The candidate's value; None when the metric was not measured.
    pub value: Option<f64>,
    /// How far outside the bound the value lies, in the metric's unit (always > 0); None when
    /// not measured.
    pub margin: Option<f64>,
}

impl FailedRequirement {
    /// One line a person can read: `diameter_m 2300 above max 2000 by 300`.
    pub fn describe(&self) -> String {
        let g = |v: f64| crate::table::fmt_num(v);
        match (self.value, self.min, self.max) {
            (None, _, _) => format!("{} not measured", self.metric),
            (Some(v), Some(min), _) if v < min => {
                format!(
                    "{} {} below min {} by {}",
                    self.metric,
                    g(v),
                    g(min),
                    g(min - v)
                )
            }
            (Some(v), _, Some(max)) => format!(
                "{} {} above max {} by {}",
                self.metric,
                g(v),
                g(max),
                g(v - max)
            ),
            (Some(v), _, None) => format!("{} {} outside bounds", self.metric, g(v)),
        }
    }
}

/// Check one value against one requirement; None when it passes. A missing or non-finite
/// value fails as "not measured": a requirement is a promise the data must back.
pub fn check(req: &Requirement, value: Option<f64>) -> Option<FailedRequirement> {
    let fail = |value: Option<f64>, margin: Option<f64>| FailedRequirement {
        metric: req.metric.clone(),
        min: req.min,
        max: req.max,
        value,
        margin,
    };
    let Some(v) = value.filter(|v| v.is_finite()) else {
        return Some(fail(None, None));
    };
    if let Some(min) = req.min.filter(|&min| v < min) {
        return Some(fail(Some(v), Some(min - v)));
    }
    if let Some(max) = req.max.filter(|&max| v > max) {
        return Some(fail(Some(v), Some(v - max)));
    }
    None
}
