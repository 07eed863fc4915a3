//! The named metrics of a candidate: what criteria files, tables and exports refer to, and
//! what a person reads for each (label, short label, unit, number format, meaning).
//!
//! The id (`name`) is for files only: criteria files, survey files and export columns. Every
//! screen, failure reason and printed table reads `label` or `short` and formats values with
//! [`MetricInfo::format`].

use crate::model::Candidate;
use crate::place::LonConvention;

/// How a metric's values read: decides the number format and, for yes/no metrics, that a
/// limit on it is a checkbox rather than a threshold.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum MetricKind {
    /// A length in metres; shown in km from 10 km up.
    Length,
    /// A volume in cubic metres.
    Volume,
    /// An angle in degrees.
    Angle,
    /// A latitude in degrees.
    Coordinate,
    /// A longitude in degrees east, written in the user's convention
    /// ([`crate::LonConvention`]).
    Longitude,
    /// A dimensionless ratio such as d/D.
    Ratio,
    /// A share between 0 and 1, shown in percent.
    Fraction,
    /// Yes (1) or no (0).
    Flag,
    /// A span of time in hours.
    Duration,
    /// A whole number of things.
    Count,
}

/// What a metric's value depends on.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Scope {
    /// The candidate alone (read from the survey file).
    Candidate,
    /// The other candidates too: which of them meet every requirement (and area). Computed
    /// by the ranking when requirements or areas change; `get` gives None. Usable as a
    /// weighted criterion, never as a requirement (it depends on them).
    Neighbourhood,
}

/// A metric: its id (as used in criteria files and exports), what a person reads for it,
/// unit, one-sentence meaning and how to get it from a candidate.
pub struct MetricInfo {
    /// The id used in files (criteria, survey, export columns); never shown on its own.
    pub name: &'static str,
    /// What screens and reports call it.
    pub label: &'static str,
    /// A short form for table headers.
    pub short: &'static str,
    pub kind: MetricKind,
    pub unit: &'static str,
    /// One sentence of meaning, for tooltips and the export documentation.
    pub description: &'static str,
    pub get: fn(&Candidate) -> Option<f64>,
    pub scope: Scope,
}

impl MetricInfo {
    /// A value as a person reads it, with its unit: "71.3 km", "2.00 km", "800 m", "0.183",
    /// "93 %", "yes".
    pub fn format(&self, v: f64) -> String {
        self.format_in(v, LonConvention::default())
    }

    /// [`MetricInfo::format`] with longitudes in the given convention.
    pub fn format_in(&self, v: f64, lon: LonConvention) -> String {
        if !v.is_finite() {
            return "no value".to_string();
        }
        match self.kind {
            MetricKind::Length if v.abs() >= 10_000.0 => format!("{:.1} km", v / 1000.0),
            MetricKind::Length if v.abs() >= 1_000.0 => format!("{:.2} km", v / 1000.0),
            MetricKind::Length if v.abs() >= 100.0 => format!("{v:.0} m"),
            MetricKind::Length => format!("{v:.1} m"),
            MetricKind::Volume if v.abs() >= 1.0e6 => format!("{:.2} million m³", v / 1.0e6),
            MetricKind::Volume => format!("{v:.0} m³"),
            MetricKind::Angle => format!("{v:.1}°"),
            MetricKind::Coordinate => format!("{v:.3}°"),
            MetricKind::Longitude => lon.format_lon(v, 3),
            MetricKind::Ratio => format!("{v:.3}"),
            MetricKind::Fraction => format!("{:.0} %", v * 100.0),
            MetricKind::Flag => (if v >= 0.5 { "yes" } else { "no" }).to_string(),
            MetricKind::Duration => format!("{v:.0} h"),
            MetricKind::Count => format!("{v:.0}"),
        }
    }

    /// A value as a table cell under a header that carries [`MetricInfo::unit_suffix`]: the
    /// number alone, in that unit ("1234" under "[m]", "93" under "[%]"), with fixed decimals
    /// per kind so a column lines up; "–" for a missing value.
    pub fn format_number(&self, v: Option<f64>) -> String {
        self.format_number_in(v, LonConvention::default())
    }

