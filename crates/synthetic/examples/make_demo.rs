//! Regenerate the committed demo terrain: `cargo run --release -p quietbowl-synthetic
//! --example make_demo -- [OUT_DIR [SEED [LAT_DEG [SIZE_KM]]]]` (default: `demo-terrain/` at
//! the workspace root, the default spec's seed, latitude and size). Another seed gives a patch
//! of the same kind with other craters: held-out terrain for checking that a detection change
//! tuned on the demo holds elsewhere. Another latitude or size keeps the crater density
//! (`DemoSpec::with_size`).

use std::path::PathBuf;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let out = std::env::args_os()
        .nth(1)
        .map(PathBuf::from)
        .unwrap_or_else(|| {
            PathBuf::from(concat!(env!("CARGO_MANIFEST_DIR"), "/../../demo-terrain"))
        });
    let mut spec = synthetic::DemoSpec::default();
    if let Some(seed) = std::env::args().nth(2) {
        spec.seed = seed
            .parse()
            .map_err(|e| format!("SEED must be a whole number ({e})"))?;
    }
    let number = |i: usize, name: &str| -> Result<Option<f64>, String> {
        std::env::args()
            .nth(i)
            .map(|v| {
                v.parse::<f64>()
                    .map_err(|e| format!("{name} must be a number ({e})"))
            })
            .transpose()
    };
    if let Some(lat) = number(3, "LAT_DEG")? {
        if !(-85.0..=85.0).contains(&lat) {
            return Err(format!("LAT_DEG must lie within -85..85 (got {lat})").into());
        }
        spec.centre_lat_deg = lat;
    }
    if let Some(size_km) = number(4, "SIZE_KM")? {
        if !(size_km > 0.0 && size_km <= 600.0) {
            return Err(format!("SIZE_KM must lie within 0..600 (got {size_km})").into());
        }
        spec = spec.with_size(size_km);
    }
    let started = std::time::Instant::now();
    let terrain = synthetic::generate(&spec)?;
    let generated = started.elapsed();
    let files = synthetic::write(&terrain, &out)?;
    let hosts = terrain
        .craters
        .iter()
        .filter(|c| c.planted_as == synthetic::PlantedAs::Host)
        .count();
    println!(
        "{} x {} posts, {} craters ({} hosts) generated in {:.2} s; wrote {} ({} bytes), {}",
        terrain.grid.width_px,
        terrain.grid.height_px,
        terrain.craters.len(),
        hosts,
        generated.as_secs_f64(),
        files.raster.display(),
        files.raster_bytes,
        files.truth.display()
    );
    println!("heights sha256 {}", files.heights_sha256);
    Ok(())
}
