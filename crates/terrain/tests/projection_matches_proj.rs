//! Our closed-form spherical projections against PROJ itself (libproj 9.1 through the `proj`
//! crate), on the IAU 2015 Moon CRSs and a custom orthographic view of the lunar sphere.
mod common;

use common::R;
use proj::Proj;
use terrain::MapProjection;

fn check(proj_def_from: &str, proj_def_to: &str, ours: &MapProjection, pts: &[(f64, f64)]) {
    let p = Proj::new_known_crs(proj_def_from, proj_def_to, None).unwrap();
    for &(lon, lat) in pts {
        // IAU_2015:30100 is lat/lon axis order in its definition; new_known_crs normalises to
        // lon/lat (x/y) order for visualisation.
        let (xp, yp) = p.convert((lon, lat)).unwrap();
        let (x, y) = ours.forward(R, lon, lat).unwrap();
        assert!(
            (x - xp).abs() < 1e-3 && (y - yp).abs() < 1e-3,
            "{proj_def_to} at ({lon},{lat}): ours ({x},{y}) PROJ ({xp},{yp})"
        );
        let (lon2, lat2) = ours.inverse(R, x, y).unwrap();
        let dlon = terrain::projection::wrap_deg_180(lon2 - lon);
        assert!(
            dlon.abs() < 1e-9 && (lat2 - lat).abs() < 1e-9,
            "inverse at ({lon},{lat}) gave ({lon2},{lat2})"
        );
    }
}

#[test]
fn equirectangular_centred_on_180_matches_proj_iau_2015_30115() {
    let ours = MapProjection::Equirectangular {
        lon0_deg: 180.0,
        lat_ts_deg: 0.0,
        false_easting_m: 0.0,
        false_northing_m: 0.0,
    };
    check(
        "IAU_2015:30100",
        "IAU_2015:30115",
        &ours,
        &[
            (180.0, 16.0),
            (179.7, 16.3),
            (-179.7, 15.7),
            (90.0, -45.0),
            (-30.0, 60.0),
        ],
    );
}

#[test]
fn south_polar_stereographic_matches_proj_iau_2015_30135() {
    let ours = MapProjection::PolarStereographic {
        south: true,
        lon0_deg: 0.0,
        lat_ts_deg: -90.0,
        false_easting_m: 0.0,
        false_northing_m: 0.0,
    };
    check(
        "IAU_2015:30100",
        "IAU_2015:30135",
        &ours,
        &[(0.0, -89.0), (45.0, -85.0), (-135.0, -80.0), (180.0, -70.0)],
    );
}

#[test]
fn orthographic_matches_proj_ortho_on_lunar_sphere() {
    let def = "+proj=ortho +lon_0=180 +lat_0=16 +R=1737400 +units=m +no_defs";
    let (ours, r) = MapProjection::from_proj4(def).unwrap();
    assert_eq!(r, Some(R));
    check(
        "+proj=longlat +R=1737400 +no_defs +type=crs",
        &format!("{def} +type=crs"),
        &ours,
        &[(180.0, 16.0), (170.0, 10.0), (-160.0, 30.0)],
    );
}

#[test]
fn polar_stereographic_with_true_scale_latitude_matches_proj() {
    let def = "+proj=stere +lat_0=90 +lat_ts=80 +lon_0=0 +R=1737400 +units=m +no_defs";
    let (ours, _) = MapProjection::from_proj4(def).unwrap();
    check(
        "+proj=longlat +R=1737400 +no_defs +type=crs",
        &format!("{def} +type=crs"),
        &ours,
        &[(0.0, 89.0), (120.0, 82.0), (-60.0, 75.0)],
    );
}
