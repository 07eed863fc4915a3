//! Study areas and keep-out zones against outside values: distances to polygon edges from
//! geographiclib 2.0 on a sphere of 1737.4 km (fixtures/areas/geodesic_cases.json, made by
//! fixtures/areas/make_fixture.py), within 0.5 %; margins either side of those distances; a
//! polygon across 180 E; a cap around the south pole read from a polar stereographic
//! (IAU_2015:30135) GeoPackage written by GDAL's ogr2ogr; a polygon with a hole; invalid
//! polygons and Earth-CRS files refused.

use std::path::{Path, PathBuf};

use serde::Deserialize;
use siting::areas::{Area, AreaError, AreaSpec, Keep};

const FIXTURE_DIR: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/fixtures/areas");

#[derive(Deserialize)]
struct Fixture {
    source: String,
    radius_m: f64,
    cases: Vec<Case>,
}

#[derive(Deserialize)]
struct Case {
    name: String,
    rings: Vec<Vec<[f64; 2]>>,
    queries: Vec<Query>,
}

#[derive(Deserialize)]
struct Query {
    lon: f64,
    lat: f64,
    inside: bool,
    distance_m: f64,
    placed: String,
}

fn fixture() -> Fixture {
    let text = std::fs::read_to_string(Path::new(FIXTURE_DIR).join("geodesic_cases.json"))
        .expect("the fixture ships with the tests");
    let f: Fixture = serde_json::from_str(&text).expect("fixture JSON");
    assert!(f.source.starts_with("geographiclib 2.0"), "{}", f.source);
    f
}

/// A GeoJSON file (no CRS member: lunar lon/lat) holding one polygon with `rings`.
fn polygon_file(dir: &Path, name: &str, rings: &[Vec<[f64; 2]>]) -> PathBuf {
    let closed: Vec<Vec<[f64; 2]>> = rings
        .iter()
        .map(|r| {
            let mut r = r.clone();
            r.push(r[0]);
            r
        })
        .collect();
    let text = serde_json::json!({
        "type": "FeatureCollection",
        "features": [{"type": "Feature", "properties": {"name": name},
                      "geometry": {"type": "Polygon", "coordinates": closed}}]
    });
    let path = dir.join(format!("{name}.geojson"));
    std::fs::write(&path, text.to_string()).unwrap();
    path
}

fn spec(path: &Path, keep: Keep, margin_km: f64) -> AreaSpec {
    AreaSpec {
        file: path.to_string_lossy().into_owned(),
        layer: None,
        filter: None,
        keep,
        margin_km,
        why: String::new(),
    }
}

/// Every query of `case` against `area`: measured exactly, the distance within 0.5 % of
/// geographiclib's and the side as placed; as ranking measures it (exact up to 100 km beyond
/// the margin), the same, or beyond that a bound no larger than geographiclib's distance.
fn check_case(case: &Case, area: &Area, radius_m: f64) {
    for q in &case.queries {
        let signed = if q.inside {
            q.distance_m
        } else {
            -q.distance_m
        };
        let exact = area
            .standing_within(radius_m, q.lon, q.lat, f64::INFINITY)
            .expect("an area with edges judges every point");
        assert!(exact.exact);
        assert!(
            (exact.clearance_m - signed).abs() <= 0.005 * q.distance_m,
            "{} ({}): clearance {:.1} m, geographiclib {:.1} m",
            case.name,
            q.placed,
            exact.clearance_m,
            signed
        );
        let s = area.standing(radius_m, q.lon, q.lat).unwrap();
        if s.exact {
            assert_eq!(s, exact);
        } else {
            assert!(
                !q.inside && -s.clearance_m <= q.distance_m && q.distance_m > 100_000.0,
                "{} ({}): bound {:.1} m for {:.1} m",
                case.name,
                q.placed,
                s.clearance_m,
                signed
            );
        }
    }
}

