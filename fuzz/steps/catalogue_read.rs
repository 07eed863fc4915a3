//! The catalogue_read target's steps, shared by the fuzz target
//! (fuzz/fuzz_targets/catalogue_read.rs) and its replay test on stable
//! (crates/craters/tests/fuzz_regressions.rs), both through `#[path]`.
//!
//! Crater catalogue bytes -> the CSV catalogue reader (`catalogue::read_csv_bytes`, the same
//! code `catalogue::read` runs on a `.csv` file), in both bad-row modes; then the good rows'
//! positions as a rim polygon through `catalogue::equal_area_circle`, the pure-Rust part of
//! the vector (OGR) reader. GeoJSON and other vector files are parsed by GDAL/OGR (C/C++),
//! which this target does not fuzz.

use craters::catalogue::{self, OnBadRow};

pub fn run(data: &[u8]) {
    let skip = catalogue::read_csv_bytes(data, "fuzz.csv", OnBadRow::Skip);
    let stop = catalogue::read_csv_bytes(data, "fuzz.csv", OnBadRow::Stop);
    let Ok((rows, problems)) = skip else {
        assert!(stop.is_err(), "Stop mode read a file Skip mode refuses");
        return;
    };
    assert_eq!(
        stop.is_ok(),
        problems.is_empty(),
        "Stop mode disagrees with the problems Skip mode found"
    );
    for r in &rows {
        assert!(
            (-180.0..180.0).contains(&r.lon_deg) && (-90.0..=90.0).contains(&r.lat_deg),
            "{r:?}"
        );
        assert!(r.diameter_m.is_finite() && r.diameter_m > 0.0, "{r:?}");
    }
    // Unnamed rows are the outer ring; rows sharing a name are one hole.
    let outer: Vec<(f64, f64)> = rows
        .iter()
        .filter(|r| r.name.is_none())
        .map(|r| (r.lon_deg, r.lat_deg))
        .collect();
    let mut holes = std::collections::BTreeMap::<&str, Vec<(f64, f64)>>::new();
    for r in &rows {
        if let Some(n) = &r.name {
            holes.entry(n).or_default().push((r.lon_deg, r.lat_deg));
        }
    }
    let holes: Vec<Vec<(f64, f64)>> = holes.into_values().collect();
    // Any answer is fine (the OGR reader checks it like a CSV row); it must not panic.
    let _ = catalogue::equal_area_circle(terrain::MOON_RADIUS_M, &outer, &holes);
}
