//! Crater catalogue bytes -> the CSV catalogue reader; the steps are in
//! fuzz/steps/catalogue_read.rs, replayed on stable by crates/craters/tests/fuzz_regressions.rs.
#![no_main]

use libfuzzer_sys::fuzz_target;

#[path = "../steps/catalogue_read.rs"]
mod steps;

fuzz_target!(|data: &[u8]| steps::run(data));