#[test]
fn distances_and_sides_match_geographiclib_within_half_a_percent() {
    let f = fixture();
    let dir = tempfile::tempdir().unwrap();
    for case in &f.cases {
        let path = polygon_file(dir.path(), &case.name, &case.rings);
        let area = Area::load(&spec(&path, Keep::Inside, 0.0), None).expect("valid area");
        check_case(case, &area, f.radius_m);
    }
}

#[test]
fn margins_pass_and_fail_either_side_of_the_geodesic_distance() {
    let f = fixture();
    let dir = tempfile::tempdir().unwrap();
    for case in &f.cases {
        let path = polygon_file(dir.path(), &case.name, &case.rings);
        for q in &case.queries {
            // The side the point is on, with a margin 1 % short of its distance, passes; with
            // one 1 % beyond it, fails.
            let keep = if q.inside {
                Keep::Inside
            } else {
                Keep::Outside
            };
            for (factor, passes) in [(0.99, true), (1.01, false)] {
                let margin_km = q.distance_m * factor / 1000.0;
                let area = Area::load(&spec(&path, keep, margin_km), None).unwrap();
                let s = area.standing(f.radius_m, q.lon, q.lat).unwrap();
                let failed = siting::requirements::check_area(&area, Some(s));
                assert_eq!(
                    failed.is_none(),
                    passes,
                    "{} ({}), margin {margin_km:.3} km: {:?}",
                    case.name,
                    q.placed,
                    failed.map(|f| f.in_words())
                );
            }
        }
    }
}

#[test]
fn the_south_cap_reads_from_a_polar_stereographic_geopackage() {
    // Written in IAU_2015:30135 by ogr2ogr (make_fixture.py); the points are geographiclib's.
    let f = fixture();
    let case = f.cases.iter().find(|c| c.name == "south_cap").unwrap();
    let path = Path::new(FIXTURE_DIR).join("south_cap_30135.gpkg");
    let area = Area::load(&spec(&path, Keep::Inside, 0.0), None).expect("a lunar projected CRS");
    assert_eq!(area.feature_label(0), "South cap");
    // Vertices come back from the projection onto the 80 S parallel (GDAL/PROJ's inverse).
    let ring = &area.features[0].polygons[0][0];
    assert!(ring.iter().all(|p| (p.1 + 80.0).abs() < 1e-6), "{ring:?}");
    check_case(case, &area, f.radius_m);
}

#[test]
fn a_keep_out_failure_names_the_area_and_the_distance() {
    let f = fixture();
    let dir = tempfile::tempdir().unwrap();
    let case = f.cases.iter().find(|c| c.name == "across_180").unwrap();
    let path = polygon_file(dir.path(), "Relay keep-out", &case.rings);
    let area = Area::load(&spec(&path, Keep::Outside, 5.0), None).unwrap();
    // 180 E 15 N lies 146.4 km inside (geographiclib, fixture).
    let s = area.standing(f.radius_m, 180.0, 15.0).unwrap();
    let text = siting::requirements::check_area(&area, Some(s))
        .expect("inside a keep-out fails")
        .in_words();
    assert_eq!(
        text,
        "Keep-out zone “Relay keep-out”: 146.4 km inside it (at least 5.00 km outside required)"
    );
}

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

fn load_err(path: &Path) -> String {
    match Area::load(&spec(path, Keep::Outside, 0.0), None) {
        Ok(a) => panic!("{} was accepted: {a:?}", path.display()),
        Err(e) => e.to_string(),
    }
}

