//! Combine the partial surveys of all shards into the survey one machine would have written.

use crate::model::{Candidate, SurveyFile};
use crate::run::{into_candidates, Found};
use crate::SurveyError;

/// Merge shard outputs. They must come from the same input and parameters and cover shards
/// 1..N exactly once. Tiles are disjoint across shards and each crater belongs to one tile, so
/// the union re-sorted and renumbered equals a single-machine run.
pub fn merge(parts: Vec<SurveyFile>) -> Result<SurveyFile, SurveyError> {
    let first = parts
        .first()
        .ok_or_else(|| SurveyError::Parameters("nothing to merge".into()))?;
    let count = first.shard.map(|s| s.count).ok_or_else(|| {
        SurveyError::Parameters("the first file is a whole survey, not a shard".into())
    })?;
    // Indices seen so far: a set, not a flag per shard, so a file claiming to be one of
    // 10^18 shards costs nothing.
    let mut seen = std::collections::BTreeSet::new();
    for p in &parts {
        if p.input.sha256 != first.input.sha256 || p.parameters != first.parameters {
            return Err(SurveyError::Parameters(format!(
                "shard files disagree: {} was surveyed from another input or with other parameters",
                p.shard
                    .map(|s| format!("shard {}/{}", s.index, s.count))
                    .unwrap_or_else(|| "a whole survey".into())
            )));
        }
        let s = p.shard.filter(|s| s.count == count).ok_or_else(|| {
            SurveyError::Parameters(format!("every file must be a shard of {count}"))
        })?;
        s.validate()?;
        if !seen.insert(s.index) {
            return Err(SurveyError::Parameters(format!(
                "shard {}/{count} is given twice",
                s.index
            )));
        }
    }
    // Every index lies in 1..=count and none repeats, so some index up to parts.len() + 1 is
    // missing unless all are present.
    if let Some(missing) = (1..=count).find(|k| !seen.contains(k)) {
        return Err(SurveyError::Parameters(format!(
            "shard {missing}/{count} is missing"
        )));
    }
    let mut merged = parts[0].clone();
    merged.shard = None;
    merged.candidates = into_candidates(
        parts
            .into_iter()
            .flat_map(|p| p.candidates)
            .map(|c: Candidate| Found {
                source: c.source,
                crater: c.crater,
                visibility: c.visibility,
                fit: c.fit,
                operations: c.operations,
            })
            .collect(),
    );
    Ok(merged)
}
