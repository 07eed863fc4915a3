//! Great-circle distance, azimuth and direct problem against geographiclib 2.1 on a sphere of
//! radius 1737.4 km (values recorded by tests/fixtures/record_geodesics.py), and the local
//! azimuthal equidistant frame against PROJ's `aeqd`.
use proj::Proj;
use terrain::geodesy::{azimuth_deg, destination, distance_m, LocalFrame};

const R: f64 = 1_737_400.0;

fn fixture() -> serde_json::Value {
    serde_json::from_str(include_str!("fixtures/geographiclib_sphere.json")).unwrap()
}

fn pt(v: &serde_json::Value) -> (f64, f64) {
    (v[0].as_f64().unwrap(), v[1].as_f64().unwrap())
}

#[test]
fn distance_and_azimuth_match_geographiclib() {
    for case in fixture()["inverse"].as_array().unwrap() {
        let (a, b) = (pt(&case["a"]), pt(&case["b"]));
        let d = distance_m(R, a, b);
        let want = case["distance_m"].as_f64().unwrap();
        assert!(
            (d - want).abs() < 1e-4 + 1e-10 * want,
            "{a:?}->{b:?}: {d} vs {want}"
        );
        // Antipodal-ish azimuths are ill-defined; all fixture pairs are shorter than 179 deg.
        if want < 179.0_f64.to_radians() * R {
            let az = azimuth_deg(a, b);
            let want_az = case["azimuth_deg"].as_f64().unwrap();
            let diff = terrain::projection::wrap_deg_180(az - want_az);
            assert!(diff.abs() < 1e-8, "{a:?}->{b:?}: azimuth {az} vs {want_az}");
        }
    }
}

#[test]
fn destination_matches_geographiclib_direct() {
    for case in fixture()["direct"].as_array().unwrap() {
        let start = pt(&case["start"]);
        let end = destination(
            R,
            start,
            case["azimuth_deg"].as_f64().unwrap(),
            case["distance_m"].as_f64().unwrap(),
        );
        let want = pt(&case["end"]);
        let dlon = terrain::projection::wrap_deg_180(end.0 - want.0);
        assert!(
            dlon.abs() < 1e-9 && (end.1 - want.1).abs() < 1e-9,
            "{start:?}: {end:?} vs {want:?}"
        );
    }
}

#[test]
fn local_frame_matches_proj_aeqd() {
    for &(lon0, lat0) in &[(180.0, 16.0), (0.0, -85.0), (-179.95, 2.0)] {
        let def =
            format!("+proj=aeqd +lon_0={lon0} +lat_0={lat0} +R={R} +units=m +no_defs +type=crs");
        let p =
            Proj::new_known_crs("+proj=longlat +R=1737400 +no_defs +type=crs", &def, None).unwrap();
        let frame = LocalFrame::new(R, lon0, lat0);
        for &(dlon, dlat) in &[(0.1, 0.05), (-0.4, 0.3), (0.0, -0.2), (2.0, 1.0)] {
            let (lon, lat) = (lon0 + dlon, lat0 + dlat);
            let (xp, yp) = p.convert((lon, lat)).unwrap();
            let (x, y) = frame.to_local(lon, lat);
            assert!(
                (x - xp).abs() < 1e-4 && (y - yp).abs() < 1e-4,
                "({lon},{lat}): ({x},{y}) vs PROJ ({xp},{yp})"
            );
            let (lon2, lat2) = frame.to_lonlat(x, y);
            assert!(
                terrain::projection::wrap_deg_180(lon2 - lon).abs() < 1e-9
                    && (lat2 - lat).abs() < 1e-9
            );
        }
    }
}