    /// [`MetricInfo::format_number`] with longitudes in the given convention (the number
    /// alone: "-170.000" or "190.000").
    pub fn format_number_in(&self, v: Option<f64>, lon: LonConvention) -> String {
        let Some(v) = v.filter(|v| v.is_finite()) else {
            return "–".to_string();
        };
        match self.kind {
            MetricKind::Length if v.abs() >= 100.0 => format!("{v:.0}"),
            MetricKind::Length => format!("{v:.1}"),
            MetricKind::Volume => format!("{v:.0}"),
            MetricKind::Angle => format!("{v:.1}"),
            MetricKind::Coordinate => format!("{v:.3}"),
            MetricKind::Longitude => format!("{:.3}", lon.normalise(v)),
            MetricKind::Ratio => format!("{v:.3}"),
            MetricKind::Fraction => format!("{:.0}", v * 100.0),
            MetricKind::Flag => (if v >= 0.5 { "yes" } else { "no" }).to_string(),
            MetricKind::Duration => format!("{v:.0}"),
            MetricKind::Count => format!("{v:.0}"),
        }
    }

    /// The unit a person reads in a header, in brackets, or nothing for unitless metrics.
    pub fn unit_suffix(&self) -> &'static str {
        match self.kind {
            MetricKind::Length => " [m]",
            MetricKind::Volume => " [m³]",
            MetricKind::Angle | MetricKind::Coordinate | MetricKind::Longitude => " [°]",
            MetricKind::Fraction => " [%]",
            MetricKind::Duration => " [h]",
            MetricKind::Ratio | MetricKind::Flag | MetricKind::Count => "",
        }
    }

    /// A table header: the short label with its unit, "Diam. [m]".
    pub fn header(&self) -> String {
        format!("{}{}", self.short, self.unit_suffix())
    }

    /// A tooltip: label, meaning, and the id the metric has in files (the only place a
    /// person meets the id on screen).
    pub fn hint(&self) -> String {
        format!(
            "{}: {}.\nid in files: {}",
            self.label, self.description, self.name
        )
    }

    /// True for yes/no metrics (limits on them are checkboxes).
    pub fn is_flag(&self) -> bool {
        self.kind == MetricKind::Flag
    }

    /// True for metrics computed from the other candidates ([`Scope::Neighbourhood`]).
    pub fn is_neighbourhood(&self) -> bool {
        self.scope == Scope::Neighbourhood
    }

    /// Whether `needle` (lower case) names this metric: part of its label, short label or id.
    pub fn matches(&self, needle: &str) -> bool {
        [self.label, self.short, self.name]
            .iter()
            .any(|t| t.to_lowercase().contains(needle))
    }
}

/// A metric whose value comes from `$get`, a `fn(&Candidate) -> Option<f64>`.
macro_rules! info {
    ($name:literal, $label:literal, $short:literal, $kind:ident, $unit:literal, $desc:literal, $get:expr) => {
        MetricInfo {
            name: $name,
            label: $label,
            short: $short,
            kind: MetricKind::$kind,
            unit: $unit,
            description: $desc,
            get: $get,
            scope: Scope::Candidate,
        }
    };
}
macro_rules! crater {
    ($name:literal, $label:literal, $short:literal, $kind:ident, $unit:literal, $desc:literal, $field:ident) => {
        info!($name, $label, $short, $kind, $unit, $desc, |c| Some(
            c.crater.$field as f64
        ))
    };
}
macro_rules! vis {
    ($name:literal, $label:literal, $short:literal, $kind:ident, $unit:literal, $desc:literal, $e:expr) => {
        info!($name, $label, $short, $kind, $unit, $desc, |c| c
            .visibility
            .as_ref()
            .map($e))
    };
}
macro_rules! fit {
    ($name:literal, $label:literal, $short:literal, $kind:ident, $unit:literal, $desc:literal) => {
        info!($name, $label, $short, $kind, $unit, $desc, |c| c
            .fit
            .as_ref()
            .and_then(|f| f.metric($name)))
    };
}
macro_rules! ops {
    ($name:literal, $label:literal, $short:literal, $kind:ident, $unit:literal, $desc:literal, $e:expr) => {
        info!($name, $label, $short, $kind, $unit, $desc, |c| c
            .operations
            .as_ref()
            .and_then($e))
    };
}

fn flag(b: bool) -> f64 {
    if b {
        1.0
    } else {
        0.0
    }
}

