//! Bad input gives clear typed errors or flagged results, never a panic or invented numbers.

mod common;
use common::*;
use craters::catalogue::{self, OnBadRow};
use craters::{detect, measure, survey_grid, CraterError, DetectOptions, MeasureOptions};

#[test]
fn window_too_small_for_the_diameter_range_is_refused_with_the_size_needed() {
    let g = grid_around(20, 20, 16.0, 180.0, 16.0, |_, _| 0.0);
    let opts = DetectOptions {
        diameter_min_m: 3000.0,
        diameter_max_m: 9000.0,
        ..DetectOptions::default()
    };
    match detect(&g, &opts) {
        Err(CraterError::GridTooSmall { needed_px, .. }) => assert!(needed_px >= 200),
        other => panic!("expected GridTooSmall, got {other:?}"),
    }
}

#[test]
fn all_nodata_window_is_refused_and_measuring_in_it_fails_cleanly() {
    let g = grid_around(100, 100, 16.0, 180.0, 16.0, |_, _| f64::NAN);
    let opts = DetectOptions {
        diameter_min_m: 300.0,
        diameter_max_m: 900.0,
        ..DetectOptions::default()
    };
    assert!(matches!(detect(&g, &opts), Err(CraterError::AllNodata)));
    assert!(matches!(
        survey_grid(&g, &opts, &MeasureOptions::default()),
        Err(CraterError::AllNodata)
    ));
    assert!(matches!(
        measure(&g, 180.0, 16.0, 600.0, &MeasureOptions::default()),
        Err(CraterError::NotMeasurable { .. })
    ));
}

#[test]
fn flat_ground_has_no_crater_to_measure() {
    let g = grid_around(100, 100, 16.0, 180.0, 16.0, |_, _| 12.0);
    assert!(matches!(
        measure(&g, 180.0, 16.0, 600.0, &MeasureOptions::default()),
        Err(CraterError::NotMeasurable { .. })
    ));
}

#[test]
fn crater_cut_by_the_raster_edge_is_flagged_and_its_missing_rim_is_not_invented() {
    // Centre 0.3 D inside the west edge: the west part of the rim lies outside the raster.
    let d = 1200.0;
    let w = 120;
    let (edge_lon, _) = {
        let g = grid_around(w, w, 16.0, 180.0, 16.0, |_, _| 0.0);
        g.lonlat(0, w / 2).expect("lonlat")
    };
    let (lon_c, lat_c) = lonlat(edge_lon, 16.0, 0.3 * d, 0.0);
    let g = grid_around(w, w, 16.0, lon_c, lat_c, |x, y| {
        rimmed_bowl(x.hypot(y), d / 2.0, 0.2 * d, 0.036 * d)
    });
    match measure(&g, lon_c, lat_c, d, &MeasureOptions::default()) {
        Ok(m) => {
            assert!(m.edge_cut, "edge cut not flagged");
            assert!(m.valid_fraction < 0.9, "valid {}", m.valid_fraction);
            assert!(
                m.rim_completeness < 0.8,
                "completeness {} counts rim outside the raster",
                m.rim_completeness
            );
        }
        Err(CraterError::NotMeasurable { reason, .. }) => assert!(!reason.is_empty()),
        Err(e) => panic!("unexpected error {e}"),
    }
}

#[test]
fn catalogue_bad_rows_are_reported_by_line_or_stop_the_read() {
    let dir = tempfile::tempdir().expect("tempdir");
    let p = dir.path().join("list.csv");
    std::fs::write(
        &p,
        "# seeds\nname,lon_deg,lat_deg,diameter_km\nA,180.5,16.0,12\nB,abc,16.0,12\nC,181,95,12\n\nD,-179.5,16.2,-3\nE,190,16.1,\"1.5\"\nF,1,2\n",
    )
    .expect("write");
    let (rows, problems) = catalogue::read(&p, OnBadRow::Skip).expect("lenient read");
    assert_eq!(rows.iter().map(|r| r.line).collect::<Vec<_>>(), vec![3, 8]);
    assert_eq!(
        problems.iter().map(|p| p.line).collect::<Vec<_>>(),
        vec![4, 5, 7, 9]
    );
    assert!(
        problems[0].reason.contains("lon_deg"),
        "{}",
        problems[0].reason
    );
    assert!((rows[1].lon_deg - -170.0).abs() < 1e-9 && (rows[1].diameter_m - 1500.0).abs() < 1e-9);
    match catalogue::read(&p, OnBadRow::Stop) {
        Err(CraterError::CatalogueRow { line, .. }) => assert_eq!(line, 4),
        other => panic!("expected a row error, got {other:?}"),
    }
}

#[test]
fn catalogue_without_the_needed_columns_or_file_says_what_is_missing() {
    let dir = tempfile::tempdir().expect("tempdir");
    let p = dir.path().join("list.csv");
    std::fs::write(&p, "lon,lat,d\n1,2,3\n").expect("write");
    let e = catalogue::read(&p, OnBadRow::Skip).expect_err("no columns");
    assert!(e.to_string().contains("lon_deg"), "{e}");
    let e = catalogue::read(dir.path().join("absent.csv"), OnBadRow::Skip).expect_err("absent");
    assert!(e.to_string().contains("no such file"), "{e}");
    std::fs::write(dir.path().join("junk.geojson"), "{ not json").expect("write");
    assert!(catalogue::read(dir.path().join("junk.geojson"), OnBadRow::Skip).is_err());
}
