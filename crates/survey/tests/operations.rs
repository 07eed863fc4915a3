//! The survey computes the operations figures for every candidate with a fit, records their
//! inputs, and leaves them out when told to.

use std::path::PathBuf;
use std::sync::atomic::AtomicBool;
use survey::{RunOptions, SurveyFile};

fn run(operations: Option<operations::OperationsInputs>) -> SurveyFile {
    let dem =
        PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../demo-terrain/farside-patch.tif");
    // Large craters only, so the debug-build test stays quick.
    let opts = RunOptions {
        diameter_min_m: Some(1500.0),
        diameter_max_m: Some(4000.0),
        visibility: false,
        operations,
        ..RunOptions::default()
    };
    survey::run(&dem, &opts, &|_| {}, &AtomicBool::new(false))
        .expect("demo survey")
        .survey
}

#[test]
fn every_fitted_candidate_has_operations_and_the_inputs_are_recorded() {
    let inputs = operations::OperationsInputs::default();
    let s = run(Some(inputs.clone()));
    assert_eq!(s.parameters.operations.as_ref(), Some(&inputs));
    let fitted: Vec<_> = s.candidates.iter().filter(|c| c.fit.is_some()).collect();
    assert!(!fitted.is_empty());
    for c in &fitted {
        let o = c
            .operations
            .as_ref()
            .unwrap_or_else(|| panic!("candidate {} has none", c.id));
        // Anchors on ground without data have no height: no shot, skyline or night there.
        let anchors = c
            .fit
            .as_ref()
            .unwrap()
            .anchors
            .iter()
            .filter(|a| a.height_m.is_finite())
            .count();
        assert_eq!(o.shots.as_ref().map_or(0, |s| s.shots.len()), anchors);
        assert_eq!(o.relay.anchors.len(), anchors);
        for v in [o.relay.lander.fraction, o.night.lander.dark_fraction] {
            assert!((0.0..=1.0).contains(&v), "candidate {}: {v}", c.id);
        }
        // Every operations metric reads from the candidate.
        for m in survey::METRICS
            .iter()
            .filter(|m| m.name == "relay_visible_fraction" || m.name == "dark_fraction")
        {
            assert!((m.get)(c).is_some(), "{} of {}", m.name, c.id);
        }
    }
    assert!(s
        .candidates
        .iter()
        .filter(|c| c.fit.is_none())
        .all(|c| c.operations.is_none()));
    // The file reads back with them (compared as text: the crater profiles hold NaN).
    let back = SurveyFile::from_json(&s.to_json()).unwrap();
    assert_eq!(back.to_json(), s.to_json());
    assert_eq!(back.candidates[0].operations, s.candidates[0].operations);

    let off = run(None);
    assert!(off.parameters.operations.is_none());
    assert!(off.candidates.iter().all(|c| c.operations.is_none()));
}
