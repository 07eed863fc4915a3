//! Survey file text -> `SurveyFile::from_json` (JSON, schema version check, the model). A file
//! it accepts must write back to text that reads as the same survey, and must survive what the
//! command line does next with a survey it read: merge it as a shard, and rank it under the
//! shipped criteria. Replay test: crates/survey/tests/fuzz_regressions.rs (reading and merging;
//! the ranking step is replayed in crates/siting/tests/fuzz_regressions.rs).
#![no_main]

use libfuzzer_sys::fuzz_target;
use siting::{Criteria, PreparedTable};
use survey::SurveyFile;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let s = match SurveyFile::from_json(text) {
        Ok(s) => s,
        Err(e) => {
            let _ = e.to_string();
            return;
        }
    };
    let again = SurveyFile::from_json(&s.to_json())
        .expect("a survey that was read does not read back after writing");
    assert_eq!(
        again.to_json(),
        s.to_json(),
        "writing a survey that was read is not stable"
    );
    let _ = survey::merge(vec![s.clone()]);
    let criteria = CRITERIA.get_or_init(Criteria::default_reflector);
    if let Ok(table) = PreparedTable::new(&s, criteria) {
        let _ = siting::rank(&table, criteria);
    }
});

static CRITERIA: std::sync::OnceLock<Criteria> = std::sync::OnceLock::new();
