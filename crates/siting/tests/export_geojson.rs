//! GeoJSON export checked against RFC 7946 through two outside readers: the `geojson` crate
//! and GDAL/OGR's `ogrinfo`.

mod common;

use std::process::Command;
use std::str::FromStr;

use common::export::Fixture;
use siting::export::geojson::{to_geojson_string, write_geojson};
use siting::export::rim::{rim_shape, signed_area2, RimShape};

fn parse(text: &str) -> geojson::FeatureCollection {
    match geojson::GeoJson::from_str(text).expect("geojson crate parses the export") {
        geojson::GeoJson::FeatureCollection(fc) => fc,
        other => panic!("not a FeatureCollection: {other:?}"),
    }
}

fn polygons(g: &geojson::Geometry) -> Vec<Vec<Vec<Vec<f64>>>> {
    match &g.value {
        geojson::Value::Polygon(p) => vec![p.clone()],
        geojson::Value::MultiPolygon(mp) => mp.clone(),
        other => panic!("unexpected geometry {other:?}"),
    }
}

fn area2(ring: &[Vec<f64>]) -> f64 {
    let pts: Vec<[f64; 2]> = ring.iter().map(|p| [p[0], p[1]]).collect();
    signed_area2(&pts)
}

#[test]
fn export_reads_back_with_geojson_crate_with_foreign_members() {
    let f = Fixture::new();
    let text = to_geojson_string(&f.set()).unwrap();
    let fc = parse(&text);
    assert_eq!(fc.features.len(), 5);
    let fm = fc.foreign_members.as_ref().expect("foreign members");
    assert_eq!(fm["reference_frame"]["crs"], "IAU_2015:30100");
    assert_eq!(fm["reference_frame"]["body"], "Moon");
    assert_eq!(fm["provenance"]["dem_sha256"], "ab".repeat(32));
    assert_eq!(fm["provenance"]["date"], "2025-01-02T03:04:05Z");
    assert!(fm["provenance"]["criteria_toml"]
        .as_str()
        .unwrap()
        .contains("quietbowl-criteria"));
    assert!(fm["screening_caution"]
        .as_str()
        .unwrap()
        .starts_with("Screening estimates"));
    let bbox = fc.bbox.as_ref().expect("collection bbox");
    // All features lie between 150 E and 170.5 W, across the antimeridian: west > east.
    assert!(
        bbox[0] > 149.0 && bbox[0] < 150.0 && bbox[2] > -170.5 && bbox[2] < -170.0,
        "{bbox:?}"
    );
    for feat in &fc.features {
        let p = feat.properties.as_ref().unwrap();
        for key in [
            "rank",
            "score",
            "passed",
            "pareto",
            "diameter_m",
            "depth_to_diameter",
            "utility_floor_tilt_deg",
            "smaa_p_rank1",
            "smaa_p_top_n",
            "failed_requirements",
            "centre_lon_deg",
        ] {
            assert!(p.contains_key(key), "missing property {key}");
        }
        assert!(feat.bbox.is_some());
    }
    // The unmeasured candidate fails on every visibility requirement, with the reason.
    let unmeasured = fc
        .features
        .iter()
        .find(|f| f.id == Some(geojson::feature::Id::Number(5.into())))
        .unwrap();
    let fails = unmeasured.properties.as_ref().unwrap()["failed_requirements"]
        .as_array()
        .unwrap();
    assert!(fails
        .iter()
        .any(|s| s.as_str() == Some("earth_clearance_deg not measured")));
    assert!(unmeasured.properties.as_ref().unwrap()["earth_clearance_deg"].is_null());
}

#[test]
fn every_exterior_ring_is_counter_clockwise_and_closed() {
    let f = Fixture::new();
    let fc = parse(&to_geojson_string(&f.set()).unwrap());
    for feat in &fc.features {
        for poly in polygons(feat.geometry.as_ref().unwrap()) {
            let ring = &poly[0];
            assert_eq!(ring.first(), ring.last(), "ring closed (RFC 7946 3.1.6)");
            assert!(
                area2(ring) > 0.0,
                "exterior ring counter-clockwise (RFC 7946 3.1.6)"
            );
            assert!(ring.iter().all(|p| (-180.0..=180.0).contains(&p[0])));
        }
    }
}

