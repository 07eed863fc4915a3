//! The real LRO LOLA LDEM_4 product (PDS3, detached label) read through GDAL's PDS driver.
mod common;

use terrain::{Dem, HeightConvention};

#[test]
fn lola_offset_is_recognised_as_reference_radius() {
    let Some(lbl) = common::lola_label() else {
        return;
    };
    let dem = Dem::open(&lbl, &Default::default()).unwrap();
    let info = dem.info();
    // The label says OFFSET = 1737400 and HEIGHT = DN * 0.5 (LDEM_4.LBL, its NOTE block).
    assert_eq!(
        info.height_convention,
        HeightConvention::RadiusOffsetIgnored {
            scale: 0.5,
            radius_offset_m: 1_737_400.0
        }
    );
    assert_eq!((info.width, info.height), (1440, 720));
    assert_eq!(info.driver, "PDS");
    assert!((info.body_radius_m - 1_737_400.0).abs() < 1.0);
}

#[test]
fn lola_heights_span_label_minimum_and_maximum() {
    let Some(lbl) = common::lola_label() else {
        return;
    };
    let dem = Dem::open(&lbl, &Default::default()).unwrap();
    let stats = dem.scan_stats(|_, _| {}).unwrap();
    // LDEM_4.LBL: MINIMUM = -17758, MAXIMUM = 21008 DN, SCALING_FACTOR 0.5 -> -8879 m, +10504 m.
    // The label's extremes are rounded outward by a DN or so, hence 1 m.
    let (lo, hi) = (stats.min_m.unwrap(), stats.max_m.unwrap());
    assert!(
        (lo + 8879.0).abs() <= 1.0 && (hi - 10504.0).abs() <= 1.0,
        "{lo} {hi}"
    );
    assert_eq!(stats.valid_fraction, 1.0);
}

#[test]
fn lola_grid_counts_longitude_0_to_360_and_wraps_negative_longitudes() {
    let Some(lbl) = common::lola_label() else {
        return;
    };
    let dem = Dem::open(&lbl, &Default::default()).unwrap();
    let info = dem.info();
    // GDAL builds the geotransform from the label's MAP_SCALE (7580.84 m, rounded), so the edges
    // sit within 1e-4 deg of 0 and 360 rather than exactly on them.
    assert!(
        info.lon_range_deg.0.abs() < 1e-4 && (info.lon_range_deg.1 - 360.0).abs() < 1e-4,
        "{:?}",
        info.lon_range_deg
    );
    assert!(
        (info.lat_range_deg.0 + 90.0).abs() < 1e-4 && (info.lat_range_deg.1 - 90.0).abs() < 1e-4
    );
    // 0.25 deg pixels: 7580.84 m/pix at the equator (label MAP_SCALE). At the raster centre
    // (equator) our great-circle pixel size must agree to 0.1 m.
    assert!(
        (info.pixel_size_m.1 - 7580.84).abs() < 0.1,
        "{:?}",
        info.pixel_size_m
    );
    let g = dem.geometry();
    // Pixel-registered, 4 px/deg starting at lon 0: lon 190 E is column 760; -170 is the same place.
    let (c1, r1) = g.lonlat_to_pixel(190.0, 0.0).unwrap();
    let (c2, r2) = g.lonlat_to_pixel(-170.0, 0.0).unwrap();
    assert!(
        (c1 - 760.0).abs() < 1e-3
            && (c2 - c1).abs() < 1e-9
            && (r1 - 360.0).abs() < 1e-3
            && (r2 - r1).abs() < 1e-9,
        "{c1} {c2} {r1}"
    );
    assert!(info.crosses_180);
}

#[test]
fn lola_window_with_halo_wraps_columns_and_pads_beyond_the_pole_with_nodata() {
    let Some(lbl) = common::lola_label() else {
        return;
    };
    let dem = Dem::open(&lbl, &Default::default()).unwrap();
    // Two columns west of the seam and two rows north of the pole: the columns come from the
    // grid's eastern edge (a global grid wraps), the rows are nodata.
    let w = dem.read_window(-2, -2, 6, 6).unwrap();
    assert_eq!((w.width, w.height, w.row0), (6, 6, -2));
    assert!(w.get(0, 0).is_none() && w.get(5, 1).is_none());
    assert!(w.get(0, 2).is_some() && w.get(1, 5).is_some() && w.get(2, 2).is_some());
    assert!((w.valid_fraction() - 24.0 / 36.0).abs() < 1e-12);
    // Window column 0 is LDEM_4's column 1438, centred on 359.625 E = -0.375.
    let (lon, lat) = w.lonlat(0, 2).unwrap();
    assert!(
        (lon + 0.375).abs() < 1e-3 && (lat - 89.875).abs() < 1e-3,
        "{lon} {lat}"
    );
}
