//! Our Horn slope, TRI (Riley) and roughness against GDAL's own DEM processing (`gdaldem`,
//! GDAL 3.6, through the gdal crate's `processing::dem`) on a window of the demo terrain.
mod common;

use gdal::raster::processing::dem::{roughness, slope, terrain_ruggedness_index, DemSlopeAlg, RoughnessOptions, SlopeOptions, TriOptions};
use gdal::Dataset;
use std::path::Path;
use terrain::derivatives::{roughness_m, slope_deg_with, tri_m, Spacing};
use terrain::{Dem, ElevationGrid};

fn demo_window() -> (tempfile::TempDir, std::path::PathBuf, ElevationGrid) {
    let demo = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../demo-terrain/farside-patch.tif");
    let dem = Dem::open(&demo, &Default::default()).expect("demo terrain is committed in demo-terrain/");
    let grid = dem.read_window(700, 700, 300, 240).unwrap();
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("window.tif");
    let gt = dem.geometry().geotransform;
    let window_gt = [gt[0] + 700.0 * gt[1], gt[1], 0.0, gt[3] + 700.0 * gt[5], 0.0, gt[5]];
    common::write_raster::<f32>(&path, grid.width, grid.height, grid.heights_m.clone(),
        &common::RasterSpec { crs: Some("IAU_2015:30115"), geotransform: window_gt, scale: None, offset: None, nodata: None });
    (dir, path, grid)
}

fn compare(ours: &[f32], gdal_ds: &Dataset, tol: f64, what: &str) {
    let band = gdal_ds.rasterband(1).unwrap();
    let (w, h) = band.size();
    let theirs = band.read_as::<f32>((0, 0), (w, h), (w, h), None).unwrap();
    let nodata = band.no_data_value();
    let mut compared = 0;
    for (i, (&a, &b)) in ours.iter().zip(theirs.data()).enumerate() {
        if a.is_nan() || Some(b as f64) == nodata {
            continue;
        }
        assert!(((a - b) as f64).abs() <= tol, "{what} at pixel {i}: ours {a}, gdaldem {b}");
        compared += 1;
    }
    assert!(compared > ours.len() * 9 / 10, "{what}: only {compared} pixels compared");
}

#[test]
fn slope_matches_gdaldem_horn() {
    let (dir, path, grid) = demo_window();
    let ds = Dataset::open(&path).unwrap();
    let mut opts = SlopeOptions::new();
    opts.with_algorithm(DemSlopeAlg::Horn);
    let out = slope(&ds, dir.path().join("slope.tif"), &opts).unwrap();
    compare(&slope_deg_with(&grid, Spacing::MapUnits), &out, 1e-3, "slope (deg)");
}

#[test]
fn tri_matches_gdaldem_riley() {
    let (dir, path, grid) = demo_window();
    let ds = Dataset::open(&path).unwrap();
    let out = terrain_ruggedness_index(&ds, dir.path().join("tri.tif"), &TriOptions::new()).unwrap();
    compare(&tri_m(&grid), &out, 1e-3, "TRI (m)");
}

#[test]
fn roughness_matches_gdaldem() {
    let (dir, path, grid) = demo_window();
    let ds = Dataset::open(&path).unwrap();
    let out = roughness(&ds, dir.path().join("rough.tif"), &RoughnessOptions::new()).unwrap();
    compare(&roughness_m(&grid), &out, 1e-3, "roughness (m)");
}

#[test]
fn ground_slope_accounts_for_shorter_degrees_of_longitude() {
    // On IAU_2015:30115 (true scale on the equator) a map metre east-west at 16 N is
    // cos(16 deg) ground metres, so a pure east-west gradient is steeper on the ground.
    let (_dir, _path, grid) = demo_window();
    let map = slope_deg_with(&grid, Spacing::MapUnits);
    let ground = slope_deg_with(&grid, Spacing::Ground);
    let mean = |v: &[f32]| v.iter().filter(|x| !x.is_nan()).map(|&x| x as f64).sum::<f64>() / v.iter().filter(|x| !x.is_nan()).count() as f64;
    assert!(mean(&ground) > mean(&map));
}