#[test]
fn crater_centred_on_180_is_split_at_the_antimeridian() {
    let f = Fixture::new();
    let fc = parse(&to_geojson_string(&f.set()).unwrap());
    let feat = fc
        .features
        .iter()
        .find(|f| f.id == Some(geojson::feature::Id::Number(1.into())))
        .unwrap();
    let parts = polygons(feat.geometry.as_ref().unwrap());
    // RFC 7946 3.1.9: a geometry crossing the antimeridian is cut into parts either side.
    assert_eq!(parts.len(), 2, "MultiPolygon of two parts");
    let lons = |p: &Vec<Vec<Vec<f64>>>| p[0].iter().map(|q| q[0]).collect::<Vec<_>>();
    let (west, east) = (lons(&parts[0]), lons(&parts[1]));
    assert!(west.iter().all(|&x| (-180.0..-179.9).contains(&x)) && west.contains(&-180.0));
    assert!(east.iter().all(|&x| x > 179.9 && x <= 180.0) && east.contains(&180.0));
    // The cut points match: each latitude on -180 has its twin on +180.
    let on = |p: &Vec<Vec<Vec<f64>>>, x: f64| {
        let mut v: Vec<f64> = p[0].iter().filter(|q| q[0] == x).map(|q| q[1]).collect();
        v.sort_by(f64::total_cmp);
        v.dedup();
        v
    };
    assert_eq!(on(&parts[0], -180.0), on(&parts[1], 180.0));
    // Bbox across the antimeridian: west > east (RFC 7946 5.2).
    let b = feat.bbox.as_ref().unwrap();
    assert!(b[0] > 0.0 && b[2] < 0.0, "{b:?}");
}

#[test]
fn rim_ring_without_crossing_stays_one_polygon() {
    let c = common::good(9, 170.0, 45.0).crater;
    match rim_shape(&c, terrain::MOON_RADIUS_M).unwrap() {
        RimShape::Polygon(r) => {
            assert!(signed_area2(&r) > 0.0);
            // Rim radius 600 m: the northmost vertex is 600 m north, 600 / 1737400 rad
            // = 0.019786 deg of latitude (arc length on a sphere).
            let north = r.iter().map(|p| p[1]).fold(f64::MIN, f64::max);
            assert!((north - 45.0 - (600.0f64 / 1_737_400.0).to_degrees()).abs() < 1e-6);
        }
        other => panic!("expected one polygon, got {other:?}"),
    }
}

#[test]
fn same_inputs_give_byte_identical_geojson() {
    let dir = tempfile::tempdir().unwrap();
    let (a, b) = (dir.path().join("a.geojson"), dir.path().join("b.geojson"));
    write_geojson(&Fixture::new().set(), &a).unwrap();
    write_geojson(&Fixture::new().set(), &b).unwrap();
    assert_eq!(std::fs::read(&a).unwrap(), std::fs::read(&b).unwrap());
}

#[test]
fn ogrinfo_opens_the_export() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("rank.geojson");
    write_geojson(&Fixture::new().set(), &path).unwrap();
    // GDAL's command-line tools are a requirement of the test suite (scripts/setup.sh
    // installs gdal-bin): without them this fails rather than pass unchecked.
    let out = Command::new("ogrinfo")
        .args(["-ro", "-al", "-so"])
        .arg(&path)
        .output()
        .expect("ogrinfo runs (GDAL's command-line tools: scripts/setup.sh installs gdal-bin)");
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(
        out.status.success(),
        "ogrinfo failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(text.contains("Feature Count: 5"), "{text}");
    // Polygons and, where split at the antimeridian, multipolygons: GDAL reports the mix.
    assert!(text.contains("Geometry: Unknown (any)"), "{text}");
    assert!(text.contains("diameter_m: Real"), "{text}");
    // Full read of every feature, geometry included: no error.
    let full = Command::new("ogrinfo")
        .args(["-ro", "-al", "-q"])
        .arg(&path)
        .output()
        .unwrap();
    assert!(
        full.status.success() && full.stderr.is_empty(),
        "{}",
        String::from_utf8_lossy(&full.stderr)
    );
    let shown = String::from_utf8_lossy(&full.stdout);
    assert!(
        shown.contains("MULTIPOLYGON (((") && shown.contains("  POLYGON (("),
        "{shown}"
    );
}

#[test]
#[ignore = "prints a sample export for a person to read"]
fn print_sample() {
    println!("{}", to_geojson_string(&Fixture::new().set()).unwrap());
}
