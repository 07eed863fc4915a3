//! What a structure fit reports, in the form the survey file carries for each candidate.

use serde::{Deserialize, Serialize};

/// One rim anchor of the placed structure.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct Anchor {
    pub lon_deg: f64,
    pub lat_deg: f64,
    /// Azimuth from the aperture centre, degrees clockwise from north.
    pub azimuth_deg: f64,
    /// Ground height at the anchor, metres above the reference sphere (null when no data).
    #[serde(with = "nan_as_null")]
    pub height_m: f64,
    /// Straight line from the anchor to the aperture edge below it (no cable sag), metres.
    #[serde(with = "nan_as_null")]
    pub span_m: f64,
    /// False when the anchor falls where the crater measurement traced no rim crest.
    pub on_crest: bool,
}

/// Clearance (surface height minus ground height) over the aperture as a small square grid.
///
/// Geometry: `size` x `size` cells of `cell_m`, centred on (`centre_lon_deg`, `centre_lat_deg`)
/// in the local azimuthal equidistant frame there (x east, y north). Row-major, row 0 northmost,
/// column 0 westmost: cell (col, row) is centred at x = (col + 0.5 - size/2) cell_m,
/// y = (size/2 - row - 0.5) cell_m. Cells whose centre lies outside the aperture are NaN
/// (null in the file).
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct ClearanceMap {
    pub centre_lon_deg: f64,
    pub centre_lat_deg: f64,
    pub cell_m: f64,
    pub size: usize,
    #[serde(with = "nan_as_null_f32")]
    pub values_m: Vec<f32>,
}

impl ClearanceMap {
    /// Local (x east, y north) metres of the centre of cell (col, row).
    pub fn cell_centre_xy_m(&self, col: usize, row: usize) -> (f64, f64) {
        let h = self.size as f64 / 2.0;
        (
            (col as f64 + 0.5 - h) * self.cell_m,
            (h - row as f64 - 0.5) * self.cell_m,
        )
    }

    /// Lon/lat of the centre of cell (col, row) on a sphere of `body_radius_m`.
    pub fn cell_centre_lonlat(&self, body_radius_m: f64, col: usize, row: usize) -> (f64, f64) {
        let (x, y) = self.cell_centre_xy_m(col, row);
        terrain::LocalFrame::new(body_radius_m, self.centre_lon_deg, self.centre_lat_deg)
            .to_lonlat(x, y)
    }

    /// Clearance of cell (col, row), `None` outside the aperture or the map.
    pub fn get(&self, col: usize, row: usize) -> Option<f32> {
        (col < self.size && row < self.size)
            .then(|| self.values_m[row * self.size + col])
            .filter(|v| !v.is_nan())
    }
}

/// The fit of one structure in one crater. See the crate docs for the method.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct StructureFit {
    /// True when every requirement holds; otherwise `reasons` says which failed.
    pub fit_ok: bool,
    pub reasons: Vec<String>,
    /// Aperture centre (the structure's axis).
    pub centre_lon_deg: f64,
    pub centre_lat_deg: f64,
    pub offset_from_crater_centre_m: f64,
    /// Direction of that offset, degrees clockwise from north.
    pub offset_azimuth_deg: f64,
    /// Azimuth of the first anchor from the aperture centre, degrees clockwise from north, in
    /// [0, 360 / anchors).
    pub rotation_deg: f64,
    /// Vertex (lowest point of the surface), metres above the reference sphere.
    #[serde(with = "nan_as_null")]
    pub vertex_height_m: f64,
    #[serde(with = "nan_as_null")]
    pub aperture_edge_height_m: f64,
    /// Smallest clearance under the surface as placed (the spec's clearance when it fits; less,
    /// or negative, when the crater is too shallow).
    #[serde(with = "nan_as_null")]
    pub min_clearance_m: f64,
    pub min_clearance_lon_deg: f64,
    pub min_clearance_lat_deg: f64,
    /// How far the surface could rise before its edge reaches the lowest anchor (negative:
    /// the shortfall that excavation must make up).
    #[serde(with = "nan_as_null")]
    pub headroom_m: f64,
    #[serde(with = "nan_as_null")]
    pub anchor_height_spread_m: f64,
    #[serde(with = "nan_as_null")]
    pub max_span_m: f64,
    /// Ground to remove so that the surface, hung no higher than the lowest anchor, clears it
    /// by the spec's clearance, cubic metres.
    #[serde(with = "nan_as_null")]
    pub excavation_m3: f64,
    /// Fraction of the aperture with elevation data.
    pub aperture_valid_fraction: f64,
    pub anchors: Vec<Anchor>,
    /// Aperture edge, closed ring (last point = first), counter-clockwise on a north-up map.
    /// Longitudes are continuous along the ring: in [0, 360) when it crosses the 180 meridian,
    /// else in [-180, 180).
    pub aperture_outline_lonlat: Vec<(f64, f64)>,
    pub clearance_map: ClearanceMap,
}

