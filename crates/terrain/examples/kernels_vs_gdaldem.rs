//! Time our Horn slope and roughness kernels against GDAL's DEM processing (`gdaldem slope`,
//! `gdaldem roughness`, through the gdal crate, output to /vsimem) on the same tile, check the
//! results agree within 1e-3, and print the speed ratios.
//!
//!   cargo run --release -p quietbowl-terrain --example kernels_vs_gdaldem -- [TILE] [REPEATS]
//!
//! Default tile: the demo terrain (2000 x 2000 px).
//!
//! `gdaldem` reads its input through GDAL (from GDAL's block cache after the first repeat, as
//! the dataset stays open), computes, and writes an uncompressed GeoTIFF to /vsimem. Ours is
//! timed three ways, each against that same `gdaldem` figure:
//! - `compute`: the kernel alone, from a grid already in memory into a new buffer;
//! - `read+compute`: reading the tile through our ingest (kept open, so also from GDAL's
//!   block cache) and the kernel;
//! - `file to file`: read+compute and writing the result as a GeoTIFF to /vsimem, which is
//!   what `gdaldem` does: the like-for-like figure.
//!
//! Wall times are the best of the repeats. CPU times (all threads of the process, from the
//! scheduler's per-thread statistics) are the smallest of the repeats too; they do not grow
//! when other processes share the cores, so their ratio is the per-core comparison.
use gdal::raster::processing::dem::{
    roughness, slope, DemSlopeAlg, RoughnessOptions, SlopeOptions,
};
use gdal::raster::Buffer;
use gdal::{Dataset, DriverManager};
use std::time::Instant;
use terrain::derivatives::{roughness_m, slope_deg_with, Spacing};
use terrain::{Dem, ElevationGrid};

/// On-CPU seconds of all threads of this process so far (Linux scheduler statistics).
fn process_cpu_s() -> f64 {
    let Ok(tasks) = std::fs::read_dir("/proc/self/task") else {
        return f64::NAN;
    };
    tasks
        .flatten()
        .filter_map(|t| std::fs::read_to_string(t.path().join("schedstat")).ok())
        .filter_map(|s| s.split_whitespace().next()?.parse::<f64>().ok())
        .sum::<f64>()
        * 1e-9
}

/// Best wall and best CPU seconds over `repeats` runs, and the last result.
fn best_of<T>(repeats: usize, mut f: impl FnMut() -> T) -> (f64, f64, T) {
    let (mut wall, mut cpu) = (f64::INFINITY, f64::INFINITY);
    let mut out = None;
    for _ in 0..repeats {
        let (c0, t) = (process_cpu_s(), Instant::now());
        let v = f();
        wall = wall.min(t.elapsed().as_secs_f64());
        cpu = cpu.min(process_cpu_s() - c0);
        out = Some(v);
    }
    (wall, cpu, out.expect("at least one repeat"))
}

fn max_diff(ours: &[f32], ds: &Dataset) -> f64 {
    let band = ds.rasterband(1).expect("band");
    let (w, h) = band.size();
    let nodata = band.no_data_value();
    let theirs = band
        .read_as::<f32>((0, 0), (w, h), (w, h), None)
        .expect("read");
    ours.iter()
        .zip(theirs.data())
        .filter(|(a, b)| !a.is_nan() && Some(**b as f64) != nodata)
        .map(|(a, b)| ((a - b) as f64).abs())
        .fold(0.0, f64::max)
}

/// Write `values` over the grid's footprint as an uncompressed Float32 GeoTIFF, as gdaldem does.
fn write_tif(path: &str, grid: &ElevationGrid, src: &Dataset, values: Vec<f32>) {
    let driver = DriverManager::get_driver_by_name("GTiff").expect("GTiff driver");
    let mut ds = driver
        .create_with_band_type::<f32, _>(path, grid.width, grid.height, 1)
        .expect("create");
    ds.set_geo_transform(&src.geo_transform().expect("geotransform"))
        .expect("set geotransform");
    ds.set_spatial_ref(&src.spatial_ref().expect("crs"))
        .expect("set crs");
    let mut band = ds.rasterband(1).expect("band");
    band.set_no_data_value(Some(f32::NAN as f64))
        .expect("nodata");
    let mut buf = Buffer::new((grid.width, grid.height), values);
    band.write((0, 0), (grid.width, grid.height), &mut buf)
        .expect("write");
}