/// Every metric a candidate carries, in table order.
pub static METRICS: &[MetricInfo] = &[
    crater!(
        "diameter_m",
        "Diameter",
        "Diam.",
        Length,
        "m",
        "diameter of the circle fitted to the rim crest",
        diameter_m
    ),
    crater!(
        "depth_m",
        "Depth",
        "Depth",
        Length,
        "m",
        "rim-crest median minus robust floor level",
        depth_m
    ),
    crater!(
        "depth_to_diameter",
        "Depth/diameter (d/D)",
        "d/D",
        Ratio,
        "",
        "rim depth divided by rim diameter",
        depth_to_diameter
    ),
    crater!(
        "ellipticity",
        "Ellipticity",
        "Ellip.",
        Ratio,
        "",
        "1 - minor/major axis of the fitted rim ellipse",
        ellipticity
    ),
    crater!(
        "rim_relief_m",
        "Rim height above the plain",
        "Rim ht",
        Length,
        "m",
        "rim crest above the surrounding plain",
        rim_relief_m
    ),
    crater!(
        "rim_completeness",
        "Rim completeness",
        "Rim compl.",
        Fraction,
        "",
        "fraction of azimuths with a rim crest near the fitted circle",
        rim_completeness
    ),
    crater!(
        "rim_gap_deg",
        "Widest rim gap",
        "Rim gap",
        Angle,
        "deg",
        "widest contiguous arc without a rim crest",
        rim_gap_deg
    ),
    crater!(
        "rim_height_sd_m",
        "Rim height scatter",
        "Rim SD",
        Length,
        "m",
        "standard deviation of rim-crest heights",
        rim_height_sd_m
    ),
    crater!(
        "floor_tilt_deg",
        "Floor tilt",
        "Floor tilt",
        Angle,
        "deg",
        "tilt of the plane fitted over the central floor",
        floor_tilt_deg
    ),
    crater!(
        "floor_slope_p95_deg",
        "Floor slope (95th percentile)",
        "Floor slope",
        Angle,
        "deg",
        "95th percentile of Horn slope over the floor",
        floor_slope_p95_deg
    ),
    crater!(
        "wall_slope_mean_deg",
        "Inner wall slope (mean)",
        "Wall slope",
        Angle,
        "deg",
        "mean Horn slope of the inner wall",
        wall_slope_mean_deg
    ),
    crater!(
        "roughness_rms_m",
        "Floor roughness (RMS)",
        "Roughness",
        Length,
        "m",
        "RMS floor height after removing a smooth bowl",
        roughness_rms_m
    ),
    crater!(
        "obstacle_fraction",
        "Obstacle share of the floor",
        "Obstacles",
        Fraction,
        "",
        "fraction of floor pixels steeper than the obstacle threshold",
        obstacle_fraction
    ),
    crater!(
        "valid_fraction",
        "Data coverage",
        "Coverage",
        Fraction,
        "",
        "fraction of the measurement disc with data",
        valid_fraction
    ),
    crater!(
        "lat_deg",
        "Latitude",
        "Lat",
        Coordinate,
        "deg",
        "latitude of the crater centre",
        centre_lat_deg
    ),
    crater!(
        "lon_deg",
        "Longitude",
        "Lon",
        Longitude,
        "deg",
        "longitude of the crater centre",
        centre_lon_deg
    ),
    vis!(
        "earth_clearance_deg",
        "Earth shielding margin",
        "Earth margin",
        Angle,
        "deg",
        "smallest margin of the Earth's upper limb below the local horizon over all librations",
        |v| v.earth_clearance_deg
    ),
    vis!(
        "limb_margin_deg",
        "Distance behind the limb",
        "Behind limb",
        Angle,
        "deg",
        "angular distance behind the libration-extended limb",
        |v| v.limb_margin_deg
    ),
    vis!(
        "far_side_band",
        "In the far-side band",
        "Far side",
        Flag,
        "",
        "whether the centre lies within 45 degrees of the 180 meridian",
        |v| if v.far_side_band { 1.0 } else { 0.0 }
    ),
    vis!(
        "gc_separation_deg",
        "Beam closest to galactic centre",
        "Gal. centre",
        Angle,
        "deg",
        "closest approach of a zenith-fixed beam to the galactic centre",
        |v| v.gc_separation_deg
    ),
    vis!(
        "plane_fraction",
        "Beam time near galactic plane",
        "Gal. plane",
        Fraction,
        "",
        "fraction of the beam's sky track near the galactic plane",
        |v| v.plane_fraction
    ),
    fit!(
        "fit_ok",
        "Structure fits",
        "Fits",
        Flag,
        "",
        "whether the target structure fits the stated envelope on this DEM"
    ),
    fit!(
        "min_clearance_m",
        "Smallest ground clearance",
        "Clearance",
        Length,
        "m",
        "smallest gap between the placed surface and the ground under it"
    ),
    fit!(
        "headroom_m",
        "Headroom below the anchors",
        "Headroom",
        Length,
        "m",
        "how far the surface could rise before its edge reaches the lowest anchor"
    ),
    fit!(
        "anchor_height_spread_m",
        "Anchor height spread",
        "Anchor spread",
        Length,
        "m",
        "highest minus lowest rim anchor"
    ),
    fit!(
        "max_span_m",
        "Longest anchor span",
        "Span",
        Length,
        "m",
        "longest straight span from a rim anchor to the aperture edge"
    ),
    fit!(
        "excavation_m3",
        "Excavation volume",
        "Excavation",
        Volume,
        "m3",
        "ground to remove to reach the clearance"
    ),
    fit!(
        "offset_from_crater_centre_m",
        "Offset from crater centre",
        "Offset",
        Length,
        "m",
        "distance of the structure's axis from the crater centre"
    ),
    ops!(
        "landing_probability",
        "Safe landing chance at the aim point",
        "Landing",
        Fraction,
        "",
        "chance that a lander aimed where the structure wants it touches down on ground the DEM shows as safe, for the set dispersion",
        |o| o.landing.as_ref().map(|l| l.p_aim)
    ),
    ops!(
        "landing_best_probability",
        "Safe landing chance at the best aim point",
        "Best landing",
        Fraction,
        "",
        "the highest safe-touchdown chance over aim points on the floor",
        |o| o.landing.as_ref().map(|l| l.p_best)
    ),
    ops!(
        "landing_safe_fraction",
        "Safe share of the floor",
        "Safe floor",
        Fraction,
        "",
        "share of the floor's DEM posts within the slope and roughness limits (rocks smaller than a post are not seen)",
        |o| o.landing.as_ref().map(|l| l.safe_fraction)
    ),
    ops!(
        "landing_best_offset_m",
        "Best aim point's distance from the structure's aim",
        "Aim offset",
        Length,
        "m",
        "ground distance from the best aim point to where the structure wants the lander",
        |o| o.landing.as_ref().map(|l| l.best_to_aim_m)
    ),
    ops!(
        "shot_longest_range_m",
        "Longest anchor shot",
        "Shot range",
        Length,
        "m",
        "longest straight line from the lander's launcher to a rim anchor",
        |o| o.shots.as_ref().map(|s| s.longest_range_m)
    ),
    ops!(
        "shot_lowest_clearance_m",
        "Lowest anchor-shot clearance",
        "Shot clear.",
        Length,
        "m",
        "lowest height of any shot line above the terrain, leaving out the last metres at the anchor",
        |o| o.shots.as_ref().and_then(|s| s.lowest_clearance_m)
    ),
    ops!(
        "shots_all_reachable",
        "Every anchor reachable",
        "Shots ok",
        Flag,
        "",
        "whether every anchor is within the launcher's range with the clearance the line needs",
        |o| o.shots.as_ref().map(|s| flag(s.all_reachable))
    ),
    ops!(
        "relay_visible_fraction",
        "Relay in view from the lander",
        "Relay",
        Fraction,
        "",
        "share of the time the relay near Earth-Moon L2 stands the margin above the lander's skyline",
        |o| Some(o.relay.lander.fraction)
    ),
    ops!(
        "relay_longest_outage_h",
        "Longest relay outage at the lander",
        "Relay gap",
        Duration,
        "h",
        "longest continuous time the relay is below the lander's skyline plus the margin",
        |o| Some(o.relay.lander.longest_gap_h)
    ),
    ops!(
        "relay_margin_deg",
        "Relay's lowest height above the skyline",
        "Relay margin",
        Angle,
        "deg",
        "smallest elevation of the relay above the lander's skyline plus the margin (negative when blocked)",
        |o| Some(o.relay.lander.worst_margin_deg)
    ),
    ops!(
        "relay_rim_worst_fraction",
        "Relay in view from the worst anchor",
        "Relay rim",
        Fraction,
        "",
        "share of the time the relay is in view from the rim anchor that sees it least",
        |o| o.rim_relay_worst().map(|a| a.fraction)
    ),
    ops!(
        "dark_fraction",
        "Share of time in darkness at the lander",
        "Dark",
        Fraction,
        "",
        "share of the time the Sun's upper limb is below the lander's skyline",
        |o| Some(o.night.lander.dark_fraction)
    ),
    ops!(
        "longest_dark_h",
        "Longest darkness at the lander",
        "Night",
        Duration,
        "h",
        "longest continuous time the Sun's upper limb stays below the lander's skyline",
        |o| Some(o.night.lander.longest_dark_h)
    ),
    ops!(
        "sunlit_h_per_month",
        "Sunlit hours per month at the lander",
        "Sun h",
        Duration,
        "h",
        "hours of sunlight at the lander in a mean synodic month",
        |o| Some(o.night.lander.sunlit_h_per_month)
    ),
    ops!(
        "rim_sunlit_h_per_month",
        "Sunlit hours per month on the best-lit anchor",
        "Rim sun h",
        Duration,
        "h",
        "hours of sunlight in a mean synodic month at the rim anchor that gets the most, where power would be",
        |o| o.rim_night().map(|n| n.sunlit_h_per_month)
    ),
    MetricInfo {
        name: NEAREST_QUALIFYING_M,
        label: "Nearest other qualifying site",
        short: "Nearest alt.",
        kind: MetricKind::Length,
        unit: "m",
        description: "great-circle distance to the nearest other candidate that meets every requirement and area",
        get: |_| None,
        scope: Scope::Neighbourhood,
    },
    MetricInfo {
        name: BACKUP_SITES,
        label: "Backup sites nearby",
        short: "Backups",
        kind: MetricKind::Count,
        unit: "",
        description: "other candidates meeting every requirement and area within the backup radius (10 km unless the criteria say otherwise)",
        get: |_| None,
        scope: Scope::Neighbourhood,
    },
];