const BOWTIE: &str = r#"{"type":"FeatureCollection","features":[
 {"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,1],[0,0]]]}},
 {"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[10,0],[11,1],[11,0],[10,1],[10,0]]]}}]}"#;

#[test]
fn a_self_intersecting_polygon_is_refused_with_its_feature_index() {
    let dir = tempfile::tempdir().unwrap();
    let e = load_err(&write(dir.path(), "bowtie.geojson", BOWTIE));
    assert!(
        e.contains("feature 1")
            && e.contains("not a valid polygon")
            && e.contains("self-intersection"),
        "{e}"
    );
}

#[test]
fn an_open_ring_is_refused_with_its_feature_index() {
    let dir = tempfile::tempdir().unwrap();
    let open = r#"{"type":"FeatureCollection","features":[
 {"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,1]]]}}]}"#;
    let e = load_err(&write(dir.path(), "open.geojson", open));
    assert!(e.contains("feature 0") && e.contains("is open"), "{e}");
}

#[test]
fn a_hole_outside_its_outer_ring_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let bad = r#"{"type":"FeatureCollection","features":[
 {"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[
   [[0,0],[1,0],[1,1],[0,1],[0,0]], [[5,5],[5,6],[6,6],[6,5],[5,5]]]}}]}"#;
    let e = load_err(&write(dir.path(), "hole.geojson", bad));
    assert!(
        e.contains("feature 0") && e.contains("not a valid polygon"),
        "{e}"
    );
}

#[test]
fn an_earth_crs_vector_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let earth = r#"{"type":"FeatureCollection","crs":{"type":"name","properties":{"name":"urn:ogc:def:crs:EPSG::4326"}},"features":[
 {"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,1],[0,0]]]}}]}"#;
    let e = load_err(&write(dir.path(), "earth.geojson", earth));
    assert!(
        e.contains("Earth ellipsoid") && e.contains("6378137"),
        "{e}"
    );
    // The same in a GeoPackage made by GDAL in EPSG:3857 (Web Mercator).
    let gpkg = dir.path().join("earth.gpkg");
    let status = std::process::Command::new("ogr2ogr")
        .args(["-f", "GPKG", "-t_srs", "EPSG:3857"])
        .arg(&gpkg)
        .arg(dir.path().join("earth.geojson"))
        .status()
        .expect("ogr2ogr (GDAL) is installed with the project");
    assert!(status.success());
    let e = load_err(&gpkg);
    assert!(e.contains("Earth ellipsoid"), "{e}");
}

#[test]
fn a_geojson_without_a_crs_member_is_lunar_lon_lat() {
    let dir = tempfile::tempdir().unwrap();
    let plain = r#"{"type":"FeatureCollection","features":[
 {"type":"Feature","properties":{"name":"Plain"},"geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,1],[0,0]]]}}]}"#;
    let a = Area::load(
        &spec(
            &write(dir.path(), "plain.geojson", plain),
            Keep::Inside,
            0.0,
        ),
        None,
    )
    .expect("RFC 7946 GeoJSON read as lunar lon/lat");
    assert!(a.standing(1_737_400.0, 0.5, 0.5).unwrap().clearance_m > 0.0);
}

#[test]
fn layers_and_filters_pick_features() {
    let dir = tempfile::tempdir().unwrap();
    let two = r#"{"type":"FeatureCollection","features":[
 {"type":"Feature","properties":{"name":"A","kind":"site"},"geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,1],[0,0]]]}},
 {"type":"Feature","properties":{"name":"B","kind":"zone"},"geometry":{"type":"Polygon","coordinates":[[[5,0],[6,0],[6,1],[5,1],[5,0]]]}}]}"#;
    let path = write(dir.path(), "two.geojson", two);
    let mut s = spec(&path, Keep::Outside, 0.0);
    s.filter = Some("kind = 'zone'".into());
    let a = Area::load(&s, None).unwrap();
    assert_eq!(a.features.len(), 1);
    assert_eq!(a.features[0].label, "B");
    s.filter = Some("kind = 'none'".into());
    assert!(matches!(Area::load(&s, None), Err(AreaError::Empty { .. })));
    s.filter = Some("no_such_field = 1".into());
    assert!(matches!(
        Area::load(&s, None),
        Err(AreaError::BadFilter { .. })
    ));
    s.filter = None;
    s.layer = Some("nope".into());
    let e = Area::load(&s, None).unwrap_err().to_string();
    assert!(e.contains("no layer \"nope\"") && e.contains("two"), "{e}");
}
