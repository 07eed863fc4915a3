//! Survey file text -> the survey reader, a merge as a shard, and a ranking under the shipped
//! criteria; the steps are in fuzz/steps/survey_read.rs and fuzz/steps/survey_rank.rs,
//! replayed on stable by crates/survey/tests/fuzz_regressions.rs and
//! crates/siting/tests/fuzz_regressions.rs.
#![no_main]

use libfuzzer_sys::fuzz_target;
use siting::Criteria;

#[path = "../steps/survey_read.rs"]
mod read;
#[path = "../steps/survey_rank.rs"]
mod rank;

static CRITERIA: std::sync::OnceLock<Criteria> = std::sync::OnceLock::new();

fuzz_target!(|data: &[u8]| {
    if let Some(s) = read::run(data) {
        rank::run(&s, CRITERIA.get_or_init(Criteria::default_reflector));
    }
});