/// Id of the neighbourhood metric "distance to the nearest other qualifying candidate".
pub const NEAREST_QUALIFYING_M: &str = "nearest_qualifying_m";
/// Id of the neighbourhood metric "qualifying candidates within the backup radius".
pub const BACKUP_SITES: &str = "backup_sites";

/// Look a metric up by name.
pub fn metric(name: &str) -> Option<&'static MetricInfo> {
    METRICS.iter().find(|m| m.name == name)
}

/// What a person reads for a metric id: its label, or the id itself when it is unknown (a
/// criteria file may name a metric this build does not have; the validator reports that).
pub fn label_of(name: &str) -> &str {
    metric(name).map_or(name, |m| m.label)
}

#[cfg(test)]
mod tests {
    #[test]
    fn every_structure_fit_metric_is_offered() {
        for m in structure::FIT_METRICS {
            let ours =
                super::metric(m.name).unwrap_or_else(|| panic!("{} missing from METRICS", m.name));
            assert_eq!(ours.unit, m.unit);
        }
    }

    #[test]
    fn labels_are_prose_not_ids() {
        for m in super::METRICS {
            for text in [m.label, m.short, m.description] {
                assert!(!text.contains('_'), "{}: {text:?} reads like an id", m.name);
            }
        }
    }

    #[test]
    fn values_format_with_their_units() {
        let d = super::metric("diameter_m").unwrap();
        assert_eq!(d.format(71_317.0), "71.3 km");
        assert_eq!(d.format(800.0), "800 m");
        assert_eq!(d.format(2_000.0), "2.00 km");
        assert_eq!(d.format(12.34), "12.3 m");
        assert_eq!(d.format_number(Some(800.0)), "800");
        assert_eq!(d.format_number(None), "–");
        assert_eq!(d.header(), "Diam. [m]");
        assert_eq!(super::metric("fit_ok").unwrap().format(1.0), "yes");
        assert_eq!(
            super::metric("valid_fraction").unwrap().format(0.934),
            "93 %"
        );
        assert_eq!(
            super::metric("depth_to_diameter").unwrap().format(0.1834),
            "0.183"
        );
    }
}
