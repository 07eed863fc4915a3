//! Replays the survey-file fuzz target's inputs (fuzz/fuzz_targets/survey_read.rs) on stable:
//! the committed seeds in fuzz/corpus/survey_read/ and every input that once failed, kept in
//! tests/fuzz-regressions/survey_read/. Each must read or give a typed error, never panic; a
//! survey that reads must write back to the same text and merge (as a shard) without panic.
//! The target's ranking step is replayed in crates/siting/tests/fuzz_regressions.rs.

use std::path::Path;

use survey::SurveyFile;

#[path = "../../../tests/fuzz-regressions/inputs.rs"]
mod replay;
use replay::inputs;

#[path = "../../../fuzz/steps/survey_read.rs"]
mod steps;

#[test]
fn survey_fuzz_inputs_read_or_fail_with_a_typed_error() {
    for p in inputs("survey_read") {
        let data = std::fs::read(&p).expect("read input");
        if let Err(panic) = std::panic::catch_unwind(|| {
            steps::run(&data);
        }) {
            panic!(
                "{} panicked: {:?}",
                p.display(),
                panic.downcast_ref::<String>()
            );
        }
    }
}

#[test]
fn the_seed_surveys_are_readable() {
    // Keeps the seeds meaningful: these must still be whole surveys of the current schema.
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../fuzz/corpus/survey_read");
    for name in [
        "one-candidate-with-fit.json",
        "one-candidate-no-fit.json",
        "empty-shard.json",
    ] {
        let text = std::fs::read_to_string(dir.join(name)).expect("seed");
        if let Err(e) = SurveyFile::from_json(&text) {
            panic!("{name}: {e}");
        }
    }
}

#[test]
fn merge_refuses_impossible_shards_built_in_code() {
    // The reader now refuses shard 0/N, so check the merge's own guard on surveys built in
    // code: shard 0 of 3 (found by fuzzing), and 1 of usize::MAX (once a huge allocation).
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../fuzz/corpus/survey_read");
    let base = SurveyFile::from_json(
        &std::fs::read_to_string(dir.join("empty-shard.json")).expect("seed"),
    )
    .expect("seed reads");
    for (index, count) in [(0, 3), (4, 3), (1, usize::MAX)] {
        let mut s = base.clone();
        s.shard = Some(survey::Shard { index, count });
        assert!(
            survey::merge(vec![s]).is_err(),
            "shard {index}/{count} merged"
        );
    }
    let mut whole = base.clone();
    whole.shard = Some(survey::Shard { index: 1, count: 1 });
    assert!(survey::merge(vec![whole]).is_ok());
}
