//! Our Horn slope, TRI (Riley) and roughness against GDAL's own DEM processing (`gdaldem`,
//! GDAL 3.6, through the gdal crate's `processing::dem`) on a window of the demo terrain, in
//! map units as gdaldem counts them. Ground units (the cos(latitude) of a degree of longitude)
//! are checked against analytic surfaces in `ground_slope_analytic.rs`.
mod common;

use gdal::raster::processing::dem::{
    roughness, slope, terrain_ruggedness_index, DemSlopeAlg, RoughnessOptions, SlopeOptions,
    TriOptions,
};
use gdal::Dataset;
use std::path::Path;
use terrain::derivatives::{roughness_m, slope_deg_with, tri_m, Spacing};
use terrain::{Dem, ElevationGrid};

fn demo_window() -> (tempfile::TempDir, std::path::PathBuf, ElevationGrid) {
    let demo = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../demo-terrain/farside-patch.tif");
    let dem =
        Dem::open(&demo, &Default::default()).expect("demo terrain is committed in demo-terrain/");
    let grid = dem.read_window(700, 700, 300, 240).unwrap();
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("window.tif");
    let gt = dem.geometry().geotransform;
    let window_gt = [
        gt[0] + 700.0 * gt[1],
        gt[1],
        0.0,
        gt[3] + 700.0 * gt[5],
        0.0,
        gt[5],
    ];
    common::write_raster::<f32>(
        &path,
        grid.width,
        grid.height,
        grid.heights_m.clone(),
        &common::RasterSpec {
            crs: Some("IAU_2015:30115"),
            geotransform: window_gt,
            scale: None,
            offset: None,
            nodata: None,
        },
    );
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
        assert!(
            ((a - b) as f64).abs() <= tol,
            "{what} at pixel {i}: ours {a}, gdaldem {b}"
        );
        compared += 1;
    }
    assert!(
        compared > ours.len() * 9 / 10,
        "{what}: only {compared} pixels compared"
    );
}

#[test]
fn slope_matches_gdaldem_horn() {
    let (dir, path, grid) = demo_window();
    let ds = Dataset::open(&path).unwrap();
    let mut opts = SlopeOptions::new();
    opts.with_algorithm(DemSlopeAlg::Horn);
    let out = slope(&ds, dir.path().join("slope.tif"), &opts).unwrap();
    compare(
        &slope_deg_with(&grid, Spacing::MapUnits),
        &out,
        1e-3,
        "slope (deg)",
    );
}

#[test]
fn tri_matches_gdaldem_riley() {
    let (dir, path, grid) = demo_window();
    let ds = Dataset::open(&path).unwrap();
    let out =
        terrain_ruggedness_index(&ds, dir.path().join("tri.tif"), &TriOptions::new()).unwrap();
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
fn slope_and_roughness_leave_gaps_where_gdaldem_does() {
    // Holes of nodata (a lone pixel, a short run): gdaldem without -compute_edges gives nodata
    // wherever the 3x3 window is incomplete, centre included; so must we (NaN).
    let (dir, _, mut grid) = demo_window();
    let holes = [
        (40usize, 50usize),
        (41, 50),
        (42, 50),
        (120, 100),
        (200, 180),
    ];
    for &(c, r) in &holes {
        grid.heights_m[r * grid.width + c] = f32::NAN;
    }
    let path = dir.path().join("holes.tif");
    let dem = Dem::open(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("../../demo-terrain/farside-patch.tif"),
        &Default::default(),
    )
    .unwrap();
    let gt = dem.geometry().geotransform;
    let window_gt = [
        gt[0] + 700.0 * gt[1],
        gt[1],
        0.0,
        gt[3] + 700.0 * gt[5],
        0.0,
        gt[5],
    ];
    let stored: Vec<f32> = grid
        .heights_m
        .iter()
        .map(|h| if h.is_nan() { -9999.0 } else { *h })
        .collect();
    common::write_raster::<f32>(
        &path,
        grid.width,
        grid.height,
        stored,
        &common::RasterSpec {
            crs: Some("IAU_2015:30115"),
            geotransform: window_gt,
            scale: None,
            offset: None,
            nodata: Some(-9999.0),
        },
    );
    let ds = Dataset::open(&path).unwrap();
    let mut opts = SlopeOptions::new();
    opts.with_algorithm(DemSlopeAlg::Horn);
    let slope_ds = slope(&ds, dir.path().join("slope.tif"), &opts).unwrap();
    let rough_ds = roughness(&ds, dir.path().join("rough.tif"), &RoughnessOptions::new()).unwrap();
    for (ours, theirs, what) in [
        (slope_deg_with(&grid, Spacing::MapUnits), &slope_ds, "slope"),
        (roughness_m(&grid), &rough_ds, "roughness"),
    ] {
        let band = theirs.rasterband(1).unwrap();
        let nodata = band.no_data_value();
        let theirs = band
            .read_as::<f32>(
                (0, 0),
                (grid.width, grid.height),
                (grid.width, grid.height),
                None,
            )
            .unwrap();
        let mut gaps = 0;
        for r in 1..grid.height - 1 {
            for c in 1..grid.width - 1 {
                let (a, b) = (ours[r * grid.width + c], theirs.data()[r * grid.width + c]);
                let gdal_gap = Some(b as f64) == nodata;
                assert_eq!(
                    a.is_nan(),
                    gdal_gap,
                    "{what} at ({c}, {r}): ours {a}, gdaldem {b}"
                );
                gaps += gdal_gap as usize;
            }
        }
        // Each hole blanks its 3x3 window: 5 x 3 for the run of three, 9 for each lone one.
        assert_eq!(gaps, 15 + 9 + 9, "{what}");
    }
}
