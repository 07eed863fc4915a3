//! Criteria file text -> the criteria parser; the steps are in fuzz/steps/criteria_parse.rs,
//! replayed on stable by crates/siting/tests/fuzz_regressions.rs.
#![no_main]

use libfuzzer_sys::fuzz_target;

#[path = "../steps/criteria_parse.rs"]
mod steps;

fuzz_target!(|data: &[u8]| steps::run(data));