/// A named number of a fit, for criteria files, tables and exports.
pub struct FitMetric {
    pub name: &'static str,
    pub unit: &'static str,
    pub description: &'static str,
    pub get: fn(&StructureFit) -> f64,
}

/// The fit metrics meant for the survey and the ranking, in table order.
pub static FIT_METRICS: &[FitMetric] = &[
    FitMetric {
        name: "fit_ok",
        unit: "",
        description: "1 if the structure fits with every requirement met, else 0",
        get: |f| if f.fit_ok { 1.0 } else { 0.0 },
    },
    FitMetric {
        name: "min_clearance_m",
        unit: "m",
        description: "smallest gap between the placed surface and the ground under it",
        get: |f| f.min_clearance_m,
    },
    FitMetric {
        name: "headroom_m",
        unit: "m",
        description: "how far the surface could rise before its edge reaches the lowest anchor",
        get: |f| f.headroom_m,
    },
    FitMetric {
        name: "anchor_height_spread_m",
        unit: "m",
        description: "highest minus lowest rim anchor",
        get: |f| f.anchor_height_spread_m,
    },
    FitMetric {
        name: "max_span_m",
        unit: "m",
        description: "longest straight span from a rim anchor to the aperture edge",
        get: |f| f.max_span_m,
    },
    FitMetric {
        name: "excavation_m3",
        unit: "m3",
        description: "ground to remove to reach the clearance",
        get: |f| f.excavation_m3,
    },
    FitMetric {
        name: "offset_from_crater_centre_m",
        unit: "m",
        description: "distance of the structure's axis from the crater centre",
        get: |f| f.offset_from_crater_centre_m,
    },
];

impl StructureFit {
    /// A metric by name from [`FIT_METRICS`]; `None` for an unknown name or a missing value.
    pub fn metric(&self, name: &str) -> Option<f64> {
        FIT_METRICS
            .iter()
            .find(|m| m.name == name)
            .map(|m| (m.get)(self))
            .filter(|v| v.is_finite())
    }
}

/// JSON has no NaN: a missing number is written as null and read back as NaN.
mod nan_as_null {
    use serde::{Deserialize, Deserializer, Serializer};

    pub fn serialize<S: Serializer>(v: &f64, s: S) -> Result<S::Ok, S::Error> {
        if v.is_finite() {
            s.serialize_some(v)
        } else {
            s.serialize_none()
        }
    }

    pub fn deserialize<'de, D: Deserializer<'de>>(d: D) -> Result<f64, D::Error> {
        Ok(Option::<f64>::deserialize(d)?.unwrap_or(f64::NAN))
    }
}

mod nan_as_null_f32 {
    use serde::{Deserialize, Deserializer, Serializer};

    pub fn serialize<S: Serializer>(v: &[f32], s: S) -> Result<S::Ok, S::Error> {
        s.collect_seq(v.iter().map(|x| x.is_finite().then_some(*x)))
    }

    pub fn deserialize<'de, D: Deserializer<'de>>(d: D) -> Result<Vec<f32>, D::Error> {
        Ok(Vec::<Option<f32>>::deserialize(d)?
            .into_iter()
            .map(|v| v.unwrap_or(f32::NAN))
            .collect())
    }
}
