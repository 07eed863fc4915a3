use serde::{Deserialize, Serialize};

/// Everything measured on one crater, in a local azimuthal equidistant frame around it.
/// Units are in the field names. See docs/metrics.md for each definition and its source.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct CraterMeasurement {
    pub centre_lon_deg: f64,
    pub centre_lat_deg: f64,
    /// Diameter of the circle fitted to the rim crest.
    pub diameter_m: f64,
    /// One standard deviation of `diameter_m` (bootstrap over azimuths).
    pub diameter_sd_m: f64,
    pub ellipse_major_m: f64,
    pub ellipse_minor_m: f64,
    /// 1 - minor/major.
    pub ellipticity: f64,
    /// Azimuth of the major axis, degrees clockwise from north, [0, 180).
    pub ellipse_azimuth_deg: f64,
    /// Rim-crest median minus robust floor level.
    pub depth_m: f64,
    pub depth_sd_m: f64,
    pub depth_to_diameter: f64,
    /// Rim crest above the surrounding plain.
    pub rim_relief_m: f64,
    /// Fraction (0..1) of azimuths with a rim crest near the fitted circle.
    pub rim_completeness: f64,
    /// Widest contiguous arc without a rim crest, degrees.
    pub rim_gap_deg: f64,
    /// Azimuth of the middle of that gap, degrees clockwise from north.
    pub rim_gap_azimuth_deg: f64,
    /// Standard deviation of rim-crest heights.
    pub rim_height_sd_m: f64,
    pub floor_tilt_deg: f64,
    /// Downhill direction of the floor plane, degrees clockwise from north.
    pub floor_tilt_azimuth_deg: f64,
    pub floor_slope_p95_deg: f64,
    pub wall_slope_mean_deg: f64,
    /// RMS height of the floor after removing a smooth bowl, at baseline `roughness_baseline_m`.
    pub roughness_rms_m: f64,
    pub roughness_baseline_m: f64,
    /// Fraction of floor pixels steeper than `obstacle_slope_threshold_deg`.
    pub obstacle_fraction: f64,
    pub obstacle_slope_threshold_deg: f64,
    /// Fraction of the measurement disc with valid data.
    pub valid_fraction: f64,
    /// True when the measurement disc is cut by the raster edge: numbers then cover only part.
    pub edge_cut: bool,
    /// Rim-crest radius per azimuth (metres from the fitted centre; NaN where no crest), azimuths
    /// evenly spaced from north clockwise. Kept so the rim can be drawn and audited.
    #[serde(with = "nan_as_null")]
    pub rim_crest_radius_m: Vec<f32>,
    /// Rim-crest height per azimuth (metres above the sphere; NaN where no crest).
    #[serde(with = "nan_as_null")]
    pub rim_crest_height_m: Vec<f32>,
    /// Robust floor level (metres above the sphere).
    pub floor_height_m: f64,
    /// RMS distance of the rim-crest points from the fitted circle, metres.
    #[serde(default)]
    pub rim_fit_rms_m: f64,
}

/// JSON has no NaN: azimuths without a crest are written as `null` and read back as NaN.
mod nan_as_null {
    use serde::{Deserialize, Deserializer, Serializer};

    pub fn serialize<S: Serializer>(v: &[f32], s: S) -> Result<S::Ok, S::Error> {
        s.collect_seq(v.iter().map(|x| if x.is_nan() { None } else { Some(*x) }))
    }

    pub fn deserialize<'de, D: Deserializer<'de>>(d: D) -> Result<Vec<f32>, D::Error> {
        let v: Vec<Option<f32>> = Vec::deserialize(d)?;
        Ok(v.into_iter().map(|x| x.unwrap_or(f32::NAN)).collect())
    }
}

impl CraterMeasurement {
    /// Fraction of the azimuths with a rim crest near the fitted circle (finite
    /// `rim_crest_radius_m`). Equal to `rim_completeness` except on a breached rim, where
    /// completeness counts azimuths by their height on the circle (docs/metrics.md): this is
    /// how much of the rim was traced as crests, which the shape gates and the merge ask.
    pub fn crest_fraction(&self) -> f64 {
        let n = self.rim_crest_radius_m.len();
        if n == 0 {
            return self.rim_completeness;
        }
        self.rim_crest_radius_m
            .iter()
            .filter(|r| r.is_finite())
            .count() as f64
            / n as f64
    }
}
