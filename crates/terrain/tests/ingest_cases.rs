//! Ingest of small rasters written through GDAL: every band type, scale and offset, nodata and
//! NaN, non-square pixels, both longitude conventions, projections, and the bad cases.
mod common;

use common::{write_raster, RasterSpec, R};
use terrain::{Dem, HeightConvention, OpenOptions, TerrainError};

const GEO: &str = "IAU_2015:30100"; // Moon 2015 geographic (PROJ 9.1 IAU catalogue)
const EQC180: &str = "IAU_2015:30115"; // Moon 2015 equirectangular centred on 180

fn tmp() -> tempfile::TempDir {
    tempfile::tempdir().unwrap()
}

fn spec(crs: &str, gt: [f64; 6]) -> RasterSpec<'_> {
    RasterSpec {
        crs: Some(crs),
        geotransform: gt,
        scale: None,
        offset: None,
        nodata: None,
    }
}

#[test]
fn every_band_type_reads_as_metres() {
    let d = tmp();
    let gt = [170.0, 0.5, 0.0, 10.0, 0.0, -0.5];
    let p = d.path().join("i16.tif");
    write_raster::<i16>(&p, 2, 2, vec![-100, 0, 100, 32767], &spec(GEO, gt));
    assert_eq!(
        Dem::open(&p, &Default::default())
            .unwrap()
            .read_all()
            .unwrap()
            .heights_m,
        vec![-100.0, 0.0, 100.0, 32767.0]
    );
    let p = d.path().join("u16.tif");
    write_raster::<u16>(&p, 2, 2, vec![0, 1, 65535, 7], &spec(GEO, gt));
    assert_eq!(
        Dem::open(&p, &Default::default())
            .unwrap()
            .read_all()
            .unwrap()
            .heights_m,
        vec![0.0, 1.0, 65535.0, 7.0]
    );
    let p = d.path().join("f32.tif");
    write_raster::<f32>(&p, 2, 2, vec![-8879.5, 0.25, 10504.0, 1.0], &spec(GEO, gt));
    assert_eq!(
        Dem::open(&p, &Default::default())
            .unwrap()
            .read_all()
            .unwrap()
            .heights_m,
        vec![-8879.5, 0.25, 10504.0, 1.0]
    );
    let p = d.path().join("f64.tif");
    write_raster::<f64>(&p, 2, 2, vec![-1.125, 2.5, 3.0, 4.0], &spec(GEO, gt));
    assert_eq!(
        Dem::open(&p, &Default::default())
            .unwrap()
            .read_all()
            .unwrap()
            .heights_m,
        vec![-1.125, 2.5, 3.0, 4.0]
    );
}

#[test]
fn band_scale_and_height_offset_are_applied() {
    let d = tmp();
    let p = d.path().join("so.tif");
    let mut s = spec(GEO, [170.0, 0.5, 0.0, 10.0, 0.0, -0.5]);
    s.scale = Some(0.5);
    s.offset = Some(-100.0); // a genuine height shift: far from any body radius
    write_raster::<i16>(&p, 2, 1, vec![10, -20], &s);
    let dem = Dem::open(&p, &Default::default()).unwrap();
    assert_eq!(
        dem.info().height_convention,
        HeightConvention::ScaleOffset {
            scale: 0.5,
            offset: -100.0
        }
    );
    assert_eq!(dem.read_all().unwrap().heights_m, vec![-95.0, -110.0]);
}

#[test]
fn offset_equal_to_lunar_radius_is_not_added() {
    let d = tmp();
    let p = d.path().join("radius_offset.tif");
    let mut s = spec(GEO, [170.0, 0.5, 0.0, 10.0, 0.0, -0.5]);
    s.scale = Some(0.5);
    s.offset = Some(R);
    write_raster::<i16>(&p, 2, 1, vec![-17758, 21008], &s);
    let dem = Dem::open(&p, &Default::default()).unwrap();
    assert!(matches!(
        dem.info().height_convention,
        HeightConvention::RadiusOffsetIgnored { .. }
    ));
    assert_eq!(dem.read_all().unwrap().heights_m, vec![-8879.0, 10504.0]);
}

#[test]
fn values_stored_as_radii_become_heights() {
    let d = tmp();
    let p = d.path().join("radii.tif");
    write_raster::<f64>(
        &p,
        2,
        1,
        vec![R + 1200.0, R - 300.0],
        &spec(GEO, [170.0, 0.5, 0.0, 10.0, 0.0, -0.5]),
    );
    let dem = Dem::open(&p, &Default::default()).unwrap();
    assert!(matches!(
        dem.info().height_convention,
        HeightConvention::RadiusValues { .. }
    ));
    assert_eq!(dem.read_all().unwrap().heights_m, vec![1200.0, -300.0]);
}

