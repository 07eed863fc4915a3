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
    /// Set when the requirement is an area's: then `metric` is [`AREA_METRIC`], `value` the
    /// distance in metres from the edge on the side the area asks for (negative on the wrong
    /// side) and `min` the margin in metres.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub area: Option<AreaBreach>,
}

/// The metric name an area's failed requirement carries (not one of `survey::METRICS`).
pub const AREA_METRIC: &str = "area_clearance_m";

/// Which area a candidate breaks.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct AreaBreach {
    pub keep: crate::areas::Keep,
    /// The feature's name, or "file #index".
    pub feature: String,
    /// The candidate lies so far outside that only a bound was kept: the distance is at least
    /// the value's size (see `areas::EXACT_BEYOND_MARGIN_M`).
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub at_least: bool,
}

impl FailedRequirement {
    /// The file form, with the metric's id and plain numbers (export columns keep it):
    /// `diameter_m 2300 above max 2000 by 300`.
    pub fn describe(&self) -> String {
        let g = |v: f64| crate::table::fmt_num(v);
        if let (Some(a), Some(v)) = (&self.area, self.value) {
            return format!(
                "area \"{}\" keep {} by {} m: {}{} m",
                a.feature,
                a.keep.key(),
                g(self.min.unwrap_or(0.0)),
                if a.at_least { "beyond " } else { "" },
                g(v)
            );
        }
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

    /// The same for a person, in the metric's label and units (`survey::METRICS`): "Diameter
    /// 71.3 km: 69.3 km over the 2.00 km maximum"; a yes/no limit as "Structure fits: no
    /// (required)"; "Earth shielding margin: not measured".
    pub fn in_words(&self) -> String {
        if let Some(a) = &self.area {
            return area_in_words(a, self.value.unwrap_or(f64::NAN), self.min.unwrap_or(0.0));
        }
        let info = survey::metrics::metric(&self.metric);
        let label = survey::label_of(&self.metric);
        let f = |v: f64| info.map_or_else(|| crate::table::fmt_num(v), |m| m.format(v));
        let Some(v) = self.value else {
            return format!("{label}: not measured");
        };
        let below = self.min.filter(|&min| v < min);
        let above = self.max.filter(|&max| v > max);
        if info.is_some_and(|m| m.is_flag()) {
            let wanted = if below.is_some() {
                "required"
            } else {
                "must be no"
            };
            return format!("{label}: {} ({wanted})", f(v));
        }
        // A margin that rounds to nothing in the value's format would read "0.000 under":
        // say how close it is instead.
        let by = |margin: f64, word: &str| {
            let m = f(margin);
            if m == f(0.0) {
                format!("just {word}")
            } else {
                format!("{m} {word}")
            }
        };
        match (below, above) {
            (Some(min), _) => format!(
                "{label} {}: {} the {} minimum",
                f(v),
                by(min - v, "under"),
                f(min)
            ),
            (None, Some(max)) => format!(
                "{label} {}: {} the {} maximum",
                f(v),
                by(v - max, "over"),
                f(max)
            ),
            (None, None) => format!("{label} {}: outside its limits", f(v)),
        }
    }
}

/// An area's breach for a person: "Keep-out zone “LZ-4”: 3.20 km inside it (at least 5.00 km
/// outside required)"; "Study area “Basin floor”: 1.20 km inside, 3.80 km short of the 5.00 km
/// margin".
fn area_in_words(a: &AreaBreach, clearance_m: f64, margin_m: f64) -> String {
    let km = |m: f64| {
        survey::metrics::metric("diameter_m").map_or_else(|| format!("{m} m"), |d| d.format(m))
    };
    let (right, wrong) = match a.keep {
        crate::areas::Keep::Inside => ("inside", "outside"),
        crate::areas::Keep::Outside => ("outside", "inside"),
    };
    let head = format!("{} “{}”", a.keep.noun(), a.feature);
    if clearance_m < 0.0 {
        let need = if margin_m > 0.0 {
            format!("at least {} {right} required", km(margin_m))
        } else {
            format!("must be {right}")
        };
        let more = if a.at_least { "more than " } else { "" };
        format!("{head}: {more}{} {wrong} it ({need})", km(-clearance_m))
    } else {
        format!(
            "{head}: {} {right}, {} short of the {} margin",
            km(clearance_m),
            km(margin_m - clearance_m),
            km(margin_m)
        )
    }
}

/// Check an area's clearance (metres, on the side it asks for) against its margin; None when
/// it passes (a loaded area always has edges, so always judges).
pub fn check_area(
    area: &crate::areas::Area,
    standing: Option<crate::areas::AreaStanding>,
) -> Option<FailedRequirement> {
    let margin_m = area.margin_m();
    let s = standing?;
    if s.clearance_m >= margin_m && (margin_m > 0.0 || s.clearance_m > 0.0) {
        return None;
    }
    Some(FailedRequirement {
        metric: AREA_METRIC.to_string(),
        min: Some(margin_m),
        max: None,
        value: Some(s.clearance_m),
        margin: Some(margin_m - s.clearance_m),
        area: Some(AreaBreach {
            keep: area.spec.keep,
            feature: if s.exact {
                area.feature_label(s.feature).to_string()
            } else {
                area.name()
            },
            at_least: !s.exact,
        }),
    })
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
        area: None,
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

#[cfg(test)]
mod tests {
    use super::*;

    fn failed(metric: &str, min: Option<f64>, max: Option<f64>, value: Option<f64>) -> String {
        let req = Requirement {
            metric: metric.into(),
            min,
            max,
            why: String::new(),
        };
        check(&req, value)
            .expect("the value breaks the requirement")
            .in_words()
    }

    #[test]
    fn length_over_its_maximum_reads_in_km() {
        assert_eq!(
            failed("diameter_m", Some(800.0), Some(2000.0), Some(71_317.0)),
            "Diameter 71.3 km: 69.3 km over the 2.00 km maximum"
        );
    }

    #[test]
    fn length_under_its_minimum_reads_in_metres() {
        assert_eq!(
            failed("diameter_m", Some(800.0), Some(2000.0), Some(500.0)),
            "Diameter 500 m: 300 m under the 800 m minimum"
        );
    }

    #[test]
    fn ratio_angle_and_share_read_with_their_own_format() {
        assert_eq!(
            failed("depth_to_diameter", Some(0.15), Some(0.3), Some(0.1)),
            "Depth/diameter (d/D) 0.100: 0.050 under the 0.150 minimum"
        );
        assert_eq!(
            failed("earth_clearance_deg", Some(1.0), None, Some(-3.3)),
            "Earth shielding margin -3.3°: 4.3° under the 1.0° minimum"
        );
        assert_eq!(
            failed("valid_fraction", Some(0.9), None, Some(0.85)),
            "Data coverage 85 %: 5 % under the 90 % minimum"
        );
    }

    #[test]
    fn yes_no_limits_read_as_yes_or_no() {
        assert_eq!(
            failed("fit_ok", Some(1.0), None, Some(0.0)),
            "Structure fits: no (required)"
        );
        assert_eq!(
            failed("far_side_band", Some(1.0), None, Some(0.0)),
            "In the far-side band: no (required)"
        );
        assert_eq!(
            failed("far_side_band", None, Some(0.0), Some(1.0)),
            "In the far-side band: yes (must be no)"
        );
    }

    #[test]
    fn a_margin_too_small_to_print_reads_as_just_outside() {
        assert_eq!(
            failed("depth_to_diameter", Some(0.15), None, Some(0.1499)),
            "Depth/diameter (d/D) 0.150: just under the 0.150 minimum"
        );
    }

    #[test]
    fn unmeasured_value_names_the_label() {
        assert_eq!(
            failed("earth_clearance_deg", Some(1.0), None, None),
            "Earth shielding margin: not measured"
        );
    }

    #[test]
    fn no_reason_in_words_shows_a_metric_id() {
        for m in survey::METRICS {
            for text in [
                failed(m.name, Some(1.0e9), None, Some(0.0)),
                failed(m.name, None, Some(-1.0e9), Some(0.0)),
                failed(m.name, Some(0.0), None, None),
            ] {
                assert!(
                    !survey::METRICS.iter().any(|n| text.contains(n.name)),
                    "{text}"
                );
            }
        }
    }
}
