//! Time our Horn slope and roughness kernels against GDAL's DEM processing (`gdaldem slope`,
//! `gdaldem roughness`, through the gdal crate, output to /vsimem) on the same tile, check the
//! results agree within 1e-3, and print the speed ratio.
//!
//!   cargo run --release -p quietbowl-terrain --example kernels_vs_gdaldem -- [TILE] [REPEATS]
//!
//! Default tile: the demo terrain (2000 x 2000 px).
use gdal::raster::processing::dem::{roughness, slope, DemSlopeAlg, RoughnessOptions, SlopeOptions};
use gdal::Dataset;
use std::time::Instant;
use terrain::derivatives::{roughness_m, slope_deg_with, Spacing};
use terrain::Dem;

fn best_of<T>(repeats: usize, mut f: impl FnMut() -> T) -> (f64, T) {
    let mut best = f64::INFINITY;
    let mut out = None;
    for _ in 0..repeats {
        let t = Instant::now();
        let v = f();
        best = best.min(t.elapsed().as_secs_f64());
        out = Some(v);
    }
    (best, out.expect("at least one repeat"))
}

fn max_diff(ours: &[f32], ds: &Dataset) -> f64 {
    let band = ds.rasterband(1).expect("band");
    let (w, h) = band.size();
    let nodata = band.no_data_value();
    let theirs = band.read_as::<f32>((0, 0), (w, h), (w, h), None).expect("read");
    ours.iter()
        .zip(theirs.data())
        .filter(|(a, b)| !a.is_nan() && Some(**b as f64) != nodata)
        .map(|(a, b)| ((a - b) as f64).abs())
        .fold(0.0, f64::max)
}

fn main() {
    // GDAL complains about listing /vsimem outputs it never needs to list; nothing to see.
    gdal::config::set_error_handler(|_, _, _| {});
    let mut args = std::env::args().skip(1);
    let path = args.next().unwrap_or_else(|| concat!(env!("CARGO_MANIFEST_DIR"), "/../../demo-terrain/farside-patch.tif").to_string());
    let repeats: usize = args.next().and_then(|s| s.parse().ok()).unwrap_or(5);
    let dem = Dem::open(&path, &Default::default()).expect("open the tile");
    let grid = dem.read_all().expect("read the tile");
    let ds = Dataset::open(&path).expect("GDAL opens the tile");
    println!("tile {path}: {} x {} px, {} threads for ours, best of {repeats}", grid.width, grid.height, rayon::current_num_threads());

    let (t_ours, s_ours) = best_of(repeats, || slope_deg_with(&grid, Spacing::MapUnits));
    let mut so = SlopeOptions::new();
    so.with_algorithm(DemSlopeAlg::Horn);
    let (t_gdal, s_gdal) = best_of(repeats, || slope(&ds, "/vsimem/slope.tif", &so).expect("gdaldem slope"));
    println!("slope      ours {:.1} ms, gdaldem {:.1} ms, ratio {:.2}x, max |diff| {:.2e} deg", t_ours * 1e3, t_gdal * 1e3, t_gdal / t_ours, max_diff(&s_ours, &s_gdal));

    let (t_ours, r_ours) = best_of(repeats, || roughness_m(&grid));
    let (t_gdal, r_gdal) = best_of(repeats, || roughness(&ds, "/vsimem/rough.tif", &RoughnessOptions::new()).expect("gdaldem roughness"));
    println!("roughness  ours {:.1} ms, gdaldem {:.1} ms, ratio {:.2}x, max |diff| {:.2e} m", t_ours * 1e3, t_gdal * 1e3, t_gdal / t_ours, max_diff(&r_ours, &r_gdal));
}