#[test]
fn nodata_and_nan_become_missing() {
    let d = tmp();
    let p = d.path().join("nd.tif");
    let mut s = spec(GEO, [170.0, 0.5, 0.0, 10.0, 0.0, -0.5]);
    s.nodata = Some(-32768.0);
    write_raster::<i16>(&p, 3, 1, vec![-32768, 5, 6], &s);
    let g = Dem::open(&p, &Default::default())
        .unwrap()
        .read_all()
        .unwrap();
    assert!(g.get(0, 0).is_none() && g.get(1, 0) == Some(5.0));
    let p = d.path().join("nan.tif");
    write_raster::<f32>(
        &p,
        3,
        1,
        vec![f32::NAN, 1.0, f32::NAN],
        &spec(GEO, [170.0, 0.5, 0.0, 10.0, 0.0, -0.5]),
    );
    let g = Dem::open(&p, &Default::default())
        .unwrap()
        .read_all()
        .unwrap();
    assert!((g.valid_fraction() - 1.0 / 3.0).abs() < 1e-12);
}

#[test]
fn non_square_pixels_give_separate_ground_sizes() {
    let d = tmp();
    let p = d.path().join("rect.tif");
    // Equirectangular centred on 180, 30 m east-west by 60 m north-south in map units, at the equator.
    write_raster::<f32>(
        &p,
        4,
        4,
        vec![0.0; 16],
        &spec(EQC180, [-60.0, 30.0, 0.0, 120.0, 0.0, -60.0]),
    );
    let dem = Dem::open(&p, &Default::default()).unwrap();
    let (dx, dy) = dem.info().pixel_size_m;
    assert!(
        (dx - 30.0).abs() < 1e-3 && (dy - 60.0).abs() < 1e-3,
        "{dx} {dy}"
    );
    assert_eq!(dem.info().crs_authority.as_deref(), Some("IAU_2015:30115"));
}

#[test]
fn equirectangular_grid_centred_on_180_straddles_the_antimeridian() {
    let d = tmp();
    let p = d.path().join("eqc.tif");
    // 60 km wide patch centred on x = 0, i.e. lon 180.
    write_raster::<f32>(
        &p,
        4,
        4,
        vec![0.0; 16],
        &spec(
            EQC180,
            [-30_000.0, 15_000.0, 0.0, 500_000.0, 0.0, -15_000.0],
        ),
    );
    let dem = Dem::open(&p, &Default::default()).unwrap();
    let info = dem.info();
    assert!(info.crosses_180);
    // 30 km of arc on a 1737.4 km sphere is 0.98935 deg (30/1737.4 rad).
    let half = (30_000.0 / R).to_degrees();
    assert!(
        (info.lon_range_deg.0 - (180.0 - half)).abs() < 1e-9
            && (info.lon_range_deg.1 - (180.0 + half)).abs() < 1e-9
    );
    // A -180..180 reader's point at -179.5 falls inside the grid, east of the centre.
    let (col, _) = dem.geometry().lonlat_to_pixel(-179.5, 16.0).unwrap();
    assert!(col > 2.0 && col < 4.0, "{col}");
    let (col, _) = dem.geometry().lonlat_to_pixel(179.5, 16.0).unwrap();
    assert!(col > 0.0 && col < 2.0, "{col}");
}

#[test]
fn minus_180_to_180_geographic_grid_wraps_longitudes_over_180() {
    let d = tmp();
    let p = d.path().join("m180.tif");
    write_raster::<f32>(
        &p,
        8,
        4,
        vec![0.0; 32],
        &spec(GEO, [-180.0, 45.0, 0.0, 90.0, 0.0, -45.0]),
    );
    let dem = Dem::open(&p, &Default::default()).unwrap();
    assert!(!dem.info().crosses_180, "180 lies on the edge only");
    let (c1, _) = dem.geometry().lonlat_to_pixel(190.0, 0.0).unwrap();
    let (c2, _) = dem.geometry().lonlat_to_pixel(-170.0, 0.0).unwrap();
    assert!(
        (c1 - c2).abs() < 1e-9 && (c1 - 10.0 / 45.0).abs() < 1e-9,
        "{c1} {c2}"
    );
}

