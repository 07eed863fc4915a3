//! Same seed, same terrain; different seed, different terrain; bad specs refused.

use synthetic::{generate, DemoSpec, SynthError};

#[test]
fn same_seed_gives_identical_heights_and_truth() {
    let spec = DemoSpec::small(42, 9.0);
    let (a, b) = (
        generate(&spec).expect("generate"),
        generate(&spec).expect("generate"),
    );
    assert_eq!(a.heights_m, b.heights_m);
    assert_eq!(a.craters, b.craters);
    assert_eq!(a.truth_json().expect("json"), b.truth_json().expect("json"));
}

#[test]
fn another_seed_gives_another_terrain() {
    let a = generate(&DemoSpec::small(1, 3.0)).expect("generate");
    let b = generate(&DemoSpec::small(2, 3.0)).expect("generate");
    assert_ne!(a.heights_sha256(), b.heights_sha256());
}

#[test]
fn invalid_specs_are_refused_not_panicked_on() {
    let bad = [
        DemoSpec {
            size_km: -1.0,
            ..DemoSpec::default()
        },
        DemoSpec {
            post_m: f64::NAN,
            ..DemoSpec::default()
        },
        DemoSpec {
            hurst: 1.5,
            ..DemoSpec::default()
        },
        DemoSpec {
            crater_min_diameter_m: 9000.0,
            ..DemoSpec::default()
        },
        DemoSpec {
            crater_max_diameter_m: 30_000.0,
            ..DemoSpec::default()
        },
        DemoSpec {
            centre_lat_deg: 89.0,
            ..DemoSpec::default()
        },
    ];
    for spec in bad {
        assert!(
            matches!(generate(&spec), Err(SynthError::InvalidSpec(_))),
            "{spec:?}"
        );
    }
}
