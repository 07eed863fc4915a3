//! The survey_read target's last step, shared by the fuzz target
//! (fuzz/fuzz_targets/survey_read.rs) and its replay in crates/siting/tests/fuzz_regressions.rs
//! (the survey crate cannot depend on siting): a survey that was read is ranked under the
//! shipped criteria, as the command line would, without panicking.

use siting::{Criteria, PreparedTable};
use survey::SurveyFile;

pub fn run(s: &SurveyFile, criteria: &Criteria) {
    if let Ok(table) = PreparedTable::new(s, criteria) {
        let _ = siting::rank(&table, criteria);
    }
}
