//! Replays the criteria fuzz target's inputs (fuzz/fuzz_targets/criteria_parse.rs) on stable:
//! the committed seeds in fuzz/corpus/criteria_parse/ and every input that once failed, kept
//! in tests/fuzz-regressions/criteria_parse/. Each must give criteria or a typed error, never a
//! panic, and accepted criteria must keep the target's promises. The survey fuzz target's
//! ranking step is replayed here too (the survey crate cannot depend on siting).

use siting::Criteria;
use survey::SurveyFile;

#[path = "../../../tests/fuzz-regressions/inputs.rs"]
mod replay;
use replay::inputs;

#[path = "../../../fuzz/steps/criteria_parse.rs"]
mod criteria_steps;
#[path = "../../../fuzz/steps/survey_rank.rs"]
mod rank_steps;

#[test]
fn criteria_fuzz_inputs_parse_or_fail_with_a_typed_error() {
    for p in inputs("criteria_parse") {
        let data = std::fs::read(&p).expect("read input");
        if let Err(panic) = std::panic::catch_unwind(|| criteria_steps::run(&data)) {
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
        let result = std::panic::catch_unwind(|| rank_steps::run(&s, &criteria));
        if let Err(panic) = result {
            panic!(
                "{} panicked in ranking: {:?}",
                p.display(),
                panic.downcast_ref::<String>()
            );
        }
    }
}
