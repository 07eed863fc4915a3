//! Invented demo terrain for quietbowl: a far-side highland patch (about 60 x 60 km at 30 m
//! posts, centred on 16 N on the 180 meridian) with a planted crater population and a
//! ground-truth list of every crater planted. Invented data, for the demo and detection tests
//! only: it is not a real place.
//!
//! The surface is built in layers: a self-affine background ([`fbm`]), a regional tilt, then
//! craters in age order ([`population`]), each a published fresh shape ([`profile`]) optionally
//! degraded by topographic diffusion ([`diffusion`]) and emplaced on the grid ([`stamp`]).
//!
//! ```no_run
//! let terrain = synthetic::generate(&synthetic::DemoSpec::default())?;
//! let files = synthetic::write(&terrain, std::path::Path::new("demo-terrain"))?;
//! println!("{} craters, {} bytes", terrain.craters.len(), files.raster_bytes);
//! # Ok::<(), synthetic::SynthError>(())
//! ```

pub mod diffusion;
pub mod error;
pub mod fbm;
pub mod patch;
pub mod population;
pub mod profile;
pub mod published;
pub mod spec;
pub mod stamp;
pub mod truth;
pub mod write;

pub use error::SynthError;
pub use patch::{PatchGrid, CRS_AUTHORITY};
pub use spec::DemoSpec;
pub use truth::{DegradationState, PlantedAs, PlantedCrater, TruthDocument, GENERATOR_REVISION};
pub use write::{write, DemoFiles, RASTER_FILE, TRUTH_FILE};

use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;
use rayon::prelude::*;
use sha2::{Digest, Sha256};

/// Heights are rounded to this step before storage: far finer than any elevation product,
/// and it lets DEFLATE shrink the file (the low mantissa bits are no longer noise).
pub const HEIGHT_QUANTUM_M: f64 = 1.0 / 256.0;

/// A generated patch.
#[derive(Clone, Debug)]
pub struct DemoTerrain {
    pub spec: DemoSpec,
    pub grid: PatchGrid,
    /// Row-major, `grid.width_px` x `grid.height_px`, metres above the reference sphere.
    pub heights_m: Vec<f32>,
    /// Every planted crater, in emplacement order (id 1 = oldest).
    pub craters: Vec<PlantedCrater>,
}

impl DemoTerrain {
    /// SHA-256 (hex) of the heights as little-endian f32 bytes, row-major.
    pub fn heights_sha256(&self) -> String {
        heights_sha256(&self.heights_m)
    }

    /// The truth document as written to `truth.json`.
    pub fn truth_json(&self) -> Result<String, SynthError> {
        let doc = TruthDocument::new(
            &self.spec,
            &self.grid,
            RASTER_FILE,
            self.heights_sha256(),
            self.craters.clone(),
        );
        Ok(doc.to_json()?)
    }
}