#[test]
fn south_polar_stereographic_grid_opens_with_pole_at_centre() {
    let d = tmp();
    let p = d.path().join("sps.tif");
    write_raster::<f32>(
        &p,
        4,
        4,
        vec![0.0; 16],
        &spec(
            "IAU_2015:30135",
            [-20_000.0, 10_000.0, 0.0, 20_000.0, 0.0, -10_000.0],
        ),
    );
    let dem = Dem::open(&p, &Default::default()).unwrap();
    let (lon, lat) = dem.geometry().pixel_to_lonlat(2.0, 2.0).unwrap();
    assert!((lat + 90.0).abs() < 1e-9, "{lon} {lat}");
    assert!(dem.info().lat_range_deg.0 <= -89.0);
    let (dx, dy) = dem.info().pixel_size_m;
    assert!((dx - 10_000.0).abs() < 5.0 && (dy - 10_000.0).abs() < 5.0);
}

#[test]
fn orthographic_grid_opens() {
    let d = tmp();
    let p = d.path().join("ortho.tif");
    write_raster::<f32>(
        &p,
        4,
        4,
        vec![0.0; 16],
        &spec(
            "+proj=ortho +lon_0=180 +lat_0=16 +R=1737400 +units=m +no_defs",
            [-2000.0, 1000.0, 0.0, 2000.0, 0.0, -1000.0],
        ),
    );
    let dem = Dem::open(&p, &Default::default()).unwrap();
    let (lon, lat) = dem.geometry().pixel_to_lonlat(2.0, 2.0).unwrap();
    assert!((lon.abs() - 180.0).abs() < 1e-9 && (lat - 16.0).abs() < 1e-9);
    assert!(dem.info().crosses_180);
}

#[test]
fn pds3_attached_label_is_read_with_radius_offset() {
    // A minimal PDS3 product with an attached label, written here byte by byte
    // (PDS Standards Reference v3.8, ch. 5: label, then the image at record ^IMAGE).
    let d = tmp();
    let p = d.path().join("attached.img");
    let record_bytes = 8usize; // 4 samples x int16
    let label_records = 128usize;
    let mut label = format!(
        "PDS_VERSION_ID = PDS3\r\nRECORD_TYPE = FIXED_LENGTH\r\nRECORD_BYTES = {record_bytes}\r\nFILE_RECORDS = {}\r\nLABEL_RECORDS = {label_records}\r\n^IMAGE = {}\r\nOBJECT = IMAGE\r\n LINES = 2\r\n LINE_SAMPLES = 4\r\n SAMPLE_TYPE = LSB_INTEGER\r\n SAMPLE_BITS = 16\r\n SCALING_FACTOR = 0.5\r\n OFFSET = 1737400.\r\n MISSING_CONSTANT = -32768\r\nEND_OBJECT = IMAGE\r\nOBJECT = IMAGE_MAP_PROJECTION\r\n MAP_PROJECTION_TYPE = \"SIMPLE CYLINDRICAL\"\r\n A_AXIS_RADIUS = 1737.4 <KM>\r\n B_AXIS_RADIUS = 1737.4 <KM>\r\n C_AXIS_RADIUS = 1737.4 <KM>\r\n POSITIVE_LONGITUDE_DIRECTION = \"EAST\"\r\n CENTER_LATITUDE = 0 <DEG>\r\n CENTER_LONGITUDE = 180 <DEG>\r\n MAP_RESOLUTION = 1 <PIX/DEG>\r\n MAP_SCALE = 30.3233 <KM/PIXEL>\r\n LINE_PROJECTION_OFFSET = 0.5 <PIXEL>\r\n SAMPLE_PROJECTION_OFFSET = 2.5 <PIXEL>\r\n MAXIMUM_LATITUDE = 0.5 <DEG>\r\n MINIMUM_LATITUDE = -1.5 <DEG>\r\n WESTERNMOST_LONGITUDE = 178 <DEG>\r\n EASTERNMOST_LONGITUDE = 182 <DEG>\r\nEND_OBJECT = IMAGE_MAP_PROJECTION\r\nEND\r\n",
            label_records + 2, label_records + 1
        );
    assert!(label.len() <= label_records * record_bytes);
    label.extend(std::iter::repeat_n(
        ' ',
        label_records * record_bytes - label.len(),
    ));
    let mut bytes = label.into_bytes();
    for dn in [100i16, 200, -32768, 400, 500, 600, 700, 800] {
        bytes.extend_from_slice(&dn.to_le_bytes());
    }
    std::fs::write(&p, bytes).unwrap();
    let dem = Dem::open(&p, &Default::default()).unwrap();
    assert_eq!(dem.info().driver, "PDS");
    assert!(
        matches!(
            dem.info().height_convention,
            HeightConvention::RadiusOffsetIgnored { .. }
        ),
        "{:?}",
        dem.info().height_convention
    );
    let g = dem.read_all().unwrap();
    assert_eq!(g.get(0, 0), Some(50.0));
    assert_eq!(g.get(2, 0), None);
    assert_eq!(g.get(3, 1), Some(400.0));
    assert!(dem.info().crosses_180);
}

