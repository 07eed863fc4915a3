//! The survey_read target's steps up to the ranking, shared by the fuzz target
//! (fuzz/fuzz_targets/survey_read.rs) and its replay test on stable
//! (crates/survey/tests/fuzz_regressions.rs), both through `#[path]`. The ranking step is
//! fuzz/steps/survey_rank.rs.
//!
//! Survey file text -> `SurveyFile::from_json` (JSON, schema version check, the model). A file
//! it accepts must write back to text that reads as the same survey, and merge as a shard.

use survey::SurveyFile;

/// The survey, when the text reads as one.
pub fn run(data: &[u8]) -> Option<SurveyFile> {
    let text = std::str::from_utf8(data).ok()?;
    let s = match SurveyFile::from_json(text) {
        Ok(s) => s,
        Err(e) => {
            let _ = e.to_string();
            return None;
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
    Some(s)
}
