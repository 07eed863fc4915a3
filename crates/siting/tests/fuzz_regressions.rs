//! Replays the criteria fuzz target's inputs (fuzz/fuzz_targets/criteria_parse.rs) on stable:
//! the committed seeds in fuzz/corpus/criteria_parse/ and every input that once failed, kept
//! in tests/fuzz-regressions/criteria_parse/. Each must give criteria or a typed error, never a
//! panic, and accepted criteria must keep the target's promises. The survey fuzz target's
//! ranking step is replayed here too (the survey crate cannot depend on siting).


use siting::{Criteria, PreparedTable};
use survey::SurveyFile;

#[path = "../../../tests/fuzz-regressions/inputs.rs"]
mod replay;
use replay::inputs;

/// The criteria_parse target's steps.
fn criteria_steps(data: &[u8]) {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let c = match Criteria::parse(text) {
        Ok(c) => c,
        Err(e) => {
            let _ = e.to_string();
            return;
        }
    };
    c.validate()
        .expect("parse accepted criteria that validate refuses");
    let again = Criteria::parse(&c.to_toml())
        .expect("canonical text of accepted criteria does not read back");
    assert_eq!(again, c, "canonical text reads back as other criteria");
    assert!(c
        .normalised_weights()
        .iter()
        .all(|w| w.is_finite() && *w >= 0.0));
    for s in &c.criteria {
        for v in [
            s.worst,
            s.ideal,
            0.5 * s.worst + 0.5 * s.ideal,
            0.0,
            f64::MIN,
            f64::MAX,
            f64::NAN,
        ] {
            let u = siting::utility::utility(s, Some(v));
            assert!((0.0..=1.0).contains(&u), "utility {u} outside [0, 1]");
        }
    }
}

#[test]
fn criteria_fuzz_inputs_parse_or_fail_with_a_typed_error() {
    for p in inputs("criteria_parse") {
        let data = std::fs::read(&p).expect("read input");
        if let Err(panic) = std::panic::catch_unwind(|| criteria_steps(&data)) {
            panic!(
                "{} panicked: {:?}",
                p.display(),
                panic.downcast_ref::<String>()
            );
        }
    }
}

#[test]
fn survey_fuzz_inputs_rank_under_the_shipped_criteria_or_fail_with_a_typed_error() {
    let criteria = Criteria::default_reflector();
    for p in inputs("survey_read") {
        let Ok(s) = SurveyFile::from_json(&String::from_utf8_lossy(
            &std::fs::read(&p).expect("read input"),
        )) else {
            continue;
        };
        let result = std::panic::catch_unwind(|| {
            if let Ok(table) = PreparedTable::new(&s, &criteria) {
                let _ = siting::rank(&table, &criteria);
            }
        });
        if let Err(panic) = result {
            panic!(
                "{} panicked in ranking: {:?}",
                p.display(),
                panic.downcast_ref::<String>()
            );
        }
    }
}
