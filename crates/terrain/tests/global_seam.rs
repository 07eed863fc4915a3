//! Global grids wrap at their seam: a window read across it is the two pieces on either side,
//! read through GDAL and joined, and every longitude near it finds its pixel. Checked on small
//! global GeoTIFFs written here (0..360 and -180..180) whose every value names its own column,
//! and on the real LOLA LDEM_4 product (0..360) against its pixels read straight from GDAL.
mod common;

use common::{write_raster, RasterSpec};
use gdal::Dataset;
use std::sync::Arc;
use terrain::{Dem, ElevationGrid};

const GEO: &str = "IAU_2015:30100"; // Moon 2015 geographic (PROJ 9.1 IAU catalogue)

/// 1 deg pixels, 360 x 180, starting at `west_deg`; the value of pixel (col, row) is
/// 1000 col + row, so a height read anywhere says which raster pixel it came from.
fn one_degree_globe<T: gdal::raster::GdalType + Copy>(
    dir: &tempfile::TempDir,
    name: &str,
    west_deg: f64,
    value: impl Fn(usize, usize) -> T,
) -> Dem {
    let (w, h) = (360, 180);
    let data = (0..w * h).map(|k| value(k % w, k / w)).collect();
    let path = dir.path().join(name);
    write_raster::<T>(
        &path,
        w,
        h,
        data,
        &RasterSpec {
            crs: Some(GEO),
            geotransform: [west_deg, 1.0, 0.0, 90.0, 0.0, -1.0],
            scale: None,
            offset: None,
            nodata: None,
        },
    );
    Dem::open(&path, &Default::default()).expect("open the synthetic globe")
}

fn code(col: usize, row: usize) -> f32 {
    (1000 * col + row) as f32
}

/// Window pixel under a lon/lat, found through the window's own geometry (as every consumer
/// of a window does), or `None` if it falls outside the window.
fn window_pixel(g: &ElevationGrid, lon: f64, lat: f64) -> Option<(usize, usize)> {
    let (c, r) = g.geometry.lonlat_to_pixel(lon, lat)?;
    let (c, r) = (c - g.col0 as f64, r - g.row0 as f64);
    (c >= 0.0 && r >= 0.0 && c < g.width as f64 && r < g.height as f64)
        .then_some((c.floor() as usize, r.floor() as usize))
}

fn check_globe(dem: &Dem, west_deg: f64) {
    assert_eq!(dem.geometry().wrap_width_px(), Some(360));
    // Ten columns each side of the seam, rows 80..84.
    let g = dem.read_window(-10, 80, 20, 4).unwrap();
    for r in 0..4 {
        for k in 0..20 {
            let raster_col = (k as isize - 10).rem_euclid(360) as usize;
            assert_eq!(
                g.heights_m[r * 20 + k],
                code(raster_col, 80 + r),
                "west {west_deg}: window ({k}, {r})"
            );
        }
    }
    // The same across the far end: the window starts at column 355 and runs past 360.
    let g2 = dem.read_window(355, 80, 10, 4).unwrap();
    assert_eq!(&g2.heights_m[..10], &g.heights_m[5..15]);
    // Longitudes on and near the seam, in either counting and a turn away, land on the
    // pixel whose value names them. Pixel centres, so the expected pixel is unambiguous.
    let seam = west_deg; // 0 or -180: the western edge of column 0
    for (lon, want_col) in [
        (seam + 0.5, 0),
        (seam - 0.5, 359),
        (seam + 359.5, 359),
        (seam + 360.5, 0),
        (seam + 720.5, 0),
        (seam - 360.5, 359),
        (seam + 9.5, 9),
        (seam - 9.5, 350),
    ] {
        let lat = 90.0 - 81.5; // centre of row 81
        let (c, r) = window_pixel(&g, lon, lat)
            .unwrap_or_else(|| panic!("west {west_deg}: lon {lon} falls outside the window"));
        assert_eq!(g.heights_m[r * 20 + c], code(want_col, 81), "lon {lon}");
        // Bilinear sampling at the seam itself has data on both sides.
        assert!(g.sample_lonlat(seam, lat).is_some(), "seam sample");
    }
    // The seam on its own, exactly, belongs to column 0 in the raster's geometry.
    let (c, _) = dem.geometry().lonlat_to_pixel(seam, 0.0).unwrap();
    assert!(c.abs() < 1e-9, "seam at column {c}");
    let (c, _) = dem.geometry().lonlat_to_pixel(seam + 360.0, 0.0).unwrap();
    assert!(c.abs() < 1e-9, "seam + 360 at column {c}");
}

#[test]
fn synthetic_0_360_globe_wraps_at_its_seam() {
    let dir = tempfile::tempdir().unwrap();
    // float32: the path that reads the band as f32.
    let dem = one_degree_globe::<f32>(&dir, "globe360.tif", 0.0, code);
    check_globe(&dem, 0.0);
}

#[test]
fn synthetic_minus_180_180_globe_wraps_at_its_seam() {
    let dir = tempfile::tempdir().unwrap();
    // int32: the path that reads the band as f64.
    let dem = one_degree_globe::<i32>(&dir, "globe180.tif", -180.0, |c, r| (1000 * c + r) as i32);
    check_globe(&dem, -180.0);
}

