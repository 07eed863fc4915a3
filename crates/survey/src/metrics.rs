//! The named metrics of a candidate: what criteria files, tables and exports refer to.

use crate::model::Candidate;

/// A metric's name (as used in criteria files and exports), unit and one-line meaning.
pub struct MetricInfo {
    pub name: &'static str,
    pub unit: &'static str,
    pub description: &'static str,
    pub get: fn(&Candidate) -> Option<f64>,
}

macro_rules! crater {
    ($name:literal, $unit:literal, $desc:literal, $field:ident) => {
        MetricInfo {
            name: $name,
            unit: $unit,
            description: $desc,
            get: |c| Some(c.crater.$field as f64),
        }
    };
}
macro_rules! vis {
    ($name:literal, $unit:literal, $desc:literal, $e:expr) => {
        MetricInfo {
            name: $name,
            unit: $unit,
            description: $desc,
            get: |c| c.visibility.as_ref().map($e),
        }
    };
}

macro_rules! fit {
    ($name:literal, $unit:literal, $desc:literal) => {
        MetricInfo {
            name: $name,
            unit: $unit,
            description: $desc,
            get: |c| c.fit.as_ref().and_then(|f| f.metric($name)),
        }
    };
}

/// Every metric a candidate carries, in table order.
pub static METRICS: &[MetricInfo] = &[
    crater!(
        "diameter_m",
        "m",
        "diameter of the circle fitted to the rim crest",
        diameter_m
    ),
    crater!(
        "depth_m",
        "m",
        "rim-crest median minus robust floor level",
        depth_m
    ),
    crater!(
        "depth_to_diameter",
        "",
        "depth_m / diameter_m",
        depth_to_diameter
    ),
    crater!(
        "ellipticity",
        "",
        "1 - minor/major axis of the fitted rim ellipse",
        ellipticity
    ),
    crater!(
        "rim_relief_m",
        "m",
        "rim crest above the surrounding plain",
        rim_relief_m
    ),
    crater!(
        "rim_completeness",
        "",
        "fraction of azimuths with a rim crest near the fitted circle",
        rim_completeness
    ),
    crater!(
        "rim_gap_deg",
        "deg",
        "widest contiguous arc without a rim crest",
        rim_gap_deg
    ),
    crater!(
        "rim_height_sd_m",
        "m",
        "standard deviation of rim-crest heights",
        rim_height_sd_m
    ),
    crater!(
        "floor_tilt_deg",
        "deg",
        "tilt of the plane fitted over the central floor",
        floor_tilt_deg
    ),
    crater!(
        "floor_slope_p95_deg",
        "deg",
        "95th percentile of Horn slope over the floor",
        floor_slope_p95_deg
    ),
    crater!(
        "wall_slope_mean_deg",
        "deg",
        "mean Horn slope of the inner wall",
        wall_slope_mean_deg
    ),
    crater!(
        "roughness_rms_m",
        "m",
        "RMS floor height after removing a smooth bowl",
        roughness_rms_m
    ),
    crater!(
        "obstacle_fraction",
        "",
        "fraction of floor pixels steeper than the obstacle threshold",
        obstacle_fraction
    ),
    crater!(
        "valid_fraction",
        "",
        "fraction of the measurement disc with data",
        valid_fraction
    ),
    crater!(
        "lat_deg",
        "deg",
        "latitude of the crater centre",
        centre_lat_deg
    ),
    crater!(
        "lon_deg",
        "deg",
        "longitude of the crater centre",
        centre_lon_deg
    ),
    vis!(
        "earth_clearance_deg",
        "deg",
        "smallest margin of the Earth's upper limb below the local horizon over all librations",
        |v| v.earth_clearance_deg
    ),
    vis!(
        "limb_margin_deg",
        "deg",
        "angular distance behind the libration-extended limb",
        |v| v.limb_margin_deg
    ),
    vis!(
        "far_side_band",
        "",
        "1 if within 45 deg of the 180 meridian, else 0",
        |v| if v.far_side_band { 1.0 } else { 0.0 }
    ),
    vis!(
        "gc_separation_deg",
        "deg",
        "closest approach of a zenith-fixed beam to the galactic centre",
        |v| v.gc_separation_deg
    ),
    vis!(
        "plane_fraction",
        "",
        "fraction of the beam's sky track near the galactic plane",
        |v| v.plane_fraction
    ),
    fit!(
        "fit_ok",
        "",
        "1 if the target structure fits with every requirement met, else 0"
    ),
    fit!(
        "min_clearance_m",
        "m",
        "smallest gap between the placed surface and the ground under it"
    ),
    fit!(
        "headroom_m",
        "m",
        "how far the surface could rise before its edge reaches the lowest anchor"
    ),
    fit!(
        "anchor_height_spread_m",
        "m",
        "highest minus lowest rim anchor"
    ),
    fit!(
        "max_span_m",
        "m",
        "longest straight span from a rim anchor to the aperture edge"
    ),
    fit!(
        "excavation_m3",
        "m3",
        "ground to remove to reach the clearance"
    ),
    fit!(
        "offset_from_crater_centre_m",
        "m",
        "distance of the structure's axis from the crater centre"
    ),
];

/// Look a metric up by name.
pub fn metric(name: &str) -> Option<&'static MetricInfo> {
    METRICS.iter().find(|m| m.name == name)
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
}
