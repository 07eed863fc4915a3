//! The spec as a criteria file reads it, the fit as the survey file carries it, and the errors
//! a bad spec or a crater off the grid give.

mod common;

use common::{crest_radius, grid, measured_at, paraboloid_crater};
use structure::{clearance_map, fit, Shape, StructureError, StructureSpec, FIT_METRICS};

#[test]
fn spec_reads_from_toml_and_refuses_unknown_fields() {
    let text = r#"
aperture_m = 300.0
shape = { kind = "paraboloid", focal_length_m = 120.0 }
anchors = 4
min_clearance_m = 5.0
max_anchor_height_difference_m = 30.0
"#;
    let spec: StructureSpec = toml::from_str(text).expect("parse");
    assert_eq!(
        spec.shape,
        Shape::Paraboloid {
            focal_length_m: 120.0
        }
    );
    assert_eq!(spec.anchors, 4);
    spec.validate().expect("valid");
    assert!(toml::from_str::<StructureSpec>(&format!("{text}\nmargin_m = 1.0")).is_err());
    let typo = text.replace("focal_length_m", "focal_m");
    assert!(toml::from_str::<StructureSpec>(&typo).is_err());
    let round: StructureSpec =
        toml::from_str(&toml::to_string(&StructureSpec::default()).expect("write"))
            .expect("read back");
    assert_eq!(round, StructureSpec::default());
}

fn demo_fit() -> (terrain::ElevationGrid, structure::StructureFit) {
    let shape = |x: f64, y: f64| paraboloid_crater(x, y, 1000.0, 450.0, 700.0);
    let (g, centre) = grid(120, 15.0, shape);
    let f = fit(
        &g,
        &measured_at(64, centre, crest_radius(700.0), shape),
        &StructureSpec::default(),
    )
    .expect("fit");
    (g, f)
}

#[test]
fn fit_round_trips_through_json_byte_for_byte_and_is_deterministic() {
    let (_, f) = demo_fit();
    let text = serde_json::to_string(&f).expect("write");
    // Cells outside the aperture are NaN in memory and null in the file.
    assert!(text.contains("null"));
    let back: structure::StructureFit = serde_json::from_str(&text).expect("read");
    assert_eq!(serde_json::to_string(&back).expect("write again"), text);
    let (_, again) = demo_fit();
    assert_eq!(serde_json::to_string(&again).expect("write"), text);
    // Compact enough to carry one per candidate.
    assert!(text.len() < 8000, "{} bytes", text.len());
    assert_eq!(
        f.aperture_outline_lonlat.first(),
        f.aperture_outline_lonlat.last()
    );
    for m in FIT_METRICS {
        assert!(f.metric(m.name).is_some(), "metric {}", m.name);
    }
}

#[test]
fn finer_clearance_map_agrees_with_the_stored_one() {
    let (g, f) = demo_fit();
    let fine = clearance_map(&g, &f, &StructureSpec::default(), 48).expect("map");
    let coarse = &f.clearance_map;
    // Coarse cell (c, r) is centred on the four fine cells (2c..2c+2, 2r..2r+2); the clearance
    // is smooth (a difference of two paraboloids), so their mean matches it to centimetres.
    let mut compared = 0;
    for r in 0..24 {
        for c in 0..24 {
            let quad: Vec<f32> = [(0, 0), (1, 0), (0, 1), (1, 1)]
                .iter()
                .filter_map(|(i, j)| fine.get(2 * c + i, 2 * r + j))
                .collect();
            if let (Some(a), 4) = (coarse.get(c, r), quad.len()) {
                let b = quad.iter().sum::<f32>() / 4.0;
                assert!((a - b).abs() < 0.1, "({c}, {r}): {a} vs {b}");
                compared += 1;
            }
        }
    }
    assert!(compared > 300);
}

#[test]
fn bad_spec_and_crater_off_the_grid_are_errors_not_panics() {
    let shape = |x: f64, y: f64| paraboloid_crater(x, y, 1000.0, 450.0, 700.0);
    let (g, centre) = grid(120, 15.0, shape);
    let crater = measured_at(64, centre, crest_radius(700.0), shape);
    let bad = StructureSpec {
        min_clearance_m: -1.0,
        ..Default::default()
    };
    assert!(matches!(
        fit(&g, &crater, &bad),
        Err(StructureError::Spec(_))
    ));
    let far = structure_off(&crater, 2.0);
    assert!(matches!(
        fit(&g, &far, &StructureSpec::default()),
        Err(StructureError::NoData { .. })
    ));
    let mut no_rim = crater.clone();
    no_rim
        .rim_crest_radius_m
        .iter_mut()
        .for_each(|r| *r = f32::NAN);
    assert!(matches!(
        fit(&g, &no_rim, &StructureSpec::default()),
        Err(StructureError::Crater(_))
    ));
}

fn structure_off(c: &craters::CraterMeasurement, dlat_deg: f64) -> craters::CraterMeasurement {
    craters::CraterMeasurement {
        centre_lat_deg: c.centre_lat_deg + dlat_deg,
        ..c.clone()
    }
}