#[test]
fn window_inside_a_global_grid_keeps_the_raster_geometry() {
    let dir = tempfile::tempdir().unwrap();
    let dem = one_degree_globe::<f32>(&dir, "globe.tif", 0.0, code);
    let g = dem.read_window(100, 50, 30, 20).unwrap();
    assert!(Arc::ptr_eq(&g.geometry, &dem.geometry()));
    assert_eq!((g.col0, g.row0), (100, 50));
    assert_eq!(g.heights_m[0], code(100, 50));
    // Rows do not wrap: beyond the pole there is nothing.
    let g = dem.read_window(100, -3, 4, 5).unwrap();
    assert!(g.heights_m[..12].iter().all(|h| h.is_nan()));
    assert_eq!(g.heights_m[12], code(100, 0));
}

#[test]
fn regional_grid_does_not_wrap() {
    // 359 one-degree columns: one short of a turn, so nothing lies beyond its edges.
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("regional.tif");
    let (w, h) = (359, 10);
    write_raster::<f32>(
        &path,
        w,
        h,
        (0..w * h).map(|k| code(k % w, k / w)).collect(),
        &RasterSpec {
            crs: Some(GEO),
            geotransform: [0.0, 1.0, 0.0, 5.0, 0.0, -1.0],
            scale: None,
            offset: None,
            nodata: None,
        },
    );
    let dem = Dem::open(&path, &Default::default()).unwrap();
    assert_eq!(dem.geometry().wrap_width_px(), None);
    let g = dem.read_window(-2, 0, 4, 1).unwrap();
    assert!(g.heights_m[0].is_nan() && g.heights_m[1].is_nan());
    assert_eq!(&g.heights_m[2..], &[code(0, 0), code(1, 0)]);
    assert_eq!(g.col0, -2);
}

/// Heights of raster pixels `col..col + width`, `row..row + height` of LDEM_4 read straight
/// from GDAL: DN x 0.5 m (the label's SCALING_FACTOR; its OFFSET is the sphere's radius).
fn lola_heights(ds: &Dataset, col: usize, row: usize, width: usize, height: usize) -> Vec<f32> {
    let band = ds.rasterband(1).unwrap();
    band.read_as::<i16>(
        (col as isize, row as isize),
        (width, height),
        (width, height),
        None,
    )
    .unwrap()
    .data()
    .iter()
    .map(|&dn| dn as f32 * 0.5)
    .collect()
}

#[test]
fn lola_window_across_the_seam_equals_its_two_halves() {
    let Some(lbl) = common::lola_label() else {
        return;
    };
    let dem = Dem::open(&lbl, &Default::default()).expect("LDEM_4 is present but does not open");
    let ds = Dataset::open(&lbl).expect("GDAL opens LDEM_4");
    assert_eq!(dem.geometry().wrap_width_px(), Some(1440));
    // 12 columns west of the seam (1428..1440) and 9 east of it (0..9), rows 350..370.
    let (w, h) = (21, 20);
    let g = dem.read_window(-12, 350, w, h).unwrap();
    let west = lola_heights(&ds, 1428, 350, 12, h);
    let east = lola_heights(&ds, 0, 350, 9, h);
    for r in 0..h {
        assert_eq!(&g.heights_m[r * w..r * w + 12], &west[r * 12..(r + 1) * 12]);
        assert_eq!(
            &g.heights_m[r * w + 12..(r + 1) * w],
            &east[r * 9..(r + 1) * 9]
        );
    }
}

#[test]
fn lola_sites_on_the_seam_find_their_terrain() {
    let Some(lbl) = common::lola_label() else {
        return;
    };
    let dem = Dem::open(&lbl, &Default::default()).expect("LDEM_4 is present but does not open");
    let ds = Dataset::open(&lbl).expect("GDAL opens LDEM_4");
    // (lon, lat) on or next to the seam, and the four LDEM_4 pixels around it (0.25 deg
    // pixels, column c centred on lon 0.25 c + 0.125, row r on lat 89.875 - 0.25 r) with the
    // bilinear weight of the western column.
    for ((lon, lat), (west_col, east_col, row, west_weight)) in [
        // lon 0 lies halfway between the centres of columns 1439 and 0; lat 0 between rows 359
        // and 360.
        ((0.0, 0.0), (1439, 0, 359, 0.5)),
        ((360.0, 10.0), (1439, 0, 319, 0.5)),
        // lon -0.01 = 359.99: 0.115 deg east of column 1439's centre, 0.135 west of column 0's.
        ((-0.01, -20.0), (1439, 0, 439, 0.54)),
    ] {
        let geom = dem.geometry();
        let (col, r) = geom.lonlat_to_pixel(lon, lat).unwrap();
        // A window of 8 pixels each way around the site, as `site` reads for its horizon.
        let g = dem
            .read_window(col as isize - 8, r as isize - 8, 17, 17)
            .unwrap();
        let got = g
            .sample_lonlat(lon, lat)
            .unwrap_or_else(|| panic!("no terrain at {lon}, {lat}"));
        let w = lola_heights(&ds, west_col, row, 1, 2);
        let e = lola_heights(&ds, east_col, row, 1, 2);
        // Rows: lat 0 and 10 lie halfway between two row centres; -20 also (row 439's
        // centre is -19.875, row 440's -20.125).
        let want = west_weight * 0.5 * (w[0] + w[1]) as f64
            + (1.0 - west_weight) * 0.5 * (e[0] + e[1]) as f64;
        // The geotransform comes from the label's rounded MAP_SCALE, so pixel centres sit
        // about 1e-4 px off the round longitudes; 1e-3 of the height step covers that.
        let step = (w[0] - e[0]).abs().max((w[1] - e[1]).abs()) as f64;
        assert!(
            (got - want).abs() <= 1e-3 * step.max(1.0) + 1e-3,
            "{lon}, {lat}: {got} m, from GDAL's pixels {want} m"
        );
    }
}
