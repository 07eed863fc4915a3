//! Combine the partial surveys of all shards into the survey one machine would have written.

use crate::model::{Candidate, SurveyFile};
use crate::run::{into_candidates, Found};
use crate::SurveyError;

/// Merge shard outputs. They must come from the same input and parameters and cover shards
/// 1..N exactly once. Tiles are disjoint across shards and each crater belongs to one tile, so
/// the union re-sorted and renumbered equals a single-machine run.
pub fn merge(parts: Vec<SurveyFile>) -> Result<SurveyFile, SurveyError> {
    let first = parts.first().ok_or_else(|| SurveyError::Parameters("nothing to merge".into()))?;
    let count = first.shard.map(|s| s.count).ok_or_else(|| SurveyError::Parameters("the first file is a whole survey, not a shard".into()))?;
    let mut seen = vec![false; count];
    for p in &parts {
        if p.input.sha256 != first.input.sha256 || p.parameters != first.parameters {
            return Err(SurveyError::Parameters(format!(
                "shard files disagree: {} was surveyed from another input or with other parameters",
                p.shard.map(|s| format!("shard {}/{}", s.index, s.count)).unwrap_or_else(|| "a whole survey".into())
            )));
        }
        let s = p.shard.filter(|s| s.count == count).ok_or_else(|| SurveyError::Parameters(format!("every file must be a shard of {count}")))?;
        if std::mem::replace(&mut seen[s.index - 1], true) {
            return Err(SurveyError::Parameters(format!("shard {}/{count} is given twice", s.index)));
        }
    }
    if let Some(missing) = seen.iter().position(|s| !s) {
        return Err(SurveyError::Parameters(format!("shard {}/{count} is missing", missing + 1)));
    }
    let mut merged = parts[0].clone();
    merged.shard = None;
    merged.candidates = into_candidates(
        parts
            .into_iter()
            .flat_map(|p| p.candidates)
            .map(|c: Candidate| Found { source: c.source, crater: c.crater, visibility: c.visibility, fit: c.fit })
            .collect(),
    );
    Ok(merged)
}
