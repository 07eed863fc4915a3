//! What to generate: the invented scenario's parameters.

use serde::{Deserialize, Serialize};

/// Parameters of an invented highland patch. `Default` is the committed demo scenario; every
/// value except the published laws in [`crate::published`] is a choice made for the demo.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct DemoSpec {
    /// Seeds every random draw; the same spec gives byte-identical output.
    pub seed: u64,
    pub centre_lon_deg: f64,
    pub centre_lat_deg: f64,
    /// Side of the square patch on the ground.
    pub size_km: f64,
    /// Ground spacing of the posts at the centre latitude, both ways.
    pub post_m: f64,
    /// Mean height of the patch above the reference sphere.
    pub mean_height_m: f64,
    /// Regional tilt of the whole patch and the azimuth (clockwise from north) it falls towards.
    pub tilt_deg: f64,
    pub tilt_down_azimuth_deg: f64,
    /// Self-affine background: Hurst exponent and the RMS height difference between points
    /// 1 km apart.
    pub hurst: f64,
    pub background_rms_at_1km_m: f64,
    /// Background crater population: count and diameter range of the power law.
    pub crater_count: usize,
    pub crater_min_diameter_m: f64,
    pub crater_max_diameter_m: f64,
    /// Share of background craters left fresh; the rest are degraded by diffusion.
    pub fresh_fraction: f64,
    /// Range of the dimensionless degradation kappa*t / R^2 for degraded craters up to 1 km
    /// across (larger ones get proportionally less, see `population`).
    pub degradation_min: f64,
    pub degradation_max: f64,
    /// Background craters with a sector of rim cut away, and the sector width range.
    pub breached_count: usize,
    pub breach_min_deg: f64,
    pub breach_max_deg: f64,
    /// Fresh background craters whose floor is strewn with boulders.
    pub boulder_floor_count: usize,
    /// Fresh, complete, level-floored craters planted on purpose as good hosts, and their
    /// diameter range.
    pub host_count: usize,
    pub host_min_diameter_m: f64,
    pub host_max_diameter_m: f64,
}

impl Default for DemoSpec {
    fn default() -> Self {
        DemoSpec {
            seed: 20_240_516,
            centre_lon_deg: 180.0,
            centre_lat_deg: 16.0,
            size_km: 60.0,
            post_m: 30.0,
            mean_height_m: 4200.0,
            tilt_deg: 0.7,
            tilt_down_azimuth_deg: 115.0,
            hurst: crate::published::HIGHLAND_HURST,
            background_rms_at_1km_m: 35.0,
            crater_count: 1200,
            crater_min_diameter_m: 150.0,
            crater_max_diameter_m: 8000.0,
            fresh_fraction: 0.3,
            degradation_min: 0.005,
            degradation_max: 0.12,
            breached_count: 5,
            breach_min_deg: 60.0,
            breach_max_deg: 120.0,
            boulder_floor_count: 2,
            host_count: 12,
            host_min_diameter_m: 800.0,
            host_max_diameter_m: 2000.0,
        }
    }
}

impl DemoSpec {
    /// A small, quick variant of the demo scenario for tests: same laws, a few km across.
    pub fn small(seed: u64, size_km: f64) -> DemoSpec {
        let d = DemoSpec::default();
        let s = d.clone().with_size(size_km);
        DemoSpec {
            seed,
            crater_count: s.crater_count.max(20),
            host_count: s.host_count.clamp(2, d.host_count),
            breached_count: 2,
            boulder_floor_count: 1,
            ..s
        }
    }

    /// This spec over a patch `size_km` across, at the same crater density: the crater, host,
    /// breached-rim and boulder-floor counts scale with the area (at least one crater and one
    /// host), and no crater is wider than a quarter of the patch.
    pub fn with_size(self, size_km: f64) -> DemoSpec {
        let area_ratio = (size_km / self.size_km).powi(2);
        let scaled = |n: usize| (n as f64 * area_ratio).round() as usize;
        DemoSpec {
            size_km,
            crater_count: scaled(self.crater_count).max(1),
            host_count: scaled(self.host_count).max(1),
            breached_count: scaled(self.breached_count),
            boulder_floor_count: scaled(self.boulder_floor_count),
            crater_max_diameter_m: self.crater_max_diameter_m.min(size_km * 1000.0 / 4.0),
            ..self
        }
    }

    /// Width and height of the raster in posts.
    pub fn size_px(&self) -> usize {
        (self.size_km * 1000.0 / self.post_m).round().max(1.0) as usize
    }
}