fn report(what: &str, unit: &str, ours: [(f64, f64); 3], gdal: (f64, f64), diff: f64) {
    println!(
        "{what}: gdaldem {:.1} ms wall, {:.1} ms CPU; max |ours - gdaldem| {diff:.2e} {unit}",
        gdal.0 * 1e3,
        gdal.1 * 1e3
    );
    for ((w, c), label) in ours.iter().zip([
        "compute (grid in memory)",
        "read+compute",
        "file to file (like for like)",
    ]) {
        println!(
            "  ours {label:<30} {:7.1} ms wall ({:.2}x), {:7.1} ms CPU ({:.2}x)",
            w * 1e3,
            gdal.0 / w,
            c * 1e3,
            gdal.1 / c
        );
    }
}

fn main() {
    // GDAL complains about listing /vsimem outputs it never needs to list; nothing to see.
    gdal::config::set_error_handler(|_, _, _| {});
    let mut args = std::env::args().skip(1);
    let path = args.next().unwrap_or_else(|| {
        concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/../../demo-terrain/farside-patch.tif"
        )
        .to_string()
    });
    let repeats: usize = args.next().and_then(|s| s.parse().ok()).unwrap_or(5);
    let dem = Dem::open(&path, &Default::default()).expect("open the tile");
    let grid = dem.read_all().expect("read the tile");
    let ds = Dataset::open(&path).expect("GDAL opens the tile");
    println!(
        "tile {path}: {} x {} px, {} threads for ours, gdaldem single-threaded, best of {repeats}",
        grid.width,
        grid.height,
        rayon::current_num_threads()
    );

    let mut so = SlopeOptions::new();
    so.with_algorithm(DemSlopeAlg::Horn);
    let (gw, gc, s_gdal) = best_of(repeats, || {
        slope(&ds, "/vsimem/slope.tif", &so).expect("gdaldem slope")
    });
    let (w0, c0, s_ours) = best_of(repeats, || slope_deg_with(&grid, Spacing::MapUnits));
    let (w1, c1, _) = best_of(repeats, || {
        slope_deg_with(&dem.read_all().expect("read"), Spacing::MapUnits)
    });
    let (w2, c2, _) = best_of(repeats, || {
        let g = dem.read_all().expect("read");
        let s = slope_deg_with(&g, Spacing::MapUnits);
        write_tif("/vsimem/ours-slope.tif", &g, &ds, s);
    });
    report(
        "Horn slope",
        "deg",
        [(w0, c0), (w1, c1), (w2, c2)],
        (gw, gc),
        max_diff(&s_ours, &s_gdal),
    );

    let (gw, gc, r_gdal) = best_of(repeats, || {
        roughness(&ds, "/vsimem/rough.tif", &RoughnessOptions::new()).expect("gdaldem roughness")
    });
    let (w0, c0, r_ours) = best_of(repeats, || roughness_m(&grid));
    let (w1, c1, _) = best_of(repeats, || roughness_m(&dem.read_all().expect("read")));
    let (w2, c2, _) = best_of(repeats, || {
        let g = dem.read_all().expect("read");
        let r = roughness_m(&g);
        write_tif("/vsimem/ours-rough.tif", &g, &ds, r);
    });
    report(
        "roughness",
        "m",
        [(w0, c0), (w1, c1), (w2, c2)],
        (gw, gc),
        max_diff(&r_ours, &r_gdal),
    );
    let (rw, rc, _) = best_of(repeats, || dem.read_all().expect("read"));
    println!(
        "reading the tile through our ingest alone: {:.1} ms wall, {:.1} ms CPU",
        rw * 1e3,
        rc * 1e3
    );
}