#[test]
fn earth_crs_on_lunar_terrain_is_refused_with_a_hint_and_can_be_overridden() {
    let d = tmp();
    let p = d.path().join("earth.tif");
    write_raster::<f32>(
        &p,
        2,
        2,
        vec![1.0; 4],
        &spec("EPSG:4326", [170.0, 0.5, 0.0, 10.0, 0.0, -0.5]),
    );
    let err = Dem::open(&p, &Default::default()).unwrap_err();
    assert!(matches!(err, TerrainError::EarthCrs { .. }));
    assert!(err.to_string().contains("mislabelled"), "{err}");
    let dem = Dem::open(
        &p,
        &OpenOptions {
            assume_body_radius_m: Some(R),
        },
    )
    .unwrap();
    assert!(dem.info().body_radius_overridden);
    assert_eq!(dem.info().body, terrain::Body::Moon);
}

#[test]
fn missing_crs_is_refused_with_how_to_assign_one() {
    let d = tmp();
    let p = d.path().join("nocrs.tif");
    write_raster::<f32>(
        &p,
        2,
        2,
        vec![1.0; 4],
        &RasterSpec {
            crs: None,
            geotransform: [0.0, 1.0, 0.0, 0.0, 0.0, -1.0],
            scale: None,
            offset: None,
            nodata: None,
        },
    );
    let err = Dem::open(&p, &Default::default()).unwrap_err();
    assert!(matches!(err, TerrainError::NoCrs { .. }), "{err}");
    assert!(err.to_string().contains("-a_srs"));
}

#[test]
fn truncated_geotiff_fails_cleanly() {
    let d = tmp();
    let p = d.path().join("full.tif");
    write_raster::<f32>(
        &p,
        64,
        64,
        (0..4096).map(|i| i as f32).collect(),
        &spec(GEO, [170.0, 0.01, 0.0, 10.0, 0.0, -0.01]),
    );
    let bytes = std::fs::read(&p).unwrap();
    let cut = d.path().join("cut.tif");
    std::fs::write(&cut, &bytes[..bytes.len() / 3]).unwrap();
    match Dem::open(&cut, &Default::default()) {
        Err(e) => assert!(!e.to_string().is_empty()),
        Ok(dem) => assert!(
            dem.read_all().is_err(),
            "reading a truncated file must fail, not invent data"
        ),
    }
}

#[test]
fn all_nodata_raster_reports_no_valid_heights() {
    let d = tmp();
    let p = d.path().join("empty.tif");
    write_raster::<f32>(
        &p,
        3,
        3,
        vec![f32::NAN; 9],
        &spec(GEO, [170.0, 0.5, 0.0, 10.0, 0.0, -0.5]),
    );
    let stats = Dem::open(&p, &Default::default())
        .unwrap()
        .scan_stats(|_, _| {})
        .unwrap();
    assert_eq!(
        (stats.min_m, stats.max_m, stats.valid_fraction),
        (None, None, 0.0)
    );
}

#[test]
fn missing_file_is_a_clear_error() {
    let err = Dem::open("/nonexistent/dem.tif", &Default::default()).unwrap_err();
    assert!(err.to_string().contains("no such file"), "{err}");
}

/// A window large enough to be read in parallel bands of rows (over a million pixels), hanging
/// over the raster's top-left corner, against GDAL's own read of the same pixels.
#[test]
fn large_window_read_in_bands_equals_gdal() {
    let demo = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../../demo-terrain/farside-patch.tif");
    let dem = Dem::open(&demo, &OpenOptions::default()).expect("demo terrain is committed");
    let (col, row, w, h) = (-37isize, -11isize, 1203usize, 1001usize);
    let grid = dem.read_window(col, row, w, h).unwrap();
    let ds = gdal::Dataset::open(&demo).unwrap();
    let (iw, ih) = (w - 37, h - 11);
    let gdal_px = ds
        .rasterband(1)
        .unwrap()
        .read_as::<f32>((0, 0), (iw, ih), (iw, ih), None)
        .unwrap();
    for r in 0..h {
        for c in 0..w {
            let ours = grid.heights_m[r * w + c];
            if r < 11 || c < 37 {
                assert!(ours.is_nan(), "outside the raster at ({c}, {r})");
            } else {
                let theirs = gdal_px.data()[(r - 11) * iw + (c - 37)];
                assert_eq!(ours.to_bits(), theirs.to_bits(), "at ({c}, {r})");
            }
        }
    }
}