/// SHA-256 (hex) of heights as little-endian f32 bytes.
pub fn heights_sha256(heights_m: &[f32]) -> String {
    let mut hasher = Sha256::new();
    for v in heights_m {
        hasher.update(v.to_le_bytes());
    }
    hasher
        .finalize()
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

/// Independent random streams per layer, so changing how many draws one layer makes does not
/// change the others.
mod stream {
    pub const BACKGROUND: u64 = 1;
    pub const POPULATION: u64 = 2;
    pub const BOULDERS: u64 = 3;
}

fn rng_for(seed: u64, stream: u64) -> ChaCha8Rng {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    rng.set_stream(stream);
    rng
}

/// Generate the patch described by `spec`. Deterministic: the same spec gives identical
/// heights and craters on any machine.
pub fn generate(spec: &DemoSpec) -> Result<DemoTerrain, SynthError> {
    validate(spec)?;
    let grid = PatchGrid::new(spec);
    let (w, h) = (grid.width_px, grid.height_px);
    let mut z = fbm::fbm_surface(
        w,
        h,
        spec.post_m,
        spec.hurst,
        1000.0,
        spec.background_rms_at_1km_m,
        &mut rng_for(spec.seed, stream::BACKGROUND),
    );
    add_mean_and_tilt(&mut z, spec, &grid);
    let background = z.clone();
    let (plans, profiles) = plan_and_profile(spec, &grid);
    let mut boulder_rng = rng_for(spec.seed, stream::BOULDERS);
    for (plan, prof) in plans.iter().zip(&profiles) {
        stamp::stamp_crater(&mut z, &background, &grid, plan, prof);
        if plan.boulder_floor {
            stamp::strew_boulders(&mut z, &grid, plan, &mut boulder_rng);
        }
    }
    let heights_m = z
        .par_iter()
        .map(|&v| ((v / HEIGHT_QUANTUM_M).round() * HEIGHT_QUANTUM_M) as f32)
        .collect();
    let craters = truth::planted_craters(&grid, &plans, &profiles);
    Ok(DemoTerrain {
        spec: spec.clone(),
        grid,
        heights_m,
        craters,
    })
}

/// The craters [`generate`] plants for `spec`, without building the raster: cheap, for
/// checking a truth file against its spec.
pub fn plant_craters(spec: &DemoSpec) -> Result<Vec<PlantedCrater>, SynthError> {
    validate(spec)?;
    let grid = PatchGrid::new(spec);
    let (plans, profiles) = plan_and_profile(spec, &grid);
    Ok(truth::planted_craters(&grid, &plans, &profiles))
}

fn plan_and_profile(
    spec: &DemoSpec,
    grid: &PatchGrid,
) -> (Vec<population::CraterPlan>, Vec<profile::CraterProfile>) {
    let plans =
        population::plan_population(spec, grid, &mut rng_for(spec.seed, stream::POPULATION));
    let profiles = plans
        .par_iter()
        .map(|p| profile::CraterProfile::new(p.diameter_m, p.kappa_t_m2))
        .collect();
    (plans, profiles)
}

/// The default demo patch, written to `out_dir`: what `quietbowl make-demo-terrain` runs.
pub fn make_demo_terrain(out_dir: &std::path::Path) -> Result<DemoFiles, SynthError> {
    write(&generate(&DemoSpec::default())?, out_dir)
}

fn add_mean_and_tilt(z: &mut [f64], spec: &DemoSpec, grid: &PatchGrid) {
    let (w, h) = (grid.width_px, grid.height_px);
    let (sx, sy) = grid.ground_step_m(spec.centre_lat_deg);
    let grade = spec.tilt_deg.to_radians().tan();
    let (east, north) = (
        spec.tilt_down_azimuth_deg.to_radians().sin(),
        spec.tilt_down_azimuth_deg.to_radians().cos(),
    );
    z.par_chunks_mut(w).enumerate().for_each(|(r, row)| {
        let v = -((r as f64 + 0.5) - h as f64 / 2.0) * sy;
        for (c, cell) in row.iter_mut().enumerate() {
            let u = ((c as f64 + 0.5) - w as f64 / 2.0) * sx;
            *cell += spec.mean_height_m - grade * (u * east + v * north);
        }
    });
}

fn validate(spec: &DemoSpec) -> Result<(), SynthError> {
    let bad = |what: &str| Err(SynthError::InvalidSpec(what.to_string()));
    let finite = [
        spec.centre_lon_deg,
        spec.centre_lat_deg,
        spec.size_km,
        spec.post_m,
        spec.mean_height_m,
        spec.tilt_deg,
        spec.tilt_down_azimuth_deg,
        spec.hurst,
        spec.background_rms_at_1km_m,
        spec.crater_min_diameter_m,
        spec.crater_max_diameter_m,
        spec.fresh_fraction,
        spec.degradation_min,
        spec.degradation_max,
        spec.breach_min_deg,
        spec.breach_max_deg,
        spec.host_min_diameter_m,
        spec.host_max_diameter_m,
    ];
    if finite.iter().any(|v| !v.is_finite()) {
        return bad("every number must be finite");
    }
    if spec.centre_lat_deg.abs() > 80.0 {
        return bad(
            "centre_lat_deg must be within 80 degrees of the equator (equirectangular grid)",
        );
    }
    if !(spec.post_m > 0.0 && spec.size_km > 0.0) {
        return bad("size_km and post_m must be positive");
    }
    // The spectral synthesis holds a complex grid of the next power of two a side: 8192^2 is
    // already 1 GiB.
    let n = spec.size_px();
    if !(2..=8192).contains(&n) {
        return bad("size_km / post_m must give between 2 and 8192 posts a side");
    }
    let half_extent_deg = (spec.size_km * 500.0 / published::MOON_RADIUS_M).to_degrees();
    if spec.centre_lat_deg.abs() + half_extent_deg > 85.0 {
        return bad("the patch must stay within 85 degrees of the equator");
    }
    if !(spec.hurst > 0.0 && spec.hurst < 1.0) {
        return bad("hurst must lie in (0, 1)");
    }
    if !(spec.crater_min_diameter_m > 0.0
        && spec.crater_min_diameter_m < spec.crater_max_diameter_m)
    {
        return bad("need 0 < crater_min_diameter_m < crater_max_diameter_m");
    }
    if spec.crater_max_diameter_m > published::SIMPLE_CRATER_MAX_D_M
        || spec.host_max_diameter_m > published::SIMPLE_CRATER_MAX_D_M
    {
        return bad("craters above the simple-to-complex transition (15 km) are not modelled");
    }
    if !(spec.host_min_diameter_m > 0.0 && spec.host_min_diameter_m <= spec.host_max_diameter_m) {
        return bad("need 0 < host_min_diameter_m <= host_max_diameter_m");
    }
    if !(0.0..=1.0).contains(&spec.fresh_fraction) {
        return bad("fresh_fraction must lie in [0, 1]");
    }
    if !(spec.degradation_min > 0.0 && spec.degradation_min <= spec.degradation_max) {
        return bad("need 0 < degradation_min <= degradation_max");
    }
    if !(spec.breach_min_deg > 0.0
        && spec.breach_min_deg <= spec.breach_max_deg
        && spec.breach_max_deg < 360.0)
    {
        return bad("need 0 < breach_min_deg <= breach_max_deg < 360");
    }
    if spec.crater_count + spec.host_count > 100_000 {
        return bad("at most 100000 craters");
    }
    Ok(())
}
